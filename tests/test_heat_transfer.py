"""Checks of planner.heat_transfer against ht 1.2.0, iapws 1.5.5 and published values.

ht and iapws are test-time references only; planner.heat_transfer implements the correlations
itself and takes air properties from planner.correlations.air.
"""

import math

import pytest
from ht.conv_internal import laminar_entry_Seider_Tate, turbulent_Gnielinski

from planner.correlations.friction import darcy_friction
from planner.correlations.heat_transfer import (
    NU_LAMINAR_DEVELOPED,
    VISCOSITY_RATIO_MAX,
    VISCOSITY_RATIO_MIN,
    nu_internal,
    nu_laminar_local_over,
    nu_laminar_sieder_tate,
    nu_laminar_thermal_entry_mean,
    nu_turbulent_gnielinski,
)



# ---------------------------------------------------------------- inside, laminar
def test_sieder_tate_references_value():
    # REFERENCES.md Heat transfer [lib: ht 1.2.0]: Re 1000, Pr 100, D/L 0.01 -> 18.60
    assert nu_laminar_sieder_tate(1000.0, 100.0, 0.01) == pytest.approx(18.60, rel=3e-4)


@pytest.mark.parametrize("re", [50.0, 500.0, 2000.0])
@pytest.mark.parametrize("pr", [5.0, 300.0, 1e4])
@pytest.mark.parametrize("l_over_d", [10.0, 300.0, 1e4])
@pytest.mark.parametrize("mu_ratio", [0.3, 1.0, 8.0])
def test_sieder_tate_against_ht(re, pr, l_over_d, mu_ratio):
    # ht 1.2.0 laminar_entry_Seider_Tate (Sieder & Tate 1936), mu/mu_w passed as mu, mu_w
    ref = laminar_entry_Seider_Tate(re, pr, L=l_over_d * 0.05, Di=0.05, mu=mu_ratio, mu_w=1.0)
    assert nu_laminar_sieder_tate(re, pr, 1.0 / l_over_d, mu_ratio) == pytest.approx(ref, rel=1e-12)


# ---------------------------------------------------------------- inside, turbulent
@pytest.mark.parametrize("re", [3000.0, 1e4, 1e5, 5e6])
@pytest.mark.parametrize("pr", [0.7, 7.0, 100.0, 2000.0])
def test_gnielinski_against_ht(re, pr):
    # ht 1.2.0 turbulent_Gnielinski (Gnielinski 1976); f from planner.friction, which is
    # itself checked against fluids 1.3.1
    f = darcy_friction(re, 1e-4)
    assert nu_turbulent_gnielinski(re, pr, f) == pytest.approx(turbulent_Gnielinski(re, pr, f), rel=1e-12)


def test_gnielinski_below_its_range_raises():
    with pytest.raises(ValueError, match="Gnielinski"):
        nu_turbulent_gnielinski(900.0, 5.0, 0.05)


# ---------------------------------------------------------------- inside, laminar thermal entrance
# Graetz problem (developed laminar velocity, uniform wall temperature): eigenvalues lambda_n and
# constants G_n as tabulated by Shah & London, Laminar Flow Forced Convection in Ducts (1978),
# Table for the Graetz problem [mem] unverified, cross-checked below by solving the eigenproblem;
# beyond them the asymptotic forms of Sellars, Tribus & Klein (1956):
# lambda_n = 4n + 8/3, G_n = 1.01276 lambda_n^(-1/3).
GRAETZ_LAMBDA = (2.70436442, 6.67903145, 10.67337954, 14.67107846, 18.66987186)
GRAETZ_G = (0.74877456, 0.54382795, 0.46286106, 0.41541846, 0.38291919)


