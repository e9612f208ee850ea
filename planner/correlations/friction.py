"""Darcy friction factor for full circular pipes (Newtonian liquids).

All functions take and return plain floats; no numpy, so that they stay cheap in the
plan's inner loop (called some 10^5 times per plan).

Darcy factor f is defined by  dp/L = f (1/D) rho V^2 / 2  (four times the Fanning factor).
"""

from __future__ import annotations

from math import log

__all__ = [
    "RE_LAMINAR_MAX",
    "RE_TURBULENT_MIN",
    "darcy_laminar",
    "darcy_colebrook",
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
_LAMINAR_AT_MAX = 64.0 / RE_LAMINAR_MAX


def _check_re(re: float) -> None:
    if not re > 0.0:
        raise ValueError(f"reynolds number: {re!r} is not allowed; it must be a positive number")


def darcy_laminar(re: float) -> float:
    """Hagen-Poiseuille laminar Darcy friction factor.

    f = 64 / Re

    Valid for laminar flow of a Newtonian fluid in a circular pipe (Re up to about 2300).

    re: Reynolds number rho V D / mu [-], > 0.
    Returns the Darcy friction factor [-].
    Source: Hagen-Poiseuille solution, any fluid-mechanics text.
    """
    _check_re(re)
    return 64.0 / re


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
    Sources: Colebrook, J. Inst. Civ. Eng. 11 (1939) 133-156; Clamond, D., "Efficient resolution
    of the Colebrook equation", Ind. Eng. Chem. Res. 48 (2009) 3665-3671.
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


def darcy_friction(re: float, relative_roughness: float) -> float:
    """Darcy friction factor over all regimes.

    f = 64/Re                                  for Re <= 2300 (laminar)
    f = Colebrook-White (Clamond)              for Re >= 4000 (turbulent)
    f = linear in Re between 64/2300 and f_Colebrook(4000)  for 2300 < Re < 4000 [trade]

    The transitional band has no reliable correlation; linear interpolation keeps the factor
    continuous, which the flow solver needs, and is common practice [trade].

    re: Reynolds number [-], > 0.
    relative_roughness: e/D [-], >= 0.
    Returns the Darcy friction factor [-].
    Sources: see darcy_laminar and darcy_colebrook.
    """
    _check_re(re)
    if re <= RE_LAMINAR_MAX:
        return 64.0 / re
    if re >= RE_TURBULENT_MIN:
        return darcy_colebrook(re, relative_roughness)
    f_turb = darcy_colebrook(RE_TURBULENT_MIN, relative_roughness)
    w = (re - RE_LAMINAR_MAX) / (RE_TURBULENT_MIN - RE_LAMINAR_MAX)
    return _LAMINAR_AT_MAX + w * (f_turb - _LAMINAR_AT_MAX)


def flow_regime(re: float) -> str:
    """Flow regime by Reynolds number: "laminar" (Re <= 2300), "transitional" (2300 < Re < 4000)
    or "turbulent" (Re >= 4000) [trade thresholds].

    re: Reynolds number [-], > 0.
    """
    _check_re(re)
    if re <= RE_LAMINAR_MAX:
        return "laminar"
    if re >= RE_TURBULENT_MIN:
        return "turbulent"
    return "transitional"
