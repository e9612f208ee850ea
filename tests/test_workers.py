"""The dashboard's worker pool (``dashboard.workers``): real worker processes, real plans.

A computation past its time limit is stopped with a message and its worker replaced; a second
session is served while the first one's heavy plan runs; a session runs one computation at a time;
a full pool says it is busy instead of queueing forever.
"""

from __future__ import annotations

import threading
import time

import pytest

from conftest import DEMO_FILES
from dashboard.compute.workers import WorkerPool
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict, scenario_to_json

pytestmark = pytest.mark.slow  # worker processes: left out of the fast loop (-m "not slow")

SYRUP = next(p for p in DEMO_FILES if "syrup" in p.name)
LIGHT = scenario_to_json(load_scenario(SYRUP))


def _heavy() -> str:
    """A plan inside the work budget that still takes a while: 1000 timeline steps on the fuel-oil line (about
    0.5 s on a quiet machine since the engine was made faster, so the time-limit tests stop it at 0.1 s)."""
    data = scenario_to_dict(load_scenario(next(p for p in DEMO_FILES if "fuel_oil" in p.name)))
    data["schedule"]["timeline_steps"] = 1000
    return scenario_to_json(scenario_from_dict(data))


HEAVY = _heavy()


@pytest.fixture(scope="module")
def workers():
    pool = WorkerPool(2)
    pool.warm()
    yield pool
    pool.close()


def test_a_plan_runs_in_a_worker_and_gives_the_bundle(workers):
    from dashboard.compute.record import PlanResults
    from dashboard.compute.results import plan_results

    result = workers.run("plan", (LIGHT,), session="s1", time_limit=120)
    assert "error" not in result and isinstance(result["results"], PlanResults)
    direct = plan_results(load_scenario(SYRUP))
    assert result["results"].plan["timeline"]["total_time_s"] == pytest.approx(
        direct.plan["timeline"]["total_time_s"], rel=1e-12)


def test_a_plan_past_its_time_limit_is_stopped_and_its_worker_replaced(workers):
    before = workers.stopped
    started = time.monotonic()
    result = workers.run("plan", (HEAVY,), session="s2", time_limit=0.1)
    elapsed = time.monotonic() - started
    assert result.get("timeout") and result.get("transient")
    assert "stopped after 0.1 s" in result["error"] and "timeline steps" in result["error"]
    assert workers.stopped == before + 1
    assert elapsed < 10.0                       # stopped, not waited out
    again = workers.run("plan", (LIGHT,), session="s2", time_limit=120)   # a fresh worker serves the next one
    assert "error" not in again


def test_a_comparison_reports_progress_and_is_stopped_at_its_limit(workers):
    seen = []
    values = [318.15, 323.15, 328.15]
    result = workers.run("comparison", (LIGHT, "setpoint", values, False), session="s3", time_limit=120,
                         progress=lambda done, total: seen.append((done, total)))
    assert "error" not in result and len(result["rows"]) == 3
    assert seen and seen[-1] == (3, 3)
    stopped = workers.run("comparison", (HEAVY, "setpoint", values, False), session="s3", time_limit=0.5)
    assert stopped.get("timeout") and "leave out the sensitivity" in stopped["error"]


def test_one_session_runs_one_computation_and_cannot_starve_another(workers):
    heavy_result = {}

    def heavy():
        heavy_result["value"] = workers.run("plan", (HEAVY,), session="greedy", time_limit=120)

    thread = threading.Thread(target=heavy)
    thread.start()
    time.sleep(0.3)
    second = workers.run("plan", (HEAVY,), session="greedy", time_limit=120)
    assert second.get("busy") and "previous computation" in second["error"]
    other = workers.run("plan", (LIGHT,), session="modest", time_limit=120)
    assert "error" not in other                 # the other worker served the other session
    thread.join()
    assert "error" not in heavy_result["value"]


