"""The work budget: how much computing one request may ask for, estimated before any is done.

Field limits alone do not bound the work (200 segments of 50 km each are all valid fields), so every
request is costed first and refused past the budget with a message that names the field to reduce.
The same budget holds for scenario files, share links, the command line and the dashboard: it is
checked in ``scenario_from_dict`` (every scenario read anywhere), in ``line.model.evaluate`` (the march step) and
in ``compare`` (values x sensitivity cases).

Work is counted in *march steps*.  One pass along the line (the discharge route, plus the suction
route when there is one) costs its counted steps — ``max(2, ceil(length / (step / 4)))`` per
segment for a march whose longest step is ``step`` (25 m a step at the default 100 m) — plus ``PASS_OVERHEAD_STEPS`` for the set-up of the pass and of the operating-point
solve around it.  A plan makes about ``PLAN_PASSES_FIXED + PLAN_PASSES_PER_TIMELINE_STEP x
timeline_steps`` passes (operating point, timeline, both start-ups, hold); those figures are fitted
to counted passes of the demo scenarios at 10 to 1000 timeline steps (68647b7 and after: 1.14-1.37 times the
counted at 10 and 24 steps, up to 1.75 times at 1000, where an increment takes about 2 passes; a plan whose
operating point is hard to find, e.g. with the relief lifting, can take three times the passes).  The march's own steps are adaptive (up to 100 m, finer where the product
changes fast), so the 25 m count is a margin: the demo plans take a tenth to a fifteenth of their
estimate (plans march on the same 100 m grid as single passes), while the hardest generated lines of tests/test_march_grid.py take up to 8 times the count
of one pass (tests/test_budget.py measures both).  A comparison is values x cases plans.  On the project's 2-core machine one step
takes 4-45 us (laminar hot products cost the most), so a plan at the default budget
(``Budget.plan_steps``) takes about 1-15 s of one core; the demos need 8,000-30,000.

The march meters its own steps against its count (``march_step_limit``): a line that is far harder
for the step control than counted is stopped at ``STEP_METER_FACTOR`` times its count (or at the
pass budget) with a message naming the route, so an estimate that is wrong cannot tie up the server.

``PLANNER_WORK_BUDGET`` (environment, a positive factor, default 1) scales every step budget for a
site that wants a tighter or looser server; ``use_budget(Budget(...))`` sets one for a block of code
(tests use it to keep each fuzz case small).
"""

from __future__ import annotations

import contextlib
import contextvars
import math
import os
from dataclasses import dataclass, replace

from planner.errors import ScenarioError

MARCH_STEP_M = 100.0                  # the march's longest step by default [m] (planner.line.march.DEFAULT_STEP_M
                                      # is this one figure: single passes and plans march on the same grid); the
                                      # work is counted at a quarter of it (COUNT_STEPS_PER_MARCH_STEP), the march refines where
                                      # the product changes fast, so smooth lines cost fewer steps than counted
PASS_OVERHEAD_STEPS = 30              # fixed cost of one pass, in march steps (measured on the demos)
PLAN_PASSES_FIXED = 110               # passes of a plan outside the timeline (start, start-ups, hold)
PLAN_PASSES_PER_TIMELINE_STEP = 3.5   # passes per timeline step (operating-point solve per increment)
# with a [weather], the start-up is worked out again at the weather of its coldest moment, at most this many
# times in all (transfer.plan), so the passes outside the timeline count that many times (planner choice)
STARTUP_WEATHER_PASSES = 3
# how long a stop is followed (``transfer/hold.py``; here, light, for the schema's limit of schedule.stop_duration):
# past it the hold says only that the line holds (a 30-day stop whose line set on day 14.2 read "holds 14 days")
HOLD_HORIZON_S = 14 * 86400.0
MIN_TIMELINE_STEPS = 10               # schema's lower limit of schedule.timeline_steps
ENV_FACTOR = "PLANNER_WORK_BUDGET"


