"""Checks of planner.pumps: the ANSI/HI 9.6.7 viscosity correction and the pump models.

Reference values come from ../shared/REFERENCES.md, "Pumps handling viscous liquids: ANSI/HI 9.6.7":
the formulas are [pub: secondary summary of the standard]; the numbers there are [calc], computed
from those formulas.  Other expected values are hand calculations from the formula named beside them.
"""

import math

import numpy as np
import pytest
import scipy.constants as sc

from planner.transfer.pumps import (
    CentrifugalPump,
    HICorrection,
    PositiveDisplacementPump,
    hi_correction,
    hi_parameter_b,
)

M3H = 1.0 / 3600.0  # m3/s per m3/h
CST = 1e-6  # m2/s per cSt
RPM = 1.0 / 60.0  # rev/s per rpm
G = 9.80665  # standard gravity, ISO 80000-3

# REFERENCES.md ANSI/HI 9.6.7 computed checks [calc]: (cSt, m3/h, m, rpm) -> B, C_Q, C_eta
HI_CASES = [
    (200.0, 200.0, 50.0, 2950.0, 5.544, 0.9373, 0.7368),
    (1000.0, 100.0, 40.0, 1450.0, 18.94, 0.7008, 0.2940),
]


# -- ANSI/HI 9.6.7 ---------------------------------------------------------------------------------


@pytest.mark.parametrize("nu, q, h, n, b_ref, cq_ref, ceta_ref", HI_CASES)
def test_hi_against_references_computed_checks(nu, q, h, n, b_ref, cq_ref, ceta_ref):
    # ANSI/HI 9.6.7 via a secondary summary, REFERENCES.md computed checks [calc];
    # printed to 4 figures -> rtol 1e-3
    b = hi_parameter_b(nu * CST, h, q * M3H, n * RPM)
    assert b == pytest.approx(b_ref, rel=1e-3)
    corr = hi_correction(b)
    assert corr.c_q == pytest.approx(cq_ref, rel=1e-3)
    assert corr.c_eta == pytest.approx(ceta_ref, rel=1e-3)
    assert corr.c_h == pytest.approx(corr.c_q, rel=1e-12)  # C_H = C_Q at the BEP [pub: summary]
    assert corr.in_range


@pytest.mark.parametrize("nu, q, h, n", [(c[0], c[1], c[2], c[3]) for c in HI_CASES] + [(30.0, 15.0, 80.0, 3550.0)])
def test_hi_b_si_form_agrees_with_us_form(nu, q, h, n):
    # ANSI/HI 9.6.7 US form B = 26.6 nu^0.5 H^0.0625 / (Q^0.375 N^0.25), H ft, Q US gpm [pub: summary];
    # unit factors from scipy.constants (CODATA / NIST).  The two printed constants are rounded:
    # 26.6 ft/gpm -> 16.43 in m, m3/h, a 0.4 % gap, so 0.6 % is the honest tolerance.
    h_ft = h / sc.foot
    q_gpm = q / 3600.0 / (sc.gallon / sc.minute)
    b_us = 26.6 * math.sqrt(nu) * h_ft**0.0625 / (q_gpm**0.375 * n**0.25)
    assert hi_parameter_b(nu * CST, h, q * M3H, n * RPM) == pytest.approx(b_us, rel=6e-3)


@pytest.mark.parametrize("b", [0.05, 0.5, 1.0])
def test_hi_no_correction_at_or_below_b_1(b):
    # ANSI/HI 9.6.7: B <= 1 means no correction [pub: summary]
    corr = hi_correction(b, flow_ratio=1.3)
    assert (corr.c_q, corr.c_h, corr.c_eta) == (1.0, 1.0, 1.0)
    assert corr.in_range


def test_hi_factors_continuous_just_above_b_1():
    # from the formulas [calc]: log10 B -> 0 so C_Q -> 1, and C_eta = B^(-0.0547 B^0.69) -> 1;
    # no step at the B = 1 switch
    corr = hi_correction(1.0001)
    assert corr.c_q == pytest.approx(1.0, abs=1e-9)
    assert corr.c_eta == pytest.approx(1.0, abs=1e-5)


def test_hi_head_factor_off_bep():
    # ANSI/HI 9.6.7 C_H = 1 - (1 - C_Q)(Q/Q_BEP)^0.75 [pub: summary], at REFERENCES case 1 (C_Q 0.9373 [calc])
    b = 5.544
    assert hi_correction(b, flow_ratio=0.0).c_h == 1.0  # shut-off head is not corrected
    c_q = hi_correction(b).c_q
    assert hi_correction(b, flow_ratio=1.5).c_h == pytest.approx(1.0 - (1.0 - 0.9373) * 1.5**0.75, rel=2e-4)
    assert hi_correction(b, flow_ratio=0.5).c_h == pytest.approx(1.0 - (1.0 - c_q) * 0.5**0.75, rel=1e-12)


