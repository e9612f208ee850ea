"""planner.transfer.hold: stop and restart, against the plug force balance and the lumped cooling law."""

from __future__ import annotations

import math

import pytest

from conftest import ID_4IN_SCH40, newtonian_product, plan_scenario
from planner.scenario.schema import scenario_from_dict
from planner.transfer.plan import make_plan


def test_gelled_restart_pressure_matches_the_plug_force_balance():
    # A plug of Bingham/Herschel–Bulkley product at rest yields when dp pi D^2/4 = tau_y pi D L.
    data = plan_scenario()
    data["product"] = {**newtonian_product(mu_pa_s=2.0, density=1300.0), "rheology": "herschel_bulkley",
                       "flow_index": 0.7, "yield_stress": "25 Pa"}
    plan = make_plan(scenario_from_dict(data))
    assert plan.hold.gelled_restart_pressure_pa == pytest.approx(4 * 25.0 * 200.0 / ID_4IN_SCH40, rel=1e-9)


def test_cold_line_with_tracing_failed_cools_by_the_lumped_law():
    # Untraced stagnant line, buried with fixed-k insulation: C dT/dt = -U' (T - Ta), exponential decay.
    data = plan_scenario()
    data["route"]["segments"][0].update(
        insulation=[{"conductivity": 0.04, "thickness": 50}],
        surroundings={"location": "buried", "ambient_temperature": 0.0, "burial_depth": 1.0, "soil_conductivity": 1.0})
    data["product"]["no_flow_temperature"] = 10.0
    data["source"]["temperature"] = 40.0
    plan = make_plan(scenario_from_dict(data))
    seg = plan.hold.segments[0]
    r1, r2 = 0.1143 / 2, 0.1143 / 2 + 0.05
    u = 1 / (math.log(r2 / r1) / (2 * math.pi * 0.04) + math.acosh(1.0 / r2) / (2 * math.pi * 1.0)
             + math.log(0.1143 / ID_4IN_SCH40) / (2 * math.pi * 45))
    c = 1100.0 * 2000.0 * math.pi * ID_4IN_SCH40 ** 2 / 4 + 7850 * 490 * math.pi / 4 * (0.1143 ** 2 - ID_4IN_SCH40 ** 2)
    expected = c / u * math.log((seg.start_temperature_k - 273.15) / 10.0)
    assert seg.time_to_limit_failed_s == pytest.approx(expected, rel=5e-3)


def test_a_stop_longer_than_the_hold_horizon_is_refused_at_the_field():
    # a stop is followed for HOLD_HORIZON_S (14 days): past it the hold says only "holds 14 days".  A 30-day
    # stop (the old limit) whose line sets on day 14.2 with the tracing failed read "holds 14 days" with no
    # finding; the stop is now held to the horizon, in the unit given
    from planner.errors import ScenarioError
    from planner.transfer.hold_words import HOLD_HORIZON_S, HOLDS_WORDS

    assert HOLD_HORIZON_S == 14 * 86400.0 and HOLDS_WORDS == "holds 14 days"
    data = plan_scenario()
    data["schedule"]["stop_duration"] = "336 h"                    # the horizon itself: accepted
    assert scenario_from_dict(data).schedule.stop_duration == HOLD_HORIZON_S
    for typed, words in (("720 h", "720 h is out of range: must be at most 336 h"),
                         ("14.5 d", "14.5 d is out of range: must be at most 14 d")):
        data["schedule"]["stop_duration"] = typed
        with pytest.raises(ScenarioError) as caught:
            scenario_from_dict(data)
        assert words in dict(caught.value.problems)["schedule.stop_duration"]