@dataclass(frozen=True)
class Budget:
    """Largest work one request may ask for [march steps, see the module docstring]."""

    pass_steps: int = 300_000          # one pass along the line (``evaluate``; any plan's pass)
    plan_steps: int = 300_000          # one plan
    comparison_steps: int = 3_000_000  # one comparison (all values and sensitivity cases)
    comparison_values: int = 101       # values of the lever in one comparison
    calibration_steps: int = 20_000_000   # one calibration fit (log rows x replays x steps a row)
    envelope_steps: int = 10_000_000   # one operating envelope (ambients x lever values plans)
    sweep_steps: int = 100_000_000     # one sweep manifest (all its plans; a batch job, not a page)
    uncertainty_steps: int = 60_000_000   # the odds: samples x (comparison rows) plans; 128 samples of 11
                                          # rows of the demos are 21-40 million
    max_ambient_shift_k: float = 50.0  # sensitivity: ambient shift [K]
    max_viscosity_uncertainty: float = 0.9   # sensitivity: viscosity +- fraction (below 1: stays positive)

    def scaled(self, factor: float) -> "Budget":
        return replace(self, pass_steps=int(self.pass_steps * factor), plan_steps=int(self.plan_steps * factor),
                       comparison_steps=int(self.comparison_steps * factor),
                       calibration_steps=int(self.calibration_steps * factor),
                       envelope_steps=int(self.envelope_steps * factor), sweep_steps=int(self.sweep_steps * factor),
                       uncertainty_steps=int(self.uncertainty_steps * factor))


DEFAULT_BUDGET = Budget()
_ACTIVE: contextvars.ContextVar[Budget | None] = contextvars.ContextVar("planner_work_budget", default=None)


class BudgetError(ScenarioError):
    """A request past the work budget: ``problems`` name the field to reduce and by how much."""

    def __init__(self, problems: list[tuple[str, str]]):
        super().__init__(problems)
        lines = [f"{field}: {message}" if field else message for field, message in problems]
        self.args = ("the request is past the work budget:\n  " + "\n  ".join(lines),)

    def __str__(self) -> str:
        return self.args[0]


def active_budget() -> Budget:
    """The budget in force: ``use_budget``'s, else the default scaled by ``PLANNER_WORK_BUDGET``."""
    chosen = _ACTIVE.get()
    if chosen is not None:
        return chosen
    text = os.environ.get(ENV_FACTOR, "").strip()
    if not text:
        return DEFAULT_BUDGET
    try:
        factor = float(text)
    except ValueError:
        factor = math.nan
    if not (math.isfinite(factor) and 0.0 < factor <= 1000.0):
        raise BudgetError([("", f"environment {ENV_FACTOR}={text!r} must be a factor above 0 and at most 1000")])
    return DEFAULT_BUDGET.scaled(factor)


@contextlib.contextmanager
def use_budget(budget: Budget):
    """Run a block of code under ``budget`` (this thread or task only)."""
    token = _ACTIVE.set(budget)
    try:
        yield budget
    finally:
        _ACTIVE.reset(token)


# ------------------------------------------------------------------------------------------- estimates

def route_steps(route, step: float = MARCH_STEP_M) -> int:
    """Counted march steps of one pass along ``route`` (a ``schema.Route`` or None) for a march whose
    longest step is ``step`` [m] (counted at a quarter of it, as the march's step meter counts)."""
    if route is None:
        return 0
    return march_step_count([seg.length for seg in route.segments], step)


def pass_steps(scenario, step: float = MARCH_STEP_M) -> int:
    """Work of one pass: discharge and suction steps plus the fixed cost of a pass."""
    return route_steps(scenario.route, step) + route_steps(scenario.suction, step) + PASS_OVERHEAD_STEPS


def plan_passes(timeline_steps: int, weather: bool = False) -> int:
    fixed = PLAN_PASSES_FIXED * (STARTUP_WEATHER_PASSES if weather else 1)
    return int(math.ceil(fixed + PLAN_PASSES_PER_TIMELINE_STEP * timeline_steps))


