"""The suction line's profile along its length at the push-out starts (``PushCold.suction_profile``) and
what the dashboard keeps of it (``compute/line_extras``): the syrup demo's limiting warning is on its
suction hose H-3, a laminar 4 in hose of 6 m."""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import DEMO_DIR
from dashboard.compute.line_extras import prewarm_suction, suction_profiles
from planner.scenario.schema import load_scenario
from planner.scenario.units import ATMOSPHERE_PA, GRAVITY
from planner.transfer.plan import make_plan

SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"


@pytest.fixture(scope="module")
def plan():
    return make_plan(load_scenario(SYRUP))


def test_push_outs_keep_the_suction_march(plan):
    for push in (plan.push_cold, plan.after_prewarm):
        profile = push.suction_profile
        assert profile is not None and profile.summary.status == "ok"
        assert profile.nodes["temperature"][0] == pytest.approx(push.start_temperature_k)
        assert profile.summary.flow_m3_s == pytest.approx(push.initial_flow_m3_s)
        assert profile.nodes["x"][-1] == pytest.approx(6.0)           # the hose's 6 m
        # the same march the push's first operating point took: its NPSH available from the march's
        # outlet (ANSI/HI 9.6.1 definition: (p + p_atm - p_v) / (rho g) + V^2 / (2 g))
        product, seg = plan.system.product, plan.system.suction_line.segments[-1]
        t, p = profile.summary.outlet_temperature_k, profile.summary.outlet_pressure_pa
        rho = product.density(t)
        v = profile.summary.mass_flow_kg_s / (rho * seg.area)
        npsh = (p + ATMOSPHERE_PA - product.vapour_pressure(t)) / (rho * GRAVITY) + v * v / (2 * GRAVITY)
        assert npsh == pytest.approx(push.initial_npsh_available_m, rel=1e-9)


def test_hose_friction_is_hagen_poiseuille(plan):
    """Laminar (Re far below 2000): the friction drop of the 6 m hose, ID 4 in, is close to
    128 mu L Q / (pi D^4) (White, Fluid Mechanics, section 6.4); the march's developing-flow entrance adds
    a little (fittings are counted apart)."""
    profile = plan.push_cold.suction_profile
    assert np.nanmax(profile.steps["reynolds"]) < 100
    mu = float(np.mean(profile.steps["viscosity"]))
    d = 4 * 0.0254
    q = profile.summary.flow_m3_s
    hand = 128 * mu * 6.0 * q / (math.pi * d ** 4)
    assert profile.summary.friction_drop_pa == pytest.approx(hand, rel=0.02)


def test_the_dashboard_keeps_each_moment(plan):
    moments = suction_profiles(plan)
    assert list(moments) == ["start", "push_cold", "after_prewarm"]
    assert moments["push_cold"]["contents_k"] == pytest.approx(plan.push_cold.start_temperature_k)
    assert moments["start"]["contents_k"] == pytest.approx(plan.scenario.source.temperature)
    # the cold contents are stiffer: a larger drop along the hose at a comparable flow
    drop = {k: m["nodes"]["pressure"][0] - m["nodes"]["pressure"][-1] for k, m in moments.items()}
    assert drop["push_cold"] > drop["start"]
    warm = prewarm_suction(plan)
    assert [w["segment"] for w in warm] == ["Unloading hose H-3"] and not warm[0]["traced"]
    assert warm[0]["settles_at_k"] == pytest.approx(plan.prewarm.start_temperature_k)
