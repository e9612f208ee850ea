"""Pipe flow of time-independent non-Newtonian liquids: power law, Bingham, Herschel–Bulkley.

Scalar SI functions using only ``math`` (they sit in the planner's hot loop).  Friction factors are
Fanning (f = 2 tau_w / (rho V^2) = Darcy / 4).  Rheology: tau = tau_y + K gamma_dot^n for tau > tau_y
(Herschel–Bulkley); tau_y = 0 is the power law (Ostwald–de Waele), n = 1 the Bingham plastic.

Sources: Metzner & Reed, AIChE J. 1 (1955) 434; Dodge & Metzner, AIChE J. 5 (1959) 189;
Buckingham (1921) and Reiner (1926) for the Bingham pipe equation; Chhabra & Richardson,
Non-Newtonian Flow and Applied Rheology, 2nd ed. (2008), ch. 3, Herschel–Bulkley pipe flow.
"""

from __future__ import annotations

import math
from typing import NamedTuple

LAMINAR_LIMIT_RE = 2100.0  # generalised Reynolds number below which flow is laminar [trade]
_LN10 = math.log(10.0)


def metzner_reed_reynolds(
    density: float, velocity: float, diameter: float, consistency: float, flow_index: float
) -> float:
    """Metzner–Reed generalised Reynolds number [-] of a power-law fluid in a pipe.

    Re_MR = rho V^(2-n) D^n / (K 8^(n-1) ((3n+1)/(4n))^n), with rho [kg/m3], V mean velocity [m/s],
    D inside diameter [m], K consistency [Pa s^n], n flow index [-].  Equals rho V D / mu for n = 1.
    Source: Metzner & Reed (1955) [1].

    Examples
    --------
    rho 1000, V 1 m/s, D 0.05 m, K 0.5 Pa s^n, n 0.5: 1131.37 by hand from [1]
    (../shared/REFERENCES.md [calc]):

    >>> round(metzner_reed_reynolds(1000.0, 1.0, 0.05, 0.5, 0.5), 2)
    1131.37

    References
    ----------
    [1] Metzner, A. B., Reed, J. C., "Flow of non-Newtonian fluids: correlation of the laminar, transition, and turbulent-flow regions", AIChE J. 1 (1955) 434-440.
    """
    _positive(density=density, diameter=diameter, consistency=consistency, flow_index=flow_index)
    if not velocity >= 0.0:
        raise ValueError(f"velocity = {velocity!r} m/s: must be >= 0")
    n = flow_index
    return (
        density * velocity ** (2.0 - n) * diameter**n
        / (consistency * 8.0 ** (n - 1.0) * ((3.0 * n + 1.0) / (4.0 * n)) ** n)
    )


def fanning_power_law_laminar(re_mr: float) -> float:
    """Laminar Fanning friction factor f = 16 / Re_MR [-] (exact for a power-law fluid).

    Valid for Re_MR below about 2100 [trade].  Source: Metzner & Reed (1955) [1].

    Examples
    --------
    >>> round(fanning_power_law_laminar(1131.37), 6)    # 16 / 1131.37 [1]
    0.014142

    References
    ----------
    [1] Metzner, A. B., Reed, J. C., "Flow of non-Newtonian fluids: correlation of the laminar, transition, and turbulent-flow regions", AIChE J. 1 (1955) 434-440.
    """
    if not re_mr > 0.0:
        raise ValueError(f"re_mr = {re_mr!r}: must be > 0")
    return 16.0 / re_mr


