"""Pump models: centrifugal pumps corrected for viscosity (ANSI/HI 9.6.7) and rotary positive-displacement pumps.

Inside, everything is SI: flow [m3/s], head [m], pressure [Pa], speed [rev/s], power [W],
kinematic viscosity [m2/s], dynamic viscosity [Pa s].  The hot-loop methods (``head``,
``efficiency``, ``delivered_flow`` ...) use plain ``math`` and ``bisect``; numpy/scipy are used only
once, when a curve is built.

Centrifugal pumps
    The user gives the water curve (head, efficiency, optionally NPSH required, against flow).
    For a viscous liquid each water point is moved by the ANSI/HI 9.6.7 correction factors
    (``hi_parameter_b`` and ``hi_correction``).  ``CentrifugalPump`` keeps one corrected curve per
    viscosity, rounded to 4 significant digits.

Positive-displacement pumps (gear, lobe, screw)
    Delivered flow = displacement x speed minus a laminar slip flow that grows with the
    differential pressure and falls with viscosity (``PositiveDisplacementPump``).

References
    [1] ANSI/HI 9.6.7, Rotodynamic Pumps - Guideline for Effects of Liquid Viscosity on Performance
        (Hydraulic Institute, 2010/2015).  The formulas here were taken from a secondary summary of
        the standard (see ../shared/REFERENCES.md), not from the standard's own text.
    [2] Plane Poiseuille flow through a narrow slit, q = w c^3 dp / (12 mu L): any fluid-mechanics
        text (e.g. White, Viscous Fluid Flow).
    [3] Karassik, Messina, Cooper, Heald, Pump Handbook, chapter on rotary pumps: slip through the
        clearances rises with differential pressure and falls with viscosity, and is nearly
        independent of speed [mem] unverified.
"""

from __future__ import annotations

import math
from bisect import bisect_right
from dataclasses import dataclass, field
from typing import Sequence

from planner.correlations.constants import GRAVITY
from planner.scenario.units import si_unit_text

__all__ = [
    "HI_B_MAX",
    "HICorrection",
    "hi_parameter_b",
    "hi_correction",
    "ViscousCurve",
    "CentrifugalPump",
    "PositiveDisplacementPump",
]

HI_B_MAX = 40.0
"""Upper limit of the parameter B for which ANSI/HI 9.6.7 gives correction factors [-] [1]."""

_HI_B_CONSTANT_SI = 16.5  # with nu [cSt], H [m], Q [m3/h], N [rpm] [1]
_M2_S_TO_CST = 1e6
_M3_S_TO_M3_H = 3600.0
_REV_S_TO_RPM = 60.0
_TABLE_SEGMENTS = 48  # uniform segments of the tabulated water curve (user points are added to them)
_CACHE_MAX = 1024  # viscous curves kept per pump (about 6 kB each); oldest dropped first


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


# --------------------------------------------------------------------------------------------------
# Centrifugal pump
# --------------------------------------------------------------------------------------------------


def _interp_linear(xs: Sequence[float], ys: Sequence[float], x: float, last_slope: float) -> float:
    """Piecewise-linear y(x) on strictly increasing xs; beyond xs[-1] the line of slope
    ``last_slope`` through the last point, clipped at 0."""
    if x >= xs[-1]:
        return max(0.0, ys[-1] + last_slope * (x - xs[-1]))
    i = bisect_right(xs, x) - 1
    x0 = xs[i]
    return ys[i] + (ys[i + 1] - ys[i]) * (x - x0) / (xs[i + 1] - x0)


def _check_flow(q: float) -> None:
    if not q >= 0.0:
        raise _bad("flow", q, "a number >= 0 [m3/s]")


