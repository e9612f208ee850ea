"""The outside surface's heat transfer (``planner/correlations/outer_surface.py``): Churchill-Chu and
Churchill-Bernstein against ht 1.2.0 and their papers' values, the radiation law by hand, and the
combined surface coefficient against a reference recipe on iapws's air properties."""

from __future__ import annotations


import pytest
from ht.conv_external import Nu_cylinder_Churchill_Bernstein
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
from iapws.humidAir import Air

from planner.correlations.air import air_conductivity, air_prandtl, air_viscosity
from planner.correlations.outer_surface import (
    h_outer_cylinder,
    h_radiation,
    nu_crossflow_churchill_bernstein,
    nu_natural_cylinder_churchill_chu,
)

SIGMA = 5.670374419e-8  # CODATA 2018


@pytest.mark.parametrize("gr, nu_ref", [(1e4, 4.0145), (1e6, 13.133), (1e8, 50.624)])
def test_churchill_chu_references_values(gr, nu_ref):
    # REFERENCES.md: Churchill & Chu 1975, horizontal cylinder, Pr 0.7 [lib: ht 1.2.0];
    # 5 printed figures -> rtol 1e-4
    assert nu_natural_cylinder_churchill_chu(gr * 0.7, 0.7) == pytest.approx(nu_ref, rel=1e-4)


@pytest.mark.parametrize("gr", [1e-3, 1.0, 1e3, 1e6, 1e9, 1e12])
@pytest.mark.parametrize("pr", [0.7, 7.0, 1000.0])
def test_churchill_chu_against_ht(gr, pr):
    # Churchill & Chu 1975 via ht 1.2.0 Nu_horizontal_cylinder_Churchill_Chu(Pr, Gr)
    ref = Nu_horizontal_cylinder_Churchill_Chu(pr, gr)
    assert nu_natural_cylinder_churchill_chu(gr * pr, pr) == pytest.approx(ref, rel=1e-12)


def test_churchill_chu_zero_rayleigh_limit():
    # Churchill & Chu 1975: Ra -> 0 gives Nu = 0.60^2 = 0.36 [calc]
    assert nu_natural_cylinder_churchill_chu(0.0, 0.7) == pytest.approx(0.36, rel=1e-12)


# ---------------------------------------------------------------- outside, forced
def test_churchill_bernstein_cengel_example():
    # REFERENCES.md: Cengel, Heat and Mass Transfer, solved problem: Re 3.254e4, Pr 0.7336 ->
    # Nu 107 [pub]; the book rounds to 3 figures -> 1 %
    assert nu_crossflow_churchill_bernstein(3.254e4, 0.7336) == pytest.approx(107.0, rel=0.01)


@pytest.mark.parametrize("re", [1.0, 100.0, 6071.0, 1e5, 1e7])
@pytest.mark.parametrize("pr", [0.7, 5.0])
def test_churchill_bernstein_against_ht(re, pr):
    # Churchill & Bernstein 1977 via ht 1.2.0 Nu_cylinder_Churchill_Bernstein
    assert nu_crossflow_churchill_bernstein(re, pr) == pytest.approx(
        Nu_cylinder_Churchill_Bernstein(re, pr), rel=1e-12
    )


# ---------------------------------------------------------------- radiation
def test_radiation_hand_value():
    # [calc] eps 0.8, Ts 485.5 K, Tsur 298.15 K (the Incropera insulated steam pipe of
    # REFERENCES.md): 0.8 * 5.670374e-8 * (485.5^2 + 298.15^2) * (485.5 + 298.15) = 11.539
    assert h_radiation(0.8, 485.5, 298.15) == pytest.approx(11.539, rel=1e-4)


@pytest.mark.parametrize("ts, tsur", [(300.0, 260.0), (450.0, 300.0), (350.0, 350.0 + 1e-3)])
def test_radiation_reproduces_stefan_boltzmann(ts, tsur):
    # Stefan-Boltzmann law: h_r (Ts - Tsur) = eps sigma (Ts^4 - Tsur^4)
    q = h_radiation(0.9, ts, tsur) * (ts - tsur)
    assert q == pytest.approx(0.9 * SIGMA * (ts**4 - tsur**4), rel=1e-6)


def test_radiation_bad_inputs():
    with pytest.raises(ValueError, match="emissivity"):
        h_radiation(1.2, 300.0, 290.0)
    with pytest.raises(ValueError, match="temperature"):
        h_radiation(0.5, 0.0, 290.0)


