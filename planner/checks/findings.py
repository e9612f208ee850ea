"""Findings: is the plan safe and valid?  One small check per concern.

Each check returns findings with a stable code of our own, a severity (info < caution < warning
< stop), where (line, segment, distance), a plain-words message with the value and the limit, and
what to do.  ``assess(plan)`` runs them all, most severe first; every plan carries the standing
caution.  Limits come from the scenario's ``[limits]`` (defaults: common practice), published
tables (``ratings``: ASME B16.5, IEC 60079-0) and the equipment data in the scenario.

This module runs the checks: those on one line (``line_checks``), the validity checks (``validity``), the
plan checks (``plan_checks``) and the bounds of a finished plan (``bounds``); the record is ``finding``.
Their names stay importable from here (tests, the dashboard, the comparison).
"""

from __future__ import annotations

from planner.checks.bounds import check_ranges
from planner.checks.caution import STANDING_CAUTION
from planner.checks.finding import DISCHARGE, SEVERITIES, SEVERITY_RANK, Finding
from planner.checks.line_checks import _run_hottest
from planner.checks.validity import _march_temperatures
from planner.line.march import Line, MarchResult
from planner.scenario.schema import Scenario
from planner.transfer.plan import Plan
# re-exported: the checks' public names stay importable from ``planner.checks.findings``
from planner.checks.line_checks import (PRODUCT_FAR_ABOVE_MAX_K, LineRun, line_poor_heat, line_pressures,  # noqa: F401
                                        line_product, line_regime, line_surfaces, product_hottest)
from planner.checks.plan_checks import (check_calibration, check_destination, check_flow_regime,  # noqa: F401
                                        check_npsh, check_operating_point, check_pressures,
                                        check_product_temperature, check_startup, check_stops, check_surfaces,
                                        check_times, check_tracing_capacity, check_validity)
from planner.checks.validity import (GNIELINSKI_PR_MAX, SIEDER_TATE_PR_MAX, film_correlation_range,  # noqa: F401
                                     film_viscosity_ratio, viscosity_range)


def assess_line(scenario: Scenario, line: Line, result: MarchResult, name: str = DISCHARGE,
                base_pressure: float = 0.0) -> list[Finding]:
    """The checks that apply to one line alone (``python -m planner evaluate``), most severe first, the
    standing caution last: product setting or above its maximum, jacket touch temperature, heater sheath
    against temperature class and exposure rating, pressure against ratings (``result``'s pressures
    plus ``base_pressure``, gauge), velocity and regime, viscosity law and film correlation ranges."""
    run = LineRun(name, line, result, base_pressure)
    found = line_product(scenario, run) + product_hottest(scenario, [_run_hottest(run)])
    found += line_surfaces(scenario, run) + line_pressures(run) + line_regime(scenario, run)
    found += line_poor_heat(scenario, run)
    found += viscosity_range(line.product, _march_temperatures([run]))
    found += film_correlation_range(line.product, [run]) + film_viscosity_ratio([run])
    return _ordered(found)


def standing_caution() -> Finding:
    return Finding("PLANNING-ESTIMATE", "info", "Planning estimate", STANDING_CAUTION,
                   "Follow site procedures, hazardous-area rules and pressure ratings; ask a licensed engineer.")


CHECKS = (check_operating_point, check_npsh, check_surfaces, check_pressures, check_product_temperature,
          check_flow_regime, check_validity, check_tracing_capacity, check_times, check_calibration, check_ranges)


def _ordered(found: list[Finding]) -> list[Finding]:
    found = sorted(found, key=lambda f: -SEVERITY_RANK[f.severity])
    return found + [standing_caution()]


def assess(plan: Plan) -> list[Finding]:
    """All findings of a plan, most severe first; the standing caution is always last."""
    found: list[Finding] = []
    for check in CHECKS:
        found.extend(check(plan))
    return _ordered(found)


def count_by_severity(findings: list) -> dict[str, int]:
    """Findings (objects or their dicts) counted by severity."""
    counts = {name: 0 for name in SEVERITIES}
    for f in findings:
        counts[f["severity"] if isinstance(f, dict) else f.severity] += 1
    return counts


def worst_severity(findings: list) -> str:
    """The most severe level among the findings (objects or dicts); "info" when there are none."""
    levels = [f["severity"] if isinstance(f, dict) else f.severity for f in findings]
    return max(levels, key=SEVERITY_RANK.__getitem__, default="info")
