"""The steady march: bulk temperature and pressure along the line at one flow and inlet temperature.

Per step of length dx the energy balance of the product is

    m cp dT/dx = G (T_eq - T) + S

where G (W/(m K)) and T_eq come from the wall balance of the heater state in force (untraced,
thermostat holding the setpoint, heater at full capacity, steam tracer), linear in T, and S (W/m) is
the viscous heating.  Each step is taken exactly for frozen coefficients (``bulk_step``) with the
coefficients evaluated at the step's midpoint state (``coefficients.evaluate``: second order, like a
midpoint Runge–Kutta step); the midpoint is predicted with the last step's own law, its G and S
carried along their trend.  Pressure falls by friction, fittings and static head, integrated with
the same midpoint state.  The film, wall and jacket are settled together at every evaluation
(``heat_path``), warm-started from the last; the thermal entrance starts at the route inlet and
again at every change of inside diameter.  Step lengths follow the local rate of change
(``step_control``); what the march keeps is in ``march_records``.

The march stops where the product falls below its no-flow temperature: the line would set there,
and the pressure beyond is not a meaningful number.

Two guards cost one integer compare a step: past TEMPERATURE_CEILING_K (heater sheath, pipe wall or
product; the schema's highest temperature) the march stops with a ComputationError naming the
heating inputs to change, and past its step meter (``scenario.budget.march_step_limit``: 20 times
the count the work budget makes for the line, at most the pass budget) with a BudgetError naming the
route.
"""

from __future__ import annotations

import dataclasses

from planner.errors import ComputationError
from planner.line.bulk_step import step_across_states
from planner.line.coefficients import Coefficients, SegmentConstants, evaluate
from planner.line.heat_path import WarmStart, entrance_jacket
from planner.line.march_records import MarchResult, MarchSummary, Profiles, Totals
from planner.line.products import Product
from planner.line.route import LineSegment
from planner.line.step_control import DEFAULT_STEP_M, StepControl
from planner.line.tracing import Heater
from planner.scenario.budget import march_step_count, march_step_limit, past_meter
from planner.scenario.schema import TEMPERATURE_CEILING_K

RUNAWAY_FACTOR = 1.2   # past 1.2 x the ceiling [K] a temperature is a runaway estimate, not reported
from planner.scenario.wording import Q, Sentence

__all__ = ["DEFAULT_STEP_M", "Line", "MarchResult", "MarchSummary", "march", "march_plugged"]


class Line:
    """Segments, product and heating bundled for repeated marches: the heaters and the segments'
    constants (and the heat paths' kept surface coefficients) are built once."""

    def __init__(self, segments: list[LineSegment], product: Product, tracing, name: str = "route",
                 kept: dict | None = None):
        """``kept``: the heat paths' kept values of another line of the same product and heating
        (``Line.kept``), shared by segments whose heat path is the same: a line cut into pieces (the
        push-cold start's warm head and cold tail) need not work them out again."""
        self.segments = segments
        self.product = product
        self.tracing = tracing
        self.name = name   # the scenario section of its segments ("route" or "suction"), for messages
        self.heaters = [Heater(tracing, s.traced_fraction, s.ambient_temperature) for s in segments]
        self.length = sum(s.length for s in segments)
        self.kept = {} if kept is None else kept
        self.constants = [SegmentConstants(seg, heater, product, self.kept) for seg, heater in zip(segments, self.heaters)]
        # a new thermal entrance at the inlet and at every change of inside diameter
        self.entrances, entry_d = [], None
        for seg in segments:
            new = entry_d is None or abs(seg.inside_diameter - entry_d) > 1e-9 * entry_d
            self.entrances.append(new)
            if new:
                entry_d = seg.inside_diameter
        self.step_count: dict[float, int] = {}

    def steps_for(self, step: float) -> int:
        """The work budget's step count of this line at longest step ``step`` (kept per step)."""
        count = self.step_count.get(step)
        if count is None:
            count = self.step_count[step] = march_step_count([seg.length for seg in self.segments], step)
        return count


