"""The steady march: bulk temperature and pressure along the line at one flow and inlet temperature.

Per step of length dx the energy balance of the product is

    m cp dT/dx = G (T_eq - T) + S

where G (W/(m K)) and T_eq come from the wall balance of the heater state in force (untraced,
thermostat holding the setpoint, heater at full capacity, steam tracer), linear in T, and S (W/m) is
the viscous heating, the frictional pressure loss times the volume flow.  The step is taken exactly
for frozen coefficients (an exponential integrator: stable at any step, even when the thermal length
is short) with coefficients evaluated at the midpoint state (second-order, like a midpoint
Runge–Kutta step).  Pressure falls by friction (Darcy, or the non-Newtonian laws of ``rheology``),
fittings (2-K or 3-K, spread evenly over their segment) and static head, integrated with the same
midpoint state.

Within each evaluation the inner film and the wall are solved together: the film's (mu/mu_w)^0.14
correction takes the wall temperature the wall balance gives, iterated to agreement; the wall and
jacket temperatures carry over from step to step and across segment boundaries.  The laminar film
is the local coefficient of the thermal entrance averaged over the step; the entrance starts at the
route inlet and again at every change of inside diameter.

Step control: steps are at most ``step`` long (at least two per segment) and shrink where the
product changes fast: the bulk temperature by more than TEMPERATURE_CHANGE_PER_STEP_K (a thermal
length short against the step) or the log of viscosity by more than LOG_VISCOSITY_CHANGE_PER_STEP
per step.  Both targets scale with ``step`` / DEFAULT_STEP_M, so a ten-times smaller ``step`` is
a ten-times finer grid everywhere.

The march stops where the product falls below its no-flow temperature: the line would set there,
and the pressure beyond is not a meaningful number.

Two guards cost one integer compare a step: past TEMPERATURE_CEILING_K (heater sheath, pipe wall or
product; the schema's highest temperature) the march stops with a ComputationError naming the
heating inputs to change, and past its step meter (``scenario.budget.march_step_limit``: 20 times
the count the work budget makes for the line, at most the pass budget) with a BudgetError naming the
route.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import NamedTuple

import numpy as np

from planner.correlations.constants import GRAVITY
from planner.errors import ComputationError
from planner.correlations.friction import RE_LAMINAR_MAX, RE_TURBULENT_MIN, darcy_friction
from planner.correlations.heat_transfer import (VISCOSITY_RATIO_MAX, VISCOSITY_RATIO_MIN, film_parts,
                                                 nu_laminar_local_over, viscosity_corrected)
from planner.correlations.rheology import pipe_flow_non_newtonian
from planner.line.heat_loss import insulation_resistance, outer_conductance, surface_resistance
from planner.line.products import Product
from planner.line.route import LineSegment
from planner.line.tracing import Heater
from planner.scenario.budget import MARCH_STEP_M, march_step_count, march_step_limit, past_meter
from planner.scenario.wording import Q, Sentence

PI = math.pi
DEFAULT_STEP_M = MARCH_STEP_M            # 100 m: single passes and plans alike (grid test: tests/test_march_grid.py)
TEMPERATURE_CHANGE_PER_STEP_K = 3.0   # at the default step; planner choice (grid test: tests/test_march.py)
LOG_VISCOSITY_CHANGE_PER_STEP = 0.05  # at the default step: viscosity within about 5 % per step
ENTRANCE_FIRST_STEP = 0.04           # first step at a thermal entrance, share of the step (film-dominated)
THERMOSTAT_ENTRANCE_WEIGHT = 1.0     # entrance steps under a thermostat: no longer than the distance from it
ENTRANCE_SPLIT_RATIO = 1.5           # a laminar step spanning more than this in distance from the entrance
LOG_CONDUCTANCE_CHANGE_PER_STEP = 0.1  # at the default step: G (film, wall, outside) within 10 % per step
WALL_TOLERANCE_K = 0.01               # film/wall/jacket agreement within an evaluation
WALL_VISCOSITY_BAND_K = 0.02          # mu_w is taken within this of the wall the evaluation ends with: a wall
                                      # viscosity left 0.3 K off made G jitter by 0.2 % from step to step,
                                      # which the step control then chased on fine grids (a thermostat holding)
TEMPERATURE_CEILING_K = 773.15        # the schema's highest temperature (scenario.schema.Temperature): the
                                      # models (air, insulation, product data) are not meant past it
RECORDED = ("x", "segment", "viscosity", "reynolds", "flow_regime", "velocity", "wall_temperature",
            "jacket_temperature", "sheath_temperature", "heat_loss", "trace_power", "heater_state",
            "film_coefficient", "viscosity_ratio", "pressure_gradient")


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
    min_viscosity_ratio: float = 1.0   # bulk over wall viscosity along the line (before bounding)
    max_viscosity_ratio: float = 1.0

    def as_dict(self) -> dict:
        return dict(self.__dict__)


@dataclass
class MarchResult:
    summary: MarchSummary
    nodes: dict = field(repr=False)   # x, temperature, pressure at step ends (and the inlet)
    steps: dict = field(repr=False)   # step-midpoint values: x, viscosity, reynolds, ...
    # segment index -> (x [m], jacket [K]) where a thermal entrance starts (``_entrance_jacket``)
    entrance_jackets: dict = field(default_factory=dict, repr=False)

    @property
    def ok(self) -> bool:
        return self.summary.status == "ok"

    def jacket_peak(self, seg_index: int, jacket_max: float, at: float) -> tuple[float, float]:
        """(jacket [K], x [m]): the hottest of a segment's mid-step ``jacket_max`` at ``at`` and its
        entrance value, where the segment starts a thermal entrance."""
        entrance = self.entrance_jackets.get(seg_index)
        if entrance is not None and entrance[1] > jacket_max:
            return entrance[1], entrance[0]
        return jacket_max, at


class Line:
    """Segments, product and heating bundled for repeated marches (the heaters are built once)."""

    def __init__(self, segments: list[LineSegment], product: Product, tracing, name: str = "route"):
        self.segments = segments
        self.product = product
        self.tracing = tracing
        self.name = name   # the scenario section of its segments ("route" or "suction"), for messages
        self.heaters = [Heater(tracing, s.traced_fraction, s.ambient_temperature) for s in segments]
        self.length = sum(s.length for s in segments)


class _Local(NamedTuple):
    """Everything of one evaluation (a step's midpoint state) the step and the totals need."""

    t_equilibrium: float
    g: float
    viscous: float        # W/m dissipated into the product
    mcp: float
    wall: object          # tracing.WallBalance
    t_eval: float
    g_in: float
    g_out: float
    mu: float
    re: float
    velocity: float
    grad_friction: float
    grad_fittings: float
    grad_static: float
    q_out: float
    h_in: float
    ratio: float
    t_jacket: float


class _Segment:
    """A segment's constants as plain floats for the hot loop."""

    __slots__ = ("seg", "heater", "d", "area", "rel_rough", "fit_a", "fit_b", "slope", "t_amb", "wall_r",
                 "buried", "has_layers", "length", "film_area", "balance", "density", "viscosity",
                 "specific_heat", "conductivity", "newtonian", "thermostat")

    def __init__(self, seg: LineSegment, heater: Heater, product: Product):
        self.seg, self.heater = seg, heater
        self.balance = heater.balance
        self.density, self.viscosity = product.density, product.viscosity
        self.specific_heat, self.conductivity = product.specific_heat, product.conductivity
        self.newtonian = product.newtonian
        self.d = seg.inside_diameter
        self.area = PI * self.d * self.d / 4.0
        self.rel_rough = seg.relative_roughness
        self.fit_a = seg.fitting_a / seg.length
        self.fit_b = seg.fitting_b / seg.length
        self.slope = seg.elevation_change / seg.length
        self.t_amb = seg.ambient_temperature
        self.wall_r = seg.wall_resistance
        self.buried = seg.location == "buried"
        self.has_layers = bool(seg.layers)
        self.length = seg.length
        self.film_area = PI * self.d   # inside surface per metre
        self.thermostat = heater.active and heater.setpoint is not None


class _WallState:
    """The outward path's warm start (wall, jacket, wall viscosity, cached resistances), carried from
    step to step and across segment boundaries."""

    __slots__ = ("t_wall", "t_jacket", "mu_wall", "mu_wall_at", "surf_at", "r_surf", "ins_at", "r_ins",
                 "at", "wall_rate", "jacket_rate", "wall_full", "jacket_full", "full_at", "layout")

    def __init__(self, t: float):
        self.t_wall = t
        self.t_jacket = t
        self.mu_wall, self.mu_wall_at = 1.0, -1.0
        self.layout = None

    def enter(self, s: _Segment) -> None:
        """New segment: keep the wall; restart the jacket guess where the insulation differs."""
        seg = s.seg
        layout = (s.has_layers, seg.jacket_diameter, s.buried)
        if layout != self.layout:
            self.t_jacket = s.t_amb + 0.2 * (self.t_wall - s.t_amb) if s.has_layers else self.t_wall
            self.layout = layout
        self.surf_at = self.ins_at = -1.0
        self.r_surf = self.r_ins = 0.0   # no layers: r_ins stays 0
        self.at = self.wall_rate = self.jacket_rate = 0.0
        self.wall_full = self.jacket_full = self.full_at = None


class _StepControl:
    """Step lengths following the local rate of change (see the module docstring)."""

    __slots__ = ("max_step", "d_temperature", "d_log_viscosity", "d_log_conductance", "mu_last", "g_last", "dx_last",
                 "state_last")

    def __init__(self, step: float):
        scale = step / DEFAULT_STEP_M
        self.max_step = step
        self.d_temperature = TEMPERATURE_CHANGE_PER_STEP_K * scale
        self.d_log_viscosity = LOG_VISCOSITY_CHANGE_PER_STEP * scale
        self.d_log_conductance = LOG_CONDUCTANCE_CHANGE_PER_STEP * scale
        self.mu_last, self.g_last, self.state_last = None, 0.0, -1
        self.dx_last = step

    def first(self, length: float) -> float:
        """The first step of a segment; G may jump at the boundary (another heat path), so its trend
        starts afresh."""
        self.g_last = 0.0
        return min(self.max_step, 0.5 * length, 2.0 * self.dx_last)

    def entrance(self, dx: float, local: "_Local", from_entry: float, d: float, thermostat: bool) -> float:
        """Where the laminar film is a large part of the heat path, steps near a thermal entrance
        grow with the distance from it: the film, the wall and the outside coefficient all change
        steeply there, and a long first step would average them wrongly.  Under a thermostat
        (``thermostat``), holding or off, the heater's output is the difference of what the wall loses
        outward and what the film takes in, so it follows the steep film even where the film is a
        small part of the path (and the heater is off where the film alone holds the wall): the steps
        grow so too.  At full output the heater gives what it can whatever the film."""
        if from_entry >= dx or local.re > RE_LAMINAR_MAX or local.g <= 0.0:
            return dx   # (the limit below is never shorter than the distance from the entrance)
        share = local.g / (local.h_in * PI * d)     # film resistance over the whole path's
        weight = 4.0 * share * (1.0 - share)
        if thermostat and weight < THERMOSTAT_ENTRANCE_WEIGHT and local.wall.heater_state != 2:
            weight = THERMOSTAT_ENTRANCE_WEIGHT
        if weight < 0.05:
            return dx
        return min(dx, max(from_entry, ENTRANCE_FIRST_STEP * self.max_step) / weight)

    def fit(self, dx: float, t: float, local: "_Local", viscosity) -> float:
        """A step from ``t`` no longer than ``dx`` whose predicted temperature change (exact for the
        coefficients at its start: the thermal length mcp/G and the drive) and viscosity change stay
        within the targets."""
        g, mcp, viscous = local.g, local.mcp, local.viscous
        if g > 1e-12:
            drive = abs(local.t_equilibrium + viscous / g - t)
            if drive > self.d_temperature:
                dx = min(dx, -mcp / g * math.log(1.0 - self.d_temperature / drive))
        elif viscous > 0.0:
            dx = min(dx, self.d_temperature * mcp / viscous)
        t_end = _advance(t, local.t_equilibrium, g, viscous, mcp, dx)
        try:
            change = abs(math.log(viscosity(t_end) / local.mu)) if t_end != t else 0.0
        except (ValueError, OverflowError):
            change = math.inf
        if change > self.d_log_viscosity:
            dx *= self.d_log_viscosity / change
        return max(dx, 1e-3 * self.max_step)

    def after(self, dx: float, t: float, t_new: float, mu: float, g: float, state: int) -> float:
        """The next step's length after a step of ``dx`` from ``t`` to ``t_new`` (midpoint viscosity
        mu, bulk-to-surroundings conductance g in heater state ``state``)."""
        if state != self.state_last:
            self.g_last, self.state_last = 0.0, state   # G jumps with the heater state: no trend
        limit = min(self.max_step, 2.0 * dx)
        change = abs(t_new - t)
        if change * limit > self.d_temperature * dx:
            limit = self.d_temperature * dx / change
        if self.mu_last is not None:
            between = 0.5 * (dx + self.dx_last)
            per_metre = abs(math.log(mu / self.mu_last)) / between
            if per_metre * limit > self.d_log_viscosity:
                limit = self.d_log_viscosity / per_metre
            if g > 0.0 and self.g_last > 0.0:
                # the loss and the viscous heating nearly balance in long viscous lines: their
                # coefficients must be followed, not just the temperature they leave
                per_metre = abs(math.log(g / self.g_last)) / between
                if per_metre * limit > self.d_log_conductance:
                    limit = self.d_log_conductance / per_metre
        self.mu_last, self.g_last, self.dx_last = mu, g, dx
        return max(limit, 1e-3 * self.max_step)


def march(line: Line, flow: float, inlet_temperature: float, inlet_pressure: float = 0.0,
          step: float = DEFAULT_STEP_M, record: bool = True) -> MarchResult:
    """March the product along ``line`` at volume flow ``flow`` [m3/s] (measured at the inlet
    temperature) from ``inlet_temperature`` [K] and gauge ``inlet_pressure`` [Pa]; ``step`` [m] is
    the longest step (the grid scale, see the module docstring)."""
    if not flow > 0.0:
        raise ValueError(f"flow must be greater than 0 m3/s, got {flow!r}")
    if not step > 0.0:
        raise ValueError(f"step must be greater than 0 m, got {step!r}")
    product = line.product
    mass_flow = product.density(inlet_temperature) * flow
    count = march_step_count([seg.length for seg in line.segments], step)
    totals = _Totals(inlet_temperature, inlet_pressure, march_step_limit(count))
    rec = _Record() if record else None
    wall_state = _WallState(inlet_temperature)
    control = _StepControl(step)
    t, p, x = inlet_temperature, inlet_pressure, 0.0
    entry_x, entry_d = 0.0, None
    carry = None
    entrances: dict[int, tuple[float, float]] = {}
    for seg, heater in zip(line.segments, line.heaters):
        s = _Segment(seg, heater, product)
        if entry_d is None or abs(seg.inside_diameter - entry_d) > 1e-9 * entry_d:
            entry_x, entry_d = x, seg.inside_diameter   # a new thermal entrance
            entrances[seg.index] = (x, _entrance_jacket(s, t))
            totals.jacket_seen(entrances[seg.index][1], x)
        wall_state.enter(s)
        t, p, x, carry = _march_segment(s, product, mass_flow, wall_state, control, totals, rec, t, p, x,
                                        entry_x, carry)
        if totals.status != "ok" or totals.n >= totals.max_steps:
            break
    if totals.n >= totals.max_steps:
        _stopped(line, totals, count, step, x)
    summary = totals.summary(line, product, flow, mass_flow, inlet_temperature, inlet_pressure, t, p, x)
    if rec is not None:
        return MarchResult(summary, rec.nodes(inlet_temperature, inlet_pressure), rec.steps(), entrances)
    return MarchResult(summary, {}, {}, entrances)


def _march_segment(s: _Segment, product: Product, mass_flow: float, wall_state: _WallState,
                   control: _StepControl, totals: "_Totals", rec, t: float, p: float, x: float,
                   entry_x: float, carry: tuple | None) -> tuple[float, float, float, tuple]:
    """March over one segment from (t, p) at distance x; returns (t, p, x) at its end (or where the
    product sets, with ``totals.status`` saying so) and what the next segment may carry on with.

    ``carry``: the last two evaluations of the segment before, used to predict this segment's first
    midpoint when the heat path is the same (same diameter, layers, surroundings and heating)."""
    heater, t_amb, d = s.heater, s.t_amb, s.d
    no_flow = product.no_flow_temperature
    x_end = x + s.length
    dx = control.first(s.length)
    signature = _path_signature(s)
    previous = older = None
    at_previous = at_older = 0.0
    if carry is not None and carry[0] == signature:
        _, previous, at_previous, older, at_older = carry
    while x_end - x > 1e-9 * s.length:
        remaining = x_end - x
        if dx >= remaining * (1.0 - 1e-9):
            dx = remaining
        elif remaining < 1.5 * dx:
            dx = 0.5 * remaining   # two equal steps rather than a sliver at the end
        from_d = (x - entry_x) / d
        if previous is None:
            # a segment's first step: sized from the rates at its start (nothing is known of this
            # segment yet), the midpoint then reached by a half step from the start
            half = _evaluate(s, product, mass_flow, wall_state, t, from_d, from_d + 0.5 * dx / d, x, False)
            fitted = control.fit(control.entrance(dx, half, x - entry_x, d, s.thermostat), t, half, product.viscosity)
            if fitted < 0.9 * dx:
                dx = fitted
                half = _evaluate(s, product, mass_flow, wall_state, t, from_d, from_d + 0.5 * dx / d, x, False)
            t_mid = _step(heater, t, half, 0.5 * dx, t_amb, half.g, half.viscous)
            older, at_older = half, x
        else:
            # predicted with the last step's own law (exponential approach to its equilibrium; a
            # linear extrapolation of T would overshoot where the thermal length is shorter than a
            # step), its conductance and viscous heating carried forward from the last two
            g, viscous = _extrapolated(previous, older, (x + 0.5 * dx - at_previous) / (at_previous - at_older))
            t_mid = _step(heater, t, previous, 0.5 * dx, t_amb, g, viscous)
            older, at_older = previous, at_previous
        local = _evaluate(s, product, mass_flow, wall_state, t_mid, from_d, from_d + dx / d, x + 0.5 * dx, True)
        t_new = _step(heater, t, local, dx, t_amb, local.g, local.viscous)
        grad_total = local.grad_friction + local.grad_fittings + local.grad_static
        p -= grad_total * dx
        x += dx
        sheath = totals.add(s, local, dx, x, p, t_new)
        if rec is not None:
            rec.add(s, local, dx, x, t_new, p, grad_total, sheath)
        previous, at_previous = local, x - 0.5 * dx
        dx = control.entrance(control.after(dx, t, t_new, local.mu, local.g, local.wall.heater_state), local, x - entry_x, d,
                               s.thermostat)
        t = t_new
        if t < no_flow:
            totals.status, totals.sets_at = "product_sets", x
            break
        if totals.n >= totals.max_steps:   # the step meter (also set to 0 past the temperature ceiling)
            break
    return t, p, x, (signature, previous, at_previous, older, at_older)


def _stopped(line: Line, totals: "_Totals", count: int, step: float, x: float) -> None:
    """The march stopped early: past the temperature ceiling (ComputationError naming the inputs to
    change) or past its step meter (BudgetError naming the route)."""
    where = f"{x:,.1f} m ({_segment_name(line, x)!r})"
    if totals.hot_at is None:
        if x >= line.length * (1.0 - 1e-9):
            return   # the meter's last step was the line's last
        text = f"{line.length:,.0f} m in {len(line.segments)} segment(s), longest step {step:g} m"
        raise past_meter(f"{line.name}.segments", totals.n, count, where, text)
    what, value = totals.hot_at
    kind = line.tracing.kind if line.tracing is not None else "none"
    if kind == "steam":
        change = "lower tracing.steam_pressure or tracing.circuits_per_metre, or raise operation.flow"
    elif kind == "none":
        change = "lower the inlet temperature or operation.flow (viscous heating)"
    else:
        change = ("lower tracing.output or tracing.circuits_per_metre, hold the pipe wall with a thermostat "
                  "(tracing.sensing = \"pipe_wall\" and a setpoint), or raise operation.flow")
    raise ComputationError(Sentence(
        "the {what} reaches {t} at {where} along the {line}, past the {limit} the planner's models hold to: the heat "
        "put in is far more than the line can lose; {change}", what=what, t=Q(value, "temperature"), where=where,
        line=line.name, limit=Q(TEMPERATURE_CEILING_K, "temperature"), change=change))


def _segment_name(line: Line, x: float) -> str:
    end = 0.0
    for seg in line.segments:
        end += seg.length
        if x <= end + 1e-9:
            return seg.name
    return line.segments[-1].name


def _path_signature(s: _Segment) -> tuple:
    """What a segment's heat path is made of: equal signatures, nothing to re-learn at the boundary."""
    seg, heater = s.seg, s.heater
    return (s.d, s.wall_r, tuple((layer.log_ratio, layer.conductivity, layer.material) for layer in seg.layers),
            seg.location, s.t_amb, seg.wind_speed, seg.emissivity, heater.active, heater.fraction)


def _extrapolated(last: _Local, before: _Local, ahead: float) -> tuple[float, float]:
    """(G, S) of ``last`` carried ``ahead`` (in units of the distance between the two evaluations)
    along their log-linear trend, each by at most a factor 2 and only within one heater state: the
    predictor of the next midpoint then errs at second order, not first."""
    g, viscous = last.g, last.viscous
    if last.wall.heater_state != before.wall.heater_state:
        return g, viscous   # G jumps where the heater changes state: no trend to follow
    if g > 0.0 and before.g > 0.0 and g != before.g:
        factor = (g / before.g) ** ahead
        g *= 2.0 if factor > 2.0 else (0.5 if factor < 0.5 else factor)
    if viscous > 0.0 and before.viscous > 0.0 and viscous != before.viscous:
        factor = (viscous / before.viscous) ** ahead
        viscous *= 2.0 if factor > 2.0 else (0.5 if factor < 0.5 else factor)
    return g, viscous


def _evaluate(s: _Segment, product: Product, mass_flow: float, ws: _WallState, t_eval: float,
              from_d: float, to_d: float, at: float, full_step: bool) -> _Local:
    """Coefficients at bulk temperature ``t_eval`` for the stretch [from_d, to_d] (distances from
    the thermal entrance over D), taken as at distance ``at`` [m]: hydraulics, then the film, wall
    and jacket solved together.  ``full_step``: a step's midpoint (the warm start learns from it)."""
    d = s.d
    rho = s.density(t_eval)
    velocity = mass_flow / (rho * s.area)
    k_prod = s.viscosity(t_eval)
    if s.newtonian:
        mu = k_prod
        re = rho * velocity * d / mu
        f = darcy_friction(re, s.rel_rough)
        grad_friction = f * rho * velocity * velocity / (2.0 * d)
    else:
        flow_nn = pipe_flow_non_newtonian(rho, velocity, d, k_prod, product.flow_index, product.yield_stress)
        re = flow_nn.reynolds
        mu = flow_nn.apparent_viscosity
        f = 4.0 * flow_nn.fanning
        grad_friction = flow_nn.pressure_gradient
    grad_fittings = (s.fit_a / re + s.fit_b) * 0.5 * rho * velocity * velocity
    viscous = (grad_friction + grad_fittings) * mass_flow / rho
    cp = s.specific_heat(t_eval)
    conductivity = s.conductivity(t_eval)
    pr = cp * mu / conductivity
    parts = film_parts(re, pr, f, from_d, to_d)
    wall, g_in, g_out, q_out, h_in, ratio = _solve_wall(s, ws, t_eval, mu, parts, conductivity / d, viscous, at)
    if full_step:
        # how the converged wall and jacket move along the line: the next warm start follows it
        if ws.full_at is not None and at > ws.full_at:
            span = at - ws.full_at
            ws.wall_rate = (ws.t_wall - ws.wall_full) / span
            ws.jacket_rate = (ws.t_jacket - ws.jacket_full) / span
        ws.wall_full, ws.jacket_full, ws.full_at = ws.t_wall, ws.t_jacket, at
    c1 = wall.c1
    g = g_in * (1.0 - c1)
    if parts[2] == 0.0 and to_d > ENTRANCE_SPLIT_RATIO * from_d:
        g = _entrance_mean_conductance(g, h_in, parts[0], re * pr, from_d, to_d, d)
    return _Local((wall.t_wall - c1 * t_eval) / (1.0 - c1), g, viscous, mass_flow * cp, wall,
                  t_eval, g_in, g_out, mu, re, velocity, grad_friction, grad_fittings, rho * GRAVITY * s.slope,
                  q_out, h_in, ratio, ws.t_jacket)


def _entrance_mean_conductance(g: float, h_in: float, nu_step: float, pe: float, from_d: float, to_d: float,
                               d: float) -> float:
    """The step's bulk-to-surroundings conductance [W/(m K)] averaged over the thermal entrance.

    Near the entrance the film coefficient varies steeply within a step (as x^(-1/3)); the film is
    in series with the rest of the path (wall, insulation, air), so the mean of the series
    conductance is not the conductance of the mean film.  The step is cut into geometric pieces
    (exact mean film of each from the entrance correlation), each piece's conductance taken with
    the rest of the path as solved, and the conductances averaged by length."""
    r_film = 1.0 / (h_in * PI * d)
    r_rest = 1.0 / g - r_film
    if r_rest <= 1e-3 * r_film or r_rest >= 20.0 * r_film:
        return g   # the film is nearly the whole path, or a small part of it: the mean film will do
    h_per_nu = h_in / nu_step                      # k / D times the viscosity correction
    low = from_d if from_d > 0.0 else to_d / 32.0
    pieces = min(6, max(2, int(math.log2(to_d / low)) + 1))
    factor = (to_d / low) ** (1.0 / pieces)
    total, a = 0.0, 0.0 if from_d <= 0.0 else from_d
    edges = [low * factor ** i for i in range(1, pieces + 1)]
    if from_d <= 0.0:
        edges.insert(0, low)
    for b in edges:
        nu = nu_laminar_local_over(a / pe, b / pe)
        total += (b - a) / (1.0 / (nu * h_per_nu * PI * d) + r_rest)
        a = b
    return total / (to_d - (from_d if from_d > 0.0 else 0.0))


def _solve_wall(s: _Segment, ws: _WallState, t_bulk: float, mu: float, parts: tuple, k_over_d: float,
                viscous: float, at: float):
    """Film, wall and jacket at one bulk temperature, iterated to agreement (fixed point on the
    wall and jacket temperatures, warm-started from the last evaluation plus its drift).

    Returns (wall balance, g_in, g_out, heat loss [W/m], film coefficient, mu/mu_wall)."""
    seg, balance, t_amb, wall_r, has_layers, film_area = s.seg, s.balance, s.t_amb, s.wall_r, s.has_layers, s.film_area
    newtonian = s.newtonian
    nu_lam, nu_turb, weight = parts
    ratio = 1.0
    ahead = at - ws.at
    drift = ws.wall_rate * ahead   # warm start: the last solution moved along its trend, at most 1 K
    t_wall = ws.t_wall + (1.0 if drift > 1.0 else (-1.0 if drift < -1.0 else drift))
    drift = ws.jacket_rate * ahead
    t_jacket = ws.t_jacket + (1.0 if drift > 1.0 else (-1.0 if drift < -1.0 else drift))
    mu_wall, mu_wall_at = ws.mu_wall, ws.mu_wall_at
    r_ins, ins_at, r_surf, surf_at = ws.r_ins, ws.ins_at, ws.r_surf, ws.surf_at
    if s.buried:
        r_surf, surf_at = seg.soil_resistance, math.inf
    x_prev = r_prev = None
    for _ in range(40):
        if newtonian:
            if abs(t_wall - mu_wall_at) > WALL_VISCOSITY_BAND_K:   # mu_w moves little over 0.02 K
                mu_wall, mu_wall_at = _wall_viscosity(s.viscosity, t_wall), t_wall
            ratio = mu / mu_wall
            h_in = (nu_lam * _bounded(ratio) ** 0.14 if weight == 0.0 else viscosity_corrected(parts, ratio)) * k_over_d
        else:
            h_in = (nu_lam + weight * (nu_turb - nu_lam)) * k_over_d
        g_in = 1.0 / (1.0 / (h_in * film_area) + wall_r)
        if has_layers:
            t_mean = t_wall + t_jacket
            if abs(t_mean - ins_at) > 0.1:   # k(T_mean) moves little over 0.05 K
                r_ins, ins_at = insulation_resistance(seg, t_wall, t_jacket), t_mean
        if surf_at != math.inf and abs(t_jacket - surf_at) > 0.02:   # h(T_jacket) moves little over 0.02 K
            r_surf, surf_at = surface_resistance(seg, t_jacket), t_jacket
        g_out = 1.0 / (r_ins + r_surf)
        wall = balance(t_bulk, g_in, g_out, t_amb, viscous)
        q_out = g_out * (wall.t_wall - t_amb)
        new_jacket = wall.t_wall - q_out * r_ins
        residual = wall.t_wall - t_wall
        if has_layers:
            # the wall is exact for the g_in and g_out it was solved with: what is left of the wall
            # guess's error is its effect through the film's (mu/mu_w)^0.14 (and, faintly, the
            # insulation's k at the mean temperature)
            change = abs(new_jacket - t_jacket) + abs(residual) * (0.14 * abs(math.log(ratio)) + 0.02)
        else:
            change = abs(new_jacket - t_jacket) + abs(residual)   # bare: the outside h follows the wall
        t_jacket = new_jacket   # bare: the jacket is the wall, settled with it below
        if change < WALL_TOLERANCE_K and (not newtonian or abs(wall.t_wall - mu_wall_at) <= WALL_VISCOSITY_BAND_K):
            break
        # the film's wall viscosity makes the wall map slow to settle on its own (cold bare lines):
        # a secant step on the wall temperature, the plain fixed-point step when that looks unsafe
        step = residual
        if x_prev is not None and residual != r_prev:
            secant = -residual * (t_wall - x_prev) / (residual - r_prev)
            if abs(secant) <= 4.0 * abs(residual):
                step = secant
        x_prev, r_prev = t_wall, residual
        t_wall += step
        if not has_layers:
            t_jacket = t_wall
    ws.t_wall, ws.t_jacket, ws.mu_wall, ws.mu_wall_at, ws.at = t_wall, t_jacket, mu_wall, mu_wall_at, at
    ws.r_ins, ws.ins_at, ws.r_surf, ws.surf_at = r_ins, ins_at, r_surf, surf_at
    return wall, g_in, g_out, q_out, h_in, ratio


def _entrance_jacket(s: _Segment, t_bulk: float) -> float:
    """The jacket temperature (bare: the wall's) where a thermal entrance starts, product at ``t_bulk``.

    Toward an entrance the local laminar film coefficient grows without bound (Graetz), so the wall
    there follows the heat path with the film's resistance gone, only the pipe wall's own left: the
    jacket's highest value near the entrance, whatever the grid.  A step's midpoint only approaches
    it as the first step shrinks (the barge demo's inlet: 35 °C at a 4 m first step, 49 °C at 6 cm);
    taken here, the hottest jacket, and the touch check on it, no longer depend on the step."""
    seg, t_amb = s.seg, s.t_amb
    g_in = 1.0 / s.wall_r if s.wall_r > 0.0 else 1e9
    t_wall = t_bulk
    t_jacket = t_amb + 0.2 * (t_bulk - t_amb) if s.has_layers else t_bulk
    for _ in range(60):
        g_out, r_ins = outer_conductance(seg, t_wall, t_jacket)
        t_wall = s.balance(t_bulk, g_in, g_out, t_amb, 0.0).t_wall
        new = t_wall - g_out * (t_wall - t_amb) * r_ins
        if abs(new - t_jacket) < 1e-3:
            return new
        t_jacket = new if s.has_layers else 0.5 * (t_jacket + new)   # bare: damped, as heat_loss does
    return t_jacket


def _bounded(ratio: float) -> float:
    """mu/mu_w within the range of the film's property correction (heat_transfer.VISCOSITY_RATIO_*)."""
    return VISCOSITY_RATIO_MIN if ratio < VISCOSITY_RATIO_MIN else (
        VISCOSITY_RATIO_MAX if ratio > VISCOSITY_RATIO_MAX else ratio)


def _wall_viscosity(viscosity, t_wall: float) -> float:
    """Viscosity at the wall temperature; beyond the law's domain (a VFT law below its c, a value out
    of floating-point range) the wall counts as set: infinitely viscous (the ratio is then bounded)."""
    try:
        return viscosity(t_wall)
    except (ValueError, OverflowError):
        return math.inf


class _Totals:
    """Sums and extremes along the line."""

    __slots__ = ("friction", "fittings", "static", "trace", "loss", "viscous", "laminar", "transitional",
                 "short", "traced", "t_min", "t_max", "p_max", "mu_min", "mu_max", "ratio_min", "ratio_max",
                 "jacket_max", "jacket_at", "sheath_max", "sheath_at", "status", "sets_at", "n", "max_steps",
                 "hot_at")

    def __init__(self, t: float, p: float, max_steps: int):
        self.friction = self.fittings = self.static = 0.0
        self.trace = self.loss = self.viscous = 0.0
        self.laminar = self.transitional = self.short = self.traced = 0.0
        self.t_min = self.t_max = t
        self.p_max = p
        self.mu_min, self.mu_max = math.inf, 0.0
        self.ratio_min, self.ratio_max = math.inf, 0.0
        self.jacket_max = self.sheath_max = -math.inf
        self.jacket_at = self.sheath_at = 0.0
        self.status, self.sets_at, self.n = "ok", None, 0
        self.max_steps = max_steps   # the step meter; 0 once past TEMPERATURE_CEILING_K (the march stops)
        self.hot_at = None           # (what, temperature [K]) past the ceiling

    def add(self, s: _Segment, local: _Local, dx: float, x: float, p: float, t_new: float) -> float:
        """Add one step ending at x; returns the heater sheath temperature of the step."""
        heater, wall = s.heater, local.wall
        self.n += 1
        self.friction += local.grad_friction * dx
        self.fittings += local.grad_fittings * dx
        self.static += local.grad_static * dx
        self.trace += wall.q_trace * dx
        self.loss += local.q_out * dx
        self.viscous += local.viscous * dx
        re = local.re
        if re <= RE_LAMINAR_MAX:
            self.laminar += dx
        elif re < RE_TURBULENT_MIN:
            self.transitional += dx
        if heater.active:
            self.traced += dx
            if wall.heater_state == 2 and heater.setpoint is not None and wall.t_wall < heater.setpoint - 0.05:
                self.short += dx
        mu, ratio = local.mu, local.ratio
        if mu < self.mu_min:
            self.mu_min = mu
        if mu > self.mu_max:
            self.mu_max = mu
        if ratio < self.ratio_min:
            self.ratio_min = ratio
        if ratio > self.ratio_max:
            self.ratio_max = ratio
        self.jacket_seen(local.t_jacket if s.has_layers or s.buried else wall.t_wall, x - 0.5 * dx)
        sheath = heater.sheath_temperature(wall.t_wall, wall.q_trace) if heater.active else wall.t_wall
        if sheath > self.sheath_max:   # the sheath (or steam tracer) is the hottest of the path when heated
            self.sheath_max, self.sheath_at = sheath, x - 0.5 * dx
            if sheath > TEMPERATURE_CEILING_K:
                self.past_ceiling("heater sheath" if heater.active else "pipe wall", sheath)
        if t_new < self.t_min:
            self.t_min = t_new
        elif t_new > self.t_max:
            self.t_max = t_new
            if t_new > TEMPERATURE_CEILING_K:
                self.past_ceiling("product", t_new)
        if p > self.p_max:
            self.p_max = p
        return sheath

    def jacket_seen(self, jacket: float, at: float) -> None:
        if jacket > self.jacket_max:
            self.jacket_max, self.jacket_at = jacket, at

    def past_ceiling(self, what: str, temperature: float) -> None:
        if self.hot_at is None:
            self.hot_at, self.max_steps = (what, temperature), 0

    def summary(self, line: Line, product: Product, flow: float, mass_flow: float, t_in: float, p_in: float,
                t: float, p: float, x: float) -> MarchSummary:
        extrapolated = product.is_extrapolation(self.t_min) or product.is_extrapolation(self.t_max)
        return MarchSummary(
            flow_m3_s=flow, mass_flow_kg_s=mass_flow, inlet_temperature_k=t_in, outlet_temperature_k=t,
            inlet_pressure_pa=p_in, outlet_pressure_pa=p, pressure_drop_pa=p_in - p,
            friction_drop_pa=self.friction, fittings_drop_pa=self.fittings, static_drop_pa=self.static,
            min_bulk_temperature_k=self.t_min, max_bulk_temperature_k=self.t_max, max_pressure_pa=self.p_max,
            max_jacket_temperature_k=self.jacket_max, max_jacket_at_m=self.jacket_at,
            max_sheath_temperature_k=self.sheath_max, max_sheath_at_m=self.sheath_at, trace_power_w=self.trace,
            heat_loss_w=self.loss, viscous_heating_w=self.viscous, min_viscosity_pa_s=self.mu_min,
            max_viscosity_pa_s=self.mu_max, laminar_fraction=self.laminar / max(x, 1e-12),
            transitional_fraction=self.transitional / max(x, 1e-12), line_length_m=line.length,
            status=self.status, sets_at_m=self.sets_at, viscosity_extrapolated=extrapolated,
            heater_short_fraction=self.short / self.traced if self.traced > 0 else 0.0, steps=self.n,
            min_viscosity_ratio=self.ratio_min, max_viscosity_ratio=self.ratio_max,
        )


class _Record:
    """Profiles along the line: nodes at step ends, values at step midpoints."""

    __slots__ = ("node_x", "node_t", "node_p", "rows")

    def __init__(self):
        self.node_x, self.node_t, self.node_p = [], [], []
        self.rows = {k: [] for k in RECORDED}

    def add(self, s: _Segment, local: _Local, dx: float, x: float, t: float, p: float, gradient: float,
            sheath: float) -> None:
        wall, re = local.wall, local.re
        self.node_x.append(x)
        self.node_t.append(t)
        self.node_p.append(p)
        values = (x - 0.5 * dx, s.seg.index, local.mu, re,
                  0 if re <= RE_LAMINAR_MAX else (1 if re < RE_TURBULENT_MIN else 2), local.velocity,
                  wall.t_wall, local.t_jacket if s.has_layers or s.buried else wall.t_wall, sheath, local.q_out,
                  wall.q_trace, wall.heater_state if s.heater.active else 0, local.h_in, local.ratio, gradient)
        for key, value in zip(RECORDED, values):
            self.rows[key].append(value)

    def nodes(self, t_in: float, p_in: float) -> dict:
        return {"x": np.array([0.0] + self.node_x), "temperature": np.array([t_in] + self.node_t),
                "pressure": np.array([p_in] + self.node_p)}

    def steps(self) -> dict:
        return {k: np.array(v) for k, v in self.rows.items()}


def _step(heater: Heater, t: float, local: _Local, dx: float, t_amb: float, g: float, viscous: float) -> float:
    """Advance the bulk temperature over dx with the step's conductances frozen (``g`` [W/(m K)] and
    ``viscous`` [W/m]: the step's G and S, those of ``local`` or predicted from them).

    With g_in, g_out and the viscous source frozen, the product balance is piecewise linear in the
    bulk temperature: heater at full output below T_low, thermostat holding between T_low and T_off,
    heater off above T_off (``Heater.switch_points``).  Each linear piece is integrated exactly;
    where the path reaches a break it continues in the next piece, so a step longer than the thermal
    length settles where the thermostat holds instead of overshooting.
    """
    mcp, g_in, g_out = local.mcp, local.g_in, local.g_out
    t_end = _advance(t, local.t_equilibrium, g, viscous, mcp, dx)
    bounds = heater.switch_points(g_in, g_out, t_amb)
    if bounds is None:
        return t_end
    t_low, t_off = bounds
    # the usual case: start and end lie in the heater state the coefficients were taken in
    state = local.wall.heater_state
    if state == 2:
        if t <= t_low + 1e-9 and t_end <= t_low + 1e-9:
            return t_end
    elif state == 0:
        if t >= t_off - 1e-9 and t_end >= t_off - 1e-9:
            return t_end
    elif t_low - 1e-9 <= t <= t_off + 1e-9 and t_low - 1e-9 <= t_end <= t_off + 1e-9:
        return t_end
    remaining = dx
    for _ in range(4):
        wall = heater.balance(t, g_in, g_out, t_amb, viscous)
        c1 = wall.c1
        g = g_in * (1.0 - c1)
        t_equilibrium = (wall.t_wall - c1 * t) / (1.0 - c1)
        t_end = _advance(t, t_equilibrium, g, viscous, mcp, remaining)
        if g <= 1e-12:
            return t_end
        if t < t_low - 1e-9:
            edge = t_low if t_end > t_low else None
        elif t > t_off + 1e-9:
            edge = t_off if t_end < t_off else None
        else:
            edge = None  # holding: the target (setpoint plus viscous heating) lies within reach
            if t_end > t_off + 1e-9:
                edge = t_off
            elif t_end < t_low - 1e-9:
                edge = t_low
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
