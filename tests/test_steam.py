"""Checks of planner.steam against the IAPWS-IF97 release and iapws 1.5.5 (test-time only)."""

import math

import pytest
from iapws.iapws97 import _PSat_T, _TSat_P

from planner.correlations.steam import (
    P_SAT_MAX,
    P_SAT_MIN,
    T_SAT_MAX,
    T_SAT_MIN,
    saturation_pressure,
    saturation_temperature,
    saturation_temperature_gauge,
)


@pytest.mark.parametrize(
    "p_mpa, t_ref",
    [(0.1, 372.755919), (1.0, 453.035632), (10.0, 584.149488)],
)
def test_release_verification_tsat(p_mpa, t_ref):
    # IAPWS R7-97(2012) Table 36 (region 4 backward equation); values printed to 1e-6 K
    # (confirmed with iapws 1.5.5 _TSat_P: they agree)
    assert saturation_temperature(p_mpa * 1e6) == pytest.approx(t_ref, abs=1e-6)


@pytest.mark.parametrize(
    "t, p_ref_mpa",
    [(300.0, 0.353658941e-2), (500.0, 0.263889776e1), (600.0, 0.123443146e2)],
)
def test_release_verification_psat(t, p_ref_mpa):
    # IAPWS R7-97(2012) Table 35 (region 4 saturation-pressure equation); 9 printed figures
    # (confirmed with iapws 1.5.5 _PSat_T: they agree)
    assert saturation_pressure(t) == pytest.approx(p_ref_mpa * 1e6, rel=5e-9)


def _temps(n=60):
    return [T_SAT_MIN + (T_SAT_MAX - T_SAT_MIN) * i / (n - 1) for i in range(n)]


def _pressures(n=60):
    lo, hi = math.log(P_SAT_MIN), math.log(P_SAT_MAX)
    # clamp: exp(log(x)) may round a hair outside the ends, which iapws rejects
    return [min(max(math.exp(lo + (hi - lo) * i / (n - 1)), P_SAT_MIN), P_SAT_MAX) for i in range(n)]


@pytest.mark.parametrize("t", _temps())
def test_psat_against_iapws(t):
    # iapws 1.5.5 iapws97._PSat_T [MPa]
    assert saturation_pressure(t) == pytest.approx(_PSat_T(t) * 1e6, rel=1e-7)


@pytest.mark.parametrize("p", _pressures())
def test_tsat_against_iapws(p):
    # iapws 1.5.5 iapws97._TSat_P [MPa -> K]
    assert saturation_temperature(p) == pytest.approx(_TSat_P(p / 1e6), rel=1e-7)


@pytest.mark.parametrize("t", _temps(25))
def test_backward_consistency(t):
    # IF97: the backward equation reproduces the forward one (release states consistency
    # well below 1e-7 relative; observed round-off level)
    assert saturation_temperature(saturation_pressure(t)) == pytest.approx(t, rel=1e-9)


@pytest.mark.parametrize(
    "barg, t_c",
    [(0.0, 99.97), (3.5, 148.02), (7.0, 170.48), (10.0, 184.12)],
)
def test_gauge_values(barg, t_c):
    # REFERENCES.md steam tracing [lib: iapws 1.5.5], 1 barg = 1e5 Pa above 101325 Pa;
    # printed to 0.01 °C -> abs 0.006 K
    assert saturation_temperature_gauge(barg * 1e5) - 273.15 == pytest.approx(t_c, abs=0.006)


def test_gauge_uses_local_atmosphere():
    # at 0 barg and a 90 kPa site the steam saturates at Tsat(90 kPa) (iapws 1.5.5 _TSat_P)
    assert saturation_temperature_gauge(0.0, 90e3) == pytest.approx(_TSat_P(0.09), rel=1e-7)


def test_range_ends():
    # IF97 region 4 runs from the triple-point region (273.15 K, 611.213 Pa) to the critical
    # point (647.096 K, 22.064 MPa) [pub: IAPWS R7-97(2012)]
    assert saturation_pressure(273.15) == pytest.approx(611.213, rel=1e-6)
    assert saturation_pressure(647.096) == pytest.approx(22.064e6, rel=1e-7)
    assert saturation_temperature(22.064e6) == pytest.approx(647.096, rel=1e-7)


@pytest.mark.parametrize("p", [600.0, 23e6, -1.0, float("nan")])
def test_pressure_outside_raises(p):
    with pytest.raises(ValueError) as err:
        saturation_temperature(p)
    assert "pressure" in str(err.value) and repr(p) in str(err.value)
    assert "611.2" in str(err.value) and "22064000" in str(err.value)


@pytest.mark.parametrize("t", [273.0, 650.0, float("nan")])
def test_temperature_outside_raises(t):
    with pytest.raises(ValueError) as err:
        saturation_pressure(t)
    assert "temperature" in str(err.value) and "273.15" in str(err.value) and "647.096" in str(err.value)


def test_gauge_vacuum_below_line_raises():
    # -101 kPa gauge leaves 325 Pa absolute, below the saturation line's start
    with pytest.raises(ValueError, match="pressure"):
        saturation_temperature_gauge(-101e3)


@pytest.mark.parametrize("celsius", [100, 120, 148, 170, 184, 200, 230, 250])
def test_latent_heat_against_iapws97(celsius):
    # IAPWS-IF97 h'' - h' via iapws 1.5.5 (test-only reference); Watson form, within 0.6 %
    from iapws import IAPWS97

    from planner.correlations.steam import latent_heat

    t = celsius + 273.15
    reference = (IAPWS97(T=t, x=1).h - IAPWS97(T=t, x=0).h) * 1e3
    assert latent_heat(t) == pytest.approx(reference, rel=0.006)
