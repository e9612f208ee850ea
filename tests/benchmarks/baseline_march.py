"""Scalar baseline of the steady march, written the straightforward way: library calls at every
right-hand-side evaluation and a general-purpose ODE integrator.

The physical model is that of ``planner.march`` (so the two can be compared for speed at equal
accuracy); only the way it is computed differs:

    state y = (T, p) along x [m]:
        m cp dT/dx = g_in (T_wall - T) + S            S = (dp/dx_friction + dp/dx_fittings) Q  [W/m]
        dp/dx     = -(dp/dx_friction + dp/dx_fittings + rho g dz/dx)                           [Pa/m]

    friction   Darcy f: 64/Re (Re <= 2300), in laminar flow the local factor of the developing
               entrance (Shah 1978, written out and differentiated here), Colebrook by ``fluids.friction.friction_factor``
               (Re >= 4000), ``fluids.friction.Churchill_1977`` in between (the bands of
               ``planner.friction``) [Hagen-Poiseuille; Colebrook 1939; Churchill 1977 via fluids 1.3.1]
    fittings   K of every fitting at the local Re, ``fluids.fittings.Hooper2K`` (Di in inches) or
               ``fluids.fittings.Darby3K`` (NPS), constants from ``planner.fittings``; the segment's
               total K V^2/2 rho spread evenly over its length [Hooper 1981; Darby 1999 via fluids 1.3.1]
    film       laminar: the local Nusselt number d(x Nu_m)/dx of the thermal-entrance mean of the VDI
               Heat Atlas (G1), differentiated by hand here (ht has no such function), with the
               entrance restarting at every change of diameter, x (mu/mu_w)^0.14; turbulent:
               ``ht.conv_internal.turbulent_Gnielinski`` x (mu/mu_w)^0.11; linear blend between
               Re 2300 and 4000; mu/mu_w bounded to 0.0044..9.75 [Gnielinski 1976 via ht 1.2.0]
    jacket     ``ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu`` and
               ``ht.conv_external.Nu_cylinder_Churchill_Bernstein`` combined as (Nf^3 + Nn^3)^(1/3),
               air properties from ``planner.air`` at the film temperature, linearised radiation
               [Churchill & Chu 1975; Churchill & Bernstein 1977 via ht 1.2.0]
    tracing    ``planner.line.tracing.Heater.balance`` (untraced / thermostat holding / full output / steam)

At every evaluation the jacket temperature is found by ``scipy.optimize.brentq`` from a fresh
bracket (no warm start); inside each residual the wall temperature (which sets the insulation k
at the layer mean and the film's mu/mu_w) is iterated to 1e-4 K from the bulk temperature.
The ODE is integrated by ``scipy.integrate.solve_ivp`` (RK45), one call per segment, stopping
where the product falls below its no-flow temperature (as the march does).

Test/benchmark code only: not part of the planner.
"""

from __future__ import annotations

import math

from fluids.fittings import Darby3K, Hooper2K
from fluids.friction import friction_factor
from ht.conv_external import Nu_cylinder_Churchill_Bernstein
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
from fluids.friction import Churchill_1977
from ht.conv_internal import turbulent_Gnielinski
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from planner.correlations.air import air_conductivity, air_density, air_heat_capacity, air_viscosity
from planner.correlations.fittings import DARBY_3K, HOOPER_2K, HOOPER_NO_SIZE_TERM, fitting_coefficients
from planner.correlations.rheology import pipe_flow_non_newtonian

PI = math.pi
GRAVITY = 9.80665            # standard gravity [m/s2] (CGPM 1901)
STEFAN_BOLTZMANN = 5.670374419e-8  # [W/(m2 K4)] (CODATA 2018)
RE_LAMINAR_MAX = 2300.0      # [trade], as planner.friction
RE_TURBULENT_MIN = 4000.0    # [trade], as planner.friction
NU_LAMINAR_DEVELOPED = 3.66  # Graetz limit, constant wall temperature
RATIO_MIN, RATIO_MAX = 0.0044, 9.75   # Sieder & Tate's range of mu/mu_w [mem]

