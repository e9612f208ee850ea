"""What a march keeps: its summary, its profiles along the line, and the sums and extremes it
gathers step by step (with the guard past the models' temperature ceiling)."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from planner.correlations.friction import RE_LAMINAR_MAX, RE_TURBULENT_MIN
from planner.line.coefficients import Coefficients, SegmentConstants
from planner.line.tracing import HEATER_FULL, HEATER_OFF
from planner.scenario.schema import TEMPERATURE_CEILING_K

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
    # segment index -> (x [m], jacket [K]) where a thermal entrance starts (``heat_path.entrance_jacket``)
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


class Totals:
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

    def add(self, s: SegmentConstants, local: Coefficients, dx: float, x: float, p: float, t_new: float,
            loss: float) -> float:
        """Add one step ending at x, losing ``loss`` [W/m] to the surroundings; returns the heater
        sheath temperature of the step."""
        heater, wall = s.heater, local.wall
        self.n += 1
        self.friction += local.grad_friction * dx
        self.fittings += local.grad_fittings * dx
        self.static += local.grad_static * dx
        self.trace += wall.q_trace * dx
        self.loss += loss * dx
        self.viscous += local.viscous_heating * dx
        re = local.reynolds
        if re <= RE_LAMINAR_MAX:
            self.laminar += dx
        elif re < RE_TURBULENT_MIN:
            self.transitional += dx
        if heater is not None:
            self.traced += dx
            if wall.heater_state == HEATER_FULL and heater.setpoint is not None and wall.t_wall < heater.setpoint - 0.05:
                self.short += dx
        mu, ratio = local.viscosity, local.viscosity_ratio
        if mu < self.mu_min:
            self.mu_min = mu
        if mu > self.mu_max:
            self.mu_max = mu
        if ratio < self.ratio_min:
            self.ratio_min = ratio
        if ratio > self.ratio_max:
            self.ratio_max = ratio
        self.jacket_seen(local.t_jacket if s.shows_jacket else wall.t_wall, x - 0.5 * dx)
        sheath = heater.sheath_temperature(wall.t_wall, wall.q_trace) if heater is not None else wall.t_wall
        if sheath > self.sheath_max:   # the sheath (or steam tracer) is the hottest of the path when heated
            self.sheath_max, self.sheath_at = sheath, x - 0.5 * dx
            if sheath > TEMPERATURE_CEILING_K:
                self.past_ceiling("heater sheath" if heater is not None else "pipe wall", sheath)
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

    def summary(self, line, product, flow: float, mass_flow: float, t_in: float, p_in: float,
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


class Profiles:
    """Profiles along the line: nodes at step ends, values at step midpoints."""

    __slots__ = ("node_x", "node_t", "node_p", "rows")

    def __init__(self):
        self.node_x, self.node_t, self.node_p = [], [], []
        self.rows = {k: [] for k in RECORDED}

    def add(self, s: SegmentConstants, local: Coefficients, dx: float, x: float, t: float, p: float, gradient: float,
            sheath: float, loss: float) -> None:
        wall, re = local.wall, local.reynolds
        self.node_x.append(x)
        self.node_t.append(t)
        self.node_p.append(p)
        values = (x - 0.5 * dx, s.seg.index, local.viscosity, re,
                  0 if re <= RE_LAMINAR_MAX else (1 if re < RE_TURBULENT_MIN else 2), local.velocity,
                  wall.t_wall, local.t_jacket if s.shows_jacket else wall.t_wall, sheath, loss,
                  wall.q_trace, wall.heater_state if s.heater is not None else HEATER_OFF, local.film_coefficient,
                  local.viscosity_ratio, gradient)
        for key, value in zip(RECORDED, values):
            self.rows[key].append(value)

    def nodes(self, t_in: float, p_in: float) -> dict:
        return {"x": np.array([0.0] + self.node_x), "temperature": np.array([t_in] + self.node_t),
                "pressure": np.array([p_in] + self.node_p)}

    def steps(self) -> dict:
        return {k: np.array(v) for k, v in self.rows.items()}
