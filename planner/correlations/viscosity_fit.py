"""Fitting a viscosity law (``viscosity``: Andrade, VFT, Walther) to measured points, with how well it
fits and over which range.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

from planner.correlations.viscosity import (LAW_NAMES, MIN_POINTS, AndradeLaw, ViscosityLaw, VogelFulcherTammannLaw, WaltherLaw,
                                            walther_cst_to_z)


@dataclass(frozen=True, slots=True)
class ViscosityFit:
    """The record of a fitted law: its quality and range.

    rms_log_residual: RMS of ln(fit/given) [-]; max_relative_residual: max |fit/given - 1| [-];
    t_min, t_max: fitted temperature range [K]; n_points: number of points used.
    """

    law: ViscosityLaw
    rms_log_residual: float
    max_relative_residual: float
    t_min: float
    t_max: float
    n_points: int

    def is_extrapolation(self, t: float) -> bool:
        """True when ``t`` [K] lies outside [t_min, t_max]."""
        return not (self.t_min <= t <= self.t_max)


def fit_viscosity_law(
    law: str, temperatures_k: Sequence[float], values: Sequence[float]
) -> ViscosityFit:
    """Fit a viscosity law to points (temperature [K], value in the law's SI quantity).

    law: "andrade" (>= 2 points; linear least squares of ln mu on 1/T), "vft" (>= 3 points; exact
    through 3 points, else least squares in ln mu with c kept below the lowest temperature) or
    "walther" (>= 2 points; values are kinematic [m2/s]; least squares of log10 log10 Z on log10 T).
    Dynamic values are [Pa s].  Raises ValueError naming the field, the value and the limit.

    Examples
    --------
    Andrade through water at 20 and 60 °C [2]: both points reproduced, 40 °C predicted 2.1 % above
    the reference's 0.65273 mPa s [2] (../shared/REFERENCES.md: "within a few percent"):

    >>> fit = fit_viscosity_law("andrade", [293.15, 333.15], [1.0016e-3, 0.46604e-3])
    >>> fit.max_relative_residual < 1e-12, fit.is_extrapolation(313.15)
    (True, False)
    >>> round(fit.law.dynamic(313.15) / 0.65273e-3, 2)
    1.02

    References
    ----------
    [1] Andrade, E. N. da C., Phil. Mag. 17 (1934) 497-511; ASTM D341-09.
    [2] Huber, M. L., et al., "New international formulation for the viscosity of H2O", J. Phys. Chem.
        Ref. Data 38 (2009) 101-125 (IAPWS 2008); values by iapws 1.5.5, ../shared/REFERENCES.md.
    """
    if law not in LAW_NAMES:
        raise ValueError(f"law = {law!r}: unknown; allowed: {', '.join(map(repr, LAW_NAMES))}")
    ts, vs = _validated_points(law, temperatures_k, values)
    if law == "andrade":
        a, b = _linear_fit([1.0 / t for t in ts], [math.log(v) for v in vs])
        fitted: ViscosityLaw = AndradeLaw(a, b)
    elif law == "vft":
        fitted = VogelFulcherTammannLaw(*_fit_vft(ts, [math.log(v) for v in vs]))
    else:
        ys = []
        for i, v in enumerate(vs):
            z = walther_cst_to_z(v * 1e6)
            if not z > 1.0:
                raise ValueError(
                    f"values[{i}] = {v!r} m2/s: below the ASTM D341 range (Z = {z:.4g} must be > 1)"
                )
            ys.append(math.log10(math.log10(z)))
        intercept, slope = _linear_fit([math.log10(t) for t in ts], ys)
        fitted = WaltherLaw(intercept, -slope)
    logs = [math.log(fitted.value(t) / v) for t, v in zip(ts, vs)]
    return ViscosityFit(
        law=fitted,
        rms_log_residual=math.sqrt(sum(r * r for r in logs) / len(logs)),
        max_relative_residual=max(abs(math.expm1(r)) for r in logs),
        t_min=min(ts),
        t_max=max(ts),
        n_points=len(ts),
    )


def _validated_points(
    law: str, temperatures_k: Sequence[float], values: Sequence[float]
) -> tuple[list[float], list[float]]:
    ts, vs = list(temperatures_k), list(values)
    if len(ts) != len(vs):
        raise ValueError(
            f"temperatures_k has {len(ts)} entries but values has {len(vs)}: must be equal"
        )
    need = MIN_POINTS[law]
    if len(ts) < need:
        raise ValueError(
            f"temperatures_k/values: {len(ts)} points given; law {law!r} needs at least {need}"
        )
    seen: dict[float, int] = {}
    for i, (t, v) in enumerate(zip(ts, vs)):
        for field, x in (("temperatures_k", t), ("values", v)):
            if not isinstance(x, (int, float)) or not math.isfinite(x):
                raise ValueError(f"{field}[{i}] = {x!r}: must be a finite number")
        if not t > 0.0:
            raise ValueError(f"temperatures_k[{i}] = {t!r} K: must be > 0 K")
        if not v > 0.0:
            raise ValueError(f"values[{i}] = {v!r}: viscosity must be > 0")
        if t in seen:
            raise ValueError(
                f"temperatures_k[{i}] = {t!r} K duplicates temperatures_k[{seen[t]}]: "
                "temperatures must be distinct"
            )
        seen[t] = i
    return [float(t) for t in ts], [float(v) for v in vs]


def _linear_fit(xs: Sequence[float], ys: Sequence[float]) -> tuple[float, float]:
    """Ordinary least squares y = p + q x; returns (p, q)."""
    n = len(xs)
    mx, my = sum(xs) / n, sum(ys) / n
    sxx = sum((x - mx) ** 2 for x in xs)
    sxy = sum((x - mx) * (y - my) for x, y in zip(xs, ys))
    q = sxy / sxx
    return my - q * mx, q


def _vft_profile(ts: Sequence[float], ys: Sequence[float], c: float) -> tuple[float, float, float]:
    """For fixed c: least-squares (a, b) of y = a + b/(T - c) and the sum of squared residuals."""
    xs = [1.0 / (t - c) for t in ts]
    a, b = _linear_fit(xs, ys)
    return a, b, sum((a + b * x - y) ** 2 for x, y in zip(xs, ys))


def _fit_vft(ts: list[float], ys: list[float]) -> tuple[float, float, float]:
    """VFT (a, b, c) minimising the squared error in ln mu, with c < min(T).

    Three points: the closed form (c from the ratio of the two differences), when it gives c < min T.
    Otherwise: c = T_min - s with s scanned on a log grid from 1e-3 K to 1e5 K, the best grid cell
    refined by bounded Brent minimisation of the profiled error, then a bounded
    scipy.optimize.least_squares polish of all three constants.  When the data are not curved like
    VFT (best s at the upper bound) the result approaches a straight line in T, still a valid fit.
    """
    t_lo = min(ts)
    if len(ts) == 3:
        (t1, y1), (t2, y2), (t3, y3) = sorted(zip(ts, ys))
        d12, d23 = y1 - y2, y2 - y3
        if d23 != 0.0:
            r = d12 / d23
            den = (t2 - t1) - r * (t3 - t2)
            if den != 0.0:
                c = ((t2 - t1) * t3 - r * (t3 - t2) * t1) / den
                if c < t1:
                    b = d12 * (t1 - c) * (t2 - c) / (t2 - t1)
                    a = y2 - b / (t2 - c)
                    return a, b, c
    from scipy.optimize import least_squares, minimize_scalar  # fitting only, not the hot loop

    grid = [10.0 ** (-3.0 + 8.0 * k / 160) for k in range(161)]
    sse = [_vft_profile(ts, ys, t_lo - s)[2] for s in grid]
    k = min(range(len(grid)), key=sse.__getitem__)
    lo, hi = math.log(grid[max(k - 1, 0)]), math.log(grid[min(k + 1, len(grid) - 1)])
    res = minimize_scalar(
        lambda u: _vft_profile(ts, ys, t_lo - math.exp(u))[2],
        bounds=(lo, hi),
        method="bounded",
        options={"xatol": 1e-10},
    )
    c = t_lo - math.exp(res.x)
    a, b, best = _vft_profile(ts, ys, c)
    c_max = t_lo - 1e-3
    c_min = t_lo - 1e5
    try:
        ls = least_squares(
            lambda p: [p[0] + p[1] / (t - p[2]) - y for t, y in zip(ts, ys)],
            x0=[a, b, min(max(c, c_min), c_max)],
            bounds=([-math.inf, -math.inf, c_min], [math.inf, math.inf, c_max]),
            x_scale="jac",
            xtol=1e-14,
            ftol=1e-14,
            gtol=1e-14,
        )
        if ls.success and 2.0 * ls.cost < best:
            a, b, c = (float(p) for p in ls.x)
    except (ValueError, FloatingPointError):  # keep the profiled optimum
        pass
    return a, b, c