@dataclass(frozen=True)
class ViscousCurve:
    """A centrifugal pump's curve corrected for one viscosity (ANSI/HI 9.6.7).

    kinematic_viscosity_m2_s: the viscosity the curve is for (rounded to 4 significant digits) [m2/s].
    flow: flows of the corrected curve [m3/s], strictly increasing from 0.
    head: corrected total head at those flows [m], clipped at 0.
    efficiency: corrected efficiency at those flows [-].
    correction: the factors at the best-efficiency point (flow ratio 1).
    Tuples rather than arrays so that scalar look-ups stay cheap; ``numpy.asarray`` takes them.
    """

    kinematic_viscosity_m2_s: float
    flow: tuple[float, ...]
    head: tuple[float, ...]
    efficiency: tuple[float, ...]
    correction: HICorrection
    head_slope_beyond: float = field(default=0.0, repr=False)
    efficiency_slope_beyond: float = field(default=0.0, repr=False)

    def head_at(self, q: float) -> float:
        """Corrected head [m] at flow q [m3/s] (linear between points, see ``CentrifugalPump``)."""
        _check_flow(q)
        return _interp_linear(self.flow, self.head, q, self.head_slope_beyond)

    def efficiency_at(self, q: float) -> float:
        """Corrected efficiency [-] at flow q [m3/s]."""
        _check_flow(q)
        return _interp_linear(self.flow, self.efficiency, q, self.efficiency_slope_beyond)