def graetz_bulk_theta(x_star: float, terms: int = 4000) -> float:
    """(T_w - T_b) / (T_w - T_in) = 8 sum G_n / lambda_n^2 exp(-2 lambda_n^2 x*), x* = x / (D Re Pr)."""
    total = 0.0
    for n in range(terms):
        if n < len(GRAETZ_LAMBDA):
            lam, g = GRAETZ_LAMBDA[n], GRAETZ_G[n]
        else:
            lam = 4.0 * n + 8.0 / 3.0
            g = 1.01276 * lam ** (-1.0 / 3.0)
        term = g / lam**2 * math.exp(-2.0 * lam**2 * x_star)
        total += term
        if term < 1e-14:
            break
    return 8.0 * total


def test_graetz_table_solves_the_eigenproblem():
    # (1/r)(r R')' + lambda^2 (1 - r^2) R = 0, R(0) = 1, R'(0) = 0, R(1) = 0; G_n = -(C_n/2) R_n'(1)
    # with C_n = -2 / (lambda dR/dlambda at r = 1) (Shah & London 1978, the Graetz problem)
    from scipy.integrate import solve_ivp

    def wall(lam):
        def rhs(r, y):
            return [y[1], -y[1] / r - lam * lam * (1.0 - r * r) * y[0]]
        sol = solve_ivp(rhs, [1e-9, 1.0], [1.0, -lam * lam * 0.5e-9], rtol=1e-11, atol=1e-13)
        return sol.y[0, -1], sol.y[1, -1]

    for lam, g in zip(GRAETZ_LAMBDA[:3], GRAETZ_G[:3]):
        r1, dr1 = wall(lam)
        assert abs(r1) < 1e-6
        h = 1e-6
        slope = (wall(lam + h)[0] - wall(lam - h)[0]) / (2 * h)
        assert -(-2.0 / (lam * slope)) / 2.0 * dr1 == pytest.approx(g, rel=1e-5)
    assert GRAETZ_LAMBDA[0] ** 2 / 2.0 == pytest.approx(3.657, abs=5e-4)   # fully developed Nu


@pytest.mark.parametrize("x_star", [10 ** (k / 4.0) for k in range(-24, 1)])
def test_thermal_entry_mean_follows_the_graetz_series(x_star):
    # issue 10 item 1: bulk temperature within 2 % of the driving difference at every distance;
    # the mean used here is within 0.2 %
    theta = math.exp(-4.0 * nu_laminar_thermal_entry_mean(x_star) * x_star)
    assert theta == pytest.approx(graetz_bulk_theta(x_star), abs=2e-3)


def test_local_coefficient_integrates_to_the_cited_mean():
    # the local Nu of a stretch is d(x Nu_m)/dx averaged over it: summed over any cut of [0, x] it
    # gives x Nu_m(x) back exactly [calc]
    edges = [0.0, 1e-5, 3e-4, 2e-3, 0.01, 0.04, 0.2]
    total = sum(nu_laminar_local_over(a, b) * (b - a) for a, b in zip(edges[:-1], edges[1:]))
    assert total == pytest.approx(0.2 * nu_laminar_thermal_entry_mean(0.2), rel=1e-12)
    # over a whole length from the inlet it is the mean itself
    assert nu_laminar_local_over(0.0, 0.01) == pytest.approx(nu_laminar_thermal_entry_mean(0.01), rel=1e-12)


def test_local_coefficient_limits():
    # Leveque near the inlet: local Nu = 1.077 x*^(-1/3), two thirds of the mean 1.615 x*^(-1/3)
    # (Shah & London 1978) [mem]; far downstream both tend to the Graetz limit 3.66
    x = 1e-7
    assert nu_laminar_local_over(x, x) == pytest.approx(1.077 * x ** (-1.0 / 3.0), rel=0.02)
    assert nu_laminar_local_over(5.0, 6.0) == pytest.approx(NU_LAMINAR_DEVELOPED, rel=5e-3)
    assert nu_laminar_local_over(0.0, math.inf) == NU_LAMINAR_DEVELOPED