def march(line: Line, flow: float, inlet_temperature: float, inlet_pressure: float = 0.0,
          step: float = DEFAULT_STEP_M, record: bool = True) -> MarchResult:
    """March the product along ``line`` at volume flow ``flow`` [m3/s] (measured at the inlet
    temperature) from ``inlet_temperature`` [K] and gauge ``inlet_pressure`` [Pa]; ``step`` [m] is
    the longest step (the grid scale, see ``step_control``).

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC), 5 m^3/h in at 20 degC: laminar (Re = 30), so the pressure drop is
    Hagen-Poiseuille's 128 mu L Q / (pi D^4) = 7.460 bar [1] plus the developing entrance's
    K(inf) = 1.25 velocity heads, 0.0023 bar [3], and the viscous heating is that drop times the flow,
    1036.5 W [2] (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> from planner.line.model import line_from_scenario
    >>> result = march(line_from_scenario(scenario), 5.0 / 3600.0, 293.15)
    >>> round(result.summary.pressure_drop_pa / 1e5, 3), round(result.summary.viscous_heating_w, 1)
    (7.463, 1036.5)

    References
    ----------
    [1] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow).
    [2] Bird, R. B., Stewart, W. E., Lightfoot, E. N., Transport Phenomena, 2nd ed., Wiley, 2002,
        section 11.4 (viscous dissipation: the mechanical energy lost to friction is heat).
    [3] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978
        (incremental pressure drop of the hydrodynamic entrance) [mem].
    """
    if not flow > 0.0:
        raise ValueError(f"flow must be greater than 0 m3/s, got {flow!r}")
    if not step > 0.0:
        raise ValueError(f"step must be greater than 0 m, got {step!r}")
    product = line.product
    mass_flow = product.density(inlet_temperature) * flow
    count = line.steps_for(step)
    totals = Totals(inlet_temperature, inlet_pressure, march_step_limit(count))
    profiles = Profiles() if record else None
    start = WarmStart(inlet_temperature)
    control = StepControl(step)
    t, p, x = inlet_temperature, inlet_pressure, 0.0
    entry_x = 0.0
    handover = None
    entrances: dict[int, tuple[float, float]] = {}
    for s, new_entrance in zip(line.constants, line.entrances):
        if new_entrance:
            entry_x = x
            jacket = entrance_jacket(s.path, t)
            entrances[s.seg.index] = (x, jacket)
            totals.jacket_seen(jacket, x)
        start.enter(s.path)
        t, p, x, handover = _march_segment(s, mass_flow, start, control, totals, profiles, t, p, x, entry_x, handover)
        if totals.status != "ok" or totals.n >= totals.max_steps:
            break
    if totals.n >= totals.max_steps:
        _stopped(line, totals, count, step, x)
    summary = totals.summary(line, product, flow, mass_flow, inlet_temperature, inlet_pressure, t, p, x)
    if profiles is not None:
        return MarchResult(summary, profiles.nodes(inlet_temperature, inlet_pressure), profiles.steps(), entrances)
    return MarchResult(summary, {}, {}, entrances)


