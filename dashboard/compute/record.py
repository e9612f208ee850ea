"""The typed record of one plan as the pages draw it, and the explicit failure in its place.

``PlanResults`` is made in the worker process (``compute/results.plan_results``) from the plan's own objects;
``PlanFailure`` says why there is none (a planner error, problems with their fields, a time limit or a
full pool: ``transient``, not cached).  ``outcome(...)`` is the one place the worker's plain reply becomes
one of the two, so a page asks ``isinstance(x, PlanResults)`` (or ``ok(x)``), never for an ``"error"`` key.
Everything is SI; ``plan`` is the documented plan JSON (``planner.reports.plan_json``, the document of
``python -m planner plan --json``).
"""

from __future__ import annotations

import logging
from dataclasses import dataclass, field
from typing import Union

log = logging.getLogger(__name__)


@dataclass(frozen=True)
class PlanResults:
    scenario_name: str
    plan: dict                          # the plan JSON (SI)
    key_figures: list                   # planner.reports.key_figures.KeyFigure, in the strip's order
    saved: dict                         # planner.reports.saved_figures: what a saved revision keeps
    profile: dict | None                # the march along the discharge line at the start (None: no flow)
    outlet_rating: dict                 # {"value": Pa gauge or None, "where": words}
    touch_limit_k: float                # the scenario's limits.touch_temperature
    segments: list                      # the discharge route's segments (plain dicts)
    suction_segments: list
    push_cold_rows: dict
    findings: list | None               # plain finding dicts (messages render in either unit system)
    findings_note: str                  # why there are no findings, when None
    product: dict                       # the viscosity curve and the product's figures
    destination_max_level: float | None
    tracing_kind: str
    setpoint: float | None
    steam_pressure: float | None
    suction_profiles: dict = field(default_factory=dict)   # compute/line_extras: the suction line's moments
    prewarm_suction: list = field(default_factory=list)    # the pre-warm's suction segments (lumped)
    pump_chart: dict | None = None                         # planner.transfer.pump_chart at the start (SI)


@dataclass(frozen=True)
class PlanFailure:
    error: str                          # in words, for the page
    problems: tuple = field(default_factory=tuple)   # (field path, message) pairs shown beside the inputs
    transient: bool = False             # a time limit or a busy pool: not cached, pressing again retries


Outcome = Union[PlanResults, PlanFailure]


def ok(result) -> bool:
    """A plan to show (not None, not a failure)."""
    return isinstance(result, PlanResults)


def outcome(reply: dict) -> Outcome:
    """The worker's reply to a ``plan`` job (``{"results": PlanResults}`` or ``{"error": ...}``) as the record."""
    if isinstance(reply.get("results"), PlanResults):
        return reply["results"]
    return PlanFailure(str(reply.get("error") or "no plan for these inputs"),
                       tuple(tuple(p) for p in reply.get("problems") or ()), bool(reply.get("transient")))


def failure(exc: BaseException, what: str) -> dict:
    """A worker job's reply for ``exc``: the planner's refusal in its words (with the problems' fields), or
    for anything else a message asking for a report (logged with its traceback, never shown)."""
    from planner.errors import PlannerError, ScenarioError

    if isinstance(exc, ScenarioError):          # e.g. past the work budget, or a plan without [pump]
        return {"error": str(exc), "problems": [list(p) for p in exc.problems]}
    if isinstance(exc, (PlannerError, ValueError, ArithmeticError, RecursionError)):
        return {"error": str(exc)}
    log.exception("%s failed", what)
    return {"error": f"the {what} failed unexpectedly ({type(exc).__name__}: {exc}); "
                     "please report this scenario to the maintainers"}