# Integrator tolerances: solve_ivp's default rtol, absolute floors in the units of the state.
# Measured on the three demo scenarios: RK45 is already near its floor there (3-4 accepted steps,
# about 23 evaluations, per segment); rtol 1e-2 saves at most a few evaluations and rtol 1e-6 adds
# about 20 %.  At 1e-3 the baseline is within 5e-4 K and 2.1e-3 % of a 1 m step fast march, well
# inside the accuracy target (0.05 K, 0.2 %); that remainder does not change at rtol 1e-6, so it is
# a model-level difference, not integration error (most likely the march's lagged wall temperature
# in mu/mu_w and its 0.01 K jacket convergence).
RTOL = 1e-3
ATOL_TEMPERATURE = 1e-2      # [K]
ATOL_PRESSURE = 100.0        # [Pa]
JACKET_XTOL = 1e-4           # brentq tolerance on the jacket temperature [K]
WALL_TOL = 1e-4              # inner fixed point on the wall temperature [K]
FITTING_METHODS = ("hooper", "darby")


def darcy_friction_baseline(re: float, relative_roughness: float) -> float:
    """Darcy f over all regimes: 64/Re (Re <= 2300), Colebrook via fluids (Re >= 4000), Churchill
    (1977) via fluids in between."""
    if re <= RE_LAMINAR_MAX:
        return 64.0 / re
    if re >= RE_TURBULENT_MIN:
        return friction_factor(Re=re, eD=relative_roughness)
    return Churchill_1977(Re=re, eD=relative_roughness)


def darcy_local_developing_baseline(re: float, z: float) -> float:
    """Local Darcy factor of developing laminar flow z diameters from the entrance: the derivative of
    Shah's (1978) apparent drop F(x+) = 4 x+ f_app Re, written out here (no library has it) and
    differentiated numerically, F' / Re."""
    a = 0.00021

    def drop(xp: float) -> float:
        root = math.sqrt(xp)
        return 13.76 * root + (1.25 + 64.0 * xp - 13.76 * root) / (1.0 + a / (xp * xp))

    xp = max(z, 1e-9) / re
    h = 1e-4 * xp
    return (drop(xp + h) - drop(xp - h)) / (2.0 * h) / re


ENTRANCE_LUMP = 1e-4   # share of a segment starting a laminar entrance taken whole at its inlet state


def _entrance_lump(product, mass_flow: float, seg, t: float, length: float) -> float:
    """Pressure drop [Pa] over the first ``length`` of a laminar entrance at bulk temperature t:
    Shah's apparent drop 4 x+ f_app Re times rho V^2 / 2 (nothing in turbulent flow, left to the RHS)."""
    d = seg.inside_diameter
    rho = product.density(t)
    velocity = mass_flow / (rho * PI * d * d / 4.0)
    re = rho * velocity * d / product.viscosity(t)
    if re > RE_LAMINAR_MAX:
        return 0.0
    xp = length / d / re
    root = math.sqrt(xp)
    drop = 13.76 * root + (1.25 + 64.0 * xp - 13.76 * root) / (1.0 + 0.00021 / (xp * xp))
    return drop * rho * velocity * velocity / 2.0


def fittings_k_baseline(fittings: list[tuple[str, float]], method: str, re: float,
                        inside_diameter_m: float, nominal_diameter_in: float) -> float:
    """Total K of a segment's fittings at Re, each fitting by its own library call."""
    total = 0.0
    for name, count in fittings:
        if method == "hooper":
            k1, kinf = HOOPER_2K[name]
            if name in HOOPER_NO_SIZE_TERM:   # entrance/exit: no (1 + 1/D) size term
                k = k1 / re + kinf
            else:
                k = Hooper2K(Di=inside_diameter_m / 0.0254, Re=re, K1=k1, Kinfty=kinf)
        else:
            k1, ki, kd = DARBY_3K[name]
            k = Darby3K(NPS=nominal_diameter_in, Re=re, K1=k1, Ki=ki, Kd=kd)
        total += count * k
    return total