def plan_steps(scenario, step: float = MARCH_STEP_M) -> int:
    """Estimated work of ``make_plan(scenario)`` [march steps]."""
    weather = getattr(scenario, "weather", None) is not None
    return plan_passes(scenario.schedule.timeline_steps, weather) * pass_steps(scenario, step)


def is_plan_scenario(scenario) -> bool:
    return all(getattr(scenario, name) is not None for name in ("pump", "source", "destination"))


# ------------------------------------------------------------------------------------------- the step meter

STEP_METER_FACTOR = 20        # a march may take this many times its count (the hardest measured: 8 times)
STEP_METER_FLOOR = 1_000      # ... and never fewer steps than this (short lines with many thermal entrances)
COUNT_STEPS_PER_MARCH_STEP = 4   # the count is at a quarter of the march's longest step (25 m at its 100 m)


def march_step_count(lengths, step: float) -> int:
    """The estimate's count of one march over segments of ``lengths`` [m] at the march's longest
    ``step`` [m]: ``max(2, ceil(length / (step / 4)))`` each, the 25 m count at the default step and
    finer with a finer march (whose step control then takes proportionally more steps)."""
    grid = step / COUNT_STEPS_PER_MARCH_STEP
    return sum(max(2, int(math.ceil(length / grid - 1e-9))) for length in lengths)


def march_step_limit(count: int, budget: Budget | None = None) -> int:
    """The most steps one march of ``count`` counted steps may take before the meter stops it."""
    budget = budget or active_budget()
    return min(budget.pass_steps, max(STEP_METER_FLOOR, STEP_METER_FACTOR * count))


def past_meter(field: str, steps: int, count: int, where: str, line_text: str) -> BudgetError:
    """The march stopped by its step meter: ``steps`` taken against ``count`` counted, at ``where``."""
    return BudgetError([(field, f"the march along the line stopped at {where} after {steps:,} steps, {steps / count:.0f} "
                                f"times the {count:,} counted for it ({line_text}; the work budget allows a march at most "
                                f"{STEP_METER_FACTOR} times its count, and at most {active_budget().pass_steps:,} steps): "
                                "the product changes too fast along the line for the step control; shorten the route "
                                "or split the plan, or use a longer march step (--step)")])


# ------------------------------------------------------------------------------------------- checks

def _route_text(scenario, step: float) -> str:
    routes = [("route", scenario.route), ("suction", scenario.suction)]
    parts = []
    for name, route in routes:
        if route is not None:
            metres = sum(seg.length for seg in route.segments)
            length = f"{metres / 1000.0:,.1f} km" if metres >= 1000.0 else f"{metres:,.0f} m"
            parts.append(f"{name} {length} in {len(route.segments)} segment(s)")
    return ", ".join(parts) + f", counted at {step / COUNT_STEPS_PER_MARCH_STEP:g} m a step (march step {step:g} m)"


def _route_field(scenario) -> str:
    suction = route_steps(scenario.suction)
    return "suction.segments" if suction > route_steps(scenario.route) else "route.segments"


def pass_problems(scenario, step: float = MARCH_STEP_M, budget: Budget | None = None) -> list[tuple[str, str]]:
    """One pass along the line against the budget (the work of ``evaluate``)."""
    budget = budget or active_budget()
    work = pass_steps(scenario, step)
    if work <= budget.pass_steps:
        return []
    field = "--step" if step < MARCH_STEP_M and pass_steps(scenario) <= budget.pass_steps else _route_field(scenario)
    return [(field, f"one pass along the line is {work:,} march steps ({_route_text(scenario, step)}), past the "
                    f"work budget of {budget.pass_steps:,}: shorten the route, or use a longer march step")]