@pytest.mark.parametrize("b", [40.0, 55.0])
def test_hi_out_of_range_flagged(b):
    # ANSI/HI 9.6.7 covers 1 < B < 40 [pub: summary]; beyond, same formulas, flagged
    corr = hi_correction(b)
    assert not corr.in_range
    assert "range" in corr.note and "40" in corr.note
    # factors still from the formulas [calc]
    assert corr.c_q == pytest.approx(2.71 ** (-0.165 * math.log10(b) ** 3.15), rel=1e-12)
    assert corr.c_eta == pytest.approx(b ** (-0.0547 * b**0.69), rel=1e-12)
    assert hi_correction(39.9).in_range


def test_hi_bad_inputs_name_the_field():
    with pytest.raises(ValueError, match="kinematic viscosity"):
        hi_parameter_b(-1e-4, 50.0, 0.05, 49.0)
    with pytest.raises(ValueError, match="BEP flow"):
        hi_parameter_b(1e-4, 50.0, 0.0, 49.0)
    with pytest.raises(ValueError, match="flow ratio"):
        hi_correction(5.0, flow_ratio=-0.1)


# -- CentrifugalPump -------------------------------------------------------------------------------

# Invented water curve whose BEP sits exactly on REFERENCES case 1: 200 m3/h, 50 m, 2950 rpm.
# The efficiency is symmetric about 200 m3/h, so the parabola's vertex is exactly there.
FLOWS_M3H = [0.0, 50.0, 100.0, 150.0, 200.0, 250.0, 300.0]
HEADS = [62.0, 61.0, 58.5, 55.0, 50.0, 43.0, 34.0]
ETAS = [0.0, 0.40, 0.62, 0.76, 0.80, 0.76, 0.62]
NPSH = [1.5, 1.8, 2.2, 2.8, 3.6, 4.8, 6.5]


def reference_pump(**kw):
    args = dict(flows_m3_s=[q * M3H for q in FLOWS_M3H], heads_m=HEADS, efficiencies=ETAS,
                speed_rev_s=2950.0 * RPM, npsh_required_m=NPSH)
    args.update(kw)
    return CentrifugalPump(**args)


def test_pump_bep_on_reference_point():
    # symmetric efficiency data -> parabola vertex at 200 m3/h, 0.80 [calc]
    pump = reference_pump()
    assert pump.bep_flow_m3_s == pytest.approx(200.0 * M3H, rel=1e-12)
    assert pump.bep_head_m == pytest.approx(50.0, rel=1e-12)
    assert pump.bep_efficiency == pytest.approx(0.80, rel=1e-12)


def test_pump_bep_parabola_vertex_asymmetric():
    # parabola through the top three points, vertex -b/(2a) via numpy.polyfit [calc]
    q = [0.0, 0.01, 0.02, 0.03, 0.04]
    e = [0.0, 0.55, 0.74, 0.70, 0.50]
    pump = CentrifugalPump(q, [40.0, 39.0, 36.0, 31.0, 24.0], e, 24.0)
    a2, a1, a0 = np.polyfit(q[1:4], e[1:4], 2)
    q_top = -a1 / (2.0 * a2)
    assert pump.bep_flow_m3_s == pytest.approx(q_top, rel=1e-9)
    assert pump.bep_efficiency == pytest.approx(a0 + a1 * q_top + a2 * q_top**2, rel=1e-9)


def test_pump_viscous_correction_at_bep_matches_references():
    # ANSI/HI 9.6.7 via a secondary summary, REFERENCES.md case 1 [calc]: B 5.544, C_Q 0.9373, C_eta 0.7368
    pump = reference_pump()
    curve = pump.viscous_curve(200.0 * CST)
    assert curve.correction.b == pytest.approx(5.544, rel=1e-3)
    q_vis = 0.9373 * 200.0 * M3H
    # BEP moves to (C_Q Q, C_H H, C_eta eta) with C_H = C_Q at the BEP
    assert pump.head(q_vis, 200.0 * CST) == pytest.approx(0.9373 * 50.0, rel=1e-3)
    assert pump.efficiency(q_vis, 200.0 * CST) == pytest.approx(0.7368 * 0.80, rel=1e-3)