def laminar_local_nu_baseline(x_star: float) -> float:
    """Local laminar Nu at x* = x/(D Re Pr): d(x* Nu_m)/dx* of Nu_m = [3.66^3 + 0.7^3 +
    (1.615 x*^(-1/3) - 0.7)^3]^(1/3) (VDI Heat Atlas G1), by hand:
    F = x* Nu_m = (A x*^3 + E^3)^(1/3), E = 1.615 x*^(2/3) - 0.7 x*, dF/dx* = (A x*^2 + E^2 E') / F^2."""
    x_star = max(x_star, 1e-12)
    a = NU_LAMINAR_DEVELOPED ** 3 + 0.7 ** 3
    e = 1.615 * x_star ** (2.0 / 3.0) - 0.7 * x_star
    de = 1.615 * (2.0 / 3.0) * x_star ** (-1.0 / 3.0) - 0.7
    f = (a * x_star ** 3 + e ** 3) ** (1.0 / 3.0)
    return (a * x_star ** 2 + e * e * de) / (f * f)


def nusselt_internal_baseline(re: float, pr: float, x_entry: float, d: float, darcy_f: float,
                              viscosity_ratio: float) -> float:
    """Inside Nu at distance x_entry from the thermal entrance: local laminar Nu x (mu/mu_w)^0.14,
    Gnielinski x (mu/mu_w)^0.11, linear blend 2300..4000 (the turbulent end with the f passed in)."""
    ratio = min(max(viscosity_ratio, RATIO_MIN), RATIO_MAX)
    nu_lam = laminar_local_nu_baseline(x_entry / (d * re * pr)) * ratio ** 0.14
    if re <= RE_LAMINAR_MAX:
        return nu_lam
    corr = ratio ** 0.11
    if re >= RE_TURBULENT_MIN:
        return turbulent_Gnielinski(Re=re, Pr=pr, fd=darcy_f) * corr
    nu_turb = turbulent_Gnielinski(Re=RE_TURBULENT_MIN, Pr=pr, fd=darcy_f) * corr
    w = (re - RE_LAMINAR_MAX) / (RE_TURBULENT_MIN - RE_LAMINAR_MAX)
    return nu_lam + w * (nu_turb - nu_lam)


def surface_coefficient_baseline(diameter: float, t_surface: float, t_air: float, wind: float,
                                 emissivity: float) -> float:
    """h_conv + h_rad of a horizontal cylinder in air [W/(m2 K)]."""
    t_film = 0.5 * (t_surface + t_air)
    mu = air_viscosity(t_film)
    k = air_conductivity(t_film)
    pr = air_heat_capacity(t_film) * mu / k
    nu_kin = mu / air_density(t_film)
    gr = GRAVITY * abs(t_surface - t_air) * diameter ** 3 / (t_film * nu_kin * nu_kin)
    nu = Nu_horizontal_cylinder_Churchill_Chu(Pr=pr, Gr=gr)
    if wind > 0.0:
        nu_f = Nu_cylinder_Churchill_Bernstein(Re=wind * diameter / nu_kin, Pr=pr)
        nu = (nu_f ** 3 + nu ** 3) ** (1.0 / 3.0)
    h_rad = emissivity * STEFAN_BOLTZMANN * (t_surface ** 2 + t_air ** 2) * (t_surface + t_air)
    return nu * k / diameter + h_rad


def _infer_fitting_method(seg) -> str:
    """The route's fitting method is not kept on LineSegment: recover it from the collapsed b."""
    fittings = [(f.type, f.count) for f in seg.spec.fittings]
    if not fittings:
        return "hooper"
    for method in FITTING_METHODS:
        try:
            _, b = fitting_coefficients(fittings, method, seg.inside_diameter, seg.nominal_diameter_in)
        except ValueError:
            continue
        if math.isclose(b, seg.fitting_b, rel_tol=1e-12, abs_tol=1e-15):
            return method
    raise ValueError(f"fitting_method: cannot tell for segment {seg.name!r}; pass one of {FITTING_METHODS}")