def _march_segment(s: SegmentConstants, mass_flow: float, start: WarmStart, control: StepControl, totals: Totals,
                   profiles: Profiles | None, t: float, p: float, x: float, entry_x: float,
                   handover: tuple | None) -> tuple[float, float, float, tuple]:
    """March over one segment from (t, p) at distance x; returns (t, p, x) at its end (or where the
    product sets, with ``totals.status`` saying so) and what the next segment may carry on with.

    ``handover``: the segment before's last two evaluations, used to predict this segment's first
    midpoint when the heat path is the same (``SegmentConstants.signature``)."""
    heater, t_amb, d = s.heater, s.t_ambient, s.diameter
    viscosity = s.viscosity
    no_flow = s.product.no_flow_temperature
    x_end = x + s.length
    dx = control.first(s.length)
    previous = older = None
    at_previous = at_older = 0.0
    if handover is not None and handover[0] == s.signature:
        _, previous, at_previous, older, at_older = handover
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
            half = evaluate(s, mass_flow, start, t, from_d, from_d + 0.5 * dx / d, x, False)
            fitted = control.fit(control.entrance(dx, half, x - entry_x, d, s.thermostat), t, half, viscosity)
            if fitted < 0.9 * dx:
                dx = fitted
                half = evaluate(s, mass_flow, start, t, from_d, from_d + 0.5 * dx / d, x, False)
            t_mid = step_across_states(heater, t, half, 0.5 * dx, t_amb, half.conductance, half.viscous_heating)
            older, at_older = half, x
        else:
            # predicted with the last step's own law (exponential approach to its equilibrium; a
            # linear extrapolation of T would overshoot where the thermal length is shorter than a
            # step), its conductance and viscous heating carried forward from the last two
            g, viscous = _extrapolated(previous, older, (x + 0.5 * dx - at_previous) / (at_previous - at_older))
            t_mid = step_across_states(heater, t, previous, 0.5 * dx, t_amb, g, viscous)
            older, at_older = previous, at_previous
        if not t_mid <= TEMPERATURE_CEILING_K:   # the midpoint's estimate is already past the models (or NaN)
            totals.past_ceiling("product", t_mid)
            break
        local = evaluate(s, mass_flow, start, t_mid, from_d, from_d + dx / d, x + 0.5 * dx, True)
        t_new = step_across_states(heater, t, local, dx, t_amb, local.conductance, local.viscous_heating)
        grad_total = local.grad_friction + local.grad_fittings + local.grad_static
        p -= grad_total * dx
        x += dx
        # an untraced step loses what its own exact step says (the entrance-averaged G, not the
        # midpoint's film): the summary's heat loss then closes the product's energy balance
        loss = local.heat_loss if heater is not None else \
            local.viscous_heating - local.heat_capacity_rate * (t_new - t) / dx
        sheath = totals.add(s, local, dx, x, p, t_new, loss)
        if profiles is not None:
            profiles.add(s, local, dx, x, t_new, p, grad_total, sheath, loss)
        previous, at_previous = local, x - 0.5 * dx
        dx = control.entrance(control.after(dx, t, t_new, local.viscosity, local.conductance, local.wall.heater_state),
                              local, x - entry_x, d, s.thermostat)
        t = t_new
        if t < no_flow:
            totals.status, totals.sets_at = "product_sets", x
            break
        if totals.n >= totals.max_steps:   # the step meter (also set to 0 past the temperature ceiling)
            break
    return t, p, x, (s.signature, previous, at_previous, older, at_older)


def _stopped(line: Line, totals: Totals, count: int, step: float, x: float) -> None:
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
    if kind in ("steam", "none"):
        # steam holds nothing above its saturation temperature (at most about 252 degC at the schema's 40 bar):
        # past the ceiling the heat is the flow's own friction
        change = ("the heat is viscous heating: lower the flow (operation.flow; in a plan the pump's speed, "
                  "displacement or curve) or the inlet temperature")
    else:
        change = ("lower tracing.output or tracing.circuits_per_metre, hold the pipe wall with a thermostat "
                  "(tracing.sensing = \"pipe_wall\" and a setpoint), or raise operation.flow")
    # a value far past the ceiling is no figure of the models (a runaway estimate): only that it passed is said
    reached = "reaches {t}, past" if value <= RUNAWAY_FACTOR * TEMPERATURE_CEILING_K else "runs away past"
    raise ComputationError(Sentence(
        "the {what} " + reached + " the {limit} the planner's models hold to, at {where} along the {line}: the "
        "heat put in is far more than the line can lose; {change}", what=what, t=Q(value, "temperature"), where=where,
        line=line.name, limit=Q(TEMPERATURE_CEILING_K, "temperature"), change=change))


