"""A calibration fit as JSON (SI; its warnings also rendered in each unit system) and as a plain-text
table for the command line in either unit system."""

from __future__ import annotations

import math

from planner.calibration.fit import RESIDUAL_KINDS, FitResult
from planner.calibration.log import TransferLog
from planner.plain import plain as _finite   # the package's one NaN-to-None helper
from planner.scenario.wording import SYSTEMS, format_quantity, render

LABELS = {"discharge_pressure": "discharge pressure", "suction_pressure": "suction pressure",
          "pump_inlet_temperature": "pump inlet temperature", "outlet_temperature": "outlet temperature",
          "flow": "flow (PD pump at logged speed)"}


def log_json(log: TransferLog) -> dict:
    return {
        "file": log.name, "sha256": log.sha256, "rows": log.rows_total, "rows_read": log.rows,
        "rows_unreadable": len(log.problems), "unreadable": log.problem_summary(),
        "rows_pump_stopped": log.stopped_rows,
        "blank_cells": log.blanks, "ignored_columns": log.ignored_headers,
        "columns": {q: c.header for q, c in log.columns.items()}, "start": log.start,
        "duration_s": float(log.values["time"][-1]),
    }


def fit_json(result: FitResult) -> dict:
    """Keys: factors.<name>.value/.low/.high (95 %), residuals.<quantity>.rms [SI], correlation, warnings."""
    return {
        "scenario": result.scenario.name,
        "log": log_json(result.log),
        "factors": {n: {"value": f.value, "low": f.low, "high": f.high, "standard_error": f.standard_error,
                        "identifiable": f.identifiable, "at_bound": f.at_bound} for n, f in result.factors.items()},
        "correlation": result.correlation,
        "residuals": {q: {k: _finite(v) if k != "unit" else v for k, v in row.items()}
                      for q, row in result.residuals.items()},
        "mismatch": result.mismatch,
        "rows_where_product_sets": result.rows_set,
        "replays": result.evaluations,
        "degrees_of_freedom": result.degrees_of_freedom,
        "warnings": [render(w, "SI") for w in result.warnings],
        "warnings_by_system": {system: [render(w, system) for w in result.warnings] for system in SYSTEMS},
        "notes": [render(n, "SI") for n in result.notes],
    }


def _in_units(quantity: str, value: float, system: str = "SI") -> str:
    if value is None or not math.isfinite(value):
        return "—"
    kind, digits = RESIDUAL_KINDS[quantity]
    return format_quantity(value, kind, system, digits)


def log_lines(log: TransferLog) -> list[str]:
    lines = [f"log {log.name} (SHA-256 {log.sha256[:16]}…): {log.rows} of {log.rows_total} rows read, "
             + format_quantity(log.values['time'][-1], 'time') + (f" from {log.start}" if log.start else "")]
    if log.problems:
        lines.append(f"  {len(log.problems)} rows could not be read:")
        for group in log.problem_summary():
            where = ", ".join(str(n) for n in group["lines"]) + (" …" if group["count"] > len(group["lines"]) else "")
            lines.append(f"    {group['count']:4d} × {group['reason']} (line {where})")
    if log.stopped_rows:
        lines.append(f"  {log.stopped_rows} rows with flow 0 (pump stopped): counted for the volumes moved, not replayed")
    for quantity, count in log.blanks.items():
        lines.append(f"  {quantity}: {count} blank cells (not compared there)")
    if log.ignored_headers:
        lines.append(f"  columns not used: {', '.join(log.ignored_headers)}")
    return lines


def fit_text(result: FitResult, system: str = "SI") -> str:
    lines = [f"Calibration of {result.scenario.name}", *log_lines(result.log), ""]
    lines.append(f"  {'factor':18s} {'value':>8s}   95 % interval")
    for name, f in result.factors.items():
        note = "" if f.identifiable else "   (not identifiable from this log)"
        lines.append(f"  {name:18s} {f.value:8.4f}   {f.low:.4f} – {f.high:.4f}{note}")
    for pair, r in result.correlation.items():
        lines.append(f"  correlation {pair}: {r:+.2f}")
    lines += ["", f"  {'residual':32s} {'RMS':>12s} {'log noise':>12s} {'bias':>12s} {'rows':>5s}"]
    for q, row in result.residuals.items():
        lines.append(f"  {LABELS[q]:32s} {_in_units(q, row['rms'], system):>12s} "
                     f"{_in_units(q, row['noise'], system):>12s} {_in_units(q, row['bias'], system):>12s} "
                     f"{row['count']:5d}")
    lines.append(f"  ({result.evaluations} replays of the log; residual = logged - modelled)")
    lines += [f"  note: {render(n, system)}" for n in result.notes]
    if result.warnings:
        lines += ["", "Warnings:"] + [f"  - {render(w, system)}" for w in result.warnings]
    return "\n".join(lines)