class _SegmentRHS:
    """dT/dx, dp/dx of one segment, everything recomputed at every call."""

    def __init__(self, seg, heater, product, mass_flow: float, method: str, entry_x: float):
        self.entry_x = entry_x   # where the thermal entrance began (route inlet or a diameter change)
        self.seg = seg
        self.heater = heater
        self.product = product
        self.mass_flow = mass_flow
        self.method = method
        self.fittings = [(f.type, f.count) for f in seg.spec.fittings]
        self.evaluations = 0

    # -- outward path -------------------------------------------------------------------------
    def _insulation_resistance(self, t_wall: float, t_jacket: float) -> float:
        t_mean = 0.5 * (t_wall + t_jacket)
        return sum(layer.log_ratio / (2.0 * PI * layer.conductivity_at(t_mean)) for layer in self.seg.layers)

    def _surface_resistance(self, t_jacket: float) -> float:
        seg = self.seg
        if seg.location == "buried":
            return seg.soil_resistance
        h = surface_coefficient_baseline(seg.jacket_diameter, t_jacket, seg.ambient_temperature,
                                         seg.wind_speed, seg.emissivity)
        return 1.0 / (PI * seg.jacket_diameter * h)

    def _wall_state(self, t_jacket: float, t_bulk: float, film, viscous: float = 0.0):
        """Wall balance at a jacket temperature: (jacket implied by the balance, wall, g_in, q_out)."""
        seg = self.seg
        t_amb = seg.ambient_temperature
        r_surf = self._surface_resistance(t_jacket)
        t_wall = t_bulk
        for _ in range(100):
            g_in = film(t_wall)
            r_ins = self._insulation_resistance(t_wall, t_jacket)
            g_out = 1.0 / (r_ins + r_surf)
            wall = self.heater.balance(t_bulk, g_in, g_out, t_amb, viscous)
            done = abs(wall.t_wall - t_wall) < WALL_TOL
            t_wall = wall.t_wall
            if done:
                break
        q_out = g_out * (t_wall - t_amb)
        return t_wall - q_out * r_ins, t_wall, g_in, q_out

    def _solve_jacket(self, t_bulk: float, film, viscous: float = 0.0):
        t_amb = self.seg.ambient_temperature

        def residual(tj: float) -> float:
            return tj - self._wall_state(tj, t_bulk, film, viscous)[0]

        lo = min(t_amb, t_bulk) - 1.0
        hi = max(t_amb, t_bulk) + 1.0
        f_lo, f_hi = residual(lo), residual(hi)
        for _ in range(60):
            if f_lo * f_hi <= 0.0:
                break
            if f_hi < 0.0:
                hi += 25.0
                f_hi = residual(hi)
            else:
                lo = max(1.0, lo - 25.0)
                f_lo = residual(lo)
        tj = brentq(residual, lo, hi, xtol=JACKET_XTOL)
        return tj, self._wall_state(tj, t_bulk, film, viscous)

    # -- right-hand side ------------------------------------------------------------------------
    def __call__(self, x: float, y) -> list[float]:
        self.evaluations += 1
        seg, product = self.seg, self.product
        t = float(y[0])
        d = seg.inside_diameter
        area = PI * d * d / 4.0
        rho = product.density(t)
        velocity = self.mass_flow / (rho * area)
        q_volume = self.mass_flow / rho
        k_prod = product.viscosity(t)
        if product.newtonian:
            mu = k_prod
            re = rho * velocity * d / mu
            f = darcy_friction_baseline(re, seg.relative_roughness)
            f_drop = darcy_local_developing_baseline(re, (x - self.entry_x) / d) if re <= RE_LAMINAR_MAX else f
            grad_friction = f_drop * rho * velocity ** 2 / (2.0 * d)
        else:
            nn = pipe_flow_non_newtonian(rho, velocity, d, k_prod, product.flow_index, product.yield_stress)
            re, mu, f, grad_friction = nn.reynolds, nn.apparent_viscosity, 4.0 * nn.fanning, nn.pressure_gradient
        k_fit = fittings_k_baseline(self.fittings, self.method, re, d, seg.nominal_diameter_in)
        grad_fittings = k_fit / seg.length * 0.5 * rho * velocity ** 2
        grad_static = rho * GRAVITY * seg.elevation_change / seg.length
        viscous = (grad_friction + grad_fittings) * q_volume

        cp = product.specific_heat(t)
        k_liquid = product.conductivity(t)
        pr = cp * mu / k_liquid

        def film(t_wall: float) -> float:
            try:
                mu_wall = product.viscosity(t_wall)
            except (ValueError, OverflowError):
                mu_wall = math.inf
            ratio = mu / mu_wall if product.newtonian else 1.0
            nu = nusselt_internal_baseline(re, pr, x - self.entry_x, d, f, ratio)
            h_in = nu * k_liquid / d
            return 1.0 / (1.0 / (h_in * PI * d) + seg.wall_resistance)

        _, (_, t_wall, g_in, _) = self._solve_jacket(t, film, viscous)
        dtdx = (g_in * (t_wall - t) + viscous) / (self.mass_flow * cp)
        dpdx = -(grad_friction + grad_fittings + grad_static)
        return [dtdx, dpdx]