# ---------------------------------------------------------------- outer cylinder
def _h_conv_reference(d, ts, ta, v):
    """Same outer-film recipe built only from references: iapws 1.5.5 humidAir.Air properties
    (Lemmon et al. 2000) at the film temperature and ht 1.2.0 correlations."""
    tf = 0.5 * (ts + ta)
    air = Air(T=tf, P=0.101325)
    nu_kin = air.mu / air.rho
    gr = 9.80665 * (1.0 / tf) * abs(ts - ta) * d**3 / nu_kin**2
    nu_n = Nu_horizontal_cylinder_Churchill_Chu(air.Prandt, gr)
    nu = nu_n
    if v > 0:
        nu_f = Nu_cylinder_Churchill_Bernstein(v * d / nu_kin, air.Prandt)
        nu = (nu_f**3 + nu_n**3) ** (1.0 / 3.0)  # Churchill 1977 combination [trade]
    return nu * air.k / d


@pytest.mark.parametrize("d", [0.06, 0.2, 0.5])
@pytest.mark.parametrize("ts, ta", [(330.0, 290.0), (420.0, 263.15), (300.0, 299.0), (270.0, 250.0)])
@pytest.mark.parametrize("v", [0.0, 0.5, 5.0, 20.0])
def test_outer_cylinder_against_reference_recipe(d, ts, ta, v):
    # iapws 1.5.5 air + ht 1.2.0 correlations. 2 %: the planner's air-property fits differ
    # from the reference formulation by up to about 1-2 % in k, nu and Pr at these film
    # temperatures (see test_air.py); the worst h difference seen on this grid is 1.05 %.
    h_c, h_r = h_outer_cylinder(d, ts, ta, v, 0.85)
    assert h_c == pytest.approx(_h_conv_reference(d, ts, ta, v), rel=0.02)
    assert h_r == pytest.approx(0.85 * SIGMA * (ts**2 + ta**2) * (ts + ta), rel=1e-12)


def test_outer_cylinder_equal_temperatures():
    # Ts == Ta: no division by zero; Ra = 0 -> Nu = 0.36 (Churchill-Chu limit) [calc], and
    # k of air at 290 K from iapws 1.5.5 (planner fit within 1.2 %)
    h_c, h_r = h_outer_cylinder(0.2, 290.0, 290.0, 0.0, 0.9)
    k_ref = Air(T=290.0, P=0.101325).k
    assert h_c == pytest.approx(0.36 * k_ref / 0.2, rel=0.012)
    assert h_r == pytest.approx(0.9 * SIGMA * 4 * 290.0**3, rel=1e-12)
    # with wind the forced term takes over and stays finite
    h_wind, _ = h_outer_cylinder(0.2, 290.0, 290.0, 3.0, 0.9)
    assert h_wind == pytest.approx(_h_conv_reference(0.2, 290.0, 290.0, 3.0), rel=0.02)


def test_outer_cylinder_far_above_the_air_fits():
    # regression (issue 13): a bare 1/2" line under 20 kW/m of constant-wattage tracing and almost no
    # flow has its wall solve visit jacket temperatures of several thousand kelvin; at 8000 K the air
    # cp cubic was negative, so Ra < 0 and the planner stopped with "Ra=-9..." naming no field.  Now h
    # is Churchill-Chu (ht 1.2.0 Nu_horizontal_cylinder_Churchill_Chu) on the planner's own air
    # properties at the film temperature, cp held at its 1800 K value: the same recipe, no reference air.
    d, ts, ta = 0.0213, 8000.0, 293.15
    h_c, h_r = h_outer_cylinder(d, ts, ta, 0.0, 0.01)
    tf = 0.5 * (ts + ta)
    pr = air_prandtl(tf)
    nu_kin = air_viscosity(tf) * 287.05 * tf / 101325.0
    gr = 9.80665 * (ts - ta) * d**3 / (tf * nu_kin**2)
    assert pr > 0.0 and h_c == pytest.approx(Nu_horizontal_cylinder_Churchill_Chu(pr, gr) * air_conductivity(tf) / d,
                                              rel=1e-9)
    assert h_r == pytest.approx(0.01 * SIGMA * (ts**2 + ta**2) * (ts + ta), rel=1e-12)


def test_outer_cylinder_bad_inputs():
    with pytest.raises(ValueError, match="outer_diameter_m"):
        h_outer_cylinder(0.0, 330.0, 290.0, 1.0, 0.9)
    with pytest.raises(ValueError, match="wind_speed"):
        h_outer_cylinder(0.2, 330.0, 290.0, -1.0, 0.9)
    with pytest.raises(ValueError, match="emissivity"):
        h_outer_cylinder(0.2, 330.0, 290.0, 1.0, -0.1)
