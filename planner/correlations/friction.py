"""Darcy friction factor for full circular pipes (Newtonian liquids).

All functions take and return plain floats; no numpy, so that they stay cheap in the
plan's inner loop (called some 10^5 times per plan).

Darcy factor f is defined by  dp/L = f (1/D) rho V^2 / 2  (four times the Fanning factor).
"""

from __future__ import annotations

import math
from math import log

__all__ = [
    "RE_LAMINAR_MAX",
    "RE_TURBULENT_MIN",
    "darcy_laminar",
    "fanning_apparent_re_shah",
    "darcy_laminar_developing",
    "darcy_colebrook",
    "darcy_churchill_1977",
    "darcy_friction",
    "flow_regime",
]

RE_LAMINAR_MAX = 2300.0
"""Upper Reynolds number of the laminar branch [-] (usual pipe-flow value) [trade]."""

RE_TURBULENT_MIN = 4000.0
"""Lower Reynolds number of the turbulent branch [-] (usual pipe-flow value) [trade]."""

# Constants of Clamond's algorithm (Clamond 2009, Ind. Eng. Chem. Res. 48(7), 3665-3671):
_CL_X1 = 0.123968186335417556  # ln(10) / 18.574
_CL_X2 = 0.779397488455682028  # ln(ln(10) / 5.02)
_CL_F = 1.151292546497022842  # ln(10) / 2


def _check_re(re: float) -> None:
    if not re > 0.0:
        raise ValueError(f"reynolds number: {re!r} is not allowed; it must be a positive number")


def darcy_laminar(re: float) -> float:
    """Hagen-Poiseuille laminar Darcy friction factor.

    f = 64 / Re

    Valid for laminar flow of a Newtonian fluid in a circular pipe (Re up to about 2300).

    re: Reynolds number rho V D / mu [-], > 0.
    Returns the Darcy friction factor [-].
    Source: Hagen-Poiseuille solution, any fluid-mechanics text [1].

    Examples
    --------
    >>> darcy_laminar(1000.0)     # 64/1000 [1]
    0.064

    References
    ----------
    [1] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (laminar flow in a pipe).
    """
    _check_re(re)
    return 64.0 / re


SHAH_INCREMENT_K = 1.25
"""Incremental pressure drop K(inf) of a developing laminar entrance [-]: the hydrodynamic entrance
costs K(inf) rho V^2 / 2 more than fully developed flow from the inlet (Shah & London 1978; Langhaar's
approximate solution gave 1.28) [mem]."""


def fanning_apparent_re_shah(x_plus: float) -> float:
    """Apparent Fanning friction factor times Re of developing laminar flow in a circular pipe, from a
    uniform inlet velocity (Shah 1978):

        f_app Re = 3.44 / sqrt(x+) + (1.25 / (4 x+) + 16 - 3.44 / sqrt(x+)) / (1 + 0.00021 x+^-2)

    with x+ = x / (D Re) the distance from the inlet.  The apparent factor counts the whole pressure
    drop from the inlet, dp = 4 f_app (x / D) rho V^2 / 2: the wall shear, and the momentum the
    flattening profile gains.  It tends to Blasius's boundary-layer 3.44 / sqrt(x+) at the inlet and to
    16 + K(inf) / (4 x+), with K(inf) = 1.25, far from it; within 2.4 % of the exact solutions
    (Shah 1978) [mem].

    x_plus: x / (D Re) [-], > 0.  Returns f_app Re [-].
    Sources: [1], [2].

    Examples
    --------
    Far from the inlet: 16 + K(inf) / (4 x+) = 16.31 at x+ = 1 [2]:

    >>> round(fanning_apparent_re_shah(1.0), 2)
    16.31

    References
    ----------
    [1] Shah, R. K., "A correlation for laminar hydrodynamic entry length solutions for circular and
        noncircular ducts", J. Fluids Eng. 100 (1978) 177-179 [mem].
    [2] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978 [mem].
    """
    if not x_plus > 0.0:
        raise ValueError(f"x_plus: {x_plus!r} is not allowed; it must be > 0")
    blasius = 3.44 / x_plus ** 0.5
    return blasius + (1.25 / (4.0 * x_plus) + 16.0 - blasius) / (1.0 + 0.00021 / (x_plus * x_plus))


def _apparent_drop(x_plus: float) -> float:
    """dp / (rho V^2 / 2) from the inlet to x+ over Re: 4 x+ f_app Re (zero at the inlet)."""
    return 4.0 * x_plus * fanning_apparent_re_shah(x_plus) if x_plus > 0.0 else 0.0


