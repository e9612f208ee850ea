"""The odds of a plan: the same plan at many draws of its uncertain inputs, summed up as P10/P50/P90,
the chance to finish within the planned window, the chance of a stop and which input drives the spread.

Each sample is one full plan of the scenario with one draw applied (``odds_inputs.sampled_scenario``:
``with_changes`` for the ambient and the wind, the ``[calibration]`` factors for heat loss and slip,
``make_plan(viscosity_factor=)``), only the chosen start-up worked out (``both_startups=False``), and
its findings (``checks.findings.assess``).  A sample the planner cannot compute (a ``PlannerError``:
no flow, product setting in the line, a computation with no answer) counts as "did not finish", with
the stop code ``NOT-COMPUTED``: it is never dropped.  Samples run on the caller's executor, in chunks
(``executors.fan_out``).  Statistics: ``planner.sweeps.odds_stats``.
"""

from __future__ import annotations

import math
from concurrent.futures import Executor

from planner.errors import PlannerError
from planner.scenario.schema import DEFAULT_CONFIDENCE, Scenario
from planner.sweeps.executors import fan_out
from planner.sweeps.odds_inputs import (SCRAMBLES, check_extremes, draws, input_specs, sampled_scenario,
                                        sampling_of)
from planner.sweeps.odds_stats import chance, fan, figure_statistics, sensitivity

# the figures of the odds (SI), with the kind each is shown in
FIGURES = {"transfer_time_s": "time", "total_time_s": "time", "peak_pressure_pa": "pressure",
           "max_jacket_temperature_k": "temperature", "electrical_energy_j": "energy", "steam_kg": "mass",
           "total_cost": "money"}
NOT_COMPUTED = "NOT-COMPUTED"
METHOD = ("scrambled Sobol points (scipy.stats.qmc, Owen scrambling), {r} independent scrambles of {m} points; "
          "percentiles by Hazen's rank; sampling error = standard deviation over the scrambles / sqrt({r}); "
          "sensitivity: first-order indices of the total time by the binned given-data estimator (Plischke, "
          "Borgonovo & Smith 2013) with Kelley's correction, {b} bins per input, from the same {n} plans (no "
          "extra plans){ranks}")


def _uses_steam(scenario: Scenario) -> bool:
    source = scenario.source
    return scenario.tracing.kind == "steam" or (source is not None and source.heating_medium == "steam"
                                                and source.heating_power > 0.0)


def _not_computed(scenario: Scenario, error: str) -> dict:
    row = {name: math.inf for name in FIGURES}
    if not _uses_steam(scenario):
        row["steam_kg"] = 0.0
    row.update(computed=False, finished=False, error=error, stop_codes=[NOT_COMPUTED], series=None)
    return row


def plan_figures(plan, findings: list) -> dict:
    """One sample's figures (SI; +inf where the plan does not finish) and its stop codes."""
    finished = plan.total_time_s is not None and plan.costs.complete and plan.pump_beyond_method is None
    jackets = [p.summary.max_jacket_temperature_k for p in (plan.start_profile, plan.suction_profile) if p is not None]
    peak = plan.peak_discharge_pressure_pa
    timeline = plan.timeline
    steam = plan.energy.steam_kg
    t = timeline.arrays
    return {
        "computed": True, "finished": finished,
        "transfer_time_s": timeline.total_time_s if timeline.completed and plan.pump_beyond_method is None else math.inf,
        "total_time_s": plan.total_time_s if finished else math.inf,
        "peak_pressure_pa": peak if peak is not None else math.inf,
        "max_jacket_temperature_k": max(jackets) if jackets else math.inf,
        "electrical_energy_j": plan.energy.electrical_j if finished else math.inf,
        "steam_kg": steam if finished or steam == 0.0 else math.inf,
        "total_cost": plan.costs.total if finished else math.inf,
        "stop_codes": sorted({f.code for f in findings if f.severity == "stop"}),
        "series": {"time_s": t["time_s"].tolist(), "flow_m3_s": t["flow_m3_s"].tolist(),
                   "outlet_temperature_k": t["outlet_temperature_k"].tolist(), "end_s": timeline.total_time_s},
    }


def sample_row(task: tuple) -> dict:
    """One sample (runs in a worker): ``(scenario, draw, changes)`` -> plain figures.  ``changes`` are
    ``with_changes`` levers applied before the draw (a comparison's row)."""
    from planner.checks.findings import assess
    from planner.transfer.plan import make_plan

    scenario, draw, changes = task
    try:
        changed, viscosity_factor = sampled_scenario(scenario, draw, **changes)
        plan = make_plan(changed, viscosity_factor=viscosity_factor, both_startups=False)
        return plan_figures(plan, assess(plan))
    except (PlannerError, ValueError, ArithmeticError) as exc:
        return _not_computed(scenario, str(exc))


