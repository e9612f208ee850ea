"""Convective and radiative heat-transfer correlations for lines and their outside surfaces.

Inside: the laminar thermal entrance (Graetz problem: a mean Nusselt number and the local value
consistent with it), Sieder-Tate's property correction, Gnielinski (turbulent), and a linear blend
between them in the transitional band. Outside: Churchill-Chu natural
convection and Churchill-Bernstein cross-flow on a horizontal cylinder, combined, plus
linearised radiation to surroundings at air temperature.

Plain floats and `math` only: these run in the plan's inner loop (about 10^5 calls per plan).
Temperatures in kelvin.
"""

from __future__ import annotations

import math
from math import sqrt

from planner.correlations.air import air_conductivity, air_heat_capacity, air_viscosity, R_AIR
from planner.correlations.constants import GRAVITY
from planner.correlations.friction import RE_LAMINAR_MAX as _RE_LAM, RE_TURBULENT_MIN as _RE_TURB

__all__ = [
    "NU_LAMINAR_DEVELOPED",
    "VISCOSITY_RATIO_MIN",
    "VISCOSITY_RATIO_MAX",
    "nu_laminar_thermal_entry_mean",
    "nu_laminar_local_over",
    "film_parts",
    "viscosity_corrected",
    "STEFAN_BOLTZMANN",
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
(Graetz problem limit 3.657, any heat-transfer text)."""

VISCOSITY_RATIO_MIN = 0.0044
VISCOSITY_RATIO_MAX = 9.75
"""Range of bulk-to-wall viscosity ratio mu/mu_w [-] of Sieder & Tate's data, over which their
(mu/mu_w)^0.14 correction was fitted [mem] unverified.  ``nu_internal`` bounds the ratio to this
range (the correction is not extrapolated); the march reports where the ratio lies outside it."""

STEFAN_BOLTZMANN = 5.670374419e-8
"""Stefan-Boltzmann constant [W/(m^2 K^4)] (CODATA 2018, exact in the 2019 SI)."""

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
    Source: Sieder & Tate, Ind. Eng. Chem. 28 (1936) 1429-1435 [1].

    Examples
    --------
    Re 1000, Pr 100, D/L 0.01: 1.86 x 1000^(1/3) = 18.60 (ht 1.2.0
    ``laminar_entry_Seider_Tate`` [2], ../shared/REFERENCES.md):

    >>> round(nu_laminar_sieder_tate(1000.0, 100.0, 0.01), 2)
    18.6

    References
    ----------
    [1] Sieder, E. N., Tate, G. E., "Heat transfer and pressure drop of liquids in tubes",
        Ind. Eng. Chem. 28 (1936) 1429-1435.
    [2] Bell, C., ht: heat transfer component of ChEDL, version 1.2.0, ht.conv_internal.
    """
    return 1.86 * (re * pr * d_over_l) ** _THIRD * viscosity_ratio**0.14


def nu_turbulent_gnielinski(re: float, pr: float, darcy_f: float) -> float:
    """Gnielinski Nusselt number, turbulent and late-transitional flow in a tube.

    Nu = (f/8)(Re - 1000) Pr / (1 + 12.7 (f/8)^0.5 (Pr^(2/3) - 1))

    Valid 3000 < Re < 5e6, 0.5 < Pr < 2000, fully developed; f is the Darcy factor.
    re: Reynolds number [-], > 1000; pr: Prandtl number [-], > 0; darcy_f: Darcy friction
    factor [-], > 0. Returns Nu [-].
    Source: Gnielinski, Int. Chem. Eng. 16 (1976) 359-368 [1].

    Examples
    --------
    Re 1e5, Pr 1.2, f 0.0185: 254.63 (ht 1.2.0 ``turbulent_Gnielinski`` [2]):

    >>> round(nu_turbulent_gnielinski(1e5, 1.2, 0.0185), 2)
    254.63

    References
    ----------
    [1] Gnielinski, V., "New equations for heat and mass transfer in turbulent pipe and channel
        flow", Int. Chem. Eng. 16 (1976) 359-368.
    [2] Bell, C., ht: heat transfer component of ChEDL, version 1.2.0, ht.conv_internal.
    """
    if not re > 1000.0:
        raise ValueError(
            f"reynolds number: {re!r} is outside the Gnielinski correlation; it needs Re > 1000 "
            "(valid 3000 to 5e6)"
        )
    f8 = 0.125 * darcy_f
    return f8 * (re - 1000.0) * pr / (1.0 + 12.7 * sqrt(f8) * (pr ** (2.0 / 3.0) - 1.0))


def nu_laminar_thermal_entry_mean(x_star: float) -> float:
    """Mean Nusselt number of the thermal entrance, laminar flow with a developed velocity profile,
    uniform wall temperature (the Graetz problem), over the heated length x.

    Nu_m = [ 3.66^3 + 0.7^3 + (1.615 (1/x*)^(1/3) - 0.7)^3 ]^(1/3),   x* = x / (D Re Pr)

    Valid for all x* > 0 (it tends to Leveque's 1.615 x*^(-1/3) near the inlet and to 3.66 far
    from it); within 0.2 % of the driving difference of the exact Graetz series in the bulk
    temperature (tests/test_heat_transfer.py).  A developed velocity profile is what a viscous
    product has: at Pr >> 1 the velocity develops far faster than the temperature.

    x_star: x / (D Re Pr) [-], > 0.  Returns Nu_m = h_m D / k [-].
    Source: VDI Heat Atlas, 2nd ed. (Springer 2010), chapter G1 (Gnielinski), thermally developing
    laminar flow at constant wall temperature [mem] unverified equation number [1]; checked against the
    Graetz series with the eigenvalues and constants of Shah & London (1978) [2].

    Examples
    --------
    At x* = 0.05 the Graetz series (eigenvalues of [2], as in tests/test_heat_transfer.py) gives a
    mean Nu of 4.641; far downstream the developed 3.657 [2]:

    >>> round(nu_laminar_thermal_entry_mean(0.05), 1), round(nu_laminar_thermal_entry_mean(100.0), 1)
    (4.6, 3.7)

    References
    ----------
    [1] VDI Heat Atlas, 2nd ed., Springer, 2010, chapter G1 (Gnielinski, V.).
    [2] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978.
    """
    if not x_star > 0.0:
        raise ValueError(f"x_star: {x_star!r} is not allowed; it must be > 0")
    return _x_nu_mean(x_star) / x_star


def _x_nu_mean(x_star: float) -> float:
    """x* Nu_m(x*) of ``nu_laminar_thermal_entry_mean``, finite (zero) at the inlet."""
    if x_star <= 0.0:
        return 0.0
    edge = 1.615 * x_star ** (2.0 / 3.0) - 0.7 * x_star
    return (_DEVELOPED_CUBES * x_star * x_star * x_star + edge * edge * edge) ** _THIRD


_DEVELOPED_CUBES = NU_LAMINAR_DEVELOPED ** 3 + 0.7 ** 3


def nu_laminar_local_over(x_star_from: float, x_star_to: float) -> float:
    """Mean over [x_from, x_to] of the local laminar Nusselt number consistent with
    ``nu_laminar_thermal_entry_mean`` (Nu_x = d(x Nu_m)/dx):

        Nu = (x_to* Nu_m(x_to*) - x_from* Nu_m(x_from*)) / (x_to* - x_from*)

    Integrated over any length this gives back the cited mean exactly, so a march in steps of any
    size transfers the heat the mean says (using the mean from the inlet as the local value would
    give about 1.5 times it).  x_star_from = 0 gives the mean from the entrance.

    x_star_from, x_star_to: distances from the start of the thermal entrance over D Re Pr [-],
    0 <= from < to (to = inf: fully developed, 3.66).  Returns Nu [-].

    Examples
    --------
    Between x* = 0.01 and 0.05 the Graetz series [2] (x* Nu_m difference over the span, eigenvalues
    of [2] as in tests/test_heat_transfer.py) gives 4.012:

    >>> round(nu_laminar_local_over(0.01, 0.05), 2)
    4.01

    References
    ----------
    [1] VDI Heat Atlas, 2nd ed., Springer, 2010, chapter G1 (Gnielinski, V.).
    [2] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978.
    """
    if x_star_to == math.inf:
        return NU_LAMINAR_DEVELOPED
    span = x_star_to - x_star_from
    if span <= 1e-9 * x_star_to:   # a point: the local value itself
        x_star_from, span = x_star_to * (1.0 - 1e-6), x_star_to * 1e-6
    return (_x_nu_mean(x_star_to) - _x_nu_mean(x_star_from)) / span


def film_parts(re: float, pr: float, darcy_f: float, entry_from_d: float = math.inf,
               entry_to_d: float = math.inf) -> tuple[float, float, float]:
    """(laminar Nu without the viscosity correction, turbulent Nu without it, turbulent weight) of
    ``nu_internal``; the march combines them with the wall viscosity it iterates on.

    Examples
    --------
    Developed laminar flow: 3.66 [1]; turbulent: Gnielinski's 254.63 (ht 1.2.0 [2]):

    >>> film_parts(1000.0, 100.0, 0.064)
    (3.66, 0.0, 0.0)
    >>> nu_lam, nu_turb, weight = film_parts(1e5, 1.2, 0.0185)
    >>> round(nu_turb, 2), weight
    (254.63, 1.0)

    References
    ----------
    [1] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978.
    [2] Bell, C., ht: heat transfer component of ChEDL, version 1.2.0, ht.conv_internal.
    """
    if re >= _RE_TURB:
        return 0.0, nu_turbulent_gnielinski(re, pr, darcy_f), 1.0
    pe = re * pr
    if entry_to_d == math.inf:
        nu_lam = NU_LAMINAR_DEVELOPED
    else:   # nu_laminar_local_over, inline (the march calls this at every step)
        x_from, x_to = entry_from_d / pe, entry_to_d / pe
        if x_to - x_from <= 1e-9 * x_to:
            x_from = x_to * (1.0 - 1e-6)
        nu_lam = (_x_nu_mean(x_to) - _x_nu_mean(x_from)) / (x_to - x_from)
    if re <= _RE_LAM:
        return nu_lam, 0.0, 0.0
    return nu_lam, nu_turbulent_gnielinski(_RE_TURB, pr, darcy_f), (re - _RE_LAM) / (_RE_TURB - _RE_LAM)


def viscosity_corrected(parts: tuple[float, float, float], viscosity_ratio: float) -> float:
    """Nu of ``film_parts`` with the property correction: laminar x r^0.14 (Sieder-Tate), turbulent
    x r^0.11 [trade], r = mu/mu_w bounded to VISCOSITY_RATIO_MIN..MAX.

    Examples
    --------
    Developed laminar flow with a wall at half the bulk viscosity: 3.66 x 2^0.14 = 4.033 [1]
    (by hand):

    >>> round(viscosity_corrected((3.66, 0.0, 0.0), 2.0), 3)
    4.033

    References
    ----------
    [1] Sieder, E. N., Tate, G. E., Ind. Eng. Chem. 28 (1936) 1429-1435.
    """
    nu_lam, nu_turb, w = parts
    r = VISCOSITY_RATIO_MIN if viscosity_ratio < VISCOSITY_RATIO_MIN else (
        VISCOSITY_RATIO_MAX if viscosity_ratio > VISCOSITY_RATIO_MAX else viscosity_ratio)
    if w == 0.0:
        return nu_lam * r ** 0.14
    if w == 1.0:
        return nu_turb * r ** 0.11
    return nu_lam * r ** 0.14 + w * (nu_turb * r ** 0.11 - nu_lam * r ** 0.14)


def nu_internal(re: float, pr: float, darcy_f: float, viscosity_ratio: float = 1.0,
                entry_from_d: float = math.inf, entry_to_d: float = math.inf) -> float:
    """Inside Nusselt number over all regimes, for a stretch [x_from, x_to] of a thermal entrance.

    laminar (Re <= 2300):   Nu = Nu_local(x_from..x_to) (mu/mu_w)^0.14, the local coefficient of
                            the Graetz problem's mean (``nu_laminar_local_over``) with Sieder and
                            Tate's property correction [trade]
    turbulent (Re >= 4000): Nu = Gnielinski(Re, Pr, f) (mu/mu_w)^0.11 (property correction for
                            liquids, heating or cooling [trade]); fully developed
    transitional:           linear in Re between the laminar value and the turbulent value at
                            Re = 4000 (Gnielinski with the darcy_f passed in) [trade]
    mu/mu_w is bounded to VISCOSITY_RATIO_MIN..VISCOSITY_RATIO_MAX (not extrapolated).

    re: Reynolds number [-], > 0; pr: Prandtl number [-], > 0; darcy_f: Darcy friction factor at
    re [-]; viscosity_ratio: bulk over wall viscosity [-], > 0 (1 if unknown); entry_from_d,
    entry_to_d: distances from the start of the thermal entrance (the route inlet or a diameter
    change) over the inside diameter [-], 0 <= from < to; both inf for fully developed flow.
    Returns Nu = h D / k [-].
    Sources: as nu_laminar_thermal_entry_mean, nu_laminar_sieder_tate, nu_turbulent_gnielinski.

    Examples
    --------
    Developed laminar flow, 3.66 [1]; turbulent, Gnielinski's 254.63 (ht 1.2.0 [3]):

    >>> nu_internal(1000.0, 100.0, 0.064)
    3.66
    >>> round(nu_internal(1e5, 1.2, 0.0185), 2)
    254.63

    References
    ----------
    [1] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978.
    [2] Sieder, E. N., Tate, G. E., Ind. Eng. Chem. 28 (1936) 1429-1435.
    [3] Gnielinski, V., Int. Chem. Eng. 16 (1976) 359-368; ht 1.2.0, ht.conv_internal.
    """
    if not (re > 0.0 and pr > 0.0):
        raise ValueError(
            f"reynolds/prandtl number: Re={re!r}, Pr={pr!r} are not allowed; both must be > 0"
        )
    if not (0.0 <= entry_from_d < entry_to_d or entry_from_d == entry_to_d == math.inf):
        raise ValueError(f"entry_from_d, entry_to_d: {entry_from_d!r}, {entry_to_d!r} are not allowed; "
                         "need 0 <= from < to")
    if not viscosity_ratio > 0.0:
        raise ValueError(f"viscosity_ratio: {viscosity_ratio!r} is not allowed; it must be > 0")
    return viscosity_corrected(film_parts(re, pr, darcy_f, entry_from_d, entry_to_d), viscosity_ratio)


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
