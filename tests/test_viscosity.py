"""Viscosity–temperature laws and fits, held against outside references.

Water values: /work/shared/REFERENCES.md, "Water at 101.325 kPa" [lib: iapws 1.5.5, IAPWS 2008
viscosity; CoolProp 8.0.0 agrees].  ASTM D341-09 equations: REFERENCES.md [pub].
"""

from __future__ import annotations

import math

import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from planner.correlations.viscosity import AndradeLaw, VogelFulcherTammannLaw, WaltherLaw, walther_cst_to_z, walther_z_to_cst
from planner.correlations.viscosity_fit import ViscosityFit, fit_viscosity_law

C0 = 273.15
# Water, mu [Pa s] at 101.325 kPa  # REFERENCES.md [lib: iapws 1.5.5, IAPWS 2008 viscosity]
WATER_MU = {20: 1.00160e-3, 40: 0.65273e-3, 50: 0.54652e-3, 60: 0.46604e-3, 80: 0.35405e-3}


def _z_d341(nu_cst: float) -> float:
    """ASTM D341-09 Z(nu), typed here from REFERENCES.md [pub], independent of the module."""
    return nu_cst + 0.7 + math.exp(-1.47 - 1.84 * nu_cst - 0.51 * nu_cst**2)


# ------------------------------------------------------------------------------------- Andrade
def test_andrade_water_two_point_predicts_40c():
    # REFERENCES.md: a two-point Andrade fit through 20 and 60 °C predicts 40 °C "within a few %".
    fit = fit_viscosity_law("andrade", [20 + C0, 60 + C0], [WATER_MU[20], WATER_MU[60]])
    err = fit.law.dynamic(40 + C0) / WATER_MU[40] - 1.0
    # Achieved +2.14 % (Andrade over-predicts at mid-range for water); hold it to 2.14 ± 0.05 %
    # and below the 3 % "few percent" ceiling.
    assert err == pytest.approx(0.0214, abs=5e-4)
    assert abs(err) < 0.03
    assert fit.is_extrapolation(80 + C0) and not fit.is_extrapolation(40 + C0)


def test_andrade_two_points_reproduced_exactly():
    # Two points determine a, b: the fit must pass through them (iapws 1.5.5 values, REFERENCES.md).
    ts, mus = [20 + C0, 60 + C0], [WATER_MU[20], WATER_MU[60]]
    fit = fit_viscosity_law("andrade", ts, mus)
    for t, mu in zip(ts, mus):
        assert fit.law.value(t) == pytest.approx(mu, rel=1e-12)
    assert fit.rms_log_residual < 1e-12 and fit.max_relative_residual < 1e-12
    assert fit.n_points == 2 and (fit.t_min, fit.t_max) == (20 + C0, 60 + C0)
    assert fit.law.name == "andrade" and fit.law.quantity == "dynamic"
    assert set(fit.law.parameters()) == {"a", "b"}


# ------------------------------------------------------------------------------------------ VFT
def test_vft_three_points_reproduced_exactly():
    # Three points determine a, b, c (closed form); iapws 1.5.5 values from REFERENCES.md.
    ts = [20 + C0, 40 + C0, 60 + C0]
    mus = [WATER_MU[20], WATER_MU[40], WATER_MU[60]]
    fit = fit_viscosity_law("vft", ts, mus)
    for t, mu in zip(ts, mus):
        assert fit.law.dynamic(t) == pytest.approx(mu, rel=1e-12)
    assert fit.law.c < ts[0]
    assert fit.law.name == "vft" and set(fit.law.parameters()) == {"a", "b", "c"}


def test_vft_water_four_points_within_one_percent():
    # Least-squares VFT through 20/40/60/80 °C, checked at the fitted points, at 50 °C
    # (REFERENCES.md, iapws 1.5.5) and at 30/70 °C computed with iapws 1.5.5 IAPWS95 (test-only).
    from iapws import IAPWS95

    pts = [20, 40, 60, 80]
    fit = fit_viscosity_law("vft", [c + C0 for c in pts], [WATER_MU[c] for c in pts])
    assert fit.max_relative_residual < 0.01
    checks = {50: WATER_MU[50]}
    for c in (30, 70):
        checks[c] = IAPWS95(T=c + C0, P=0.101325).mu  # iapws 1.5.5, IAPWS 2008 viscosity
    for c, mu in checks.items():
        assert fit.law.dynamic(c + C0) == pytest.approx(mu, rel=0.01), c
    # The VFT form suits water: achieved max point error 0.063 %, well inside 1 %.
    assert fit.max_relative_residual < 0.002


