"""The operating envelope: for each ambient, the lowest lever value that finishes within the window.

A grid of full plans, ambients x lever values (setpoints, steam pressures, pump speeds or flow limits,
``planner.checks.lever_values.LEVERS``).  Each cell is one comparison row (``compare.plan_row``) at the
ambient: every ambient of the scenario (the site's, its design ambient, a segment's own) is shifted by
the ambient asked minus the site's, as the comparison's sensitivity shifts them.  A cell *fits* when its
plan has a total time, no stop-level finding and a total time within ``schedule.planned_window``.  The
envelope line is, per ambient, the lowest value whose cell fits (None where none does): the card an
operator reads to pick a setpoint without a computer.
"""

from __future__ import annotations

import csv
import io
import math
from concurrent.futures import Executor
from dataclasses import dataclass

from planner.checks.lever_values import LEVERS, ValuesError, check_values
from planner.errors import ScenarioError
from planner.plain import plain
from planner.scenario.schema import Scenario
from planner.scenario.wording import format_quantity
from planner.checks.lever_values import lever_decimals
from planner.sweeps.compare import check_lever, plan_row
from planner.sweeps.executors import fan_out

CELL_FIELDS = ("ambient_k", "value", "total_time_s", "fits", "has_stop", "worst_severity", "stop_codes", "error")
SEVERITY_MARKS = {"info": "ok", "caution": "caut", "warning": "warn", "stop": "STOP"}


@dataclass
class Envelope:
    scenario: str             # the scenario's name
    lever: str
    quantity: str             # kind of the lever's values
    values: list[float]       # SI, in the order given
    ambients: list[float]     # K, in the order given
    window_s: float           # schedule.planned_window
    cells: list[list[dict]]   # [ambient][value], each with CELL_FIELDS

    @property
    def line(self) -> list[float | None]:
        """Per ambient, the lowest lever value whose cell fits; None where no value fits."""
        return [min((c["value"] for c in row if c["fits"]), default=None) for row in self.cells]


def cell_of(row: dict, ambient_k: float, window_s: float) -> dict:
    """The envelope's cell from a comparison row at ``ambient_k`` (plain data: no findings list)."""
    total = row.get("total_time_s") if row.get("ok") else None
    has_stop = bool(row.get("has_stop", True))
    fits = total is not None and math.isfinite(total) and not has_stop and total <= window_s
    return {"ambient_k": ambient_k, "value": row["value"], "total_time_s": total, "fits": fits, "has_stop": has_stop,
            "worst_severity": row.get("worst_severity", "stop"), "stop_codes": list(row.get("stop_codes", [])),
            "error": row.get("error")}


def _cell_task(task: tuple) -> dict:
    """One cell (runs on the executor's worker): ``(scenario, lever, value, ambient_k)``."""
    scenario, lever, value, ambient_k = task
    row = plan_row(scenario, lever, value, 1.0, ambient_k - scenario.site.ambient_temperature)
    return cell_of(row, ambient_k, scenario.schedule.planned_window)


class AmbientsError(ValuesError):
    """Ambients an envelope cannot take; ``problems`` name the option."""

    def __init__(self, problems: list[tuple[str, str]]):
        super().__init__(problems)
        self.args = ("the ambients are not valid:\n  " + "\n  ".join(f"{f}: {m}" for f, m in problems),)


def typed_ambients(scenario: Scenario, numbers: list[float], system: str, option: str) -> list[float]:
    """Ambients [K] from ``numbers`` in ``system``'s temperature unit (°C or °F), each checked (``check_ambients``)
    with the site's limit said in that unit; AmbientsError naming ``option`` otherwise."""
    from planner.scenario.units import UNIT_SYSTEMS, to_si_from_display

    unit = UNIT_SYSTEMS[system]["temperature"]
    ambients = [to_si_from_display(n, "temperature", system) for n in numbers]
    check_ambients(scenario, ambients, option, [f"{n:g} {unit.label}" for n in numbers],
                   [f"{n!r} {unit.pint_unit}" for n in numbers])
    return ambients


def check_ambients(scenario: Scenario, ambients: list[float], option: str = "--ambient",
                   shown: list[str] | None = None, typed: list[str] | None = None) -> None:
    """Refuse ambients [K] that repeat or that the scenario's ambient fields refuse once shifted to them;
    ``shown``: each as typed, for the message; ``typed``: with its pint unit ("-95.0 degC"), so that the site's
    limit is said in the unit typed."""
    from pydantic import ValidationError

    from planner.scenario.schema import problems_from
    from planner.transfer.changes import with_changes

    problems = []
    for i, ambient in enumerate(ambients):
        words = f"ambient {i + 1} ({shown[i] if shown else format_quantity(ambient, 'temperature')})"
        if not math.isfinite(ambient):
            problems.append((option, f"{words} is not a finite number"))
            continue
        if any(abs(a - ambient) < 1e-9 for a in ambients[:i]):
            problems.append((option, f"{words} repeats an earlier ambient: give each ambient once"))
            continue
        try:
            if typed:                  # the site's own field, in the unit typed
                scenario.site.model_copy().ambient_temperature = typed[i]
            with_changes(scenario, ambient_shift=ambient - scenario.site.ambient_temperature)
        except ValidationError as exc:
            problems += [(option, f"{words}: site.{path}: {message}") for path, message in problems_from(exc)]
        except ScenarioError as exc:
            problems += [(option, f"{words}: {path + ': ' if path else ''}{message}") for path, message in exc.problems]
    if problems:
        raise AmbientsError(problems[:10])


