"""Issue 10 item 6: pre-warm treats each untraced gap as its own cold spot, and contents that cannot
move after the pre-warm end the plan with a stop.

Sources:
- Fin with both ends held at T_end, losing U (T - T_amb) per metre: steady centre temperature
  T_amb + (T_end - T_amb) / cosh(m L / 2), m = sqrt(U / kA) (Incropera & DeWitt, *Fundamentals of Heat
  and Mass Transfer*, ch. 3, fin equation).
- Its transient, C dT/dt = kA T'' - U (T - T_amb): checked against an independent explicit finite-difference
  solution written here (a standard FTCS scheme inside its stability limit, e.g. Incropera ch. 5).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import DEMO_DIR
from planner.checks.findings import assess
from planner.line.transients import _gap_centre
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict
from planner.scenario.wording import render
from planner.transfer.plan import make_plan

SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"
C0 = 273.15


def _fd_centre(gap, u, ka, cap, t0, t_end, t_amb, until, nodes=81):
    """FTCS: centre temperature at ``until`` seconds."""
    dx = gap / (nodes - 1)
    dt = 0.4 * cap * dx * dx / ka
    t = np.full(nodes, t0)
    t[0] = t[-1] = t_end
    steps = int(math.ceil(until / dt))
    dt = until / steps
    for _ in range(steps):
        lap = (t[2:] - 2 * t[1:-1] + t[:-2]) / (dx * dx)
        t[1:-1] += dt / cap * (ka * lap - u * (t[1:-1] - t_amb))
    return t[nodes // 2]


@pytest.mark.parametrize("gap, u", [(2.0, 0.35), (0.8, 0.35), (4.0, 0.6)])
def test_gap_centre_matches_the_fin_solution(gap, u):
    ka, cap, t0, t_end, t_amb = 0.095, 35_000.0, 5.0 + C0, 55.0 + C0, -4.0 + C0
    settles, centre = _gap_centre(gap, u, ka, cap, t0, t_end, t_amb)
    m = math.sqrt(u / ka)
    assert settles == pytest.approx(t_amb + (t_end - t_amb) / math.cosh(m * gap / 2), rel=1e-12)
    for hours in (1.0, 6.0, 24.0):
        reference = _fd_centre(gap, u, ka, cap, t0, t_end, t_amb, hours * 3600.0)
        assert centre(hours * 3600.0) == pytest.approx(reference, abs=0.05 * (t_end - t0) / 10)   # 0.25 K


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
