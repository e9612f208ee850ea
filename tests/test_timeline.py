"""planner.transfer.timeline: the transfer in equal volume increments."""

from __future__ import annotations

import math

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
    assert len(timeline.arrays["time_s"]) == 50


def test_the_destination_rises_by_the_volume_moved_over_its_area():
    # a vertical tank 10 m across starting at 1 m: level = 1 + V / (pi 5^2) at every increment's start
    timeline = run_transfer(TransferSystem(scenario_from_dict(plan_scenario())))
    for moved, level in zip(timeline.arrays["moved_m3"], timeline.arrays["destination_level_m"]):
        assert level == pytest.approx(1.0 + moved / (math.pi * 25.0), rel=1e-12)