def test_the_mean_as_local_value_would_overstate_the_heat_by_half():
    # what the issue found: integrating the mean as if it were local gives ~1.5 x the mean's heat
    # near the inlet (d(x x^(-1/3))/dx = 2/3 x^(-1/3)) [calc]
    x_star = 1e-4
    as_local = sum(nu_laminar_thermal_entry_mean((k + 0.5) * x_star / 200) for k in range(200)) / 200
    assert as_local / nu_laminar_thermal_entry_mean(x_star) == pytest.approx(1.5, rel=0.05)


# ---------------------------------------------------------------- inside, all regimes
def test_internal_developed_laminar():
    # fully developed laminar Nu = 3.66 at constant wall temperature [pub]
    assert nu_internal(100.0, 5.0, 0.64) == pytest.approx(3.66, rel=1e-12)
    assert NU_LAMINAR_DEVELOPED == 3.66


def test_internal_laminar_entrance_with_sieder_tate_correction():
    # the stretch's local Nu times Sieder & Tate's (mu/mu_w)^0.14 [trade]; [calc] 2^0.14 = 1.10190
    re, pr, from_d, to_d = 1000.0, 100.0, 50.0, 80.0
    expected = nu_laminar_local_over(from_d / (re * pr), to_d / (re * pr)) * 2.0 ** 0.14
    assert nu_internal(re, pr, 0.064, 2.0, from_d, to_d) == pytest.approx(expected, rel=1e-12)


def test_internal_viscosity_ratio_is_bounded_to_sieder_tates_range():
    # issue 10 item 2: the correction is not extrapolated beyond 0.0044 .. 9.75
    assert (VISCOSITY_RATIO_MIN, VISCOSITY_RATIO_MAX) == (0.0044, 9.75)
    assert nu_internal(100.0, 5.0, 0.64, 1e-4) == pytest.approx(3.66 * 0.0044 ** 0.14, rel=1e-12)
    assert nu_internal(100.0, 5.0, 0.64, 50.0) == pytest.approx(3.66 * 9.75 ** 0.14, rel=1e-12)


def test_internal_turbulent_with_viscosity_correction():
    # ht 1.2.0 turbulent_Gnielinski times (mu/mu_w)^0.11 [trade]; [calc] 3^0.11 = 1.128453
    f = darcy_friction(5e4, 1e-4)
    ref = turbulent_Gnielinski(5e4, 20.0, f) * 1.128453
    assert nu_internal(5e4, 20.0, f, viscosity_ratio=3.0) == pytest.approx(ref, rel=1e-6)


@pytest.mark.parametrize("pr", [0.8, 30.0, 1000.0])
@pytest.mark.parametrize("entry", [(math.inf, math.inf), (10.0, 20.0), (500.0, 900.0)])
@pytest.mark.parametrize("mu_ratio", [0.5, 1.0, 4.0])
def test_internal_transition_joins_the_laminar_branch(pr, entry, mu_ratio):
    # [trade] the blend starts from the laminar value at Re = 2300 (the same band definition as
    # friction: Re = 2300 is laminar) and ends at Gnielinski with the f passed in at Re = 4000
    def nu(re, f=None):
        return nu_internal(re, pr, darcy_friction(re, 2e-4) if f is None else f, mu_ratio, *entry)

    assert nu(2300.0 * (1 + 1e-9)) == pytest.approx(nu(2300.0), rel=1e-6)
    f = darcy_friction(3999.9999, 2e-4)
    ref4000 = turbulent_Gnielinski(4000.0, pr, f) * mu_ratio**0.11
    assert nu(4000.0 * (1 - 1e-9), f) == pytest.approx(ref4000, rel=1e-6)


def test_internal_bad_inputs():
    with pytest.raises(ValueError, match="reynolds"):
        nu_internal(0.0, 5.0, 0.05)
    with pytest.raises(ValueError, match="entry_from_d"):
        nu_internal(100.0, 5.0, 0.64, 1.0, -1.0, 3.0)
    with pytest.raises(ValueError, match="viscosity_ratio"):
        nu_internal(100.0, 5.0, 0.64, viscosity_ratio=0.0)


# ---------------------------------------------------------------- outside, natural
