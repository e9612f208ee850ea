"""planner.transfer.vessels: levels, wetted areas and the lumped balance of the contents.

Source heating (steam coils, electric cut-out) is checked in test_source_heating.py."""

from __future__ import annotations

import math

import pytest

from conftest import plan_scenario
from planner.scenario.schema import scenario_from_dict
from planner.transfer.system import TransferSystem
from planner.transfer.timeline import run_transfer
from planner.transfer.vessels import cool_contents, level_from_volume


def test_source_vessel_cools_by_the_lumped_exponential_law():
    # Newton cooling, lumped capacitance: T = Ta + (T0 - Ta) exp(-U A t / (m cp)) (Incropera, ch. 5).
    t = cool_contents(353.15, 50_000.0, 2000.0, 400.0, 283.15, 0.0, 7200.0)
    assert t == pytest.approx(283.15 + 70.0 * math.exp(-400.0 * 7200.0 / (50_000.0 * 2000.0)), rel=1e-12)
    # with heating the balance heads to Ta + P/UA
    assert cool_contents(283.15, 1.0, 1.0, 10.0, 283.15, 500.0, 1e9) == pytest.approx(333.15)
    # and inside the timeline: a nearly full source barely changes mass or wetted area
    data = plan_scenario()
    data["site"]["ambient_temperature"] = 20.0
    data["source"].update(temperature=60.0, heat_loss_coefficient=5.0, initial_volume=500.0, volume_to_move=5.0)
    data["product"]["no_flow_temperature"] = -40.0
    scenario = scenario_from_dict(data)
    timeline = run_transfer(TransferSystem(scenario))
    area = math.pi * 10.0 * level_from_volume(scenario.source, 500.0) + math.pi * 25.0
    mass = 1100.0 * 500.0
    expected = 293.15 + 40.0 * math.exp(-5.0 * area * timeline.total_time_s / (mass * 2000.0))
    assert timeline.arrays["source_temperature_k"][-1] == pytest.approx(expected, abs=0.02)


@pytest.mark.parametrize("fill", [0.05, 0.25, 0.5, 0.8, 0.97])
def test_horizontal_cylinder_level_inverts_the_circular_segment(fill):
    # a horizontal cylinder filled to h of its diameter D holds (theta - sin theta) / (2 pi) of its volume,
    # theta = 2 acos(1 - 2h/D) (the circular segment; Perry's Handbook, section 10)
    from planner.scenario.schema import Vessel

    tank = Vessel(shape="horizontal_cylinder", diameter="2.6 m", length="12 m", initial_volume="50 m3",
                  volume_to_move="20 m3", temperature="20 degC")
    theta = 2 * math.acos(1 - 2 * fill)
    volume = (theta - math.sin(theta)) / (2 * math.pi) * math.pi * 1.3 ** 2 * 12.0
    assert level_from_volume(tank, volume) == pytest.approx(fill * 2.6, abs=1e-9)