def plan_problems(scenario, step: float = MARCH_STEP_M, budget: Budget | None = None) -> list[tuple[str, str]]:
    """A whole plan against the budget; empty when it fits."""
    budget = budget or active_budget()
    problems = pass_problems(scenario, step, budget)
    if problems or not is_plan_scenario(scenario):
        return problems
    work = plan_steps(scenario, step)
    if work <= budget.plan_steps:
        return []
    steps = scenario.schedule.timeline_steps
    fewer = budget.plan_steps // pass_steps(scenario, step)
    weather = getattr(scenario, "weather", None) is not None
    most_steps = int((fewer - plan_passes(0, weather)) / PLAN_PASSES_PER_TIMELINE_STEP)
    text = (f"the plan is estimated at {work:,} march steps (about {plan_passes(steps, weather):,} passes along the line "
            f"for {steps} timeline steps, {pass_steps(scenario, step):,} steps each: {_route_text(scenario, step)}), "
            f"past the work budget of {budget.plan_steps:,}")
    if most_steps >= MIN_TIMELINE_STEPS:
        return [("schedule.timeline_steps", text + f": lower schedule.timeline_steps to at most {most_steps}, "
                                                   "or shorten the route")]
    return [(_route_field(scenario), text + ": shorten the route (or plan it in parts)")]


def check_plan(scenario, step: float = MARCH_STEP_M) -> None:
    problems = plan_problems(scenario, step)
    if problems:
        raise BudgetError(problems)


def check_pass(scenario, step: float = MARCH_STEP_M) -> None:
    problems = pass_problems(scenario, step)
    if problems:
        raise BudgetError(problems)


def sensitivity_problems(ambient_shift: float, viscosity_uncertainty: float,
                         budget: Budget | None = None) -> list[tuple[str, str]]:
    """Sensitivity options of a comparison: finite, and a viscosity that stays positive."""
    budget = budget or active_budget()
    problems = []
    if not (math.isfinite(ambient_shift) and abs(ambient_shift) <= budget.max_ambient_shift_k):
        problems.append(("--ambient-shift", f"{ambient_shift!r} K: give a finite shift of at most "
                                            f"{budget.max_ambient_shift_k:g} K"))
    if not (math.isfinite(viscosity_uncertainty) and 0.0 <= viscosity_uncertainty <= budget.max_viscosity_uncertainty):
        shown = viscosity_uncertainty * 100.0 if math.isfinite(viscosity_uncertainty) else viscosity_uncertainty
        problems.append(("--viscosity-uncertainty", f"{shown!r} %: give 0 to {budget.max_viscosity_uncertainty * 100:g} % "
                                                    "(the scaled viscosity must stay above zero)"))
    return problems