def envelope(scenario: Scenario, lever: str, values: list[float], ambients: list[float],
             executor: Executor | None = None, progress=None) -> Envelope:
    """The envelope of ``values`` (SI) of ``lever`` at each of ``ambients`` [K], the cells run on
    ``executor`` (the caller's; None: in this process).  Refused before any plan runs: a lever the
    scenario lacks, values or ambients its fields refuse, work past the budget (``--ambient`` named)."""
    from planner.scenario.budget import BudgetError, envelope_problems

    check_lever(scenario, lever)
    if not values or not ambients:
        raise ValuesError([("--ambient" if not ambients else "values", "give at least one value")])
    problems = envelope_problems(scenario, len(ambients), len(values))
    if problems:
        raise BudgetError(problems)
    check_values(scenario, lever, values)
    check_ambients(scenario, ambients)
    tasks = [(scenario, lever, v, a) for a in ambients for v in values]
    flat = fan_out(_cell_task, tasks, executor, progress)
    n = len(values)
    cells = [flat[i * n:(i + 1) * n] for i in range(len(ambients))]
    return Envelope(scenario.name, lever, LEVERS[lever].kind, list(values), list(ambients),
                    scenario.schedule.planned_window, cells)


def envelope_json(result: Envelope) -> dict:
    """Every cell and the envelope line, SI (K, s, the lever's SI unit)."""
    return plain({
        "scenario": result.scenario, "lever": result.lever, "quantity": result.quantity,
        "unit": LEVERS[result.lever].si_unit, "values": result.values, "ambients_k": result.ambients,
        "planned_window_s": result.window_s, "cells": [c for row in result.cells for c in row],
        "envelope": [{"ambient_k": a, "value": v} for a, v in zip(result.ambients, result.line)],
    })


def envelope_from_json(data: dict) -> Envelope:
    """The envelope back from ``envelope_json`` (e.g. the dashboard's worker's answer)."""
    n = len(data["values"])
    cells = [data["cells"][i * n:(i + 1) * n] for i in range(len(data["ambients_k"]))]
    return Envelope(data["scenario"], data["lever"], data["quantity"], list(data["values"]), list(data["ambients_k"]),
                    data["planned_window_s"], cells)


def envelope_csv(result: Envelope) -> str:
    """One line per cell, SI: the ambient [K], the lever and its value [its SI unit], the cell's figures."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(["ambient_k", "lever", "value", "unit", "total_time_s", "fits_window", "has_stop",
                     "worst_severity", "stop_codes", "error", "envelope_value"])
    unit = LEVERS[result.lever].si_unit
    number = lambda x: "" if x is None else f"{x:.12g}"  # noqa: E731  (12 digits: no float noise like 253.14999999999998)
    for row, line_value in zip(result.cells, result.line):
        for c in row:
            writer.writerow([number(c["ambient_k"]), result.lever, number(c["value"]), unit, number(c["total_time_s"]),
                             c["fits"], c["has_stop"], c["worst_severity"], " ".join(c["stop_codes"]), c["error"] or "",
                             number(line_value)])
    return out.getvalue()


def _cell_text(cell: dict, system: str) -> str:
    hours = "—" if cell["total_time_s"] is None else format_quantity(cell["total_time_s"], "time", system, 1)
    mark = "*" if cell["fits"] else " "
    return f"{mark}{hours} {SEVERITY_MARKS.get(cell['worst_severity'], cell['worst_severity'])}"


def envelope_table(result: Envelope, system: str = "SI") -> str:
    """Ambients (rows) x lever values (columns): each cell the total time and the worst severity, ``*`` where
    it fits the window; then the envelope line."""
    from planner.scenario.units import unit_label

    decimals = lever_decimals(result.quantity, result.values, system=system)
    value_text = lambda v: format_quantity(v, result.quantity, system, decimals).rsplit(" ", 1)[0]  # noqa: E731
    ambient_text = lambda a: format_quantity(a, "temperature", system, 1).rsplit(" ", 1)[0]  # noqa: E731
    texts = [[_cell_text(c, system) for c in row] for row in result.cells]
    width = max([len(t) for row in texts for t in row] + [len(value_text(v)) for v in result.values]) + 2
    head = f"{'ambient':>8} {unit_label('temperature', system):<3}|" + "".join(
        f"{value_text(v):>{width}}" for v in result.values)
    lines = [f"  {result.lever} [{unit_label(result.quantity, system)}] across; each cell: total time, worst "
             f"severity; * finishes within the planned window "
             f"({format_quantity(result.window_s, 'time', system, 1)}) with no stop", head, "-" * len(head)]
    for ambient, row in zip(result.ambients, texts):
        lines.append(f"{ambient_text(ambient):>12}|" + "".join(f"{t:>{width}}" for t in row))
    lines += ["", f"  envelope: the lowest {result.lever} that finishes within the window with no stop"]
    for ambient, value in zip(result.ambients, result.line):
        shown = ("none of the values given: raise the range or lengthen the window" if value is None
                 else format_quantity(value, result.quantity, system, decimals))
        lines.append(f"    at {format_quantity(ambient, 'temperature', system, 1):>9}: {shown}")
    return "\n".join(lines)
