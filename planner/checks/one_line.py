"""The checks that apply to one line alone, run together: ``assess_line`` for ``python -m planner evaluate``
(no pump, no vessels, no timeline; so ``evaluate`` loads nothing of ``transfer/``).
"""

from __future__ import annotations

from planner.checks.finding import DISCHARGE, Finding, ordered
from planner.checks.line_checks import (LineRun, _run_hottest, line_poor_heat, line_pressures, line_product,
                                        line_regime, line_surfaces, product_hottest)
from planner.checks.validity import _march_temperatures, film_correlation_range, film_viscosity_ratio, viscosity_range
from planner.line.march import Line, MarchResult
from planner.scenario.schema import Scenario


def assess_line(scenario: Scenario, line: Line, result: MarchResult, name: str = DISCHARGE,
                base_pressure: float | None = None) -> list[Finding]:
    """The checks that apply to one line alone (``python -m planner evaluate``), most severe first, the
    standing caution last: product setting or above its maximum, jacket touch temperature, heater sheath
    against temperature class and exposure rating, pressure against ratings (``result``'s pressures
    plus ``base_pressure``, gauge), velocity and regime, viscosity law and film correlation ranges.

    ``base_pressure`` None: the pressure that pushes this flow through, i.e. ``result``'s pressures (which
    fall from ``operation.inlet_pressure``, 0 by default) raised so that none is below 0 gauge (the outlet at
    least open to the air); before, a line needing 1,357 bar from a 0 bar inlet was checked at pressures
    of 0 down to -1,357 bar and never exceeded a rating."""
    if base_pressure is None:
        pressures = result.nodes["pressure"]
        base_pressure = max(0.0, -float(min(pressures))) if len(pressures) else 0.0
    run = LineRun(name, line, result, base_pressure)
    found = line_product(scenario, run) + product_hottest(scenario, [_run_hottest(run)])
    found += line_surfaces(scenario, run) + line_pressures(run) + line_regime(scenario, run)
    found += line_poor_heat(scenario, run)
    found += viscosity_range(line.product, _march_temperatures([run]))
    found += film_correlation_range(line.product, [run]) + film_viscosity_ratio([run])
    return ordered(found)