def test_vft_many_points_robust_on_noisy_data():
    # Invented bitumen-like law with ±1 % alternating noise: the fit must stay within the noise.
    true = VogelFulcherTammannLaw(-9.0, 2000.0, 200.0)
    ts = [333.15, 373.15, 408.15, 433.15, 453.15]
    mus = [true.dynamic(t) * (1.0 + 0.01 * (-1) ** i) for i, t in enumerate(ts)]
    fit = fit_viscosity_law("vft", ts, mus)
    assert fit.max_relative_residual < 0.015
    for t in ts:
        assert fit.law.dynamic(t) == pytest.approx(true.dynamic(t), rel=0.015)


def test_vft_below_c_raises_naming_temperature_and_c():
    law = VogelFulcherTammannLaw(-10.0, 500.0, 150.0)
    with pytest.raises(ValueError, match=r"temperature = 140\.0 K.*c = 150\.0 K"):
        law.dynamic(140.0)


# -------------------------------------------------------------------------------------- Walther
def test_d341_inverse_round_trip():
    # ASTM D341-09 forward Z(nu) typed from REFERENCES.md [pub]; the module's inverse must undo it.
    for nu in (0.25, 0.5, 1.0, 2.0, 3.0, 4.0, 5.0, 5.5, 6.0, 10.0, 180.0, 1e4, 1e6):
        assert walther_z_to_cst(_z_d341(nu)) == pytest.approx(nu, rel=1e-13)
        assert walther_cst_to_z(nu) == pytest.approx(_z_d341(nu), rel=1e-15)


def test_walther_rme180_two_points_reproduce():
    # ISO 8217 RME180 limit 180 cSt at 50 °C [pub, REFERENCES.md]; 30 cSt at 100 °C is invented.
    ts, nus = [50 + C0, 100 + C0], [180e-6, 30e-6]
    fit = fit_viscosity_law("walther", ts, nus)
    for t, nu in zip(ts, nus):
        assert fit.law.kinematic(t) == pytest.approx(nu, rel=1e-10)
    assert fit.law.quantity == "kinematic" and fit.law.name == "walther"
    # ASTM D341 two-point constants by hand (REFERENCES.md form, log10 log10 Z = A - B log10 T):
    y1, y2 = (math.log10(math.log10(_z_d341(v * 1e6))) for v in nus)
    b_hand = (y1 - y2) / (math.log10(ts[1]) - math.log10(ts[0]))
    a_hand = y1 + b_hand * math.log10(ts[0])
    assert fit.law.b == pytest.approx(b_hand, rel=1e-12)
    assert fit.law.a == pytest.approx(a_hand, rel=1e-12)
    # Interpolation at 80 °C from the hand constants via D341's Z -> nu (exp term < 1e-11 here).
    z80 = 10 ** (10 ** (a_hand - b_hand * math.log10(80 + C0)))
    assert fit.law.kinematic(80 + C0) * 1e6 == pytest.approx(z80 - 0.7, rel=1e-9)


def test_walther_is_straight_on_loglog_against_log_t():
    # ASTM D341 [pub]: the chart is built so an oil plots as a straight line in loglog Z vs log T.
    law = WaltherLaw(9.5, 3.6)
    ts = [260.0 + 20.0 * k for k in range(10)]
    ys = [math.log10(math.log10(_z_d341(law.kinematic(t) * 1e6))) for t in ts]
    for t, y in zip(ts, ys):
        assert y == pytest.approx(9.5 - 3.6 * math.log10(t), abs=1e-11)
    # and the viscosity really falls with temperature across the chart
    assert all(law.kinematic(t1) > law.kinematic(t2) for t1, t2 in zip(ts, ts[1:]))