def fanning_dodge_metzner(re_mr: float, flow_index: float) -> float:
    """Turbulent Fanning friction factor [-] of a power-law fluid in a smooth pipe (Dodge–Metzner).

    1/sqrt(f) = (4 / n^0.75) log10(Re_MR f^(1 - n/2)) - 0.4 / n^1.2.
    Solved for x = 1/sqrt(f): g(x) = x + A (2 - n) log10 x - A log10 Re_MR + C = 0 is increasing and
    concave in x for n < 2, so Newton from the left converges monotonically; a positivity guard
    keeps x > 0.  n >= 2 raises ValueError (g is no longer monotone).
    For n = 1 it is the Prandtl–von Kármán smooth-pipe law.  Data range of the original work about
    0.36 <= n <= 1 and 2900 <= Re_MR <= 36000 [mem] unverified; used beyond as common practice.
    Source: Dodge & Metzner, AIChE J. 5 (1959) 189 [1].

    Examples
    --------
    Re_MR 1e4, n 0.5: f = 0.0048738, solving the published equation [1] by hand
    (../shared/REFERENCES.md [calc]):

    >>> round(fanning_dodge_metzner(1e4, 0.5), 7)
    0.0048738

    References
    ----------
    [1] Dodge, D. W., Metzner, A. B., "Turbulent flow of non-Newtonian systems", AIChE J. 5 (1959)
        189-204.
    """
    if not re_mr > 0.0:
        raise ValueError(f"re_mr = {re_mr!r}: must be > 0")
    if not 0.0 < flow_index < 2.0:
        raise ValueError(f"flow_index = {flow_index!r}: Dodge–Metzner needs 0 < n < 2")
    n = flow_index
    a = 4.0 / n**0.75
    c = 0.4 / n**1.2
    k = a * (2.0 - n) / _LN10  # coefficient of ln x
    rhs = a * math.log10(re_mr) - c
    x = max(rhs, 1.0)  # above the root when rhs > 1 (log10 x >= 0 there): first step lands left
    for _ in range(100):
        g = x + k * math.log(x) - rhs
        step = g / (1.0 + k / x)
        x_new = x - step
        if x_new <= 0.0:
            x_new = 0.1 * x
        if abs(x_new - x) <= 1e-14 * x:
            x = x_new
            break
        x = x_new
    return 1.0 / (x * x)


def fanning_buckingham_reiner(re_bingham: float, hedstrom: float) -> float:
    """Laminar Fanning friction factor [-] of a Bingham plastic in a pipe (Buckingham–Reiner).

    f = (16/Re)[1 + He/(6 Re) - He^4/(3 f^3 Re^7)], Re = rho V D / mu_p, He = rho tau_y D^2 / mu_p^2.
    Solved exactly through phi = tau_y / tau_w = 2 He / (f Re^2), the root in (0, 1) of
    phi^4/3 - 4 phi/3 + 1 - 8 Re phi / He = 0 (decreasing, convex: Newton from phi = 0 converges
    monotonically), then f = 16 / (Re (1 - 4 phi/3 + phi^4/3)).  Laminar flow only (Re below about
    2100, or the Hanks critical Re for large He).  Source: Buckingham (1921) [1]; Chhabra & Richardson
    (2008) ch. 3 [2].

    Examples
    --------
    Re 1000, He 1e4: f = 0.04194 solving the published equation [2] by hand
    (../shared/REFERENCES.md [calc]); He = 0 is the Newtonian 16/Re:

    >>> round(fanning_buckingham_reiner(1000.0, 1e4), 5), fanning_buckingham_reiner(1000.0, 0.0)
    (0.04194, 0.016)

    References
    ----------
    [1] Buckingham, E., "On plastic flow through capillary tubes", Proc. ASTM 21 (1921) 1154-1156.
    [2] Chhabra, R. P., Richardson, J. F., Non-Newtonian Flow and Applied Rheology, 2nd ed., Butterworth-Heinemann, 2008, chapter 3.
    """
    if not re_bingham > 0.0:
        raise ValueError(f"re_bingham = {re_bingham!r}: must be > 0")
    if not hedstrom >= 0.0:
        raise ValueError(f"hedstrom = {hedstrom!r}: must be >= 0")
    if hedstrom == 0.0:
        return 16.0 / re_bingham
    phi = _bingham_phi(8.0 * re_bingham / hedstrom)
    return 16.0 / (re_bingham * (1.0 - 4.0 * phi / 3.0 + phi**4 / 3.0))


def _bingham_phi(q: float) -> float:
    """Root phi in (0, 1) of phi^4/3 - 4 phi/3 + 1 - q phi = 0, q > 0."""
    phi = 0.0
    for _ in range(100):
        h = phi**4 / 3.0 - (4.0 / 3.0 + q) * phi + 1.0
        dh = 4.0 * phi**3 / 3.0 - 4.0 / 3.0 - q
        phi_new = phi - h / dh
        if phi_new >= 1.0:  # cannot happen in exact arithmetic; guard against rounding
            phi_new = 0.5 * (phi + 1.0)
        if abs(phi_new - phi) <= 1e-15 * max(phi_new, 1e-300):
            return phi_new
        phi = phi_new
    return phi


