"""The key figures kept with a saved revision have one definition (``planner/reports/saved_figures.py``):
the command line's ``plans save`` and the dashboard's save store the same figures, taken from the plan's
key figures, so a step that cannot be carried out stores no partial value."""

from __future__ import annotations

from pathlib import Path

import pytest

from planner.cli.records_commands import plan_summary
from planner.reports.key_figures import key_figures, outlet_rating
from planner.reports.saved_figures import SAVED_FIGURES, saved_figures
from planner.scenario.schema import load_scenario
from planner.transfer.plan import J_PER_KWH, make_plan, with_changes

ROOT = Path(__file__).resolve().parents[1]
DEMO_FILES = sorted((ROOT / "demo_scenarios").glob("*.toml"))
SYRUP = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_the_command_line_and_the_dashboard_store_the_same_figures(path):
    from dashboard.compute.results import plan_results

    scenario = load_scenario(path)
    cli, page = plan_summary(scenario), plan_results(scenario).saved
    assert cli == page
    labelled = {key for key, _, _ in SAVED_FIGURES}
    assert set(cli) - {"currency"} <= labelled
    plan = make_plan(scenario)
    figures = {k.key: k.value for k in key_figures(plan)}
    assert cli["outlet_rating_pa"] == outlet_rating(plan).value and cli["outlet_rating_pa"] is not None
    assert cli["steam_kg"] == figures["steam"]
    assert cli["electrical_energy_kwh"] == pytest.approx(figures["electrical_energy"] / J_PER_KWH, rel=1e-12)


def test_an_impossible_start_up_stores_no_partial_total():
    """The case of the issue: costs incomplete (a pre-warm to 95 degC the tracing cannot reach). The plan's
    own total covers only what can be done; the stored total is None, as the key figure is."""
    plan = make_plan(with_changes(load_scenario(SYRUP), setpoint=368.15))
    assert plan.costs.complete is False and plan.costs.total > 0.0
    saved = saved_figures(plan, None)
    assert saved["total_cost"] is None and saved["total_time_s"] is None
    assert saved["transfer_time_s"] == pytest.approx(plan.timeline.total_time_s, rel=1e-12)   # the transfer completes
    assert saved["findings_stop"] is None        # findings not assessed: counts unknown, not zero


def test_a_transfer_that_stops_stores_no_transfer_time():
    """``timeline.completed`` False: no transfer time (the timeline's time is where it stopped)."""
    plan = make_plan(load_scenario(SYRUP))
    stopped = plan.timeline.__class__(**{**plan.timeline.__dict__, "completed": False, "stop_reason": "test"}) \
        if hasattr(plan.timeline, "__dict__") else None
    if stopped is None:
        pytest.skip("timeline is not a plain record")
    plan.timeline = stopped
    assert saved_figures(plan, [])["transfer_time_s"] is None
