"""Viscosity against temperature: Andrade, Vogel–Fulcher–Tammann and Walther (ASTM D341) laws.

Temperatures are kelvin throughout.  Each law is a small frozen dataclass whose evaluation uses only
the ``math`` module (it sits in the planner's hot loop).  ``fit_viscosity_law`` turns measured points
into a law and says how well it fits and over which range.

Laws
----
- ``AndradeLaw``: ln(mu / [Pa s]) = a + b / T.  Source: E. N. da C. Andrade, Phil. Mag. 17 (1934)
  497; the usual two-constant liquid-viscosity form.
- ``VogelFulcherTammannLaw``: ln(mu / [Pa s]) = a + b / (T - c), valid for T > c.  Source: Vogel
  (1921), Fulcher (1925), Tammann & Hesse (1926).
- ``WaltherLaw``: log10 log10 Z = a - b log10 T with
  Z = nu + 0.7 + exp(-1.47 - 1.84 nu - 0.51 nu^2), nu in [cSt] = [mm2/s].  Source: ASTM D341-09 and
  later editions (the 2009 form with the exponential correction for low viscosities).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

LAW_NAMES = ("andrade", "vft", "walther")
MIN_POINTS = {"andrade": 2, "vft": 3, "walther": 2}


# --------------------------------------------------------------------------------------------- laws
@dataclass(frozen=True, slots=True)
class AndradeLaw:
    """Andrade law ln(mu/[Pa s]) = a + b/T, T in [K]; a [-], b [K].

    Valid over the fitted range of a simple (Newtonian) liquid; two constants describe water within
    about 2 % across 20–60 °C.  Source: Andrade (1934) [1].

    Examples
    --------
    Water through 1.0016 mPa s at 20 °C and 0.46604 at 60 °C [2]; at 40 °C the reference gives
    0.65273 mPa s [2], the law 2.1 % more, inside the "few percent" of ../shared/REFERENCES.md:

    >>> import math
    >>> b = math.log(1.0016e-3 / 0.46604e-3) / (1 / 293.15 - 1 / 333.15)
    >>> law = AndradeLaw(math.log(1.0016e-3) - b / 293.15, b)
    >>> abs(law.dynamic(313.15) / 0.65273e-3 - 1) < 0.03
    True

    References
    ----------
    [1] Andrade, E. N. da C., "A theory of the viscosity of liquids", Phil. Mag. 17 (1934) 497-511.
    [2] Huber, M. L., et al., "New international formulation for the viscosity of H2O", J. Phys. Chem.
        Ref. Data 38 (2009) 101-125 (IAPWS 2008); values by iapws 1.5.5, ../shared/REFERENCES.md.
    """

    a: float
    b: float
    quantity = "dynamic"
    name = "andrade"

    def __post_init__(self) -> None:
        _check_parameters(self.name, a=self.a, b=self.b)

    def dynamic(self, t: float) -> float:
        """Dynamic viscosity [Pa s] at temperature ``t`` [K] (t > 0)."""
        if not t > 0.0:
            raise ValueError(f"temperature = {t!r} K: must be > 0 K")
        return math.exp(self.a + self.b / t)

    value = dynamic

    def parameters(self) -> dict[str, float]:
        """The constants, {"a": [-], "b": [K]}."""
        return {"a": self.a, "b": self.b}


@dataclass(frozen=True, slots=True)
class VogelFulcherTammannLaw:
    """Vogel–Fulcher–Tammann law ln(mu/[Pa s]) = a + b/(T - c); a [-], b [K], c [K].

    Valid for T > c only (the law diverges at T = c); use inside the fitted range.
    Source: Vogel (1921) [1], Fulcher (1925) [2], Tammann & Hesse (1926) [3].

    Examples
    --------
    Through water at 20, 40 and 60 °C [4], the law gives 50 °C within 0.1 % of the reference's
    0.54652 mPa s [4]:

    >>> law = fit_viscosity_law("vft", [293.15, 313.15, 333.15], [1.0016e-3, 0.65273e-3, 0.46604e-3]).law
    >>> abs(law.dynamic(323.15) / 0.54652e-3 - 1) < 0.001
    True

    References
    ----------
    [1] Vogel, H., Phys. Z. 22 (1921) 645-646.
    [2] Fulcher, G. S., J. Am. Ceram. Soc. 8 (1925) 339-355.
    [3] Tammann, G., Hesse, W., Z. Anorg. Allg. Chem. 156 (1926) 245-257.
    [4] Huber, M. L., et al., "New international formulation for the viscosity of H2O", J. Phys. Chem.
        Ref. Data 38 (2009) 101-125 (IAPWS 2008); values by iapws 1.5.5, ../shared/REFERENCES.md.
    """

    a: float
    b: float
    c: float
    quantity = "dynamic"
    name = "vft"

    def __post_init__(self) -> None:
        _check_parameters(self.name, a=self.a, b=self.b, c=self.c)

    def dynamic(self, t: float) -> float:
        """Dynamic viscosity [Pa s] at temperature ``t`` [K]; ValueError unless t > c."""
        if not t > self.c:
            raise ValueError(
                f"temperature = {t!r} K: the VFT law needs temperature > c = {self.c!r} K"
            )
        return math.exp(self.a + self.b / (t - self.c))

    value = dynamic

    def parameters(self) -> dict[str, float]:
        """The constants, {"a": [-], "b": [K], "c": [K]}."""
        return {"a": self.a, "b": self.b, "c": self.c}


@dataclass(frozen=True, slots=True)
class WaltherLaw:
    """ASTM D341 (Walther) law log10 log10 Z = a - b log10 T, T in [K]; a [-], b [-].

    Z = nu + 0.7 + exp(-1.47 - 1.84 nu - 0.51 nu^2) with nu the kinematic viscosity in [cSt].
    The inverse is the standard's expression
    nu = (Z - 0.7) - exp(-0.7487 - 3.295 (Z-0.7) + 0.6119 (Z-0.7)^2 - 0.3193 (Z-0.7)^3),
    followed by two Newton steps on the forward expression (the standard's inverse is within
    about 2.4e-4 relative of it below 3 cSt and within 1e-14 above 6 cSt).
    Valid for petroleum liquids between cloud point and initial boiling point; the 2009 equations
    cover about 0.21 cSt upwards [mem] unverified.  Source: ASTM D341-09, section 5 [1].

    Examples
    --------
    A residual fuel at the ISO 8217 RME180 limit, 180 cSt at 50 °C [2], and 30 cSt at 100 °C
    (invented); constants by hand from the standard's equations [1]:

    >>> import math
    >>> y50, y100 = (math.log10(math.log10(walther_cst_to_z(nu))) for nu in (180.0, 30.0))
    >>> b = (y50 - y100) / (math.log10(373.15) - math.log10(323.15))
    >>> law = WaltherLaw(y50 + b * math.log10(323.15), b)
    >>> round(law.kinematic(323.15) * 1e6, 6)
    180.0

    References
    ----------
    [1] ASTM D341-09, Standard Practice for Viscosity-Temperature Charts for Liquid Petroleum Products,
        section 5.
    [2] ISO 8217, Petroleum products - Fuels (class F) - Specifications of marine fuels, table 2.
    """

    a: float
    b: float
    quantity = "kinematic"
    name = "walther"

    def __post_init__(self) -> None:
        _check_parameters(self.name, a=self.a, b=self.b)

    def kinematic(self, t: float) -> float:
        """Kinematic viscosity [m2/s] at temperature ``t`` [K] (t > 0)."""
        if not t > 0.0:
            raise ValueError(f"temperature = {t!r} K: must be > 0 K")
        try:
            z = 10.0 ** (10.0 ** (self.a - self.b * math.log10(t)))
        except OverflowError:
            raise ValueError(
                f"temperature = {t!r} K: Walther law a = {self.a!r}, b = {self.b!r} gives a "
                "viscosity beyond floating-point range"
            ) from None
        nu = walther_z_to_cst(z)
        if not nu > 0.0:
            raise ValueError(
                f"temperature = {t!r} K: Walther law gives Z = {z!r}, below the ASTM D341 range "
                "(kinematic viscosity would be <= 0)"
            )
        return nu * 1e-6

    value = kinematic

    def parameters(self) -> dict[str, float]:
        """The constants, {"a": [-], "b": [-]} (T in K, nu in cSt)."""
        return {"a": self.a, "b": self.b}


ViscosityLaw = AndradeLaw | VogelFulcherTammannLaw | WaltherLaw


def walther_cst_to_z(nu_cst: float) -> float:
    """ASTM D341-09 Z = nu + 0.7 + exp(-1.47 - 1.84 nu - 0.51 nu^2); nu in [cSt], Z [-].

    Examples
    --------
    1 cSt: 1 + 0.7 + exp(-3.82) = 1.72193 (by hand from [1]):

    >>> round(walther_cst_to_z(1.0), 5)
    1.72193

    References
    ----------
    [1] ASTM D341-09, Standard Practice for Viscosity-Temperature Charts for Liquid Petroleum Products,
        section 5.
    """
    return nu_cst + 0.7 + math.exp(-1.47 - 1.84 * nu_cst - 0.51 * nu_cst * nu_cst)


def walther_z_to_cst(z: float) -> float:
    """Inverse of ``walther_cst_to_z``: kinematic viscosity [cSt] from Z [-].

    ASTM D341-09 inverse nu = w - exp(-0.7487 - 3.295 w + 0.6119 w^2 - 0.3193 w^3), w = Z - 0.7,
    then, for w < 6 where the correction matters, two Newton steps on the forward expression so that
    the round trip is exact to rounding.

    Examples
    --------
    Z = 1.72193 is 1 cSt (by hand from [1]: see ``walther_cst_to_z``):

    >>> round(walther_z_to_cst(1.72193), 5)
    1.0

    References
    ----------
    [1] ASTM D341-09, Standard Practice for Viscosity-Temperature Charts for Liquid Petroleum Products,
        section 5.
    """
    w = z - 0.7
    if w >= 1.0e3:  # the correction is exp(-3e8) = 0; w**3 would overflow past about 5e102
        return w
    if w >= 6.0:  # D341's correction terms are below 1e-14 relative here
        return w - math.exp(-0.7487 - 3.295 * w + 0.6119 * w * w - 0.3193 * w * w * w)
    nu = w - math.exp(-0.7487 - 3.295 * w + 0.6119 * w * w - 0.3193 * w * w * w)
    for _ in range(2):  # 2.4e-4 -> ~1e-8 -> rounding
        e = math.exp(-1.47 - 1.84 * nu - 0.51 * nu * nu)
        nu -= (nu + 0.7 + e - z) / (1.0 - e * (1.84 + 1.02 * nu))
    return nu


def _check_parameters(law: str, **params: float) -> None:
    for key, val in params.items():
        if not isinstance(val, (int, float)) or not math.isfinite(val):
            raise ValueError(f"{law} parameter {key} = {val!r}: must be a finite number")


# ---------------------------------------------------------------------------------------- fitting
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
