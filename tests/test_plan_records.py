"""Typed plan records and the concepts defined once: energy and costs, the peak discharge pressure,
the rating of a segment, typed lever changes, the key figures and the NaN-to-None helper."""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import DEMO_FILES, ROOT
from planner.errors import ScenarioError
from planner.line.route import build_line
from planner.plain import finite_or_none, plain
from planner.reports.key_figures import key_figures
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict
from planner.transfer.plan import J_PER_KWH, make_plan, with_changes

SYRUP = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"


def test_plain_turns_every_nan_into_none():
    doc = plain({"a": math.nan, "b": [1.0, math.inf, np.float64(2.5)], "c": np.array([1.0, np.nan]), "d": {3, 1},
                 "e": (np.int64(4),), "f": "text"})
    assert doc == {"a": None, "b": [1.0, None, 2.5], "c": [1.0, None], "d": [1, 3], "e": [4], "f": "text"}
    assert finite_or_none(math.nan) is None and finite_or_none(1.5) == 1.5


def test_rating_at_takes_the_lower_of_own_and_flange_rating():
    # ASME B16.5-2009 Table 2-1.1, Group 1.1, class 150: 19.6 bar to 38 degC, 13.8 bar at 200 degC
    data = scenario_to_dict(load_scenario(SYRUP))
    seg = data["route"]["segments"][0]
    seg.update(flange_class=150, pressure_rating="16 bar")
    scenario = scenario_from_dict(data)
    first = build_line(scenario.route, scenario.site)[0]
    assert first.rating_at(293.15) == pytest.approx(16e5, rel=1e-12)
    assert first.rating_source_at(293.15) == "own rating"
    assert first.rating_at(473.15) == pytest.approx(13.8e5, rel=1e-12)
    assert first.rating_source_at(473.15) == "ASME B16.5 class 150"
    seg.update(pressure_rating=None)
    seg.pop("pressure_rating")
    only_flange = build_line(scenario_from_dict(data).route, scenario.site)[0]
    assert only_flange.rating_at(293.15) == pytest.approx(19.6e5, rel=1e-12)
    assert only_flange.rating_at(273.15 - 40.0) is None          # below the table's -29 degC


def test_with_changes_is_typed_and_checked():
    scenario = load_scenario(SYRUP)
    changed = with_changes(scenario, setpoint=330.123456789, pump_speed=2.5, ambient_shift=3.0)
    assert changed.tracing.setpoint == 330.123456789                 # exactly: no string round trip
    assert changed.pump.speed == 2.5
    assert changed.site.ambient_temperature == scenario.site.ambient_temperature + 3.0
    assert scenario.tracing.setpoint == pytest.approx(328.15) and scenario.site.ambient_temperature == pytest.approx(269.15)
    with pytest.raises(ScenarioError) as caught:
        with_changes(scenario, setpoint=900.0)
    assert caught.value.problems[0][0] == "tracing.setpoint" and "at most" in caught.value.problems[0][1]
    limited = with_changes(scenario, flow_limit=0.004)
    assert limited.pump.control == "fixed_flow" and limited.pump.flow_setpoint == 0.004


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_energy_costs_and_the_peak_are_one_definition(path):
    plan = make_plan(load_scenario(path))
    e, c = plan.energy, plan.costs
    assert e.electrical_j == pytest.approx(e.tracing_electric_j + e.pump_j + e.vessel_heating_electric_j, rel=1e-12)
    tariffs = plan.scenario.costs
    assert c.electricity == pytest.approx(e.electrical_j / J_PER_KWH * tariffs.electricity_per_kwh, rel=1e-12)
    assert c.steam == pytest.approx(e.steam_kg / 1000.0 * tariffs.steam_per_tonne, rel=1e-12)
    assert c.total == pytest.approx(c.electricity + c.steam + c.demurrage, rel=1e-12)
    running = max(plan.timeline.arrays["discharge_pressure_pa"])
    push = plan.startup_push
    expected = max(running, push.peak_discharge_pressure_pa) if push is not None else running
    assert plan.peak_discharge_pressure_pa == pytest.approx(expected, rel=1e-12)
    figures = {k.key: k for k in key_figures(plan)}
    assert figures["peak_pressure"].value == plan.peak_discharge_pressure_pa
    assert figures["electrical_energy"].value == e.electrical_j


def test_an_impossible_start_up_has_no_total():
    plan = make_plan(with_changes(load_scenario(SYRUP), setpoint=368.15))   # 95 degC: pre-warm cannot reach it
    assert not plan.prewarm.possible and plan.costs.complete is False
    figures = {k.key: k for k in key_figures(plan)}
    for key in ("total_time", "total_cost"):
        assert figures[key].value is None and not figures[key].possible
        assert str(figures[key].why).startswith("pre-warm: tracing cannot bring")
    assert figures["transfer_time"].possible          # the transfer itself still computes