class CentrifugalPump:
    """A centrifugal pump given by its water curve, corrected for viscosity by ANSI/HI 9.6.7.

    flows_m3_s: flows of the water curve [m3/s]; at least 3, strictly increasing, the first 0
        (shut-off).
    heads_m: total head on water at those flows [m], all > 0 (a rising curve near shut-off is
        accepted).
    efficiencies: efficiency on water at those flows [-], in (0, 1]; at the shut-off point 0 is
        also accepted (a real pump has none there).
    speed_rev_s: speed at which the curve holds [rev/s], > 0.
    npsh_required_m: NPSH required [m], either one value for all flows or one per flow; None if
        unknown.  Not corrected for viscosity (the standard leaves NPSH required as on water).
    stages: number of stages [-]; the BEP head per stage enters B.

    Curve shape: a monotone cubic (scipy ``PchipInterpolator``) is put through the user points once
    and tabulated at the user points plus 48 even steps; look-ups are linear between the tabulated
    points (pure Python, about a microsecond).  PCHIP does not overshoot the data, so a head curve
    that only falls stays falling.  Beyond the last user point head and efficiency follow the
    straight line through the last two user points, clipped at 0 (no limit on how far).
    Flows below 0 raise ValueError.

    BEP: vertex of the parabola through the highest-efficiency user point and its two
    neighbours (the point itself if it is the last one).
    """

    def __init__(self, flows_m3_s: Sequence[float], heads_m: Sequence[float],
                 efficiencies: Sequence[float], speed_rev_s: float,
                 npsh_required_m: float | Sequence[float] | None = None, stages: int = 1):
        flows = self._floats("flows_m3_s", flows_m3_s)
        heads = self._floats("heads_m", heads_m)
        etas = self._floats("efficiencies", efficiencies)
        n = len(flows)
        if n < 3:
            raise _bad("flows_m3_s", list(flows), "at least 3 points of the water curve")
        for name, values in (("heads_m", heads), ("efficiencies", etas)):
            if len(values) != n:
                raise _bad(name, list(values), f"one value per flow ({n} values)")
        if flows[0] != 0.0:
            raise _bad("flows_m3_s", list(flows), "starting at 0 (the shut-off point)")
        if any(b <= a for a, b in zip(flows, flows[1:])):
            raise _bad("flows_m3_s", list(flows), "strictly increasing")
        if any(not h > 0.0 for h in heads):
            raise _bad("heads_m", list(heads), "all > 0 [m]")
        if not 0.0 <= etas[0] <= 1.0 or any(not 0.0 < e <= 1.0 for e in etas[1:]):
            raise _bad("efficiencies", list(etas), "in (0, 1] (0 allowed at shut-off)")
        self.speed_rev_s = _positive("speed_rev_s", speed_rev_s)
        if not (isinstance(stages, int) and stages >= 1):
            raise _bad("stages", stages, "a whole number >= 1")
        self.stages = stages
        self.flows_m3_s = flows
        self.heads_m = heads
        self.efficiencies = etas

        self._npsh_flows = flows
        self._npsh: tuple[float, ...] | float | None
        if npsh_required_m is None:
            self._npsh = None
        elif isinstance(npsh_required_m, (int, float)):
            self._npsh = _non_negative("npsh_required_m", npsh_required_m)
        else:
            npsh = self._floats("npsh_required_m", npsh_required_m)
            if len(npsh) != n or any(not v >= 0.0 for v in npsh):
                raise _bad("npsh_required_m", list(npsh), f"one value >= 0 [m] per flow ({n} values)")
            self._npsh = npsh
        self.npsh_required_m = npsh_required_m

        self._build_water_table()
        self.bep_flow_m3_s, self.bep_efficiency = self._best_efficiency_point()
        self._water = self._corrected(0.0, HICorrection(0.0, 1.0, 1.0, 1.0, True, "water curve"))
        self.bep_head_m = self.water_head(self.bep_flow_m3_s)
        self._cache: dict[float, ViscousCurve] = {}
        self._last_nu = math.nan
        self._last_curve: ViscousCurve | None = None

    @staticmethod
    def _floats(name: str, values) -> tuple[float, ...]:
        try:
            out = tuple(float(v) for v in values)
        except (TypeError, ValueError):
            raise _bad(name, values, "a list of numbers") from None
        if not all(math.isfinite(v) for v in out):
            raise _bad(name, list(out), "a list of finite numbers")
        return out

    def _build_water_table(self) -> None:
        import numpy as np
        from scipy.interpolate import PchipInterpolator

        q = np.asarray(self.flows_m3_s)
        grid = np.union1d(np.linspace(0.0, q[-1], _TABLE_SEGMENTS + 1), q)
        grid[0], grid[-1] = 0.0, q[-1]
        self._table_flow = tuple(float(v) for v in grid)
        self._table_head = tuple(float(v) for v in PchipInterpolator(q, self.heads_m)(grid))
        self._table_eta = tuple(float(v) for v in PchipInterpolator(q, self.efficiencies)(grid))
        # index in the table of the last-but-one user point: the extrapolation runs along the
        # user's last segment, not along the cubic's end tangent
        self._penultimate = int(np.searchsorted(grid, q[-2]))

    def _best_efficiency_point(self) -> tuple[float, float]:
        q, e = self.flows_m3_s, self.efficiencies
        i = max(range(len(e)), key=e.__getitem__)
        if i == 0:
            raise _bad("efficiencies", list(e), "highest at a flow above 0 (not at shut-off)")
        if i == len(e) - 1:
            return q[i], e[i]
        # parabola through (q[i-1], e[i-1]), (q[i], e[i]), (q[i+1], e[i+1]) in Newton form
        d1 = (e[i] - e[i - 1]) / (q[i] - q[i - 1])
        d2 = ((e[i + 1] - e[i]) / (q[i + 1] - q[i]) - d1) / (q[i + 1] - q[i - 1])
        if d2 >= 0.0:  # flat top: no vertex
            return q[i], e[i]
        q_top = 0.5 * (q[i - 1] + q[i]) - d1 / (2.0 * d2)
        q_top = min(max(q_top, q[i - 1]), q[i + 1])
        e_top = e[i - 1] + (q_top - q[i - 1]) * (d1 + d2 * (q_top - q[i]))
        return q_top, min(1.0, max(e_top, e[i]))

    def _corrected(self, nu: float, corr: HICorrection) -> ViscousCurve:
        c_q, c_eta, one_minus = corr.c_q, corr.c_eta, 1.0 - corr.c_q
        qb = self.bep_flow_m3_s
        flow = tuple(c_q * q for q in self._table_flow)
        head = tuple(max(0.0, (1.0 - one_minus * (q / qb) ** 0.75) * h)
                     for q, h in zip(self._table_flow, self._table_head))
        eta = tuple(c_eta * e for e in self._table_eta)
        j = self._penultimate
        dq = flow[-1] - flow[j]
        return ViscousCurve(nu, flow, head, eta, corr,
                            (head[-1] - head[j]) / dq, (eta[-1] - eta[j]) / dq)

    # -- water curve ---------------------------------------------------------------------------

    def water_head(self, q: float) -> float:
        """Total head on water [m] at flow q [m3/s]."""
        return self._water.head_at(q)

    def water_efficiency(self, q: float) -> float:
        """Efficiency on water [-] at flow q [m3/s]."""
        return self._water.efficiency_at(q)

    # -- viscous curve ---------------------------------------------------------------------------

    def viscous_curve(self, kinematic_viscosity_m2_s: float) -> ViscousCurve:
        """The curve corrected by ANSI/HI 9.6.7 for this kinematic viscosity [m2/s].

        Each tabulated water point (Q_w, H_w, eta_w) becomes
        (C_Q Q_w,  C_H(Q_w/Q_BEP) H_w,  C_eta eta_w), with B from the BEP on water (head per stage).
        Kept per viscosity rounded to 4 significant digits, and computed at that rounded value, so
        that the same key always gives the same curve.
        """
        nu = kinematic_viscosity_m2_s
        if nu == self._last_nu:
            return self._last_curve  # type: ignore[return-value]
        _positive("kinematic viscosity", nu)
        key = float(f"{nu:.4g}")
        curve = self._cache.get(key)
        if curve is None:
            b = hi_parameter_b(key, self.bep_head_m / self.stages, self.bep_flow_m3_s, self.speed_rev_s)
            curve = self._corrected(key, hi_correction(b, 1.0))
            if len(self._cache) >= _CACHE_MAX:
                del self._cache[next(iter(self._cache))]
            self._cache[key] = curve
        self._last_nu, self._last_curve = nu, curve
        return curve

    def head(self, q: float, kinematic_viscosity: float) -> float:
        """Total head [m] at flow q [m3/s] for a liquid of kinematic viscosity [m2/s]."""
        return self.viscous_curve(kinematic_viscosity).head_at(q)

    def efficiency(self, q: float, kinematic_viscosity: float) -> float:
        """Pump efficiency [-] at flow q [m3/s] for a liquid of kinematic viscosity [m2/s]."""
        return self.viscous_curve(kinematic_viscosity).efficiency_at(q)

    def shut_off_head(self, nu: float) -> float:
        """Head at zero flow [m] (C_H = 1 there, so equal to the water value)."""
        return self.viscous_curve(nu).head[0]

    def max_flow(self, nu: float) -> float:
        """Largest flow of the corrected curve [m3/s]: where its head first reaches 0, else the last
        point (C_Q times the last water flow).  Flows beyond are extrapolations."""
        curve = self.viscous_curve(nu)
        for q, h in zip(curve.flow, curve.head):
            if h <= 0.0:
                return q
        return curve.flow[-1]

    def shaft_power(self, q: float, head_m: float, density: float, kinematic_viscosity: float) -> float:
        """Shaft power [W] = rho g Q H / eta.

        q: flow [m3/s]; head_m: head developed [m]; density [kg/m3]; kinematic_viscosity [m2/s].
        At zero flow with zero efficiency the limit of Q/eta along the first curve segment is used
        (a finite shut-off power); with a positive efficiency at shut-off the result is 0.
        Raises ValueError where the extrapolated efficiency has fallen to 0.
        """
        curve = self.viscous_curve(kinematic_viscosity)
        eta = curve.efficiency_at(q)
        if eta > 0.0:
            return density * GRAVITY * q * head_m / eta
        if q == 0.0:
            return density * GRAVITY * head_m * curve.flow[1] / curve.efficiency[1]
        raise _bad("flow", q, f"within the pump's curve: efficiency is 0 there (last point "
                              f"{curve.flow[-1]:.4g} m3/s)")

    def npsh_required(self, q: float) -> float | None:
        """NPSH required [m] at flow q [m3/s]: linear between the user points, beyond the last one
        along the last segment (clipped at 0); the single value if one was given; None if unknown."""
        npsh = self._npsh
        if npsh is None or isinstance(npsh, float):
            return npsh
        _check_flow(q)
        xs = self._npsh_flows
        return _interp_linear(xs, npsh, q, (npsh[-1] - npsh[-2]) / (xs[-1] - xs[-2]))


