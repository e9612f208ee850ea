"""The steady march: bulk temperature and pressure along the line at one flow and inlet temperature.

Per step of length dx the energy balance of the product is

    m cp dT/dx = G (T_eq - T) + S

where G (W/(m K)) and T_eq come from the wall balance of the regime in force (untraced, thermostat
holding the setpoint, heater at full capacity, steam tracer), linear in T, and S (W/m) is the viscous
heating, the frictional pressure loss times the volume flow.  The step is taken exactly for frozen
coefficients (an exponential integrator: stable at any step, even when the thermal length is short)
with coefficients evaluated at the midpoint state (second-order, like a midpoint Runge–Kutta step).
Pressure falls by friction (Darcy, or the non-Newtonian laws of ``rheology``), fittings (2-K or 3-K,
spread evenly over their segment) and static head, integrated with the same midpoint state.

The march stops where the product falls below its no-flow temperature: the line would set there,
and the pressure beyond is not a meaningful number.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from planner.correlations.friction import darcy_friction
from planner.line.heat_loss import insulation_resistance, surface_resistance
from planner.correlations.heat_transfer import nu_internal
from planner.line.products import Product
from planner.correlations.rheology import pipe_flow_non_newtonian
from planner.line.route import LineSegment
from planner.line.tracing import Heater
from planner.scenario.units import GRAVITY

PI = math.pi
DEFAULT_STEP_M = 25.0
REGIME_NAMES = {0: "laminar", 1: "transitional", 2: "turbulent"}
HEATER_STATE_NAMES = {0: "off / untraced", 1: "holding setpoint", 2: "full output"}


@dataclass
class MarchSummary:
    flow_m3_s: float
    mass_flow_kg_s: float
    inlet_temperature_k: float
    outlet_temperature_k: float
    inlet_pressure_pa: float
    outlet_pressure_pa: float
    pressure_drop_pa: float
    friction_drop_pa: float
    fittings_drop_pa: float
    static_drop_pa: float
    min_bulk_temperature_k: float
    max_bulk_temperature_k: float
    max_pressure_pa: float
    max_jacket_temperature_k: float
    max_jacket_at_m: float
    max_sheath_temperature_k: float
    max_sheath_at_m: float
    trace_power_w: float
    heat_loss_w: float
    viscous_heating_w: float
    min_viscosity_pa_s: float
    max_viscosity_pa_s: float
    laminar_fraction: float
    transitional_fraction: float
    line_length_m: float
    status: str               # "ok" or "product_sets"
    sets_at_m: float | None   # where the product fell below its no-flow temperature
    viscosity_extrapolated: bool
    heater_short_fraction: float  # share of traced length where the heater ran at full output below setpoint
    steps: int

    def as_dict(self) -> dict:
        return dict(self.__dict__)


@dataclass
class MarchResult:
    summary: MarchSummary
    nodes: dict = field(repr=False)   # x, temperature, pressure at step ends (and the inlet)
    steps: dict = field(repr=False)   # step-midpoint values: x, viscosity, reynolds, ...

    @property
    def ok(self) -> bool:
        return self.summary.status == "ok"


class Line:
    """Segments, product and heating bundled for repeated marches (the heaters are built once)."""

    def __init__(self, segments: list[LineSegment], product: Product, tracing):
        self.segments = segments
        self.product = product
        self.tracing = tracing
        self.heaters = [Heater(tracing, s.traced_fraction) for s in segments]
        self.length = sum(s.length for s in segments)

    def with_tracing(self, tracing) -> "Line":
        return Line(self.segments, self.product, tracing)


def march(line: Line, flow: float, inlet_temperature: float, inlet_pressure: float = 0.0,
          step: float = DEFAULT_STEP_M, record: bool = True) -> MarchResult:
    """March the product along ``line`` at volume flow ``flow`` [m3/s] (measured at the inlet
    temperature) from ``inlet_temperature`` [K] and gauge ``inlet_pressure`` [Pa]."""
    if not flow > 0.0:
        raise ValueError(f"flow must be greater than 0 m3/s, got {flow!r}")
    product = line.product
    density = product.density
    viscosity = product.viscosity
    specific_heat = product.specific_heat
    conductivity = product.conductivity
    newtonian = product.newtonian
    n_index = product.flow_index
    tau_y = product.yield_stress
    no_flow = product.no_flow_temperature
    mass_flow = density(inlet_temperature) * flow

    t = inlet_temperature
    p = inlet_pressure
    x = 0.0
    sum_friction = sum_fittings = sum_static = 0.0
    sum_trace = sum_loss = sum_viscous = 0.0
    laminar_len = transitional_len = 0.0
    short_len = traced_len = 0.0
    t_min = t_max = t
    p_max = p
    mu_min, mu_max = math.inf, 0.0
    jacket_max, jacket_at = -math.inf, 0.0
    sheath_max, sheath_at = -math.inf, 0.0
    status, sets_at = "ok", None
    n_steps = 0

    if record:
        node_x, node_t, node_p = [0.0], [t], [p]
        rec = {k: [] for k in ("x", "segment", "viscosity", "reynolds", "regime", "velocity", "wall_temperature",
                               "jacket_temperature", "sheath_temperature", "heat_loss", "trace_power",
                               "heater_state", "film_coefficient", "pressure_gradient")}

    for seg, heater in zip(line.segments, line.heaters):
        n = max(2, int(math.ceil(seg.length / step - 1e-9)))
        dx = seg.length / n
        d = seg.inside_diameter
        area = PI * d * d / 4.0
        rel_rough = seg.relative_roughness
        fit_a_per_m = seg.fitting_a / seg.length
        fit_b_per_m = seg.fitting_b / seg.length
        slope = seg.elevation_change / seg.length
        t_amb = seg.ambient_temperature
        wall_r = seg.wall_resistance
        buried = seg.location == "buried"
        has_layers = bool(seg.layers)
        # warm start of the outward path for this segment
        t_wall_guess = t
        t_jacket = t_amb + 0.2 * (t - t_amb) if has_layers else t
        g_out = None
        wall_drift = jacket_drift = 0.0
        wall_last = jacket_last = None
        mu_wall, mu_wall_at = 1.0, -1.0

        slope_previous = None
        surf_at, r_surf = -1.0, 0.0       # cached surface resistance and the jacket temperature it is for
        ins_at, r_ins_cached = -1.0, 0.0  # cached insulation resistance and the mean temperature it is for
        for _ in range(n):
            # The coefficients are taken at the step's midpoint state.  On a segment's first step the
            # midpoint is reached by a half step from the start (two evaluations); after that it is
            # predicted with the previous step's coefficients (one evaluation), which keeps second order.
            if slope_previous is None:
                t_eval = t
                x_eval = x + 0.25 * dx
                stages = (0, 1)
            else:
                # predicted with the last step's own law (exponential approach to its equilibrium):
                # a linear extrapolation would overshoot where the thermal length is shorter than a step
                t_eval = _step(heater, t, slope_previous, 0.5 * dx, t_amb)
                x_eval = x + 0.5 * dx
                stages = (1,)
            for stage in stages:
                rho = density(t_eval)
                velocity = mass_flow / (rho * area)
                q_volume = mass_flow / rho
                k_prod = viscosity(t_eval)
                if newtonian:
                    mu = k_prod
                    re = rho * velocity * d / mu
                    f = darcy_friction(re, rel_rough)
                    grad_friction = f * rho * velocity * velocity / (2.0 * d)
                else:
                    flow_nn = pipe_flow_non_newtonian(rho, velocity, d, k_prod, n_index, tau_y)
                    re = flow_nn.reynolds
                    mu = flow_nn.apparent_viscosity
                    f = 4.0 * flow_nn.fanning
                    grad_friction = flow_nn.pressure_gradient
                dyn = 0.5 * rho * velocity * velocity
                grad_fittings = (fit_a_per_m / re + fit_b_per_m) * dyn
                grad_static = rho * GRAVITY * slope
                viscous = (grad_friction + grad_fittings) * q_volume  # W/m dissipated into the product

                cp = specific_heat(t_eval)
                pr = cp * mu / conductivity(t_eval)
                if newtonian:
                    if abs(t_wall_guess - mu_wall_at) > 0.05:
                        mu_wall, mu_wall_at = viscosity(t_wall_guess), t_wall_guess
                    ratio = mu / mu_wall
                else:
                    ratio = 1.0
                nu = nu_internal(re, pr, d / max(x_eval, d), f, ratio)
                h_in = nu * conductivity(t_eval) / d
                g_in = 1.0 / (1.0 / (h_in * PI * d) + wall_r)

                # outward path and heater: fixed point on the jacket temperature, warm-started from
                # the last evaluation extrapolated by its change (one pass usually settles it)
                t_wall_guess += wall_drift
                t_jacket += jacket_drift
                for _it in range(30):
                    if has_layers:
                        t_mean = t_wall_guess + t_jacket
                        if abs(t_mean - ins_at) > 0.1:   # k(T_mean) moves little over 0.05 K
                            r_ins_cached, ins_at = insulation_resistance(seg, t_wall_guess, t_jacket), t_mean
                        r_ins = r_ins_cached
                    else:
                        r_ins = 0.0
                    if buried:
                        r_surf = seg.soil_resistance
                    elif abs(t_jacket - surf_at) > 0.02:  # h(T_jacket) moves little over 0.02 K
                        r_surf, surf_at = surface_resistance(seg, t_jacket), t_jacket
                    g_out = 1.0 / (r_ins + r_surf)
                    wall = heater.balance(t_eval, g_in, g_out, t_amb)
                    q_out = g_out * (wall.t_wall - t_amb)
                    new_jacket = wall.t_wall - q_out * r_ins
                    change = abs(new_jacket - t_jacket) + abs(wall.t_wall - t_wall_guess)
                    t_wall_guess = wall.t_wall
                    t_jacket = new_jacket if has_layers else 0.5 * (t_jacket + new_jacket)
                    if change < 0.02:
                        break
                if stage:
                    # drift of the converged values from the last step's, bounded: a guess, never a driver
                    if wall_last is not None:
                        wall_drift = max(-1.0, min(1.0, t_wall_guess - wall_last))
                        jacket_drift = max(-1.0, min(1.0, t_jacket - jacket_last))
                    wall_last, jacket_last = t_wall_guess, t_jacket

                c1 = wall.c1
                g = g_in * (1.0 - c1)
                t_equilibrium = (wall.t_wall - c1 * t_eval) / (1.0 - c1)
                mcp = mass_flow * cp
                if stage == 0:
                    t_eval = _step(heater, t, (t_equilibrium, g, viscous, mcp, wall, t_eval, g_in, g_out),
                                   0.5 * dx, t_amb)
                    x_eval = x + 0.5 * dx
            slope_previous = (t_equilibrium, g, viscous, mcp, wall, t_eval, g_in, g_out)
            t_new = _step(heater, t, slope_previous, dx, t_amb)

            grad_total = grad_friction + grad_fittings + grad_static
            p -= grad_total * dx
            x += dx
            n_steps += 1
            sum_friction += grad_friction * dx
            sum_fittings += grad_fittings * dx
            sum_static += grad_static * dx
            sum_trace += wall.q_trace * dx
            sum_loss += q_out * dx
            sum_viscous += viscous * dx
            if re < 2300.0:
                laminar_len += dx
            elif re < 4000.0:
                transitional_len += dx
            if heater.active:
                traced_len += dx
                if wall.regime == 2 and heater.setpoint is not None and wall.t_wall < heater.setpoint - 0.05:
                    short_len += dx
            if mu < mu_min:
                mu_min = mu
            if mu > mu_max:
                mu_max = mu
            jacket_t = t_jacket if has_layers or buried else wall.t_wall
            if jacket_t > jacket_max:
                jacket_max, jacket_at = jacket_t, x - 0.5 * dx
            sheath = heater.sheath_temperature(wall.t_wall, wall.q_trace) if heater.active else wall.t_wall
            if sheath > sheath_max:
                sheath_max, sheath_at = sheath, x - 0.5 * dx
            t = t_new
            if t < t_min:
                t_min = t
            elif t > t_max:
                t_max = t
            if p > p_max:
                p_max = p
            if record:
                node_x.append(x)
                node_t.append(t)
                node_p.append(p)
                rec["x"].append(x - 0.5 * dx)
                rec["segment"].append(seg.index)
                rec["viscosity"].append(mu)
                rec["reynolds"].append(re)
                rec["regime"].append(0 if re < 2300.0 else (1 if re < 4000.0 else 2))
                rec["velocity"].append(velocity)
                rec["wall_temperature"].append(wall.t_wall)
                rec["jacket_temperature"].append(jacket_t)
                rec["sheath_temperature"].append(sheath)
                rec["heat_loss"].append(q_out)
                rec["trace_power"].append(wall.q_trace)
                rec["heater_state"].append(wall.regime if heater.active else 0)
                rec["film_coefficient"].append(h_in)
                rec["pressure_gradient"].append(grad_total)
            if t < no_flow:
                status, sets_at = "product_sets", x
                break
        if status != "ok":
            break

    extrapolated = product.is_extrapolation(t_min) or product.is_extrapolation(t_max)
    summary = MarchSummary(
        flow_m3_s=flow, mass_flow_kg_s=mass_flow, inlet_temperature_k=inlet_temperature,
        outlet_temperature_k=t, inlet_pressure_pa=inlet_pressure, outlet_pressure_pa=p,
        pressure_drop_pa=inlet_pressure - p, friction_drop_pa=sum_friction, fittings_drop_pa=sum_fittings,
        static_drop_pa=sum_static, min_bulk_temperature_k=t_min, max_bulk_temperature_k=t_max,
        max_pressure_pa=p_max, max_jacket_temperature_k=jacket_max, max_jacket_at_m=jacket_at,
        max_sheath_temperature_k=sheath_max, max_sheath_at_m=sheath_at, trace_power_w=sum_trace,
        heat_loss_w=sum_loss, viscous_heating_w=sum_viscous, min_viscosity_pa_s=mu_min,
        max_viscosity_pa_s=mu_max, laminar_fraction=laminar_len / max(x, 1e-12),
        transitional_fraction=transitional_len / max(x, 1e-12), line_length_m=line.length,
        status=status, sets_at_m=sets_at, viscosity_extrapolated=extrapolated,
        heater_short_fraction=short_len / traced_len if traced_len > 0 else 0.0, steps=n_steps,
    )
    if record:
        nodes = {"x": np.array(node_x), "temperature": np.array(node_t), "pressure": np.array(node_p)}
        steps = {k: np.array(v) for k, v in rec.items()}
    else:
        nodes, steps = {}, {}
    return MarchResult(summary, nodes, steps)


def _step(heater, t: float, coefficients: tuple, dx: float, t_amb: float) -> float:
    """Advance the bulk temperature over dx with the step's conductances frozen.

    With g_in, g_out and the viscous source frozen, the product balance is piecewise linear in the
    bulk temperature: heater at full output below T_low, thermostat holding the wall at the setpoint
    between T_low and T_off, heater off above T_off (T_off: the bulk temperature whose passive wall is
    at the setpoint; T_low: where holding would need more than the heater's capacity).  Each linear
    piece is integrated exactly; where the path reaches a break it continues in the next piece, so a
    step longer than the thermal length settles where the thermostat holds instead of overshooting.
    """
    t_equilibrium, g, viscous, mcp, wall, _, g_in, g_out = coefficients
    t_end = _advance(t, t_equilibrium, g, viscous, mcp, dx)
    if not heater.active or heater.setpoint is None:
        return t_end
    setpoint = heater.setpoint
    t_off = (setpoint * (g_in + g_out) - g_out * t_amb) / g_in
    t_low = setpoint - (heater._capacity_at_setpoint - g_out * (setpoint - t_amb)) / g_in
    if t_low > t_off:
        t_low = t_off
    # the usual case: start and end lie in the regime the coefficients were taken in
    regime = wall.regime
    if regime == 2:
        if t <= t_low + 1e-9 and t_end <= t_low + 1e-9:
            return t_end
    elif regime == 0:
        if t >= t_off - 1e-9 and t_end >= t_off - 1e-9:
            return t_end
    elif t_low - 1e-9 <= t <= t_off + 1e-9 and t_low - 1e-9 <= t_end <= t_off + 1e-9:
        return t_end
    bounds = (t_low, t_off)
    remaining = dx
    for _ in range(4):
        wall = heater.balance(t, g_in, g_out, t_amb)
        c1 = wall.c1
        g = g_in * (1.0 - c1)
        t_equilibrium = (wall.t_wall - c1 * t) / (1.0 - c1)
        t_end = _advance(t, t_equilibrium, g, viscous, mcp, remaining)
        if bounds is None or g <= 1e-12:
            return t_end
        low, high = bounds
        if t < low - 1e-9:
            edge = low if t_end > low else None
        elif t > high + 1e-9:
            edge = high if t_end < high else None
        else:
            edge = None  # holding: the target (setpoint plus viscous heating) lies within reach
            if t_end > high + 1e-9:
                edge = high
            elif t_end < low - 1e-9:
                edge = low
        if edge is None:
            return t_end
        target = t_equilibrium + viscous / g
        if (target - edge) * (target - t) <= 0.0:
            return t_end
        dx_edge = -mcp / g * math.log((target - edge) / (target - t))
        if not 0.0 <= dx_edge < remaining:
            return t_end
        remaining -= dx_edge
        t = edge + (1e-9 if t_end > edge else -1e-9)
    return t


def _advance(t: float, t_equilibrium: float, g: float, viscous: float, mcp: float, dx: float) -> float:
    """Exact step of m cp dT/dx = G (T_eq - T) + S for frozen G, T_eq, S."""
    if g > 1e-12:
        t_eq = t_equilibrium + viscous / g
        return t_eq + (t - t_eq) * math.exp(-g * dx / mcp)
    return t + viscous * dx / mcp
