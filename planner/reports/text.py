"""Plain-text tables and JSON documents of results, for the command line."""

from __future__ import annotations

import numpy as np

from planner.checks.caution import STANDING_CAUTION  # noqa: F401  (re-exported: reports show it)
from planner.checks.finding import worst_severity
from planner.line.march import MarchResult
from planner.plain import finite_or_none
from planner.reports.findings_text import findings_json, findings_lines, headline
from planner.scenario.schema import Scenario
from planner.scenario.units import si_unit_text
from planner.scenario.wording import Q, Sentence, format_quantity, render

# the kinds of the numbers a march document carries (their SI units head the document)
MARCH_KINDS = ("temperature", "pressure", "length", "volume_flow", "mass_flow", "power", "dynamic_viscosity")


def segment_rows(result: MarchResult, line_segments) -> list[dict]:
    """Per-segment figures at each segment's outlet (SI)."""
    rows = []
    if not result.nodes:
        return rows
    x = result.nodes["x"]
    steps = result.steps
    for seg in line_segments:
        inside = (steps["segment"] == seg.index)
        if not inside.any():
            break
        end = min(int(np.searchsorted(x, seg.x_end - 1e-9)), len(x) - 1)
        rows.append({
            "segment": seg.name,
            "x_end_m": float(x[end]),
            "outlet_temperature_k": float(result.nodes["temperature"][end]),
            "pressure_pa": float(result.nodes["pressure"][end]),
            "max_viscosity_pa_s": float(steps["viscosity"][inside].max()),
            "min_reynolds": float(steps["reynolds"][inside].min()),
            "max_jacket_temperature_k": result.jacket_peak(seg.index, float(steps["jacket_temperature"][inside].max()),
                                                           0.0)[0],
            "max_sheath_temperature_k": float(steps["sheath_temperature"][inside].max()),
            "heat_loss_w": float((steps["heat_loss"][inside]).sum() * seg.length / inside.sum()),
            "trace_power_w": float((steps["trace_power"][inside]).sum() * seg.length / inside.sum()),
        })
    return rows


def march_json(scenario: Scenario, result: MarchResult, profiles: bool = False, line_segments=None,
               findings: list | None = None) -> dict:
    from planner.line.model import line_from_scenario

    segments = line_segments or line_from_scenario(scenario).segments
    doc = {
        "scenario": scenario.name,
        "units": "SI: " + ", ".join(si_unit_text(k) + (" (gauge)" if k == "pressure" else "") for k in MARCH_KINDS),
        "summary": {k: finite_or_none(v) for k, v in result.summary.as_dict().items()},
        "segments": segment_rows(result, segments),
        "caution": STANDING_CAUTION,
    }
    if findings is not None:
        doc["worst_severity"] = worst_severity(findings)
        doc["headline"] = headline(findings)
        doc["findings"] = findings_json(findings)
    if profiles:
        doc["profiles"] = {
            "nodes": {k: v.tolist() for k, v in result.nodes.items()},
            "steps": {k: v.tolist() for k, v in result.steps.items()},
            "entrance_jackets": [{"x_m": x, "jacket_temperature_k": t} for x, t in sorted(result.entrance_jackets.values())],
        }
    return doc


def _summary_lines(scenario: Scenario, result: MarchResult, system: str) -> list[str]:
    s = result.summary
    q = lambda value, kind, decimals=None: format_quantity(value, kind, system, decimals)  # noqa: E731
    rate_digits = 2 if system == "SI" else 0        # kg/s and kW; lb/h and BTU/h
    lines = [f"  flow                 {q(s.flow_m3_s, 'volume_flow', 2)}   "
             f"({q(s.mass_flow_kg_s, 'mass_flow', rate_digits)})",
             f"  inlet temperature    {q(s.inlet_temperature_k, 'temperature', 2)}"]
    if s.status == "product_sets":
        lines.append(render(Sentence("  PRODUCT SETS at {x}: it falls below its no-flow temperature ({t}); figures "
                                     "below stop there", x=Q(s.sets_at_m, "length"),
                                     t=Q(scenario.product.no_flow_temperature, "temperature")), system))
    lines += [
        f"  outlet temperature   {q(s.outlet_temperature_k, 'temperature', 2)}",
        f"  min / max bulk       {q(s.min_bulk_temperature_k, 'temperature', 2)} / {q(s.max_bulk_temperature_k, 'temperature', 2)}",
        f"  pressure drop        {q(s.pressure_drop_pa, 'pressure', 3)}",
        f"    friction           {q(s.friction_drop_pa, 'pressure', 3)}",
        f"    fittings           {q(s.fittings_drop_pa, 'pressure', 3)}",
        f"    static head        {q(s.static_drop_pa, 'pressure', 3)}",
        f"  viscosity range      {q(s.min_viscosity_pa_s, 'dynamic_viscosity', 1)} – {q(s.max_viscosity_pa_s, 'dynamic_viscosity', 1)}"
        + ("   (law extrapolated beyond its lab points)" if s.viscosity_extrapolated else ""),
        f"  laminar share        {s.laminar_fraction * 100:.0f} %",
        f"  hottest jacket       {q(s.max_jacket_temperature_k, 'temperature')} at {q(s.max_jacket_at_m, 'length')}",
        f"  hottest heater       {q(s.max_sheath_temperature_k, 'temperature')} at {q(s.max_sheath_at_m, 'length')}",
        f"  trace power          {q(s.trace_power_w, 'heat_rate', rate_digits)}",
        f"  heat lost            {q(s.heat_loss_w, 'heat_rate', rate_digits)}",
        f"  viscous heating      {q(s.viscous_heating_w, 'heat_rate', rate_digits)}",
    ]
    return lines


def march_table(scenario: Scenario, result: MarchResult, system: str = "SI", findings: list | None = None) -> str:
    """The march in words and a table by segment, in ``system``; with ``findings``, the first line is the
    worst of them and they follow grouped by severity."""
    from planner.line.model import line_from_scenario
    from planner.scenario.units import unit_label

    segments = line_from_scenario(scenario).segments
    lines = [] if findings is None else [headline(findings, system), ""]
    lines += [f"{scenario.name}", ""]
    if findings is not None:
        lines += findings_lines(findings, system) + [""]
    lines += _summary_lines(scenario, result, system)
    lines.append("")
    u = lambda kind: unit_label(kind, system)  # noqa: E731
    lines.append(f"  {'segment':32s} {'end ' + u('length'):>7s} {'T out ' + u('temperature'):>9s} "
                 f"{'p ' + u('pressure'):>8s} {'max ' + u('dynamic_viscosity'):>10s} {'min Re':>8s} "
                 f"{'jacket ' + u('temperature'):>10s}")
    for row in segment_rows(result, segments):
        cells = [format_quantity(row[key], kind, system, digits).rsplit(" ", 1)[0] for key, kind, digits in (
            ("x_end_m", "length", 0), ("outlet_temperature_k", "temperature", 2), ("pressure_pa", "pressure", 3),
            ("max_viscosity_pa_s", "dynamic_viscosity", 1))]
        jacket = format_quantity(row["max_jacket_temperature_k"], "temperature", system, 1).rsplit(" ", 1)[0]
        lines.append(f"  {row['segment'][:32]:32s} {cells[0]:>7s} {cells[1]:>9s} {cells[2]:>8s} {cells[3]:>10s} "
                     f"{row['min_reynolds']:8.1f} {jacket:>10s}")
    lines.append("")
    lines.append("  pressures are gauge relative to the route inlet pressure; " + STANDING_CAUTION)
    return "\n".join(lines)
