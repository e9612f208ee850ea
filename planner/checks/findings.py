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
from planner.checks.finding import Finding, ordered
from planner.transfer.plan import Plan
# re-exported: the checks' public names stay importable from ``planner.checks.findings``
from planner.checks.finding import (SEVERITIES, SEVERITY_RANK, count_by_severity, standing_caution,  # noqa: F401
                                    worst_severity)
from planner.checks.one_line import assess_line  # noqa: F401
from planner.checks.line_checks import (PRODUCT_FAR_ABOVE_MAX_K, LineRun, line_poor_heat, line_pressures,  # noqa: F401
                                        line_product, line_regime, line_surfaces, product_hottest)
from planner.checks.plan_checks import (check_calibration, check_destination, check_flow_regime,  # noqa: F401
                                        check_npsh, check_operating_point, check_pressures,
                                        check_product_temperature, check_startup, check_stops, check_surfaces,
                                        check_times, check_tracing_capacity, check_validity)
from planner.checks.validity import (GNIELINSKI_PR_MAX, SIEDER_TATE_PR_MAX, film_correlation_range,  # noqa: F401
                                     film_viscosity_ratio, viscosity_range)

CHECKS = (check_operating_point, check_npsh, check_surfaces, check_pressures, check_product_temperature,
          check_flow_regime, check_validity, check_tracing_capacity, check_times, check_calibration, check_ranges)


def assess(plan: Plan) -> list[Finding]:
    """All findings of a plan, most severe first; the standing caution is always last."""
    found: list[Finding] = []
    for check in CHECKS:
        found.extend(check(plan))
    return ordered(found)
