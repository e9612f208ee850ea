"""Issue 10 item 6: pre-warm treats each untraced gap as its own cold spot, and contents that cannot
move after the pre-warm end the plan with a stop.

The gap's own warm-up (the fin equation and its transient) is checked in test_transients.py.
"""

from __future__ import annotations

import pytest

from conftest import DEMO_DIR
from planner.checks.findings import assess
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict
from planner.scenario.wording import render
from planner.transfer.plan import make_plan

SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"
C0 = 273.15


def _syrup(first_length: float, gap: float, line_start: float) -> dict:
    data = scenario_to_dict(load_scenario(SYRUP))
    data["schedule"].update(start_mode="prewarm", line_start_temperature=line_start)
    data["route"]["segments"][0].update(length=first_length, untraced_length=gap)
    return data


def test_a_short_segment_with_the_same_gap_prewarms_in_the_same_time():
    # the traced pipe warms at the heater's full output whatever the segment's length: the 2 m gap is
    # its own cold spot, not spread over the segment (the 45 m -> 5 m case gave 4.7 h -> 17.2 h)
    long = make_plan(scenario_from_dict(_syrup(45.0, 2.0, 45.0))).prewarm
    short = make_plan(scenario_from_dict(_syrup(5.0, 2.0, 45.0))).prewarm
    assert long.possible and short.possible
    assert short.time_s == pytest.approx(long.time_s, rel=1e-6)
    gaps = [s for s in short.segments if s.gap_m]
    assert [s.gap_m for s in gaps][:1] == [2.0]


def test_contents_set_in_a_gap_stop_the_plan():
    # line at 5 degC, below the syrup's 15 degC no-flow temperature; a 3 m gap settles near 3 degC
    plan = make_plan(scenario_from_dict(_syrup(45.0, 2.0, 5.0)))
    assert plan.prewarm.possible and plan.prewarm.stuck
    assert plan.startup_time_s is None and plan.total_time_s is None
    [stop] = [f for f in assess(plan) if f.code == "PREWARM-CONTENTS-STUCK"]
    assert stop.severity == "stop" and "untraced gap" in stop.message
    assert "59 °F" in render(stop.message, "US")


def test_a_line_warmer_than_the_setpoint_is_pushed_at_its_own_temperature():
    data = _syrup(45.0, 0.0, 50.0)
    data["route"]["segments"][1]["untraced_length"] = 0.0
    data["tracing"]["setpoint"] = 30.0          # below the 50 degC line
    plan = make_plan(scenario_from_dict(data))
    assert plan.after_prewarm is not None
    assert plan.after_prewarm.start_temperature_k == pytest.approx(50.0 + C0)


def test_the_demos_still_start():
    for path in sorted(DEMO_DIR.glob("*.toml")):
        plan = make_plan(load_scenario(path))
        assert not plan.prewarm_stuck, path.name
        assert plan.startup_time_s is not None, path.name


def test_a_long_stop_sets_the_contents_of_a_gap_while_the_traced_pipe_holds():
    # the same cold spot during a stop with the tracing on: the traced pipe holds 55 degC, the 6 m gap
    # between its ends cools towards its fin temperature (here about 8 degC after 48 h, below the
    # syrup's 15 degC no-flow temperature): the hold check names the gap, not "holds"
    data = scenario_to_dict(load_scenario(SYRUP))
    data["route"]["segments"][0]["untraced_length"] = 6.0
    data["schedule"]["stop_duration"] = 48 * 3600.0
    data["suction"] = None
    plan = make_plan(scenario_from_dict(data))
    by_name = {s.segment: s for s in plan.hold.segments}
    assert by_name["Siding header"].time_to_limit_traced_s is None            # the traced pipe holds
    gap = by_name["Siding header, untraced gap"]
    assert gap.time_to_limit_traced_s is not None and gap.time_to_limit_traced_s < 48 * 3600.0
    assert gap.after_stop_traced_k < plan.system.product.no_flow_temperature
    [short] = [f for f in assess(plan) if f.code == "HOLD-SHORT"]
    assert "untraced gap" in short.message