# ------------------------------------------------------------------------------------- property
@settings(max_examples=60, deadline=None)
@given(a=st.floats(0.1, 8.0), b=st.floats(50.0, 5000.0))
def test_andrade_fit_recovers_parameters(a, b):
    # Round trip: points made from a law are fitted back to the same constants (least squares).
    law = AndradeLaw(a, b)
    ts = [280.0, 310.0, 345.0, 390.0]
    fit = fit_viscosity_law("andrade", ts, [law.dynamic(t) for t in ts])
    assert fit.law.a == pytest.approx(a, rel=1e-9, abs=1e-9)
    assert fit.law.b == pytest.approx(b, rel=1e-9)


@settings(max_examples=60, deadline=None)
@given(y300=st.floats(-0.6, 0.6), b=st.floats(2.0, 4.5))
def test_walther_fit_recovers_parameters(y300, b):
    # Parametrised by loglog Z at 300 K (about 1 to 1e4 cSt) so a, b stay a petroleum-like pair.
    a = y300 + b * math.log10(300.0)
    law = WaltherLaw(a, b)
    ts = [300.0, 330.0, 360.0, 400.0]
    nus = [law.kinematic(t) for t in ts]
    assume(min(nus) > 0.5e-6)  # keep inside the range where D341's equations are stated
    fit = fit_viscosity_law("walther", ts, nus)
    assert fit.law.a == pytest.approx(a, rel=1e-8)
    assert fit.law.b == pytest.approx(b, rel=1e-8)


@settings(max_examples=40, deadline=None)
@given(a=st.floats(-12.0, -6.0), b=st.floats(300.0, 3000.0), c=st.floats(100.0, 220.0))
def test_vft_fit_recovers_parameters(a, b, c):
    law = VogelFulcherTammannLaw(a, b, c)
    ts = [290.0, 310.0, 330.0, 350.0, 380.0]
    fit = fit_viscosity_law("vft", ts, [law.dynamic(t) for t in ts])
    assert fit.max_relative_residual < 1e-6
    assert fit.law.c == pytest.approx(c, rel=1e-3)


# --------------------------------------------------------------------------------------- errors
@pytest.mark.parametrize(
    "law, ts, vs, pattern",
    [
        ("arrhenius", [300, 320], [1e-3, 5e-4], r"law = 'arrhenius'.*allowed: 'andrade', 'vft'"),
        ("andrade", [300], [1e-3], r"1 points given; law 'andrade' needs at least 2"),
        ("vft", [300, 320], [1e-3, 5e-4], r"2 points given; law 'vft' needs at least 3"),
        ("andrade", [300, 320], [1e-3, 0.0], r"values\[1\] = 0\.0.*must be > 0"),
        ("andrade", [300, 300], [1e-3, 5e-4], r"temperatures_k\[1\] = 300 K duplicates"),
        ("andrade", [300, math.nan], [1e-3, 5e-4], r"temperatures_k\[1\] = nan.*finite"),
        ("andrade", [300, 320], [1e-3, math.inf], r"values\[1\] = inf.*finite"),
        ("andrade", [0.0, 320], [1e-3, 5e-4], r"temperatures_k\[0\] = 0\.0 K: must be > 0 K"),
        ("andrade", [300, 320, 340], [1e-3, 5e-4], r"temperatures_k has 3 entries but values has 2"),
        ("walther", [300, 320], [1e-6, 1e-8], r"values\[1\] = 1e-08 m2/s: below the ASTM D341"),
    ],
)
def test_bad_input_names_field_value_and_limit(law, ts, vs, pattern):
    with pytest.raises(ValueError, match=pattern):
        fit_viscosity_law(law, ts, vs)


def test_law_rejects_non_positive_temperature_and_bad_parameters():
    with pytest.raises(ValueError, match=r"temperature = -5\.0 K: must be > 0 K"):
        AndradeLaw(-13.0, 1900.0).dynamic(-5.0)
    with pytest.raises(ValueError, match=r"temperature = 0\.0 K"):
        WaltherLaw(9.5, 3.6).kinematic(0.0)
    with pytest.raises(ValueError, match=r"andrade parameter b = nan"):
        AndradeLaw(1.0, math.nan)


def test_fit_result_type():
    fit = fit_viscosity_law("andrade", [300.0, 350.0], [1e-3, 4e-4])
    assert isinstance(fit, ViscosityFit)
    assert fit.is_extrapolation(299.9) and fit.is_extrapolation(350.1)
    assert not fit.is_extrapolation(300.0) and not fit.is_extrapolation(350.0)
