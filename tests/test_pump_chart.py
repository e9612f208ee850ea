"""The pump chart at the plan's start (``planner.transfer.pump_chart``): the viscosity-corrected curve
against ANSI/HI 9.6.7 worked by hand here, the slip line of a PD pump by hand, and the operating point
on both the pump's and the system's curve."""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import DEMO_DIR
from planner.correlations.constants import GRAVITY
from planner.scenario.schema import load_scenario
from planner.transfer.operating import SystemState
from planner.transfer.plan import make_plan
from planner.transfer.pump_chart import pump_chart

POLYOL = DEMO_DIR / "polyol_tank_transfer.toml"     # centrifugal P-31
SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"      # internal gear pump P-3


@pytest.fixture(scope="module")
def polyol():
    plan = make_plan(load_scenario(POLYOL))
    return plan, pump_chart(plan)


def _hand_hi(nu_m2_s: float, bep_head_m: float, bep_flow_m3_s: float, rpm: float):
    """ANSI/HI 9.6.7 (formulas via a secondary summary; the same as ``transfer/pump_hi``'s doctests):
    B = 16.5 nu^0.5 H^0.0625 / (Q^0.375 N^0.25) with nu [cSt], H [m], Q [m3/h], N [rpm];
    C_Q = 2.71^(-0.165 (log10 B)^3.15)."""
    b = 16.5 * math.sqrt(nu_m2_s * 1e6) * bep_head_m ** 0.0625 / ((bep_flow_m3_s * 3600) ** 0.375 * rpm ** 0.25)
    return b, 2.71 ** (-0.165 * math.log10(b) ** 3.15)


def test_corrected_curve_is_ansi_hi_967_by_hand(polyol):
    plan, chart = polyol
    spec = plan.scenario.pump
    # BEP on water by hand: the vertex of the parabola through the best user point and its neighbours
    q = np.array([p.flow for p in spec.curve][2:5])
    eta = np.array([p.efficiency for p in spec.curve][2:5])
    a2, a1, _ = np.polyfit(q, eta, 2)
    q_bep = -a1 / (2 * a2)
    h_bep = plan.system.pump.water_head(q_bep)
    b, c_q = _hand_hi(chart.kinematic_viscosity_m2_s, h_bep, q_bep, spec.speed * 60)
    assert chart.hi_b == pytest.approx(b, rel=2e-3)          # the planner rounds nu to 4 digits
    assert 1.0 < b < 40.0 and chart.corrected is not None
    flows, heads = np.array(chart.corrected.flow_m3_s), np.array(chart.corrected.value)
    for point in spec.curve[1:]:
        c_h = 1.0 - (1.0 - c_q) * (point.flow / q_bep) ** 0.75
        i = int(np.argmin(abs(flows - c_q * point.flow)))
        assert flows[i] == pytest.approx(c_q * point.flow, rel=2e-3)
        assert heads[i] == pytest.approx(max(0.0, c_h * point.head), rel=3e-3)
    # the water curve passes through the user's points and starts at shut-off
    assert chart.water.value[0] == pytest.approx(spec.curve[0].head)
    assert np.interp(spec.curve[3].flow, chart.water.flow_m3_s, chart.water.value) == pytest.approx(spec.curve[3].head, rel=1e-6)


def test_operating_point_is_on_both_curves(polyol):
    plan, chart = polyol
    q, head = chart.operating_flow_m3_s, chart.operating_value
    assert q == pytest.approx(plan.start.flow) and head == pytest.approx(plan.start.pump_head)
    assert np.interp(q, chart.corrected.flow_m3_s, chart.corrected.value) == pytest.approx(head, rel=2e-3)
    source = plan.scenario.source
    state = SystemState(source.temperature, source.initial_volume)
    rho = plan.system.product.density(source.temperature)
    need = plan.system.at_flow(q, state).pump_differential / (rho * GRAVITY)
    assert need == pytest.approx(head, rel=2e-3)
    # the system curve rises with flow (friction) and crosses the pump's curve once
    system = np.array(chart.system.value)
    assert np.all(np.diff(system) > 0)
    gap = np.interp(chart.system.flow_m3_s, chart.corrected.flow_m3_s, chart.corrected.value) - system
    assert np.count_nonzero(np.diff(np.sign(gap))) == 1


def test_pd_slip_line_by_hand():
    plan = make_plan(load_scenario(SYRUP))
    chart = pump_chart(plan)
    spec = plan.scenario.pump
    assert chart.kind == "positive_displacement" and chart.quantity == "pressure"
    q_th = 1.5e-3 * 150 / 60                     # 1.5 L/rev at 150 rpm: 13.5 m3/h
    assert chart.water.flow_m3_s == pytest.approx([q_th] * len(chart.water.flow_m3_s))
    t_pump = plan.start.point.pump_inlet_temperature
    mu = plan.system.product.viscosity(t_pump)
    # slip = 0.5 m3/h (dp / 5 bar) (1000 cP / mu)^1, the scenario's slip reference (laminar slit flow:
    # White, Viscous Fluid Flow, section 3.2)
    for dp, q in zip(chart.corrected.value, chart.corrected.flow_m3_s):
        slip = 0.5 / 3600 * (dp / 5e5) * (1.0 / mu) ** spec.slip_viscosity_exponent
        assert q == pytest.approx(max(0.0, q_th - min(slip, q_th)), rel=1e-9, abs=1e-12)
    assert chart.relief_pa == pytest.approx(10e5) and max(chart.corrected.value) == pytest.approx(10e5)
    assert chart.operating_value == pytest.approx(plan.start.point.pump_differential)
    assert np.interp(chart.operating_value, chart.corrected.value, chart.corrected.flow_m3_s) == \
        pytest.approx(chart.operating_flow_m3_s, rel=1e-3)


def test_beyond_ansi_hi_967_no_curve_and_no_point():
    """Viscosity x 14 (a [calibration]-style factor): B = 12.6 x sqrt(14) = 47 by the square-root law of B in
    nu (ANSI/HI 9.6.7), above the method's 40: neither the corrected curve nor the point is given."""
    scenario = load_scenario(POLYOL)
    base = pump_chart(make_plan(scenario))
    plan = make_plan(scenario, viscosity_factor=14.0)
    chart = pump_chart(plan)
    assert not plan.start.hi_in_range
    assert chart.hi_b >= 40.0 and chart.hi_b == pytest.approx(base.hi_b * math.sqrt(14.0), rel=0.01)
    assert chart.corrected is None and chart.operating_flow_m3_s is None and chart.operating_value is None
    assert "beyond the range of ANSI/HI 9.6.7" in chart.note
    assert chart.water.value[0] == pytest.approx(52.0)                  # the water curve is still the data