# --------------------------------------------------------------------------------------------------
# Positive-displacement pump
# --------------------------------------------------------------------------------------------------


class PositiveDisplacementPump:
    """A rotary positive-displacement pump (gear, lobe, screw) with laminar slip.

    displacement_m3_per_rev: volume moved per revolution [m3/rev], > 0.
    speed_rev_s: running speed [rev/s], > 0 (and at most max_speed_rev_s if that is given).
    slip_flow_m3_s: slip at the reference differential pressure and viscosity [m3/s], >= 0.
    slip_reference_pressure_pa: differential pressure of that slip figure [Pa], > 0.
    slip_reference_viscosity_pa_s: dynamic viscosity of that slip figure [Pa s], > 0.
    slip_viscosity_exponent: exponent on the viscosity ratio [-], >= 0 (1 for purely laminar slip).
    relief_setting_pa: differential at which the relief valve opens [Pa], > 0, or None.  Kept for
        the checks; the flow model here does not limit pressure.
    mechanical_efficiency: shaft power to hydraulic power of the theoretical flow [-], in (0, 1].
    motor_power_w: motor rating [W], > 0, or None.
    npsh_required_m: NPSH required [m], >= 0 (a single figure).
    max_speed_rev_s: the pump's speed limit [rev/s], > 0, or None.

    Slip model: leakage back through the clearances is plane Poiseuille flow, q = w c^3 dp/(12 mu L)
    [2], so at fixed clearances slip is proportional to dp / mu and (to first order) independent of
    speed, as pump handbooks describe rotary-pump slip [3] [mem] unverified.  The exponent on the
    viscosity ratio lets a measured slip curve be fitted (thin liquids leak less than 1/mu predicts
    once the clearance flow is no longer laminar) [trade].
    """

    def __init__(self, displacement_m3_per_rev: float, speed_rev_s: float, slip_flow_m3_s: float = 0.0,
                 slip_reference_pressure_pa: float = 1e5, slip_reference_viscosity_pa_s: float = 0.1,
                 slip_viscosity_exponent: float = 1.0, relief_setting_pa: float | None = None,
                 mechanical_efficiency: float = 0.85, motor_power_w: float | None = None,
                 npsh_required_m: float = 3.0, max_speed_rev_s: float | None = None):
        self.displacement_m3_per_rev = _positive("displacement_m3_per_rev", displacement_m3_per_rev)
        self.speed_rev_s = _positive("speed_rev_s", speed_rev_s)
        self.slip_flow_m3_s = _non_negative("slip_flow_m3_s", slip_flow_m3_s)
        self.slip_reference_pressure_pa = _positive("slip_reference_pressure_pa", slip_reference_pressure_pa)
        self.slip_reference_viscosity_pa_s = _positive("slip_reference_viscosity_pa_s",
                                                       slip_reference_viscosity_pa_s)
        self.slip_viscosity_exponent = _non_negative("slip_viscosity_exponent", slip_viscosity_exponent)
        self.relief_setting_pa = (None if relief_setting_pa is None
                                  else _positive("relief_setting_pa", relief_setting_pa))
        eta = mechanical_efficiency
        if not (isinstance(eta, (int, float)) and 0.0 < eta <= 1.0):
            raise _bad("mechanical_efficiency", eta, "in (0, 1]")
        self.mechanical_efficiency = float(eta)
        self.motor_power_w = None if motor_power_w is None else _positive("motor_power_w", motor_power_w)
        self.npsh_required_m = _non_negative("npsh_required_m", npsh_required_m)
        self.max_speed_rev_s = None if max_speed_rev_s is None else _positive("max_speed_rev_s", max_speed_rev_s)
        if self.max_speed_rev_s is not None and self.speed_rev_s > self.max_speed_rev_s:
            raise _bad("speed_rev_s", speed_rev_s, f"at most max_speed_rev_s = {self.max_speed_rev_s!r}")
        # slip = coefficient * dp / mu^exponent
        self._slip_coefficient = (self.slip_flow_m3_s / self.slip_reference_pressure_pa
                                  * self.slip_reference_viscosity_pa_s ** self.slip_viscosity_exponent)

    def _speed(self, speed: float | None) -> float:
        if speed is None:
            return self.speed_rev_s
        if not speed >= 0.0:
            raise _bad("speed", speed, "a number >= 0 [rev/s]")
        return speed

    def _slip_per_pa(self, viscosity: float) -> float:
        if not viscosity > 0.0:
            raise _bad("viscosity", viscosity, "a positive dynamic viscosity [Pa s]")
        return self._slip_coefficient / viscosity ** self.slip_viscosity_exponent

    def theoretical_flow(self, speed: float | None = None) -> float:
        """Theoretical flow [m3/s] = displacement [m3/rev] x speed [rev/s] (rated speed if None)."""
        return self.displacement_m3_per_rev * self._speed(speed)

    def slip(self, dp: float, viscosity: float, speed: float | None = None) -> float:
        """Slip flow [m3/s] = slip_ref (dp / p_ref) (mu_ref / mu)^exponent, at most the theoretical flow.

        dp: differential pressure, discharge minus suction [Pa]; below 0 the slip is taken as 0
            (the model has no forward leakage).
        viscosity: dynamic viscosity [Pa s], > 0.
        speed: [rev/s], rated speed if None (only the cap depends on it).
        Sources: [2], [3] (see the class docstring).
        """
        if dp <= 0.0:
            return 0.0
        return min(self._slip_per_pa(viscosity) * dp, self.theoretical_flow(speed))

    def delivered_flow(self, dp: float, viscosity: float, speed: float | None = None) -> float:
        """Delivered flow [m3/s] = max(0, theoretical flow - slip) at differential dp [Pa] and
        dynamic viscosity [Pa s]."""
        return max(0.0, self.theoretical_flow(speed) - self.slip(dp, viscosity, speed))

    def differential_for_flow(self, q: float, viscosity: float, speed: float | None = None) -> float:
        """Differential pressure [Pa] at which the pump delivers q [m3/s]: the inverse of
        ``delivered_flow``, dp = (Q_theoretical - q) / (slip per Pa).

        q equal to the theoretical flow gives 0; q = 0 gives the differential at which slip eats
        the whole displacement.  With no slip any q below the theoretical flow gives math.inf
        (the pump cannot deliver less; the relief valve has to).  q above the theoretical flow or
        below 0 raises ValueError.
        """
        q_th = self.theoretical_flow(speed)
        if not 0.0 <= q <= q_th:
            raise _bad("flow", q, f"between 0 and the theoretical flow {q_th:.6g} {si_unit_text('volume_flow')}")
        per_pa = self._slip_per_pa(viscosity)
        if q == q_th:
            return 0.0
        if per_pa == 0.0:
            return math.inf
        return (q_th - q) / per_pa

    def shaft_power(self, dp: float, viscosity: float, speed: float | None = None) -> float:
        """Shaft power [W] = Q_theoretical dp / mechanical_efficiency.

        The theoretical flow is used, not the delivered one, because the slip flow is pumped up to
        discharge pressure too before it leaks back.  dp [Pa] below 0 counts as 0.  ``viscosity``
        [Pa s] is accepted for a uniform call and checked, but this model has no viscous-drag term.
        """
        self._slip_per_pa(viscosity)
        return self.theoretical_flow(speed) * max(dp, 0.0) / self.mechanical_efficiency

    def motor_overloaded(self, power: float) -> bool:
        """True if ``power`` [W] exceeds the motor rating (False when no rating is given)."""
        return self.motor_power_w is not None and power > self.motor_power_w