def test_pump_viscous_curve_off_bep_uses_flow_ratio():
    # ANSI/HI 9.6.7: water point (100 m3/h, 58.5 m) has Q/Q_BEP = 0.5 -> C_H = 1 - (1 - C_Q) 0.5^0.75 [calc]
    pump = reference_pump()
    nu = 200.0 * CST
    c_q = pump.viscous_curve(nu).correction.c_q
    c_h = 1.0 - (1.0 - c_q) * 0.5**0.75
    assert pump.head(c_q * 100.0 * M3H, nu) == pytest.approx(c_h * 58.5, rel=1e-9)
    assert pump.shut_off_head(nu) == 62.0  # C_H = 1 at shut-off
    assert pump.max_flow(nu) == pytest.approx(c_q * 300.0 * M3H, rel=1e-12)


def test_pump_multistage_uses_head_per_stage():
    # ANSI/HI 9.6.7 takes H per stage [pub: summary]: two stages of 50 m at BEP -> same B as case 1 [calc]
    pump = reference_pump(heads_m=[2.0 * h for h in HEADS], stages=2)
    assert pump.viscous_curve(200.0 * CST).correction.b == pytest.approx(5.544, rel=1e-3)


def test_pump_thin_liquid_is_not_corrected():
    # B scales with nu^0.5 [pub: summary]: 1 cSt gives B = 5.544/sqrt(200) = 0.39 < 1 [calc] -> water curve
    pump = reference_pump()
    curve = pump.viscous_curve(1.0 * CST)
    assert curve.correction.b == pytest.approx(5.544 / math.sqrt(200.0), rel=1e-3)
    for q in (0.0, 0.013, 0.04, 0.07, 0.09):
        assert pump.head(q, 1.0 * CST) == pump.water_head(q)
        assert pump.efficiency(q, 1.0 * CST) == pump.water_efficiency(q)


def test_pump_curve_passes_through_the_data_and_stays_monotone():
    # PCHIP interpolates the data and preserves monotonicity (Fritsch & Carlson 1980) [pub]
    pump = reference_pump()
    for q, h, e in zip(FLOWS_M3H, HEADS, ETAS):
        assert pump.water_head(q * M3H) == pytest.approx(h, abs=1e-12)
        assert pump.water_efficiency(q * M3H) == pytest.approx(e, abs=1e-12)
    heads = [pump.water_head(q) for q in np.linspace(0.0, 300.0 * M3H, 997)]
    assert all(b <= a + 1e-12 for a, b in zip(heads, heads[1:]))
    etas = [pump.water_efficiency(q) for q in np.linspace(0.0, 300.0 * M3H, 997)]
    assert max(etas) <= 0.80 + 1e-12  # no overshoot above the data


def test_pump_extrapolates_along_the_last_segment_clipped_at_zero():
    # documented rule: beyond the last point, the line through the last two user points, clipped at 0
    pump = reference_pump()
    slope = (34.0 - 43.0) / (50.0 * M3H)
    assert pump.water_head(330.0 * M3H) == pytest.approx(34.0 + slope * 30.0 * M3H, rel=1e-12)
    assert pump.water_head(1000.0 * M3H) == 0.0


def test_pump_shaft_power_hand_value():
    # P = rho g Q H / eta [calc]: 1000 * 9.80665 * (200/3600) * 50 / 0.80 = 34 050.9 W
    pump = reference_pump()
    assert pump.shaft_power(200.0 * M3H, 50.0, 1000.0, 1.0 * CST) == pytest.approx(34050.9, rel=1e-5)
    # viscous efficiency: 900 kg/m3 at the corrected BEP, eta = C_eta 0.80 (REFERENCES case 1 [calc])
    q_vis, h_vis = 0.9373 * 200.0 * M3H, 0.9373 * 50.0
    expected = 900.0 * G * q_vis * h_vis / (0.7368 * 0.80)
    assert pump.shaft_power(q_vis, h_vis, 900.0, 200.0 * CST) == pytest.approx(expected, rel=2e-3)


def test_pump_shaft_power_at_shut_off_is_the_limit():
    # eta(0) = 0: limit of Q/eta along the first (linear) segment of the table [calc]; finite, positive
    pump = reference_pump()
    p0 = pump.shaft_power(0.0, 62.0, 1000.0, 1.0 * CST)
    p_small = pump.shaft_power(1e-9, 62.0, 1000.0, 1.0 * CST)
    assert p0 == pytest.approx(p_small, rel=1e-6)
    assert 0.0 < p0 < pump.shaft_power(200.0 * M3H, 50.0, 1000.0, 1.0 * CST)


