"""Convective and radiative heat-transfer correlations for lines and their outside surfaces.

Inside: Sieder-Tate (laminar, developing) with the fully developed floor, Gnielinski (turbulent),
and a linear blend between them in the transitional band. Outside: Churchill-Chu natural
convection and Churchill-Bernstein cross-flow on a horizontal cylinder, combined, plus
linearised radiation to surroundings at air temperature.

Plain floats and `math` only: these run in the plan's inner loop (about 10^5 calls per plan).
Temperatures in kelvin.
"""

from __future__ import annotations

from math import sqrt

from planner.correlations.air import air_conductivity, air_heat_capacity, air_viscosity, R_AIR

__all__ = [
    "NU_LAMINAR_DEVELOPED",
    "D_OVER_X_MAX",
    "STEFAN_BOLTZMANN",
    "G_STANDARD",
    "nu_laminar_sieder_tate",
    "nu_turbulent_gnielinski",
    "nu_internal",
    "nu_natural_cylinder_churchill_chu",
    "nu_crossflow_churchill_bernstein",
    "h_radiation",
    "h_outer_cylinder",
]

NU_LAMINAR_DEVELOPED = 3.66
"""Fully developed laminar Nusselt number in a round tube at constant wall temperature [-]
(Graetz problem limit, any heat-transfer text)."""

D_OVER_X_MAX = 1.0
"""Largest D/x used in the laminar entry correlation [-]: the mean Nusselt number of the first
diameter of a heated length is taken as that over one diameter. Sieder-Tate grows without bound
as x -> 0; at x < D the loss or gain is set by the upstream fitting, not by a boundary layer,
so the cap only removes the singularity (planner choice)."""

STEFAN_BOLTZMANN = 5.670374419e-8
"""Stefan-Boltzmann constant [W/(m^2 K^4)] (CODATA 2018, exact in the 2019 SI)."""

G_STANDARD = 9.80665
"""Standard acceleration of gravity [m/s^2] (CGPM 1901)."""

_RE_LAM = 2300.0  # same band as planner.friction (kept local to avoid a hot-loop lookup)
_RE_TURB = 4000.0
_THIRD = 1.0 / 3.0


def nu_laminar_sieder_tate(
    re: float, pr: float, d_over_l: float, viscosity_ratio: float = 1.0
) -> float:
    """Sieder-Tate mean Nusselt number, laminar flow in a tube with a developing profile.

    Nu = 1.86 (Re Pr D/L)^(1/3) (mu/mu_w)^0.14

    Valid for laminar flow (Re < 2300), constant wall temperature, and Nu above about 3.66
    (short tubes; below that the fully developed value applies); Nu is the mean over the length
    L. Property ranges usually quoted: 0.48 < Pr < 16700, 0.0044 < mu/mu_w < 9.75 [mem] unverified.

    re: Reynolds number [-]; pr: Prandtl number [-]; d_over_l: inside diameter over heated
    length [-], >= 0; viscosity_ratio: bulk over wall viscosity mu/mu_w [-], > 0.
    Returns Nu = h D / k [-].
    Source: Sieder & Tate, Ind. Eng. Chem. 28 (1936) 1429-1435.
    """
    return 1.86 * (re * pr * d_over_l) ** _THIRD * viscosity_ratio**0.14


def nu_turbulent_gnielinski(re: float, pr: float, darcy_f: float) -> float:
    """Gnielinski Nusselt number, turbulent and late-transitional flow in a tube.

    Nu = (f/8)(Re - 1000) Pr / (1 + 12.7 (f/8)^0.5 (Pr^(2/3) - 1))

    Valid 3000 < Re < 5e6, 0.5 < Pr < 2000, fully developed; f is the Darcy factor.
    re: Reynolds number [-], > 1000; pr: Prandtl number [-], > 0; darcy_f: Darcy friction
    factor [-], > 0. Returns Nu [-].
    Source: Gnielinski, Int. Chem. Eng. 16 (1976) 359-368.
    """
    if not re > 1000.0:
        raise ValueError(
            f"reynolds number: {re!r} is outside the Gnielinski correlation; it needs Re > 1000 "
            "(valid 3000 to 5e6)"
        )
    f8 = 0.125 * darcy_f
    return f8 * (re - 1000.0) * pr / (1.0 + 12.7 * sqrt(f8) * (pr ** (2.0 / 3.0) - 1.0))