def herschel_bulkley_wall_stress(
    velocity: float, diameter: float, yield_stress: float, consistency: float, flow_index: float
) -> float:
    """Laminar wall shear stress tau_w [Pa] of a Herschel–Bulkley fluid in a pipe.

    Solves the exact laminar flow equation (Chhabra & Richardson 2008, ch. 3)
    8V/D = (4n / (K^(1/n) tau_w^3)) (tau_w - tau_y)^(1+1/n)
           [ (tau_w - tau_y)^2/(3n+1) + 2 tau_y (tau_w - tau_y)/(2n+1) + tau_y^2/(n+1) ]
    for tau_w > tau_y, by Newton on ln(8V/D) against u = ln(tau_w - tau_y) with bisection safeguard
    (the left side rises with slope between 1/n and 1 + 1/n in u).  V mean velocity [m/s], D [m],
    tau_y yield stress [Pa], K consistency [Pa s^n], n flow index [-].  tau_y = 0 gives the power law
    K ((3n+1)/(4n))^n (8V/D)^n in closed form; V = 0 gives tau_y (the plug just holds).

    Examples
    --------
    Power law (tau_y = 0), V 1 m/s, D 0.05 m, K 0.5, n 0.5: 0.5 (1.25)^0.5 160^0.5 = 7.071 Pa, the
    wall stress of the 565.7 Pa/m of ../shared/REFERENCES.md [calc] from [1]:

    >>> round(herschel_bulkley_wall_stress(1.0, 0.05, 0.0, 0.5, 0.5), 3)
    7.071

    References
    ----------
    [1] Chhabra, R. P., Richardson, J. F., Non-Newtonian Flow and Applied Rheology, 2nd ed., Butterworth-Heinemann, 2008, chapter 3.
    """
    _positive(diameter=diameter, consistency=consistency, flow_index=flow_index)
    if not velocity >= 0.0:
        raise ValueError(f"velocity = {velocity!r} m/s: must be >= 0")
    if not yield_stress >= 0.0:
        raise ValueError(f"yield_stress = {yield_stress!r} Pa: must be >= 0")
    if velocity == 0.0:
        return yield_stress
    n = flow_index
    shear = 8.0 * velocity / diameter
    tau_pl = consistency * ((3.0 * n + 1.0) / (4.0 * n)) ** n * shear**n
    if yield_stress == 0.0:
        return tau_pl
    ty = yield_stress
    m = 1.0 + 1.0 / n
    c1, c2, c3 = 1.0 / (3.0 * n + 1.0), 2.0 * ty / (2.0 * n + 1.0), ty * ty / (n + 1.0)
    ln_target = math.log(shear) - math.log(4.0 * n) + math.log(consistency) / n
    u_lo, u_hi = -math.inf, math.inf
    u = math.log(tau_pl + ty / 3.0)  # Bingham-like first guess: tau_w ~ 4/3 tau_y + tau_pl
    for _ in range(200):
        s = math.exp(u)
        tau = ty + s
        q = (c1 * s + c2) * s + c3
        f = m * u - 3.0 * math.log(tau) + math.log(q) - ln_target
        if f == 0.0:
            break
        if f < 0.0:
            u_lo = u
        else:
            u_hi = u
        df = m - 3.0 * s / tau + s * (2.0 * c1 * s + c2) / q
        u_new = u - f / df
        if not u_lo < u_new < u_hi:
            if math.isinf(u_lo) or math.isinf(u_hi):
                u_new = u + (5.0 if f < 0.0 else -5.0)
            else:
                u_new = 0.5 * (u_lo + u_hi)
        if abs(u_new - u) <= 1e-13:
            u = u_new
            break
        u = u_new
    return ty + math.exp(u)


class NonNewtonianFlow(NamedTuple):
    """Result of ``pipe_flow_non_newtonian``.

    pressure_gradient: frictional pressure gradient 4 tau_w / D [Pa/m]; reynolds: generalised
    (Metzner–Reed) Reynolds number rho V D / mu_app [-]; regime: "laminar", "turbulent" or "no flow";
    apparent_viscosity: mu_app = tau_w,laminar / (8V/D) [Pa s]; fanning: Fanning friction factor [-];
    approximate: True when the turbulent result of a yield-stress fluid rests on Dodge–Metzner
    applied to the generalised Reynolds number (an approximation, not a validated correlation).
    """

    pressure_gradient: float
    reynolds: float
    regime: str
    apparent_viscosity: float
    fanning: float
    approximate: bool = False


