"""Checks of planner.air against reference values and the reference formulation for dry air.

Reference: iapws 1.5.5 ``iapws.humidAir.Air`` (Lemmon et al. 2000 equation of state,
Lemmon & Jacobsen 2004 viscosity and conductivity), a test-time reference only.
"""

import pytest
from iapws.humidAir import Air

from planner.correlations.air import (
    air_conductivity,
    air_density,
    air_heat_capacity,
    air_prandtl,
    air_viscosity,
)

T20 = 293.15


def test_sutherland_hand_value():
    # REFERENCES.md Air: Sutherland at 20 °C = 1.813e-5 Pa s [calc]; 4 printed figures
    assert air_viscosity(T20) == pytest.approx(1.813e-5, rel=3e-4)


def test_sutherland_reference_point():
    # Sutherland's law returns mu0 = 1.716e-5 Pa s at T0 = 273.15 K by construction (White)
    assert air_viscosity(273.15) == pytest.approx(1.716e-5, rel=1e-12)


def test_air_at_20c_against_references():
    # REFERENCES.md Air at 20 °C [lib: CoolProp 8.0.0]. Tolerances are the model's known error
    # at 20 °C with margin: Sutherland mu (0.4 % low) -> 1 %; White's Sutherland-form k
    # (0.7 % low) -> 1.5 %; Pr from the three fits -> 1 %; ideal gas at 1 atm (Z - 1 about
    # 4e-4) -> 0.2 %.
    assert air_viscosity(T20) == pytest.approx(1.8206e-5, rel=0.01)
    assert air_conductivity(T20) == pytest.approx(0.02587, rel=0.015)
    assert air_prandtl(T20) == pytest.approx(0.708, rel=0.01)
    assert air_density(T20) == pytest.approx(1.2046, rel=0.002)


def test_ideal_gas_hand_value():
    # [calc] 101325 / (287.05 * 293.15) = 1.20412 kg/m3; half atmosphere halves it
    assert air_density(T20) == pytest.approx(1.20412, rel=1e-5)
    assert air_density(T20, 50662.5) == pytest.approx(0.60206, rel=1e-5)


# Accuracy bands over 200-600 K against the reference formulation (stated in planner.air);
# each is the model's worst deviation found over the range plus a small margin.
BANDS = {"mu": 0.025, "k": 0.035, "cp": 0.01, "rho": 0.003, "pr": 0.025}


@pytest.mark.parametrize("t", [200.0, 250.0, 273.15, 300.0, 350.0, 400.0, 450.0, 500.0, 550.0, 600.0])
def test_against_reference_formulation(t):
    # iapws 1.5.5 humidAir.Air at 0.101325 MPa (Lemmon et al. 2000; Lemmon & Jacobsen 2004)
    ref = Air(T=t, P=0.101325)
    assert air_viscosity(t) == pytest.approx(ref.mu, rel=BANDS["mu"])
    assert air_conductivity(t) == pytest.approx(ref.k, rel=BANDS["k"])
    assert air_heat_capacity(t) == pytest.approx(ref.cp * 1000.0, rel=BANDS["cp"])
    assert air_density(t) == pytest.approx(ref.rho, rel=BANDS["rho"])
    assert air_prandtl(t) == pytest.approx(ref.Prandt, rel=BANDS["pr"])


@pytest.mark.parametrize("t", [280.0, 300.0, 400.0, 500.0, 600.0])
def test_conductivity_tighter_above_freezing(t):
    # iapws 1.5.5 humidAir.Air: White's k law is within about 1.1 % over 270-600 K
    assert air_conductivity(t) == pytest.approx(Air(T=t, P=0.101325).k, rel=0.012)


def test_heat_capacity_flat_below_fit_range():
    # below 273.15 K the polynomial is held at its lower limit (planner.air docstring); the
    # reference cp at 200 K (iapws 1.5.5 humidAir.Air) is within 1 % of that value
    assert air_heat_capacity(200.0) == air_heat_capacity(273.15)
    assert air_heat_capacity(200.0) == pytest.approx(Air(T=200.0, P=0.101325).cp * 1000, rel=0.01)


def test_heat_capacity_flat_above_fit_range():
    # above 1800 K (the fit's upper limit) the cubic is held at 1800 K: it fell to a negative cp above
    # about 3,730 K, which gave a negative Prandtl and Rayleigh number (issue 13: "Ra=-96..." with no
    # field named).  At 1800 K the fit is within 0.5 % of iapws 1.5.5 humidAir.Air (1.2367 kJ/(kg K))
    assert air_heat_capacity(4000.0) == air_heat_capacity(8000.0) == air_heat_capacity(1800.0)
    assert air_heat_capacity(1800.0) == pytest.approx(Air(T=1800.0, P=0.101325).cp * 1000, rel=0.005)
    assert air_prandtl(8000.0) > 0.0


@pytest.mark.parametrize("bad", [0.0, -5.0, float("nan")])
def test_bad_temperature_raises(bad):
    for fn in (air_viscosity, air_conductivity, air_density, air_heat_capacity, air_prandtl):
        with pytest.raises(ValueError, match="temperature"):
            fn(bad)


def test_bad_pressure_raises():
    with pytest.raises(ValueError, match="pressure"):
        air_density(300.0, 0.0)