def darcy_laminar_developing(re: float, from_d: float, to_d: float) -> float:
    """Mean Darcy factor of laminar flow over the stretch [from_d, to_d] diameters from a hydrodynamic
    entrance (``fanning_apparent_re_shah``): the stretch's pressure drop over (to_d - from_d) rho V^2 / 2.

    Integrated over any length it gives back the apparent factor from the inlet, so a march in steps
    of any size loses the pressure Shah's correlation says; far from the entrance it is 64 / Re.

    re: Reynolds number [-], > 0; 0 <= from_d < to_d [-] (to_d = inf: fully developed).
    Returns the Darcy friction factor [-].

    Examples
    --------
    L/D = 100 at Re = 1000 (x+ = 0.1): f_app Re = 18.96 by [1]'s formula worked by hand, 1.18 times
    Hagen-Poiseuille's 16 (the numerical entrance solution of tests/test_developing_laminar.py agrees
    within 1 %):

    >>> round(darcy_laminar_developing(1000.0, 0.0, 100.0) / darcy_laminar(1000.0), 2)
    1.18

    References
    ----------
    [1] Shah, R. K., J. Fluids Eng. 100 (1978) 177-179 [mem].
    """
    _check_re(re)
    if to_d == math.inf:
        return 64.0 / re
    if not 0.0 <= from_d < to_d:
        raise ValueError(f"from_d, to_d: {from_d!r}, {to_d!r} are not allowed; 0 <= from_d < to_d")
    return (_apparent_drop(to_d / re) - _apparent_drop(from_d / re)) / (to_d - from_d)


def darcy_colebrook(re: float, relative_roughness: float) -> float:
    """Colebrook-White Darcy friction factor, solved explicitly by Clamond's algorithm.

    Colebrook-White:  1/sqrt(f) = -2 log10( (e/D)/3.7 + 2.51/(Re sqrt(f)) ).

    Clamond (2009) rewrites it with the Lambert-W form and applies two steps of a
    third-order (Householder) correction to a fixed starting guess; the result solves the
    implicit equation to within floating-point precision, with no iteration loop:

        X1 = (e/D) Re ln(10)/18.574,   X2 = ln(Re ln(10)/5.02),   F = X2 - 0.2
        twice:  E = (ln(X1 + F) + F - X2) / (1 + X1 + F)
                F = F - (1 + X1 + F + E/2) E (X1 + F) / (1 + X1 + F + E (1 + E/3))
        f = (ln(10) / (2 F))^2

    Valid range: turbulent flow, Re from about 4000 up (the algorithm itself stays exact down to
    Re of about 10 and beyond Re 1e12), relative roughness 0 to about 0.05.

    re: Reynolds number [-], > 0.
    relative_roughness: absolute roughness over inside diameter e/D [-], >= 0.
    Returns the Darcy friction factor [-].
    Sources: Colebrook, J. Inst. Civ. Eng. 11 (1939) 133-156 [1]; Clamond, D., "Efficient resolution
    of the Colebrook equation", Ind. Eng. Chem. Res. 48 (2009) 3665-3671 [2].

    Examples
    --------
    Re 1e5, e/D 1e-4: 0.018514 (fluids 1.3.1 ``Colebrook`` [3], ../shared/REFERENCES.md). White's
    worked example of a 6-in asphalted cast-iron pipe, e/D 0.0008, Re about 274,900: f = 0.0198 [4]:

    >>> round(darcy_colebrook(1e5, 1e-4), 6)
    0.018514
    >>> round(darcy_colebrook(2.749e5, 0.0008), 4)
    0.0198

    References
    ----------
    [1] Colebrook, C. F., "Turbulent flow in pipes", J. Inst. Civ. Eng. 11 (1939) 133-156.
    [2] Clamond, D., Ind. Eng. Chem. Res. 48 (2009) 3665-3671.
    [3] Bell, C., fluids: fluid dynamics component of ChEDL, version 1.3.1, fluids.friction.
    [4] White, F. M., Fluid Mechanics, McGraw-Hill, chapter 6, worked example (Moody chart).
    """
    _check_re(re)
    if not relative_roughness >= 0.0:
        raise ValueError(
            f"relative_roughness: {relative_roughness!r} is not allowed; it must be >= 0"
        )
    x1 = relative_roughness * re * _CL_X1
    x2 = log(re) - _CL_X2
    f = x2 - 0.2
    # first correction step (with F = X2 - 0.2, ln(X1+F) + F - X2 reduces to ln(X1+F) - 0.2)
    x1f = x1 + f
    e = (log(x1f) - 0.2) / (1.0 + x1f)
    f = f - (1.0 + x1f + 0.5 * e) * e * x1f / (1.0 + x1f + e * (1.0 + e / 3.0))
    # second correction step
    x1f = x1 + f
    e = (log(x1f) + f - x2) / (1.0 + x1f)
    f = f - (1.0 + x1f + 0.5 * e) * e * x1f / (1.0 + x1f + e * (1.0 + e / 3.0))
    f = _CL_F / f
    return f * f