def comparison_problems(scenario, values: int, cases: int, budget: Budget | None = None) -> list[tuple[str, str]]:
    """A comparison of ``values`` lever values in ``cases`` sensitivity cases against the budget."""
    budget = budget or active_budget()
    if values > budget.comparison_values:
        return [("values", f"{values:,} values to compare, past the work budget of {budget.comparison_values}: "
                           "give fewer values (a coarser step or a shorter range)")]
    problems = plan_problems(scenario, budget=budget)
    if problems:
        return problems
    each = plan_steps(scenario) if is_plan_scenario(scenario) else pass_steps(scenario)
    work = each * values * cases
    if work <= budget.comparison_steps:
        return []
    fit = max(1, budget.comparison_steps // (each * cases))
    extra = " or leave out the sensitivity cases" if cases > 1 else ""
    return [("values", f"the comparison is estimated at {work:,} march steps ({values} values x {cases} case(s) x "
                       f"{each:,} per plan), past the work budget of {budget.comparison_steps:,}: give at most "
                       f"{fit} values{extra}, or lower schedule.timeline_steps")]


def check_comparison(scenario, values: int, cases: int) -> None:
    problems = comparison_problems(scenario, values, cases)
    if problems:
        raise BudgetError(problems)


MIN_LOG_ROWS = 5                      # planner.calibration.log.MIN_ROWS: rows a fit needs at least


def calibration_problems(scenario, rows: int, evaluations: int, factors: int,
                         budget: Budget | None = None) -> list[tuple[str, str]]:
    """A calibration fit against the budget: every row of the log is one pass along the line, and
    the fit replays the whole log at most ``evaluations`` times (``planner.calibration.fit``'s bound
    for ``factors`` fitted factors)."""
    budget = budget or active_budget()
    problems = pass_problems(scenario, budget=budget)
    if problems:
        return problems
    each = pass_steps(scenario)
    work = rows * evaluations * each
    if work <= budget.calibration_steps:
        return []
    text = (f"the fit is estimated at {work:,} march steps ({rows:,} log rows x up to {evaluations} replays of the "
            f"log for {factors} factor(s) x {each:,} steps a row: {_route_text(scenario, MARCH_STEP_M)}), past the "
            f"work budget of {budget.calibration_steps:,}")
    most_rows = budget.calibration_steps // (evaluations * each)
    if most_rows < MIN_LOG_ROWS:
        return [(_route_field(scenario), text + ": shorten the route, or fit fewer factors (--fit)")]
    return [("log", text + f": resample the log to at most {most_rows:,} rows, or fit fewer factors (--fit)")]


def check_calibration(scenario, rows: int, evaluations: int, factors: int) -> None:
    problems = calibration_problems(scenario, rows, evaluations, factors)
    if problems:
        raise BudgetError(problems)


def plan_work(scenario) -> int:
    """Estimated steps of one plan of ``scenario`` (one pass when it is a line without pump and vessels)."""
    return plan_steps(scenario) if is_plan_scenario(scenario) else pass_steps(scenario)


def envelope_problems(scenario, ambients: int, values: int, budget: Budget | None = None) -> list[tuple[str, str]]:
    """An operating envelope of ``ambients`` x ``values`` plans (cells) against the budget."""
    budget = budget or active_budget()
    problems = plan_problems(scenario, budget=budget)
    if problems:
        return problems
    each = plan_work(scenario)
    cells = ambients * values
    work = each * cells
    if work <= budget.envelope_steps:
        return []
    fit = max(1, budget.envelope_steps // each)
    return [("--ambient", f"the envelope is {cells:,} cells ({ambients} ambients x {values} lever values), estimated at "
                          f"{work:,} march steps ({each:,} a plan), past the work budget of {budget.envelope_steps:,}: "
                          f"give at most {fit:,} cells (a coarser --ambient step or fewer lever values), lower "
                          f"schedule.timeline_steps, or raise the budget for batch use with {ENV_FACTOR}=FACTOR")]


def sweep_problems(work: int, plans: int, budget: Budget | None = None) -> list[tuple[str, str]]:
    """A sweep of ``plans`` plans estimated at ``work`` march steps in all against the budget."""
    budget = budget or active_budget()
    if work <= budget.sweep_steps:
        return []
    return [("", f"the sweep is {plans:,} plans estimated at {work:,} march steps, past the work budget of "
                 f"{budget.sweep_steps:,}: fewer ambients or lever values in the manifest's entries, fewer scenarios, or "
                 f"raise the budget for batch use with {ENV_FACTOR}=FACTOR")]


def uncertainty_problems(scenario, samples: int, rows: int = 1, field: str = "--samples",
                         budget: Budget | None = None) -> list[tuple[str, str]]:
    """The odds of ``rows`` plans (a comparison's values; 1 for one plan) at ``samples`` samples each
    against the budget: every sample is one plan."""
    budget = budget or active_budget()
    problems = plan_problems(scenario, budget=budget)
    if problems:
        return problems
    each = plan_work(scenario)
    work = each * samples * rows
    if work <= budget.uncertainty_steps:
        return []
    most = budget.uncertainty_steps // (each * rows)
    fewer = 2 ** int(math.floor(math.log2(most))) if most >= 1 else 0
    advice = f"give at most {fewer} samples" if fewer >= 16 else "compare fewer values"
    return [(field, f"{samples:,} samples x {rows} plan(s) are estimated at {work:,} march steps ({each:,} a plan), "
                    f"past the work budget of {budget.uncertainty_steps:,}: {advice}, lower schedule.timeline_steps, "
                    f"or raise the budget for batch use with {ENV_FACTOR}=FACTOR")]
