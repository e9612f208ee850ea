"""The centrifugal pump: the water curve tabulated once, moved point by point by the ANSI/HI 9.6.7
corrections for a viscous liquid (``ViscousCurve``; one corrected curve kept per viscosity).
"""

from __future__ import annotations

import math
from bisect import bisect_right
from dataclasses import dataclass, field
from typing import Sequence

from planner.correlations.constants import GRAVITY
from planner.transfer.pump_hi import HICorrection, _bad, _non_negative, _positive, hi_correction, hi_parameter_b

_TABLE_SEGMENTS = 48  # uniform segments of the tabulated water curve (user points are added to them)
_CACHE_MAX = 1024  # viscous curves kept per pump (about 6 kB each); oldest dropped first


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

    Examples
    --------
    A water curve with its BEP at 200 m^3/h, 50 m, 80 % at 2950 rpm, on 200 cSt: B = 5.544, C_Q = C_H
    = 0.9373 and C_eta = 0.7368 by hand from [1] (../shared/REFERENCES.md [calc]), so the corrected
    BEP is at 187.5 m^3/h and 0.9373 x 50 = 46.86 m, at 0.8 x 0.7368 = 58.9 %; on water, as given:

    >>> pump = CentrifugalPump([0.0, 100 / 3600, 200 / 3600, 300 / 3600], [62.0, 58.0, 50.0, 38.0],
    ...                        [0.0, 0.6, 0.8, 0.6], speed_rev_s=2950 / 60)
    >>> q = 0.9373 * 200 / 3600
    >>> round(pump.head(q, 200e-6), 1), round(pump.efficiency(q, 200e-6), 3)
    (46.9, 0.589)
    >>> pump.head(200 / 3600, 1e-6), pump.efficiency(200 / 3600, 1e-6)
    (50.0, 0.8)

    References
    ----------
    [1] ANSI/HI 9.6.7, Rotodynamic Pumps - Guideline for Effects of Liquid Viscosity on Performance,
        Hydraulic Institute, 2010/2015 (formulas via a secondary summary of the standard).
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
