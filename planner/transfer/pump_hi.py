"""ANSI/HI 9.6.7 [1]: the parameter B and the viscosity correction factors of a centrifugal pump's water
curve, and the argument checks every pump model shares (SI; reference list in ``transfer.pumps``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

HI_B_MAX = 40.0
"""Upper limit of the parameter B for which ANSI/HI 9.6.7 gives correction factors [-] [1]."""

_HI_B_CONSTANT_SI = 16.5  # with nu [cSt], H [m], Q [m3/h], N [rpm] [1]
_M2_S_TO_CST = 1e6
_M3_S_TO_M3_H = 3600.0
_REV_S_TO_RPM = 60.0


def _bad(name: str, value: object, rule: str) -> ValueError:
    return ValueError(f"{name}: {value!r} is not allowed; it must be {rule}")


def _positive(name: str, value: float) -> float:
    if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0.0):
        raise _bad(name, value, "a positive finite number")
    return float(value)


def _non_negative(name: str, value: float) -> float:
    if not (isinstance(value, (int, float)) and math.isfinite(value) and value >= 0.0):
        raise _bad(name, value, "a finite number >= 0")
    return float(value)


# --------------------------------------------------------------------------------------------------
# ANSI/HI 9.6.7
# --------------------------------------------------------------------------------------------------


def hi_parameter_b(kinematic_viscosity_m2_s: float, bep_head_m: float, bep_flow_m3_s: float,
                   speed_rev_s: float) -> float:
    """ANSI/HI 9.6.7 parameter B, which sets the size of the viscosity correction.

    B = 16.5 nu^0.5 H^0.0625 / (Q^0.375 N^0.25)
    with nu [cSt], H [m] head per stage at the best-efficiency point on water, Q [m3/h] flow at
    the best-efficiency point on water, N [rpm].  The US form is the same with constant 26.6,
    H [ft] and Q [US gpm]; the two agree to about 0.4 % (the constants are rounded).

    For a double-suction impeller the standard takes Q per impeller eye (half the pump flow);
    the caller passes that.

    kinematic_viscosity_m2_s: liquid kinematic viscosity [m2/s], > 0.
    bep_head_m: head per stage at BEP on water [m], > 0.
    bep_flow_m3_s: flow at BEP on water [m3/s], > 0.
    speed_rev_s: shaft speed [rev/s], > 0.
    Returns B [-].
    Valid range: the method was fitted to data from about 1 to 3000 cSt; the caller decides
    whether to report viscosities outside that band.
    Source: [1] (via a secondary summary).

    Examples
    --------
    200 cSt, 50 m and 200 m^3/h at the BEP, 2950 rpm: B = 5.544 by hand from [1]
    (../shared/REFERENCES.md [calc]):

    >>> round(hi_parameter_b(200e-6, 50.0, 200.0 / 3600.0, 2950.0 / 60.0), 3)
    5.544

    References
    ----------
    [1] ANSI/HI 9.6.7, Rotodynamic Pumps - Guideline for Effects of Liquid Viscosity on Performance,
        Hydraulic Institute, 2010/2015 (formulas via a secondary summary of the standard).
    """
    nu_cst = _positive("kinematic viscosity", kinematic_viscosity_m2_s) * _M2_S_TO_CST
    head = _positive("BEP head", bep_head_m)
    flow_m3_h = _positive("BEP flow", bep_flow_m3_s) * _M3_S_TO_M3_H
    rpm = _positive("speed", speed_rev_s) * _REV_S_TO_RPM
    return _HI_B_CONSTANT_SI * math.sqrt(nu_cst) * head**0.0625 / (flow_m3_h**0.375 * rpm**0.25)


@dataclass(frozen=True)
class HICorrection:
    """ANSI/HI 9.6.7 correction factors for one value of B.

    b: parameter B [-].
    c_q: flow factor, Q_vis = C_Q Q_water [-].
    c_h: head factor at the given flow ratio, H_vis = C_H H_water [-].
    c_eta: efficiency factor, eta_vis = C_eta eta_water [-].
    in_range: False when B >= 40, where the standard gives no factors (these are extrapolated).
    note: why the factors are what they are, in words ("" in the normal case).
    """

    b: float
    c_q: float
    c_h: float
    c_eta: float
    in_range: bool
    note: str


def hi_correction(b: float, flow_ratio: float = 1.0) -> HICorrection:
    """ANSI/HI 9.6.7 correction factors for flow, head and efficiency.

    For B <= 1 the liquid behaves like water: C_Q = C_H = C_eta = 1.
    For 1 < B < 40:
        C_Q   = 2.71^(-0.165 (log10 B)^3.15)
        C_eta = B^(-0.0547 B^0.69)
        C_H   = 1 - (1 - C_Q) (Q_water / Q_BEP,water)^0.75     (= C_Q at the BEP, 1 at shut-off)
    For B >= 40 the same formulas are evaluated but ``in_range`` is False and ``note`` says that the
    method's range is exceeded; the caller turns that into a finding.

    C_H is not clipped here (it falls below 0 only far beyond the BEP at large B); the pump curve
    clips the corrected head at 0.

    b: parameter B from ``hi_parameter_b`` [-], > 0.
    flow_ratio: Q_water / Q_BEP,water of the water point being corrected [-], >= 0.
    Returns an ``HICorrection``.
    Source: [1] (via a secondary summary).

    Examples
    --------
    B = 5.544 (200 cSt, see ``hi_parameter_b``): C_Q = 0.9373 and C_eta = 0.7368 by hand from [1]
    (../shared/REFERENCES.md [calc]):

    >>> c = hi_correction(5.544)
    >>> round(c.c_q, 4), round(c.c_eta, 4), c.in_range
    (0.9373, 0.7368, True)

    References
    ----------
    [1] ANSI/HI 9.6.7, Rotodynamic Pumps - Guideline for Effects of Liquid Viscosity on Performance,
        Hydraulic Institute, 2010/2015 (formulas via a secondary summary of the standard).
    """
    b = _positive("B", b)
    flow_ratio = _non_negative("flow ratio", flow_ratio)
    if b <= 1.0:
        return HICorrection(b, 1.0, 1.0, 1.0, True, "B <= 1: no viscosity correction needed")
    c_q = 2.71 ** (-0.165 * math.log10(b) ** 3.15)
    c_eta = b ** (-0.0547 * b**0.69)
    c_h = 1.0 - (1.0 - c_q) * flow_ratio**0.75
    if b >= HI_B_MAX:
        note = (f"B = {b:.4g} is at or above {HI_B_MAX:g}, beyond the range of ANSI/HI 9.6.7; "
                "the factors are extrapolated from its formulas and may be far off")
        return HICorrection(b, c_q, c_h, c_eta, False, note)
    return HICorrection(b, c_q, c_h, c_eta, True, "")