def test_pump_npsh_required():
    # linear between the user points [calc]
    pump = reference_pump()
    assert pump.npsh_required(125.0 * M3H) == pytest.approx(0.5 * (2.2 + 2.8), rel=1e-12)
    assert pump.npsh_required(330.0 * M3H) == pytest.approx(6.5 + (6.5 - 4.8) * 30.0 / 50.0, rel=1e-12)
    assert reference_pump(npsh_required_m=3.2).npsh_required(0.05) == 3.2
    assert reference_pump(npsh_required_m=None).npsh_required(0.05) is None


def test_pump_cache_by_four_significant_digits():
    pump = reference_pump()
    a = pump.viscous_curve(2.0e-4)
    assert pump.viscous_curve(2.00004e-4) is a
    assert pump.viscous_curve(2.001e-4) is not a
    assert pump.viscous_curve(2.00004e-4).kinematic_viscosity_m2_s == 2.0e-4


def test_pump_out_of_range_b_reaches_the_curve():
    # small slow pump on a very thick liquid: B >= 40 -> flagged [calc from the B formula]
    pump = CentrifugalPump([0.0, 2.0 * M3H, 4.0 * M3H, 6.0 * M3H], [20.0, 19.0, 17.0, 13.0],
                           [0.0, 0.30, 0.40, 0.35], 1450.0 * RPM)
    curve = pump.viscous_curve(3000.0 * CST)
    assert curve.correction.b >= 40.0
    assert not curve.correction.in_range
    assert isinstance(curve.correction, HICorrection)


@pytest.mark.parametrize("change, field", [
    (dict(flows_m3_s=[0.0, 0.01], heads_m=[10.0, 9.0], efficiencies=[0.0, 0.5]), "flows_m3_s"),
    (dict(flows_m3_s=[0.001, 0.01, 0.02], heads_m=[10.0, 9.0, 7.0], efficiencies=[0.1, 0.5, 0.6]), "flows_m3_s"),
    (dict(flows_m3_s=[0.0, 0.02, 0.02], heads_m=[10.0, 9.0, 7.0], efficiencies=[0.0, 0.5, 0.6]), "flows_m3_s"),
    (dict(flows_m3_s=[0.0, 0.01, 0.02], heads_m=[10.0, 9.0, 0.0], efficiencies=[0.0, 0.5, 0.6]), "heads_m"),
    (dict(flows_m3_s=[0.0, 0.01, 0.02], heads_m=[10.0, 9.0], efficiencies=[0.0, 0.5, 0.6]), "heads_m"),
    (dict(flows_m3_s=[0.0, 0.01, 0.02], heads_m=[10.0, 9.0, 7.0], efficiencies=[0.0, 0.5, 1.2]), "efficiencies"),
    (dict(flows_m3_s=[0.0, 0.01, 0.02], heads_m=[10.0, 9.0, 7.0], efficiencies=[0.0, 0.0, 0.6]), "efficiencies"),
    (dict(speed_rev_s=0.0), "speed_rev_s"),
    (dict(stages=0), "stages"),
    (dict(npsh_required_m=[1.0, 2.0]), "npsh_required_m"),
])
def test_pump_bad_curves_name_the_field(change, field):
    args = dict(flows_m3_s=[0.0, 0.01, 0.02], heads_m=[10.0, 9.0, 7.0], efficiencies=[0.0, 0.5, 0.6],
                speed_rev_s=24.0)
    args.update(change)
    with pytest.raises(ValueError, match=field):
        CentrifugalPump(**args)


def test_pump_negative_flow_or_viscosity_rejected():
    pump = reference_pump()
    with pytest.raises(ValueError, match="flow"):
        pump.head(-0.001, 1e-4)
    with pytest.raises(ValueError, match="kinematic viscosity"):
        pump.head(0.01, 0.0)


# -- PositiveDisplacementPump ----------------------------------------------------------------------


def test_pd_without_slip_delivers_displacement_times_speed():
    # defining property of a positive-displacement pump: Q = V_d N whatever the pressure [pub: any pump text]
    pump = PositiveDisplacementPump(displacement_m3_per_rev=5e-5, speed_rev_s=25.0)
    for dp in (0.0, 1e5, 1e6, 1e7):
        for mu in (1e-3, 0.5, 50.0):
            assert pump.delivered_flow(dp, mu) == 5e-5 * 25.0
    assert pump.theoretical_flow(10.0) == 5e-5 * 10.0


def slipping_pump(**kw):
    args = dict(displacement_m3_per_rev=5e-5, speed_rev_s=25.0, slip_flow_m3_s=1e-4,
                slip_reference_pressure_pa=5e5, slip_reference_viscosity_pa_s=0.2)
    args.update(kw)
    return PositiveDisplacementPump(**args)


