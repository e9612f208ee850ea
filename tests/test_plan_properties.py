"""Generated transfer scenarios: a plan with finite figures, or a clear message — never a traceback."""

from __future__ import annotations

import math

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from planner.errors import PlannerError
from planner.checks.findings import assess
from planner.transfer.plan import make_plan
from planner.reports.plan_json import plan_json
from planner.scenario.schema import scenario_from_dict
from test_findings import bench

pytestmark = pytest.mark.slow  # property: left out of the fast loop (-m "not slow")


def _finite_everywhere(value, path="plan"):
    if isinstance(value, float):
        assert math.isfinite(value), path
    elif isinstance(value, dict):
        for k, v in value.items():
            _finite_everywhere(v, f"{path}.{k}")
    elif isinstance(value, list):
        for i, v in enumerate(value[:5]):
            _finite_everywhere(v, f"{path}[{i}]")


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    mu=st.floats(1e-3, 200.0), length=st.floats(5.0, 3000.0), rise=st.floats(-5.0, 40.0),
    source_c=st.floats(-10.0, 120.0), ambient_c=st.floats(-30.0, 40.0), wind=st.floats(0.0, 15.0),
    speed_rpm=st.floats(20.0, 1500.0), relief_bar=st.one_of(st.none(), st.floats(0.05, 30.0)),
    slip_m3_h=st.floats(0.0, 5.0), tracing=st.sampled_from(["none", "electric_constant", "electric_self_regulating", "steam"]),
    setpoint_c=st.floats(5.0, 150.0), output=st.floats(1.0, 80.0), no_flow_c=st.floats(-40.0, 60.0),
    mode=st.sampled_from(["prewarm", "push_cold"]), line_c=st.floats(-30.0, 100.0),
    pump=st.sampled_from(["positive_displacement", "centrifugal"]),
)
def test_generated_plans_are_finite_or_explained(mu, length, rise, source_c, ambient_c, wind, speed_rpm, relief_bar,
                                                 slip_m3_h, tracing, setpoint_c, output, no_flow_c, mode, line_c, pump):
    data = bench()
    data["product"]["viscosity"]["coefficients"]["a"] = math.log(mu)
    data["product"]["no_flow_temperature"] = no_flow_c
    data["product"]["max_temperature"] = 200.0
    data["route"]["segments"][0].update(length=length, elevation_change=max(-length, min(rise, length)),
                                        insulation=[{"material": "mineral_wool", "thickness": 50}])
    data["site"].update(ambient_temperature=ambient_c, wind_speed=wind)
    data["source"]["temperature"] = source_c
    data["schedule"].update(start_mode=mode, line_start_temperature=line_c)
    if pump == "centrifugal":
        data["pump"] = {"kind": "centrifugal", "speed": f"{speed_rpm * 2} rpm", "curve": [
            {"flow": 0, "head": 60, "efficiency": 0.0}, {"flow": "40 m3/h", "head": 55, "efficiency": 0.6},
            {"flow": "80 m3/h", "head": 42, "efficiency": 0.7}, {"flow": "120 m3/h", "head": 25, "efficiency": 0.6}]}
    else:
        data["pump"].update(speed=f"{speed_rpm} rpm", slip_flow=f"{slip_m3_h} m3/h")
        if relief_bar is not None:
            data["pump"]["relief_setting"] = f"{relief_bar} bar"
    data["tracing"] = {"kind": tracing, "setpoint": setpoint_c, "output": output, "steam_pressure": "3 bar"}
    try:
        scenario = scenario_from_dict(data)
        plan = make_plan(scenario, steps=12)
        findings = assess(plan)
    except PlannerError as exc:
        assert str(exc)
        return
    assert findings[-1].code == "PLANNING-ESTIMATE"
    doc = plan_json(plan, arrays=False)
    _finite_everywhere(doc["start"])
    _finite_everywhere(doc["costs"])
    _finite_everywhere(doc["energy"])