def check_work(scenario: Scenario, samples: int, rows: int = 1, field: str = "--samples") -> None:
    """Refuse before computing: ``rows`` x ``samples`` plans past the work budget (``uncertainty_steps``)."""
    from planner.scenario.budget import BudgetError, uncertainty_problems

    problems = uncertainty_problems(scenario, samples, rows, field)
    if problems:
        raise BudgetError(problems)


def tasks_for(scenario: Scenario, samples: int | None = None, seed: int | None = None, changes: dict | None = None):
    """(specs, unit points, tasks, samples, seed): the draws of one scenario as sample tasks."""
    samples, seed = sampling_of(scenario, samples, seed)
    specs = input_specs(scenario)
    check_extremes(scenario, specs)
    u, values = draws(specs, samples, seed)
    rows = [{spec.name: float(values[j][i]) for j, spec in enumerate(specs)} for i in range(samples)]
    return specs, u, [(scenario, row, changes or {}) for row in rows], samples, seed


def sample_plans(scenario: Scenario, samples: int | None = None, seed: int | None = None,
                 executor: Executor | None = None, progress=None) -> tuple:
    """(specs, unit points, the sampled plans' figures in draw order, seed): the samples ``plan_odds`` sums
    up, for a caller that also shows them one by one (the dashboard's histogram of the total time)."""
    check_work(scenario, sampling_of(scenario, samples, seed)[0])
    specs, u, tasks, samples, seed = tasks_for(scenario, samples, seed)
    return specs, u, fan_out(sample_row, tasks, executor, progress), seed


def plan_odds(scenario: Scenario, samples: int | None = None, seed: int | None = None,
              executor: Executor | None = None, progress=None) -> dict:
    """The odds of the scenario's plan (a JSON-ready dict, SI; see ``summarise``).  ``samples`` (a power of
    two) and ``seed`` default to the scenario's ``[uncertainty]``, else 128 and 21."""
    return summarise(scenario, *sample_plans(scenario, samples, seed, executor, progress))


def confidence_of(scenario: Scenario) -> float:
    """``limits.confidence``, or its default 0.9."""
    given = scenario.limits.confidence
    return DEFAULT_CONFIDENCE if given is None else given


def summarise(scenario: Scenario, specs, u, rows: list[dict], seed: int, fan_data: bool = True) -> dict:
    """The odds of sampled plans ``rows`` (in draw order) as a JSON-ready dict (SI; +inf values stay +inf
    here: ``plain`` makes them null, ``beyond`` lists them)."""
    samples = len(rows)
    window = scenario.schedule.planned_window
    percentiles, errors, beyond = {}, {}, {}
    for name in FIGURES:
        levels, level_errors = figure_statistics([r[name] for r in rows], SCRAMBLES)
        percentiles[name], errors[name] = levels, level_errors
        far = [key for key, value in levels.items() if not math.isfinite(value)]
        if far:
            beyond[name] = far
    in_window = [r["total_time_s"] <= window for r in rows]
    stop = [bool(r["stop_codes"]) for r in rows]
    success = [w and not s for w, s in zip(in_window, stop)]
    p_window, e_window = chance(in_window, SCRAMBLES)
    p_stop, e_stop = chance(stop, SCRAMBLES)
    p_success, e_success = chance(success, SCRAMBLES)
    counts: dict[str, int] = {}
    for r in rows:
        for code in r["stop_codes"]:
            counts[code] = counts.get(code, 0) + 1
    totals = [r["total_time_s"] for r in rows]
    from planner.sweeps.odds_stats import bin_count

    ranked = not all(math.isfinite(v) for v in totals)
    doc = {
        "samples": samples, "seed": seed, "scrambles": SCRAMBLES, "confidence": confidence_of(scenario),
        "currency": scenario.costs.currency,
        "planned_window_s": window, "percentiles": percentiles, "beyond": beyond,
        "probability_in_window": p_window, "stop_probability": p_stop, "probability_in_window_no_stop": p_success,
        "sampling_error": {**errors, "probability_in_window": e_window, "stop_probability": e_stop,
                           "probability_in_window_no_stop": e_success},
        "did_not_finish": sum(1 for r in rows if not r["finished"]),
        "not_computed": sum(1 for r in rows if not r["computed"]),
        "stop_codes": [{"code": c, "samples": n, "share": n / samples}
                       for c, n in sorted(counts.items(), key=lambda kv: (-kv[1], kv[0]))],
        "sensitivity": sensitivity(u, totals, [s.name for s in specs]),
        "sensitivity_of": "total_time_s" + (" (ranks: some samples did not finish)" if ranked else ""),
        "inputs": [s.as_dict() for s in specs],
        "method": METHOD.format(r=SCRAMBLES, m=samples // SCRAMBLES, b=bin_count(samples), n=samples,
                                ranks="; on the ranks of the total time, as some samples did not finish"
                                if ranked else ""),
    }
    if fan_data:
        ends = [r["series"]["end_s"] for r in rows if r["series"] and math.isfinite(r["series"]["end_s"])]
        doc["fan"] = fan([r["series"] for r in rows], max(ends) if ends else 0.0)
    return doc