def test_pd_slip_scales_with_dp_over_viscosity():
    # laminar slit flow q = w c^3 dp / (12 mu L) (plane Poiseuille, any fluid-mechanics text) [pub]
    pump = slipping_pump()
    assert pump.slip(5e5, 0.2) == pytest.approx(1e-4, rel=1e-12)  # the reference point itself
    assert pump.slip(1e6, 0.2) == pytest.approx(2.0 * pump.slip(5e5, 0.2), rel=1e-12)
    assert pump.slip(5e5, 0.4) == pytest.approx(0.5 * pump.slip(5e5, 0.2), rel=1e-12)
    # exponent 0.5 [calc]: four times the viscosity -> half the slip
    half = slipping_pump(slip_viscosity_exponent=0.5)
    assert half.slip(5e5, 0.8) == pytest.approx(0.5e-4, rel=1e-12)


def test_pd_slip_limits():
    pump = slipping_pump()
    assert pump.slip(-2e5, 0.2) == 0.0  # suction above discharge: documented as no slip
    assert pump.delivered_flow(-2e5, 0.2) == pump.theoretical_flow()
    # thin liquid, high dp: slip capped at the theoretical flow, delivered flow 0 [calc]
    assert pump.slip(2e7, 1e-3) == pump.theoretical_flow()
    assert pump.delivered_flow(2e7, 1e-3) == 0.0
    # hand value: 1.25e-3 - 1e-4 (8e5/5e5)(0.2/0.1) = 9.3e-4 m3/s [calc]
    assert pump.delivered_flow(8e5, 0.1) == pytest.approx(9.3e-4, rel=1e-12)


@pytest.mark.parametrize("dp", [0.0, 1e4, 3e5, 1.2e6, 2.5e6])
@pytest.mark.parametrize("mu", [0.01, 0.3, 4.0])
def test_pd_differential_round_trip(dp, mu):
    pump = slipping_pump(slip_viscosity_exponent=0.8)
    q = pump.delivered_flow(dp, mu)
    if q > 0.0:
        assert pump.differential_for_flow(q, mu) == pytest.approx(dp, rel=1e-9, abs=1e-6)


def test_pd_differential_edges():
    pump = slipping_pump()
    q_th = pump.theoretical_flow()
    assert pump.differential_for_flow(q_th, 0.2) == 0.0
    # zero delivery when slip = theoretical: dp = 1.25e-3 / (1e-4 / 5e5) = 6.25e6 Pa [calc]
    assert pump.differential_for_flow(0.0, 0.2) == pytest.approx(6.25e6, rel=1e-12)
    assert PositiveDisplacementPump(5e-5, 25.0).differential_for_flow(1e-3, 0.2) == math.inf
    with pytest.raises(ValueError, match="flow"):
        pump.differential_for_flow(1.1 * q_th, 0.2)


def test_pd_shaft_power_hand_value():
    # P = V_d N dp / eta_m [calc]: 5e-5 * 25 * 6e5 / 0.85 = 882.3529 W (slip flow pumped too)
    pump = slipping_pump()
    assert pump.shaft_power(6e5, 0.2) == pytest.approx(882.3529, rel=1e-6)
    assert pump.shaft_power(6e5, 0.2, speed=12.5) == pytest.approx(441.1765, rel=1e-6)
    limited = slipping_pump(motor_power_w=800.0)
    assert limited.motor_overloaded(limited.shaft_power(6e5, 0.2))
    assert not limited.motor_overloaded(limited.shaft_power(5e5, 0.2))  # 735.3 W
    assert not pump.motor_overloaded(1e9)  # no rating given


@pytest.mark.parametrize("change, field", [
    (dict(displacement_m3_per_rev=0.0), "displacement_m3_per_rev"),
    (dict(displacement_m3_per_rev=-1e-5), "displacement_m3_per_rev"),
    (dict(mechanical_efficiency=0.0), "mechanical_efficiency"),
    (dict(mechanical_efficiency=1.05), "mechanical_efficiency"),
    (dict(speed_rev_s=-1.0), "speed_rev_s"),
    (dict(slip_flow_m3_s=-1e-5), "slip_flow_m3_s"),
    (dict(slip_reference_viscosity_pa_s=0.0), "slip_reference_viscosity_pa_s"),
    (dict(max_speed_rev_s=20.0), "speed_rev_s"),
    (dict(relief_setting_pa=0.0), "relief_setting_pa"),
])
def test_pd_bad_inputs_name_the_field(change, field):
    with pytest.raises(ValueError, match=field):
        slipping_pump(**change)


def test_pd_bad_viscosity_rejected():
    with pytest.raises(ValueError, match="viscosity"):
        slipping_pump().delivered_flow(1e5, 0.0)
