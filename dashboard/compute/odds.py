"""The odds of a plan and of a comparison, as the dashboard's worker jobs (no Streamlit here).

Both run in a worker process of ``compute/workers`` on its executor, with the page's progress callback
called as the sampled plans finish, within ``PLANNER_ODDS_TIME_LIMIT_S`` (``workers.limits``).  They return
plain data (pickled back to the server) or ``{"error": ...}``:

- ``odds_job``: ``{"odds": planner.sweeps.uncertainty.summarise(...), "total_time_s": [...]}`` -- the summary
  (SI; +inf where a percentile reaches a sample that did not finish) and each sample's total time (+inf
  when it did not finish), for the histogram;
- ``comparison_odds_job``: ``planner.sweeps.compare_odds.comparison_odds_json`` (SI; null beyond the samples
  that finished).

``check_sampling`` is the page's check of its two boxes before anything runs: the planner's own rules
(``checked_samples``, ``checked_seed``, the work budget ``check_work``), each message naming the box.
"""

from __future__ import annotations

from .record import failure

SAMPLES_FIELD = "Samples"
SEED_FIELD = "Seed"


def check_sampling(scenario, samples, seed, rows: int = 1) -> list[tuple[str, str]]:
    """The problems of the boxes Samples and Seed for ``rows`` plans (a comparison's values), as
    (field, message) pairs; [] when the odds may run."""
    from planner.errors import ScenarioError
    from planner.scenario.uncertainty_spec import checked_samples
    from planner.sweeps.odds_inputs import checked_seed
    from planner.sweeps.uncertainty import check_work

    problems = []
    for field, value, check in ((SAMPLES_FIELD, samples, checked_samples), (SEED_FIELD, seed, checked_seed)):
        try:
            check(value)
        except ValueError as exc:
            problems.append((field, str(exc)))
    if problems:
        return problems
    try:
        check_work(scenario, samples, rows, field=SAMPLES_FIELD)
    except ScenarioError as exc:
        return [tuple(p) for p in exc.problems]
    return []


def whole_number(value) -> int | float:
    """A box's number as an int when it is whole (``64.0`` -> 64), else as given (refused by the checks)."""
    if isinstance(value, float) and value.is_integer():
        return int(value)
    return value


def odds_job(scenario_json: str, samples: int, seed: int, progress=None, executor=None) -> dict:
    """The odds of the scenario's plan at ``samples`` draws from ``seed`` (see the module docstring)."""
    from planner.scenario.schema import parse_scenario_text
    from planner.sweeps.uncertainty import sample_plans, summarise

    try:
        scenario = parse_scenario_text(scenario_json, "json")
        specs, u, rows, seed = sample_plans(scenario, samples, seed, executor, progress)
        return {"odds": summarise(scenario, specs, u, rows, seed), "total_time_s": [r["total_time_s"] for r in rows]}
    except Exception as exc:  # noqa: BLE001  (a bug must not put a traceback on the page)
        return failure(exc, "odds")


def comparison_odds_job(scenario_json: str, lever: str, values_si: list, samples: int, seed: int, progress=None,
                        executor=None) -> dict:
    """The odds of each value of ``lever`` (SI), the same points for every value (``compare_odds``)."""
    from planner.scenario.schema import parse_scenario_text
    from planner.sweeps.compare_odds import compare_odds, comparison_odds_json

    try:
        result = compare_odds(parse_scenario_text(scenario_json, "json"), lever, list(values_si), executor,
                              progress, samples=samples, seed=seed)
        return comparison_odds_json(result)
    except Exception as exc:  # noqa: BLE001
        return failure(exc, "comparison with odds")
