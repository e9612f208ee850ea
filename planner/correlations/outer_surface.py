"""Heat transfer from a line's outside surface (its jacket) to the air around it.

Churchill-Chu natural convection and Churchill-Bernstein cross-flow on a horizontal cylinder,
combined, plus linearised radiation to surroundings at air temperature (the inside film:
``heat_transfer``).

Plain floats and `math` only: these run in the plan's inner loop.  Temperatures in kelvin.
"""

from __future__ import annotations

import math
from math import sqrt

from planner.correlations.air import air_conductivity, air_heat_capacity, air_viscosity, R_AIR
from planner.correlations.constants import GRAVITY

__all__ = [
    "STEFAN_BOLTZMANN",
    "nu_natural_cylinder_churchill_chu",
    "nu_crossflow_churchill_bernstein",
    "h_radiation",
    "h_outer_cylinder",
]

STEFAN_BOLTZMANN = 5.670374419e-8
"""Stefan-Boltzmann constant [W/(m^2 K^4)] (CODATA 2018, exact in the 2019 SI)."""

_THIRD = 1.0 / 3.0

def nu_natural_cylinder_churchill_chu(rayleigh: float, prandtl: float) -> float:
    """Churchill-Chu natural-convection Nusselt number, long horizontal isothermal cylinder.

    Nu_D = {0.60 + 0.387 Ra^(1/6) / [1 + (0.559/Pr)^(9/16)]^(8/27)}^2

    Full-range form, 1e-5 < Ra_D < 1e12, all Pr; Ra -> 0 gives the conduction-like limit 0.36.
    rayleigh: Ra_D = g beta |dT| D^3 / (nu alpha) [-], >= 0; prandtl: Pr [-], > 0.
    Returns Nu_D [-].
    Source: Churchill & Chu, Int. J. Heat Mass Transfer 18 (1975) 1049-1053 [1].

    Examples
    --------
    Pr 0.7, Gr 1e6 (Ra 7e5): 13.133 (ht 1.2.0 ``Nu_horizontal_cylinder_Churchill_Chu`` [2],
    ../shared/REFERENCES.md):

    >>> round(nu_natural_cylinder_churchill_chu(7e5, 0.7), 3)
    13.133

    References
    ----------
    [1] Churchill, S. W., Chu, H. H. S., "Correlating equations for laminar and turbulent free
        convection from a horizontal cylinder", Int. J. Heat Mass Transfer 18 (1975) 1049-1053.
    [2] Bell, C., ht: heat transfer component of ChEDL, version 1.2.0, ht.conv_free_immersed.
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
    Source: Churchill & Bernstein, J. Heat Transfer 99 (1977) 300-306 [1].

    Examples
    --------
    Cengel's solved problem, Re 3.254e4, Pr 0.7336: Nu about 107 [2] (ht 1.2.0 gives 107.05):

    >>> round(nu_crossflow_churchill_bernstein(3.254e4, 0.7336))
    107

    References
    ----------
    [1] Churchill, S. W., Bernstein, M., "A correlating equation for forced convection from gases
        and liquids to a circular cylinder in crossflow", J. Heat Transfer 99 (1977) 300-306.
    [2] Cengel, Y. A., Heat and Mass Transfer, McGraw-Hill, chapter 7, solved problem (cross-flow
        over a pipe).
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
    Source: Stefan-Boltzmann law, linearised (any heat-transfer text, e.g. Incropera [1]).

    Examples
    --------
    eps 0.8, 485.5 K to 298.15 K: 0.8 x 5.670374e-8 x (485.5^2 + 298.15^2)(485.5 + 298.15) = 11.539
    (by hand, ../shared/REFERENCES.md):

    >>> round(h_radiation(0.8, 485.5, 298.15), 3)
    11.539

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, eq. 1.9.
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
    citation [1].

    Examples
    --------
    A 0.2 m jacket at 330 K in still air at 290 K: the same recipe on reference air (iapws 1.5.5
    humidAir.Air [2]) and ht 1.2.0's Churchill-Chu [3] gives 5.070 W/(m^2 K); radiation at eps 0.9,
    0.9 sigma (330^2 + 290^2)(330 + 290) = 6.107 by hand:

    >>> h_c, h_r = h_outer_cylinder(0.2, 330.0, 290.0, 0.0, 0.9)
    >>> round(h_c, 1), round(h_r, 3)
    (5.1, 6.107)

    References
    ----------
    [1] Churchill, S. W., "A comprehensive correlating equation for laminar, assisting, forced and
        free convection", AIChE J. 23 (1977) 10-16 [mem] unverified citation.
    [2] Lemmon, E. W., et al., J. Phys. Chem. Ref. Data 29 (2000) 331-385 (air properties).
    [3] Churchill, S. W., Chu, H. H. S., Int. J. Heat Mass Transfer 18 (1975) 1049-1053; ht 1.2.0.
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
    ra = GRAVITY * abs(t_surface - t_air) * d * d * d * pr / (t_film * nu_kin * nu_kin)
    nu = nu_natural_cylinder_churchill_chu(ra, pr)
    if wind_speed > 0.0:
        nu_f = nu_crossflow_churchill_bernstein(wind_speed * d / nu_kin, pr)
        nu = (nu_f * nu_f * nu_f + nu * nu * nu) ** _THIRD
    return nu * k / d, h_rad