def baseline_march(line, flow: float, inlet_temperature: float, inlet_pressure: float = 0.0,
                   fitting_method: str | None = None, rtol: float = RTOL,
                   atol: tuple[float, float] = (ATOL_TEMPERATURE, ATOL_PRESSURE)) -> dict:
    """Integrate the steady line with solve_ivp (RK45), segment by segment.

    line: planner.line.march.Line; flow [m3/s] at the inlet temperature; inlet_temperature [K];
    inlet_pressure gauge [Pa]; fitting_method "hooper"/"darby" (None: recovered per segment).
    Returns a dict with outlet_temperature_k, outlet_pressure_pa, pressure_drop_pa, status,
    sets_at_m, rhs_evaluations, accepted_steps.
    """
    if not flow > 0.0:
        raise ValueError(f"flow must be greater than 0 m3/s, got {flow!r}")
    if fitting_method is not None and fitting_method not in FITTING_METHODS:
        raise ValueError(f"fitting_method: {fitting_method!r} is not allowed; choose one of {FITTING_METHODS}")
    product = line.product
    mass_flow = product.density(inlet_temperature) * flow
    no_flow = product.no_flow_temperature

    def sets(x, y):
        return y[0] - no_flow
    sets.terminal = True
    sets.direction = -1

    y = [inlet_temperature, inlet_pressure]
    status, sets_at = "ok", None
    evaluations = accepted = 0
    x = 0.0
    entry_x, entry_d = 0.0, None
    for seg, heater in zip(line.segments, line.heaters):
        if entry_d is None or abs(seg.inside_diameter - entry_d) > 1e-9 * entry_d:
            entry_x, entry_d = seg.x_start, seg.inside_diameter
        method = fitting_method or _infer_fitting_method(seg)
        rhs = _SegmentRHS(seg, heater, product, mass_flow, method, entry_x)
        start = seg.x_start
        if entry_x == seg.x_start and product.newtonian:
            # the laminar entrance's local friction is singular at the inlet (as x^-1/2): its first
            # ENTRANCE_LUMP of the segment is taken whole from Shah's apparent drop at the inlet state
            start = seg.x_start + ENTRANCE_LUMP * seg.length
            y = [y[0], y[1] - _entrance_lump(product, mass_flow, seg, y[0], start - seg.x_start)]
        sol = solve_ivp(rhs, (start, seg.x_start + seg.length), y, method="RK45",
                        rtol=rtol, atol=list(atol), events=sets)
        evaluations += rhs.evaluations
        accepted += len(sol.t) - 1
        if not sol.success:
            raise RuntimeError(f"solve_ivp failed on segment {seg.name!r}: {sol.message}")
        y = [float(sol.y[0, -1]), float(sol.y[1, -1])]
        x = float(sol.t[-1])
        if sol.status == 1:
            status, sets_at = "product_sets", x
            break
    return {
        "outlet_temperature_k": y[0],
        "outlet_pressure_pa": y[1],
        "pressure_drop_pa": inlet_pressure - y[1],
        "status": status,
        "sets_at_m": sets_at,
        "length_m": x,
        "rhs_evaluations": evaluations,
        "accepted_steps": accepted,
    }