def _nu_laminar(re: float, pr: float, d_over_x: float, viscosity_ratio: float) -> float:
    if d_over_x > D_OVER_X_MAX:
        d_over_x = D_OVER_X_MAX
    nu = 1.86 * (re * pr * d_over_x) ** _THIRD * viscosity_ratio**0.14
    return nu if nu > NU_LAMINAR_DEVELOPED else NU_LAMINAR_DEVELOPED


def nu_internal(
    re: float, pr: float, d_over_x: float, darcy_f: float, viscosity_ratio: float = 1.0
) -> float:
    """Mean inside Nusselt number over all regimes for a heated/cooled length x.

    laminar (Re <= 2300):   Nu = max(3.66, 1.86 (Re Pr D/x')^(1/3) (mu/mu_w)^0.14),
                            D/x' = min(D/x, D_OVER_X_MAX)
    turbulent (Re >= 4000): Nu = Gnielinski(Re, Pr, f) (mu/mu_w)^0.11
                            (property correction for liquids, heating or cooling [trade])
    transitional:           linear in Re between the laminar value at Re = 2300 and the
                            turbulent value at Re = 4000 [trade]; the turbulent end uses the
                            darcy_f passed in, so pass friction.darcy_friction(re, e/D), which
                            equals the Colebrook value at 4000 and keeps Nu continuous there.

    re: Reynolds number [-], > 0; pr: Prandtl number [-], > 0; d_over_x: inside diameter over
    the heated length x from the start of heating [-], >= 0 (0 means fully developed; large
    values near the inlet are capped, see D_OVER_X_MAX); darcy_f: Darcy friction factor at re
    [-]; viscosity_ratio: bulk over wall viscosity mu/mu_w [-], > 0 (1 if unknown).
    Returns Nu = h D / k [-].
    Sources: as nu_laminar_sieder_tate and nu_turbulent_gnielinski; 3.66 from the Graetz limit.
    """
    if not (re > 0.0 and pr > 0.0):
        raise ValueError(
            f"reynolds/prandtl number: Re={re!r}, Pr={pr!r} are not allowed; both must be > 0"
        )
    if not d_over_x >= 0.0:
        raise ValueError(f"d_over_x: {d_over_x!r} is not allowed; it must be >= 0")
    if not viscosity_ratio > 0.0:
        raise ValueError(f"viscosity_ratio: {viscosity_ratio!r} is not allowed; it must be > 0")
    if re <= _RE_LAM:
        return _nu_laminar(re, pr, d_over_x, viscosity_ratio)
    turb_corr = viscosity_ratio**0.11
    if re >= _RE_TURB:
        return nu_turbulent_gnielinski(re, pr, darcy_f) * turb_corr
    nu_lam = _nu_laminar(_RE_LAM, pr, d_over_x, viscosity_ratio)
    nu_turb = nu_turbulent_gnielinski(_RE_TURB, pr, darcy_f) * turb_corr
    w = (re - _RE_LAM) / (_RE_TURB - _RE_LAM)
    return nu_lam + w * (nu_turb - nu_lam)


def nu_natural_cylinder_churchill_chu(rayleigh: float, prandtl: float) -> float:
    """Churchill-Chu natural-convection Nusselt number, long horizontal isothermal cylinder.

    Nu_D = {0.60 + 0.387 Ra^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27)}^2

    Full-range form, 1e-5 < Ra_D < 1e12, all Pr; Ra -> 0 gives the conduction-like limit 0.36.
    rayleigh: Ra_D = g beta |dT| D^3 / (nu alpha) [-], >= 0; prandtl: Pr [-], > 0.
    Returns Nu_D [-].
    Source: Churchill & Chu, Int. J. Heat Mass Transfer 18 (1975) 1049-1053.
    """
    if not (rayleigh >= 0.0 and prandtl > 0.0):
        raise ValueError(
            f"rayleigh/prandtl number: Ra={rayleigh!r}, Pr={prandtl!r} are not allowed; "
            "need Ra >= 0 and Pr > 0"
        )
    root = 0.60 + 0.387 * rayleigh ** (1.0 / 6.0) / (1.0 + (0.559 / prandtl) ** 0.5625) ** (
        8.0 / 27.0
    )
    return root * root


