"""planner.transfer.startup: pre-warm and pushing the cold contents out.

Untraced gaps in the pre-warm are checked in test_prewarm_gaps.py."""

from __future__ import annotations

import pytest

from conftest import plan_scenario
from planner.scenario.schema import scenario_from_dict
from planner.transfer.startup import push_cold
from planner.transfer.system import SystemState, TransferSystem


def test_push_cold_leaves_the_shared_system_unchanged():
    # issue 9: pushing the cold plug out works on a copy (TransferSystem.with_plug); the system the
    # timeline and hold use afterwards gives the same operating point as before
    from planner.transfer.startup import push_cold

    scenario = scenario_from_dict(plan_scenario())
    system = TransferSystem(scenario)
    state = SystemState(scenario.source.temperature, scenario.source.initial_volume)
    before = system.at_flow(0.002, state)
    push = push_cold(system, scenario.source.temperature - 15.0)
    assert push.rows or not push.possible
    assert system.plug is None
    after = system.at_flow(0.002, state)
    assert after.discharge_pressure == before.discharge_pressure
    assert after.outlet_temperature == before.outlet_temperature


def test_a_constant_wattage_prewarm_uses_the_heater_output_over_the_time():
    # the heater runs at its full 100 W/m over the traced length until the line is ready (energy = P t L)
    from planner.transfer.startup import prewarm

    data = plan_scenario()
    data["tracing"] = {"kind": "electric_constant", "output": "100 W/m", "setpoint": 45.0}
    data["route"]["segments"][0]["insulation"] = [{"conductivity": 0.04, "thickness": 50}]
    data["source"]["temperature"] = 40.0
    warm = prewarm(TransferSystem(scenario_from_dict(data)), 283.15)
    assert warm.possible and warm.time_s > 0
    assert warm.energy_j == pytest.approx(100.0 * warm.time_s * 200.0, rel=1e-9)


@pytest.mark.parametrize("demo, contents_c", [("polyol_tank_transfer", 10.0), ("fuel_oil_barge_discharge", 32.0),
                                              ("syrup_railcar_unload", 45.0)])
def test_the_front_time_is_the_trapezoidal_rule_over_the_fronts(demo, contents_c):
    # the flow rises 20-110 % as the warm front advances: a left sum from the all-cold start's flow at 8 front
    # positions overstated the front's time by 3.5-6.8 % against 64 positions (measured, 8dff325); the
    # trapezoidal rule from the flow once the suction's contents are through, to the warm line's at the end,
    # is within 0.5 % at the default 4 (a relief valve that stops lifting part-way puts a kink in the flow)
    from pathlib import Path

    from planner.scenario.files import load_scenario
    scenario = load_scenario(Path(__file__).parent.parent / "demo_scenarios" / f"{demo}.toml")
    coarse = push_cold(TransferSystem(scenario), contents_c + 273.15)
    fine = push_cold(TransferSystem(scenario), contents_c + 273.15, positions=64)
    assert coarse.possible and fine.possible
    assert coarse.front_time_s == pytest.approx(fine.front_time_s, rel=0.005)
    assert coarse.rows["volume_fraction"][-1] == 1.0 and len(coarse.rows["time_s"]) == 4 + 2
    assert coarse.rows["time_s"][-1] == pytest.approx(coarse.front_time_s)
