"""planner.transfer.timeline: the transfer in equal volume increments."""

from __future__ import annotations

import math
import pathlib

import numpy as np
import pytest

from conftest import plan_scenario
from planner.scenario.schema import scenario_from_dict
from planner.transfer.system import TransferSystem
from planner.transfer.timeline import run_transfer


def test_constant_flow_transfer_takes_volume_over_flow():
    scenario = scenario_from_dict(plan_scenario())
    timeline = run_transfer(TransferSystem(scenario))
    assert timeline.completed
    assert timeline.total_time_s == pytest.approx(100.0 / (1.0e-3 * 5.0), rel=1e-5)
    assert timeline.moved_m3 == pytest.approx(100.0)
    assert len(timeline.arrays["time_s"]) == 50 + 1          # each increment's start, and the end


def test_the_destination_rises_by_the_volume_moved_over_its_area():
    # a vertical tank 10 m across starting at 1 m: level = 1 + V / (pi 5^2) at every increment's start
    timeline = run_transfer(TransferSystem(scenario_from_dict(plan_scenario())))
    for moved, level in zip(timeline.arrays["moved_m3"], timeline.arrays["destination_level_m"]):
        assert level == pytest.approx(1.0 + moved / (math.pi * 25.0), rel=1e-12)


@pytest.mark.parametrize("steps", [10, 24])
def test_a_heated_source_that_empties_warms_as_the_exact_lumped_balance(steps):
    # 20 kW of electric heating into contents that leave at a constant 5 L/s (PD pump, no slip), no shell loss:
    # m(t) = rho (V0 - q t), so m cp dT/dt = P gives T(t) = T0 + P / (rho q cp) ln(V0 / (V0 - q t)): from 200 to
    # 100 m^3, 20e3 / (1100 x 5e-3 x 2000) ln 2 = 1.2603 K (the lumped capacitance method, Incropera and DeWitt,
    # Fundamentals of Heat and Mass Transfer, section 5.1; integrated by hand).  The contents are taken at each
    # increment's mid volume: the sum of the logs' midpoint rule is within 0.002 K at 10 increments (a start-volume
    # rule erred by 0.035 K).
    data = plan_scenario()
    data["source"].update({"heating_power": "20 kW", "heating_medium": "electric"})
    data["schedule"]["timeline_steps"] = steps
    timeline = run_transfer(TransferSystem(scenario_from_dict(data)))
    rise = timeline.arrays["source_temperature_k"][-1] - 293.15
    assert rise == pytest.approx(20e3 / (1100.0 * 5e-3 * 2000.0) * math.log(2.0), abs=0.002)
    assert timeline.vessel_heating_energy_j == pytest.approx(20e3 * timeline.total_time_s, rel=1e-9)
    assert len(timeline.arrays["time_s"]) == steps + 1


def test_the_timeline_is_second_order_in_its_increments():
    # trapezoidal rule in volume: halving the increment quarters the error.  On the syrup demo (its tracing power
    # falls steadily as the railcar's heating warms the product) 24 increments are within 0.1 % of 480 on every
    # time and energy; a left sum at the default 60 of old erred by 2.8 % on the tracing energy (measured, 8dff325)
    from planner.scenario.files import load_scenario
    from planner.transfer.plan import make_plan
    scenario = load_scenario(pathlib.Path(__file__).parent.parent / "demo_scenarios" / "syrup_railcar_unload.toml")
    coarse, fine = make_plan(scenario, steps=24).timeline, make_plan(scenario, steps=480).timeline
    for name in ("total_time_s", "trace_energy_j", "pump_energy_j", "vessel_heating_energy_j"):
        assert getattr(coarse, name) == pytest.approx(getattr(fine, name), rel=1e-3), name
    # the source at three quarters moved (at the end the railcar holds 2 of its 78 m^3, and the last increment's
    # contents shrink 2.6-fold: its temperature there is the least well resolved, 0.16 K at 24)
    at = [np.interp(57.0, t.arrays["moved_m3"], t.arrays["source_temperature_k"]) for t in (coarse, fine)]
    assert at[0] == pytest.approx(at[1], abs=0.02)
