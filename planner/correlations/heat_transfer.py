"""Heat-transfer correlations of the film inside a line (the outside surface: ``outer_surface``).

The laminar thermal entrance (Graetz problem: a mean Nusselt number and the local value consistent
with it), Sieder-Tate's property correction, Gnielinski (turbulent), and a linear blend between them
in the transitional band.

Plain floats and `math` only: these run in the plan's inner loop (about 10^5 calls per plan).
Temperatures in kelvin.
"""

from __future__ import annotations

import math
from math import sqrt

from planner.correlations.friction import RE_LAMINAR_MAX as _RE_LAM, RE_TURBULENT_MIN as _RE_TURB

__all__ = [
    "NU_LAMINAR_DEVELOPED",
    "VISCOSITY_RATIO_MIN",
    "VISCOSITY_RATIO_MAX",
    "nu_laminar_thermal_entry_mean",
    "nu_laminar_local_over",
    "film_parts",
    "viscosity_corrected",
    "nu_laminar_sieder_tate",
    "nu_turbulent_gnielinski",
    "nu_internal",
]

NU_LAMINAR_DEVELOPED = 3.66
"""Fully developed laminar Nusselt number in a round tube at constant wall temperature [-]
(Graetz problem limit 3.657, any heat-transfer text)."""

VISCOSITY_RATIO_MIN = 0.0044
VISCOSITY_RATIO_MAX = 9.75
"""Range of bulk-to-wall viscosity ratio mu/mu_w [-] of Sieder & Tate's data, over which their
(mu/mu_w)^0.14 correction was fitted [mem] unverified.  ``nu_internal`` bounds the ratio to this
range (the correction is not extrapolated); the march reports where the ratio lies outside it."""

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