def test_a_full_pool_says_it_is_busy():
    pool = WorkerPool(1)
    try:
        pool.warm()
        thread = threading.Thread(target=lambda: pool.run("plan", (HEAVY,), session="a", time_limit=120))
        thread.start()
        time.sleep(0.3)
        # the heavy plan takes about 0.8 s on a quiet machine: a 0.5 s wait after 0.3 s ended with it (a race)
        result = pool.run("plan", (LIGHT,), session="b", wait=0.2)
        assert result.get("busy") and "busy with other users" in result["error"]
        thread.join()
    finally:
        pool.close()


def test_a_planner_error_comes_back_as_a_message(workers):
    data = scenario_to_dict(load_scenario(SYRUP))
    del data["pump"]
    from planner.scenario.schema import Scenario

    text = Scenario.model_validate(data).model_dump_json()
    result = workers.run("plan", (text,), session="s4", time_limit=120)
    assert "pump" in result["error"] and not result.get("transient")


def test_a_fresh_pool_starts_one_worker_and_the_next_when_two_sessions_compute_at_once():
    """The server starts one worker for its first page (``spare``), not one per core; the second starts
    when a second session computes while the first worker is busy."""
    pool = WorkerPool(2)
    try:
        pool.spare()
        pool.spare()                                    # one is idle already: no second one
        assert len(pool._all) == 1
        first = pool.run("plan", (LIGHT,), session="a", time_limit=120)
        assert "error" not in first and len(pool._all) == 1     # the spare served it
        heavy = {}
        thread = threading.Thread(target=lambda: heavy.update(r=pool.run("plan", (HEAVY,), session="a",
                                                                         time_limit=120)))
        thread.start()
        time.sleep(0.3)
        second = pool.run("plan", (LIGHT,), session="b", time_limit=120)
        thread.join()
        assert "error" not in second and "error" not in heavy["r"]
        assert len(pool._all) == 2
        assert first["results"].plan["timeline"]["total_time_s"] == second["results"].plan["timeline"]["total_time_s"]
    finally:
        pool.close()


def test_the_first_demo_planned_ahead_is_the_pages_own_request():
    """The server's first worker plans the first demo before any page asks (``_preplanned``): its key is the
    JSON the page sends for that demo (``loading.load_demo`` then ``app.validate``), and its result the one
    the request computes (the same job of the same text)."""
    import copy

    from dashboard.compute.demos import DEMO_FILES as OFFERED
    from dashboard.compute.workers import _preplanned, plan_job

    first = OFFERED[0]
    work = scenario_to_dict(load_scenario(first))                             # loading.load_demo
    page_json = scenario_to_json(scenario_from_dict(copy.deepcopy(work)))     # app.validate
    ahead = _preplanned(str(first))
    assert list(ahead) == [page_json]
    now = plan_job(page_json)["results"]
    assert ahead[page_json]["results"].plan == now.plan
    assert ahead[page_json]["results"].key_figures == now.key_figures
    assert _preplanned(None) == {}


def test_a_worker_that_planned_ahead_answers_that_plan_and_others():
    """The page's request for the first demo gets what a worker that did not plan ahead computes for it (both
    fresh workers), and a request for another scenario is planned as usual."""
    from dashboard.compute.demos import DEMO_FILES as OFFERED

    first_json = scenario_to_json(load_scenario(OFFERED[0]))
    answers = {}
    for ahead in (str(OFFERED[0]), None):
        pool = WorkerPool(1)
        try:
            pool.spare(ahead)
            answers[ahead] = (pool.run("plan", (first_json,), session="a", time_limit=120),
                              pool.run("plan", (LIGHT,), session="a", time_limit=120))
        finally:
            pool.close()
    (first_ahead, light_ahead), (first_asked, light_asked) = answers.values()
    assert first_ahead["results"].plan == first_asked["results"].plan
    assert first_ahead["results"].key_figures == first_asked["results"].key_figures
    assert light_ahead["results"].plan == light_asked["results"].plan
    assert light_ahead["results"].scenario_name != first_ahead["results"].scenario_name