def nu_crossflow_churchill_bernstein(re: float, pr: float) -> float:
    """Churchill-Bernstein mean Nusselt number, circular cylinder in cross-flow.

    Nu_D = 0.3 + 0.62 Re^(1/2) Pr^(1/3) / [1 + (0.4/Pr)^(2/3)]^(1/4)
                 * [1 + (Re/282000)^(5/8)]^(4/5)

    Valid for Re Pr > 0.2, all Re (laminar to turbulent boundary layer).
    re: Re_D = V D / nu [-], >= 0; pr: Pr [-], > 0. Returns Nu_D [-].
    Source: Churchill & Bernstein, J. Heat Transfer 99 (1977) 300-306.
    """
    if not (re >= 0.0 and pr > 0.0):
        raise ValueError(
            f"reynolds/prandtl number: Re={re!r}, Pr={pr!r} are not allowed; need Re >= 0, Pr > 0"
        )
    return 0.3 + 0.62 * sqrt(re) * pr**_THIRD / (1.0 + (0.4 / pr) ** (2.0 / 3.0)) ** 0.25 * (
        1.0 + (re / 282000.0) ** 0.625
    ) ** 0.8


def h_radiation(emissivity: float, t_surface: float, t_surroundings: float) -> float:
    """Linearised radiation coefficient, small grey surface in large isothermal surroundings.

    h_r = eps sigma (Ts^2 + Tsur^2)(Ts + Tsur),  so that q'' = h_r (Ts - Tsur) exactly.

    emissivity: total hemispherical emissivity [-], 0..1; t_surface, t_surroundings [K], > 0.
    Returns h_r [W/(m^2 K)].
    Source: Stefan-Boltzmann law, linearised (any heat-transfer text, e.g. Incropera).
    """
    if not 0.0 <= emissivity <= 1.0:
        raise ValueError(f"emissivity: {emissivity!r} is not allowed; it must be in 0..1")
    if not (t_surface > 0.0 and t_surroundings > 0.0):
        raise ValueError(
            f"temperature: surface {t_surface!r} K, surroundings {t_surroundings!r} K; "
            "both must be > 0 K"
        )
    return (
        emissivity
        * STEFAN_BOLTZMANN
        * (t_surface * t_surface + t_surroundings * t_surroundings)
        * (t_surface + t_surroundings)
    )


def h_outer_cylinder(
    outer_diameter_m: float,
    t_surface: float,
    t_air: float,
    wind_speed: float,
    emissivity: float,
) -> tuple[float, float]:
    """Outside coefficients of a horizontal cylinder in air: (h_convection, h_radiation).

    Air properties (planner.air, 1 atm) at the film temperature T_f = (Ts + Ta)/2;
    beta = 1/T_f (ideal gas); Ra = g beta |Ts - Ta| D^3 Pr / nu^2.
    Nu_n = Churchill-Chu(Ra, Pr); Nu_f = Churchill-Bernstein(V D / nu, Pr) when V > 0;
    Nu = (Nu_f^3 + Nu_n^3)^(1/3) (Churchill 1977 combination of forced and natural
    convection [trade]); h_convection = Nu k / D.
    h_radiation = eps sigma (Ts^2 + Ta^2)(Ts + Ta), surroundings at air temperature.
    With Ts == Ta, Ra = 0 and Nu_n = 0.36 (the Ra -> 0 limit): no division by zero.

    outer_diameter_m: outside diameter of the jacket or bare pipe [m], > 0; t_surface, t_air
    [K], > 0; wind_speed: air speed across the line [m/s], >= 0; emissivity: surface
    emissivity [-], 0..1. Returns (h_convection, h_radiation) [W/(m^2 K)].
    Sources: as nu_natural_cylinder_churchill_chu, nu_crossflow_churchill_bernstein and
    h_radiation; Churchill, AIChE J. 23 (1977) 10-16 for the cubic combination [mem] unverified
    citation.
    """
    if not outer_diameter_m > 0.0:
        raise ValueError(f"outer_diameter_m: {outer_diameter_m!r} is not allowed; it must be > 0")
    if not wind_speed >= 0.0:
        raise ValueError(f"wind_speed: {wind_speed!r} m/s is not allowed; it must be >= 0")
    h_rad = h_radiation(emissivity, t_surface, t_air)
    t_film = 0.5 * (t_surface + t_air)
    mu = air_viscosity(t_film)
    k = air_conductivity(t_film)
    pr = air_heat_capacity(t_film) * mu / k
    nu_kin = mu * R_AIR * t_film / 101325.0  # mu / rho, ideal gas at 1 atm
    d = outer_diameter_m
    ra = G_STANDARD * abs(t_surface - t_air) * d * d * d * pr / (t_film * nu_kin * nu_kin)
    nu = nu_natural_cylinder_churchill_chu(ra, pr)
    if wind_speed > 0.0:
        nu_f = nu_crossflow_churchill_bernstein(wind_speed * d / nu_kin, pr)
        nu = (nu_f * nu_f * nu_f + nu * nu * nu) ** _THIRD
    return nu * k / d, h_rad