REFERENCE_STEPS = 400   # the reference march's steps over the whole line


class _WarmJacketRHS(_SegmentRHS):
    """The same right-hand side with the jacket found the way a plain scalar march would: fixed-point
    iteration from the last evaluation's jacket (damped on bare pipe), to JACKET_XTOL."""

    def __init__(self, *args, jacket: float | None = None):
        super().__init__(*args)
        self.jacket = jacket

    def _solve_jacket(self, t_bulk: float, film, viscous: float = 0.0):
        tj = t_bulk if self.jacket is None or not self.seg.layers else self.jacket
        damping = 1.0 if self.seg.layers else 0.5
        state = self._wall_state(tj, t_bulk, film, viscous)
        for _ in range(200):
            new = tj + damping * (state[0] - tj)
            if abs(new - tj) < JACKET_XTOL:
                tj = new
                break
            tj = new
            state = self._wall_state(tj, t_bulk, film, viscous)
        self.jacket = tj
        return tj, state


def reference_march_rk4(line, flow: float, inlet_temperature: float, inlet_pressure: float = 0.0,
                        fitting_method: str | None = None, steps: int = REFERENCE_STEPS) -> dict:
    """A plain fixed-step march: classical fourth-order Runge–Kutta, ``steps`` equal steps over the
    line (shared among the segments by length, at least one each), the same general-purpose
    right-hand side as ``baseline_march`` with the jacket warm-started from the last evaluation.

    The speed benchmark's unit of cost: ratios against one call of this, in the same run."""
    product = line.product
    mass_flow = product.density(inlet_temperature) * flow
    no_flow = product.no_flow_temperature
    t, p = inlet_temperature, inlet_pressure
    entry_x, entry_d = 0.0, None
    jacket = None
    evaluations = 0
    status, sets_at = "ok", None
    for seg, heater in zip(line.segments, line.heaters):
        if entry_d is None or abs(seg.inside_diameter - entry_d) > 1e-9 * entry_d:
            entry_x, entry_d = seg.x_start, seg.inside_diameter
        rhs = _WarmJacketRHS(seg, heater, product, mass_flow, fitting_method or _infer_fitting_method(seg),
                             entry_x, jacket=jacket)
        n = max(1, round(steps * seg.length / line.length))
        h = seg.length / n
        x = seg.x_start
        for _ in range(n):
            k1 = rhs(x, (t, p))
            k2 = rhs(x + 0.5 * h, (t + 0.5 * h * k1[0], p))
            k3 = rhs(x + 0.5 * h, (t + 0.5 * h * k2[0], p))
            k4 = rhs(x + h, (t + h * k3[0], p))
            t += h / 6.0 * (k1[0] + 2.0 * k2[0] + 2.0 * k3[0] + k4[0])
            p += h / 6.0 * (k1[1] + 2.0 * k2[1] + 2.0 * k3[1] + k4[1])
            x += h
            if t < no_flow:
                status, sets_at = "product_sets", x
                break
        evaluations += rhs.evaluations
        jacket = rhs.jacket
        if status != "ok":
            break
    return {"outlet_temperature_k": t, "outlet_pressure_pa": p, "pressure_drop_pa": inlet_pressure - p,
            "status": status, "sets_at_m": sets_at, "rhs_evaluations": evaluations}