def pipe_flow_non_newtonian(
    density: float,
    velocity: float,
    diameter: float,
    consistency: float,
    flow_index: float,
    yield_stress: float = 0.0,
) -> NonNewtonianFlow:
    """Frictional pressure gradient of a Herschel–Bulkley liquid in a smooth straight pipe.

    Laminar wall stress from ``herschel_bulkley_wall_stress`` (power law when tau_y = 0, Newtonian
    when also n = 1); mu_app = tau_w / (8V/D); Re = rho V D / mu_app (= Re_MR for a power-law fluid).
    Re < 2100 [trade]: laminar, f = 2 tau_w/(rho V^2) = 16/Re.  Otherwise turbulent: Fanning f from
    Dodge–Metzner with n and this Re, tau_w = f rho V^2 / 2 (approximate when tau_y > 0).
    pressure_gradient = 4 tau_w / D [Pa/m].  V = 0: no flow, gradient 4 tau_y / D (the most the plug
    holds), Re 0, mu_app and f infinite.  Inputs: rho [kg/m3], V [m/s], D [m], K [Pa s^n], n [-],
    tau_y [Pa].

    Examples
    --------
    rho 1000, V 1 m/s, D 0.05 m, K 0.5, n 0.5: Re_MR 1131.37 and dp/L 565.7 Pa/m by hand from [1]
    (../shared/REFERENCES.md [calc]):

    >>> flow = pipe_flow_non_newtonian(1000.0, 1.0, 0.05, 0.5, 0.5)
    >>> flow.regime, round(flow.reynolds, 2), round(flow.pressure_gradient, 1)
    ('laminar', 1131.37, 565.7)

    References
    ----------
    [1] Metzner, A. B., Reed, J. C., "Flow of non-Newtonian fluids: correlation of the laminar, transition, and turbulent-flow regions", AIChE J. 1 (1955) 434-440.
    [2] Dodge, D. W., Metzner, A. B., AIChE J. 5 (1959) 189-204.
    [3] Chhabra, R. P., Richardson, J. F., Non-Newtonian Flow and Applied Rheology, 2nd ed., Butterworth-Heinemann, 2008, chapter 3.
    """
    _positive(density=density)
    tau_w = herschel_bulkley_wall_stress(velocity, diameter, yield_stress, consistency, flow_index)
    if velocity == 0.0:
        return NonNewtonianFlow(4.0 * tau_w / diameter, 0.0, "no flow", math.inf, math.inf)
    mu_app = tau_w * diameter / (8.0 * velocity)
    re = density * velocity * diameter / mu_app
    dyn = 0.5 * density * velocity * velocity
    if re < LAMINAR_LIMIT_RE:
        return NonNewtonianFlow(4.0 * tau_w / diameter, re, "laminar", mu_app, tau_w / dyn)
    f = fanning_dodge_metzner(re, flow_index)
    return NonNewtonianFlow(
        4.0 * f * dyn / diameter, re, "turbulent", mu_app, f, yield_stress > 0.0
    )


def gelled_restart_pressure(yield_stress: float, length: float, diameter: float) -> float:
    """Pressure difference [Pa] to start a gelled plug moving: 4 tau_y L / D.

    Force balance on a rigid plug, dp pi D^2/4 = tau_y pi D L; tau_y [Pa] the (gel) yield stress,
    L plug length [m], D inside diameter [m].  Ignores compressibility of the gel, so it is the
    conservative upper bound for a long line [trade].

    Examples
    --------
    tau_y 10 Pa over 1000 m of 0.1 m bore: 4 x 10 x 1000 / 0.1 = 4 bar (force balance [1], by hand):

    >>> gelled_restart_pressure(10.0, 1000.0, 0.1)
    400000.0

    References
    ----------
    [1] Chhabra, R. P., Richardson, J. F., Non-Newtonian Flow and Applied Rheology, 2nd ed., Butterworth-Heinemann, 2008, chapter 3.
    """
    if not yield_stress >= 0.0:
        raise ValueError(f"yield_stress = {yield_stress!r} Pa: must be >= 0")
    if not length >= 0.0:
        raise ValueError(f"length = {length!r} m: must be >= 0")
    _positive(diameter=diameter)
    return 4.0 * yield_stress * length / diameter


def _positive(**fields: float) -> None:
    for key, val in fields.items():
        if not val > 0.0:
            raise ValueError(f"{key} = {val!r}: must be > 0")