def darcy_churchill_1977(re: float, relative_roughness: float) -> float:
    """Churchill's all-regime Darcy friction factor.

    f = 8 [ (8/Re)^12 + (A + B)^(-3/2) ]^(1/12)
    A = [ 2.457 ln( 1 / ((7/Re)^0.9 + 0.27 e/D) ) ]^16,   B = (37530 / Re)^16

    One expression for laminar, transitional and turbulent flow (it tends to 64/Re at low Re and
    to a Colebrook-like law at high Re).

    re: Reynolds number [-], > 0; relative_roughness: e/D [-], >= 0.
    Returns the Darcy friction factor [-].
    Source: Churchill, S. W., "Friction-factor equation spans all fluid-flow regimes",
    Chem. Eng. 84 (24) (1977) 91-92 [1].

    Examples
    --------
    Re 3000, e/D 1e-4: 0.043049 (fluids 1.3.1 ``Churchill_1977`` [2]); at Re 100 it is 64/Re:

    >>> round(darcy_churchill_1977(3000.0, 1e-4), 6)
    0.043049
    >>> round(darcy_churchill_1977(100.0, 0.0), 4)
    0.64

    References
    ----------
    [1] Churchill, S. W., Chem. Eng. 84 (24) (1977) 91-92.
    [2] Bell, C., fluids: fluid dynamics component of ChEDL, version 1.3.1, fluids.friction.
    """
    _check_re(re)
    if not relative_roughness >= 0.0:
        raise ValueError(
            f"relative_roughness: {relative_roughness!r} is not allowed; it must be >= 0"
        )
    a = (2.457 * log(1.0 / ((7.0 / re) ** 0.9 + 0.27 * relative_roughness))) ** 16
    b = (37530.0 / re) ** 16
    return 8.0 * ((8.0 / re) ** 12 + (a + b) ** -1.5) ** (1.0 / 12.0)


def darcy_friction(re: float, relative_roughness: float) -> float:
    """Darcy friction factor over all regimes.

    f = 64/Re                                  for Re <= 2300 (laminar)
    f = Colebrook-White (Clamond)              for Re >= 4000 (turbulent)
    f = Churchill (1977)                       for 2300 < Re < 4000 (transitional)

    The transitional band has no reliable correlation.  Churchill's all-regime law is used there:
    a straight line between the laminar and turbulent ends gave 0.58-0.87 times Churchill's
    factor, under-predicting the pressure drop of a line running in the band.  Churchill lies
    above both ends, so the factor steps up by up to about 11 % at Re = 2300 and down by about 2 %
    at Re = 4000; the operating-point search brackets its roots and does not need continuity.

    re: Reynolds number [-], > 0.
    relative_roughness: e/D [-], >= 0.
    Returns the Darcy friction factor [-].
    Sources: see darcy_laminar, darcy_colebrook and darcy_churchill_1977; bands [trade].

    Examples
    --------
    One value per band: 64/Re [1]; Colebrook 0.018514 [2] (fluids 1.3.1, ../shared/REFERENCES.md);
    Churchill 0.043049 [3] (fluids 1.3.1 ``Churchill_1977``):

    >>> [round(darcy_friction(re, 1e-4), 6) for re in (1000.0, 1e5, 3000.0)]
    [0.064, 0.018514, 0.043049]

    References
    ----------
    [1] Hagen-Poiseuille: White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4.
    [2] Colebrook, C. F., J. Inst. Civ. Eng. 11 (1939) 133-156.
    [3] Churchill, S. W., Chem. Eng. 84 (24) (1977) 91-92.
    """
    _check_re(re)
    if re <= RE_LAMINAR_MAX:
        return 64.0 / re
    if re >= RE_TURBULENT_MIN:
        return darcy_colebrook(re, relative_roughness)
    return darcy_churchill_1977(re, relative_roughness)


def flow_regime(re: float) -> str:
    """Flow regime by Reynolds number: "laminar" (Re <= 2300), "transitional" (2300 < Re < 4000)
    or "turbulent" (Re >= 4000) [trade thresholds].

    re: Reynolds number [-], > 0.

    Examples
    --------
    >>> flow_regime(2300.0), flow_regime(3000.0), flow_regime(4000.0)
    ('laminar', 'transitional', 'turbulent')

    References
    ----------
    [1] Common practice [trade]; e.g. White, F. M., Fluid Mechanics, McGraw-Hill, section 6.1
        (transition near Re 2300 in a pipe).
    """
    _check_re(re)
    if re <= RE_LAMINAR_MAX:
        return "laminar"
    if re >= RE_TURBULENT_MIN:
        return "turbulent"
    return "transitional"