def _segment_name(line: Line, x: float) -> str:
    end = 0.0
    for seg in line.segments:
        end += seg.length
        if x <= end + 1e-9:
            return seg.name
    return line.segments[-1].name


def _extrapolated(last: Coefficients, before: Coefficients, ahead: float) -> tuple[float, float]:
    """(G, S) of ``last`` carried ``ahead`` (in units of the distance between the two evaluations)
    along their log-linear trend, each by at most a factor 2 and only within one heater state: the
    predictor of the next midpoint then errs at second order, not first."""
    g, viscous = last.conductance, last.viscous_heating
    if last.wall.heater_state != before.wall.heater_state:
        return g, viscous   # G jumps where the heater changes state: no trend to follow
    if g > 0.0 and before.conductance > 0.0 and g != before.conductance:
        factor = (g / before.conductance) ** ahead
        g *= 2.0 if factor > 2.0 else (0.5 if factor < 0.5 else factor)
    if viscous > 0.0 and before.viscous_heating > 0.0 and viscous != before.viscous_heating:
        factor = (viscous / before.viscous_heating) ** ahead
        viscous *= 2.0 if factor > 2.0 else (0.5 if factor < 0.5 else factor)
    return g, viscous


def march_plugged(head: Line, tail: Line, mass_flow: float, t_warm: float, t_cold: float,
                  step: float = DEFAULT_STEP_M) -> MarchResult:
    """A line holding a cold plug: the warm ``head`` (product from the pump at ``t_warm`` [K]) then the
    cold ``tail`` (line contents at ``t_cold`` [K]), each marched at ``mass_flow`` [kg/s]; the summary
    is the tail's with the two lines' drops, powers and losses added (no profiles kept).

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s at every temperature, ID 52.48 mm [1]) cut at 40 m
    (``transfer.startup.split_segments``), 40 degC head and 10 degC tail, at 1.25 kg/s: the viscosity
    does not change with temperature, so the drop is the whole line's Hagen-Poiseuille 7.460 bar [2]
    plus the developing entrance of each part, 2 x 1.25 velocity heads = 2 x 0.0023 bar [3] (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.line.model import line_from_scenario
    >>> from planner.transfer.startup import split_segments
    >>> line = line_from_scenario(example_scenario("oil line"))
    >>> head, tail = (Line(part, line.product, line.tracing) for part in split_segments(line.segments, 40.0))
    >>> round(march_plugged(head, tail, 1.25, 313.15, 283.15).summary.pressure_drop_pa / 1e5, 3)
    7.465

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    [2] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow).
    [3] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978
        (incremental pressure drop of the hydrodynamic entrance, K(inf) = 1.25) [mem].
    """
    density = tail.product.density
    cold = march(tail, mass_flow / density(t_cold), t_cold, 0.0, step=step, record=False)
    if not head.segments:
        return cold
    warm = march(head, mass_flow / density(t_warm), t_warm, 0.0, step=step, record=False)
    h, t = warm.summary, cold.summary
    combined = dataclasses.replace(
        t, inlet_temperature_k=h.inlet_temperature_k, pressure_drop_pa=h.pressure_drop_pa + t.pressure_drop_pa,
        friction_drop_pa=h.friction_drop_pa + t.friction_drop_pa, fittings_drop_pa=h.fittings_drop_pa + t.fittings_drop_pa,
        static_drop_pa=h.static_drop_pa + t.static_drop_pa, outlet_pressure_pa=-(h.pressure_drop_pa + t.pressure_drop_pa),
        trace_power_w=h.trace_power_w + t.trace_power_w, heat_loss_w=h.heat_loss_w + t.heat_loss_w,
        status="ok" if h.status == "ok" and t.status == "ok" else "product_sets",
        sets_at_m=h.sets_at_m if h.status != "ok" else (None if t.sets_at_m is None else t.sets_at_m + head.length))
    return MarchResult(combined, {}, {})
