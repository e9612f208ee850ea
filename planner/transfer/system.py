"""The transfer system: suction route + pump + discharge route between two vessels, and the
operating point where pump and system agree.

Pressures are gauge. Along the suction route the product starts at the source's gas pressure plus
its liquid head above the route inlet; the march gives the pump suction pressure. The discharge
route must deliver against the destination's gas pressure plus, for a bottom entry, its liquid
level. Route elevation changes carry the static head between those points.

NPSH available = (p_suction + p_atm - p_vapour) / (rho g) + V^2 / (2 g) at the pump inlet (the usual
definition, ANSI/HI 9.6.1).

Outcomes are plain words, not exceptions: ``ok``, ``no_flow`` (static head, yield stress or relief
setting not overcome), ``relief_lifting`` (the relief valve passes part of the flow back),
``rate_not_reachable`` (a fixed-flow pump cannot reach its setpoint), ``beyond_curve`` (a centrifugal
pump would run past the end of its curve); flags ``motor_overloaded`` and ``suction_starved`` may be
added to any of them.
"""

from __future__ import annotations

import copy
import math

from planner.errors import ComputationError
from planner.line.march import DEFAULT_STEP_M, Line, march, march_plugged
from planner.line.products import Product, scenario_product
from planner.line.route import build_line
from planner.scenario.schema import Scenario, calibration_of
from planner.scenario.units import ATMOSPHERE_PA, GRAVITY
from planner.scenario.wording import Q, Sentence
from planner.transfer.flow_roots import GUESS_TOLERANCE, HUGE_PRESSURE, MIN_FLOW_FRACTION, bracket_down, flow_root
from planner.transfer.operating import OUTCOME_WORDS, OperatingPoint, SystemPoint, SystemState  # noqa: F401  (re-exported)
from planner.transfer.pumps import CentrifugalPump, PositiveDisplacementPump, build_pump
from planner.transfer.suction import check_suction
from planner.transfer.vessels import destination_level, level_from_volume


class TransferSystem:
    """Suction route, pump and discharge route between the source and the destination, for
    ``operating_point`` (where pump and system agree) and ``at_flow`` (the system at a given flow).

    Examples
    --------
    The oil transfer of ``scenario.examples`` (the oil line, ID 52.48 mm [1], traced at 100 W/m to
    45 degC; a PD pump without slip, 0.25 L/rev at 300 rpm: 4.5 m^3/h, from a 5 m tank holding 60 m^3 at
    40 degC into the top of a tank).
    The pump delivers its displacement x speed, 1.25e-3 m^3/s (4.5 m^3/h); the discharge route is laminar
    (Re = 27) so its drop is Hagen-Poiseuille's 128 mu L Q / (pi D^4) = 6.714 bar [2] plus the
    developing entrance's K(inf) = 1.25 velocity heads, 0.0019 bar [3]: 6.716 bar; the pump inlet has
    the tank's head, 900 g (60 / (pi 2.5^2)) = 26.97 kPa [2]; the shaft power is
    Q (6.716 - 0.270) bar / 0.85 (mechanical efficiency) = 948.0 W (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil transfer")
    >>> system = TransferSystem(scenario)
    >>> point = system.operating_point(SystemState(313.15, 60.0))
    >>> round(point.flow * 3600, 6), round(point.point.discharge_pressure / 1e5, 3), round(point.point.suction_pressure / 1e3, 2)
    (4.5, 6.716, 26.97)
    >>> round(point.shaft_power, 1)
    948.0

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    [2] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow) and
        chapter 2 (hydrostatics).
    [3] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978
        (incremental pressure drop of the hydrodynamic entrance) [mem].
    """

    def __init__(self, scenario: Scenario, tracing=None, product: Product | None = None, step: float = DEFAULT_STEP_M):
        missing = [name for name in ("pump", "source", "destination") if getattr(scenario, name) is None]
        if missing:
            from planner.errors import ScenarioError

            raise ScenarioError([(name, "a transfer plan needs this section") for name in missing])
        self.scenario = scenario
        self.tracing = tracing or scenario.tracing
        calibration = calibration_of(scenario)
        self.product = product or scenario_product(scenario)
        heat_loss_factor = calibration.heat_loss_factor
        self.heat_loss_factor = heat_loss_factor      # the lines' loss and the source shell's (calibration)
        self.discharge_line = Line(build_line(scenario.route, scenario.site, heat_loss_factor), self.product, self.tracing)
        self.suction_line = (Line(build_line(scenario.suction, scenario.site, heat_loss_factor), self.product,
                                  self.tracing, name="suction") if scenario.suction is not None else None)
        self.pump_spec = scenario.pump
        self.pump = build_pump(scenario.pump, calibration.slip_factor)
        self.source = scenario.source
        self.destination = scenario.destination
        self.step = step
        self.evaluations = 0
        self._slopes: dict[str, float] = {}
        self.plug = None  # (warm head Line, cold tail Line, cold temperature): set only on a with_plug copy
        self._last_relief_flow: float | None = None
        self._root_estimate: float | None = None
        self._source_level = (math.nan, math.nan)     # (source volume [m3], its level [m])

    def with_plug(self, head: Line | None, tail: Line | None, cold_temperature: float,
                  slopes_from: "TransferSystem | None" = None) -> "TransferSystem":
        """A copy of this system whose discharge line holds a cold plug: a warm head (product from the
        pump) then a cold tail at ``cold_temperature`` [K] (``head`` None: no plug, the line warm
        throughout).  This system is left unchanged.  ``slopes_from``: a system of the previous front
        position, whose remembered slopes start this one's solves."""
        plugged = copy.copy(self)
        plugged.plug = None if head is None else (head, tail, cold_temperature)
        plugged._slopes = dict((slopes_from or self)._slopes)
        return plugged

    def _warm_solve(self, kind: str, function, high: float, guess: float | None, ftol: float = 0.0,
                    cold: bool = False) -> float | None:
        """Secant iteration from a guess (the previous timeline step), using the slope remembered from
        the last solve of the same kind.  ``cold``: a start without a guess (``guess`` is then the top
        of the range), whose system may be another than the last solve's (cold contents): it starts
        with no slope and leaves its slope only where none is kept.  None when it does not settle
        inside (0, high]: the caller then brackets from scratch."""
        if self.plug is not None:
            kind += "/plug"  # the system with a cold plug in the line has a slope of its own
        if guess is None or not 0.0 < guess <= high:
            return None
        slopes = self._slopes

        def keep(value: float) -> None:   # a start's slope only starts the runs after it
            slopes[kind] = slopes.get(kind, value) if cold else value

        q0, f0 = guess, function(guess)
        slope = None if cold else slopes.get(kind)
        if slope and abs(f0 / slope) <= GUESS_TOLERANCE * q0:
            # the guess (extrapolated by the caller) already satisfies the tolerance; a Newton step
            # past it is a better estimate of the root for the caller's next extrapolation
            self._root_estimate = q0 - f0 / slope
            return q0
        q1 = q0 - f0 / slope if slope else q0 * 0.99
        for _ in range(8):
            if not high * MIN_FLOW_FRACTION < q1 <= high:
                return None
            f1 = function(q1)
            if abs(q1 - q0) <= 2e-5 * q1 or abs(f1) <= ftol:
                if f1 != f0:
                    keep((f1 - f0) / (q1 - q0))
                    self._root_estimate = q1 - f1 * (q1 - q0) / (f1 - f0)
                return q1
            if f1 == f0:
                return None
            slope = (f1 - f0) / (q1 - q0)
            if abs(f1 / slope) <= GUESS_TOLERANCE * q1:
                # the secant's next step would move less than the tolerance: q1 is the answer (the
                # same acceptance as for a guess), the step past it the caller's root estimate
                keep(slope)
                self._root_estimate = q1 - f1 / slope
                return q1
            q0, f0, q1 = q1, f1, q1 - f1 / slope
        return None

    # -- boundary pressures ---------------------------------------------------------------------
    def source_pressure(self, state: SystemState) -> float:
        rho = self.product.density(state.source_temperature)
        if self._source_level[0] != state.source_volume:     # kept for the volume asked last (one state's solves)
            self._source_level = (state.source_volume, level_from_volume(self.source, state.source_volume))
        level = self._source_level[1]
        return self.source.pressure + rho * GRAVITY * (level + self.source.outlet_height)

    def destination_pressure(self, state: SystemState, temperature: float) -> float:
        dest = self.destination
        p = dest.pressure
        if dest.inlet == "bottom":
            level = destination_level(dest, state.destination_volume_added)
            p += self.product.density(temperature) * GRAVITY * level
        return p

    # -- the system at one flow -----------------------------------------------------------------
    def at_flow(self, flow: float, state: SystemState, record: bool = False) -> SystemPoint:
        self.evaluations += 1
        product = self.product
        t_source = state.source_temperature
        rho_source = product.density(t_source)
        mass_flow = rho_source * flow
        p_source = self.source_pressure(state)
        suction_summary = None
        sets, where = False, ""
        if self.suction_line is not None:
            suction = march(self.suction_line, flow, t_source, p_source, step=self.step, record=record)
            suction_summary = suction.summary
            p_suction = suction_summary.outlet_pressure_pa
            t_pump = suction_summary.outlet_temperature_k
            seg = self.suction_line.segments[-1]
            velocity = mass_flow / (product.density(t_pump) * seg.area)
            if suction_summary.status != "ok":
                sets, where = True, Sentence("suction line at {x}", x=Q(suction_summary.sets_at_m, "length"))
        else:
            p_suction, t_pump = p_source, t_source
            velocity = 0.0
        rho_pump = product.density(t_pump)
        npsh_a = ((p_suction + ATMOSPHERE_PA - product.vapour_pressure(t_pump)) / (rho_pump * GRAVITY)
                  + velocity * velocity / (2.0 * GRAVITY))
        if self.plug is not None:
            head_line, tail_line, t_cold = self.plug
            discharge = march_plugged(head_line, tail_line, mass_flow, t_pump, t_cold, self.step)
        else:
            discharge = march(self.discharge_line, mass_flow / product.density(t_pump), t_pump, 0.0,
                              step=self.step, record=record)
        ds = discharge.summary
        if ds.status != "ok" and not sets:
            sets, where = True, Sentence("discharge line at {x}", x=Q(ds.sets_at_m, "length"))
        p_discharge = ds.pressure_drop_pa + self.destination_pressure(state, ds.outlet_temperature_k)
        point = SystemPoint(flow, mass_flow, t_source, t_pump, p_suction, p_discharge, p_discharge - p_suction,
                            npsh_a, ds.outlet_temperature_k, suction_summary, ds, sets, where)
        point.discharge_result = discharge if record else None
        point.suction_result = suction if record and self.suction_line is not None else None
        return point

    def _differential(self, flow: float, state: SystemState, cache: dict) -> float:
        key = round(flow, 12)
        if key not in cache:
            try:
                cache[key] = self.at_flow(flow, state)
            except ComputationError as exc:   # a trial flow whose viscous heating runs past the temperature
                cache[key] = exc              # ceiling cannot be pushed; raised if it is the answer (``_point``)
        point = cache[key]
        return HUGE_PRESSURE if isinstance(point, ComputationError) or point.sets else point.pump_differential

    def _trial(self, flow: float, cache: dict) -> SystemPoint | None:
        """The point of a flow tried (None: past the temperature ceiling, or not tried)."""
        point = cache.get(round(flow, 12))
        return None if isinstance(point, ComputationError) else point

    # -- the operating point --------------------------------------------------------------------
    def operating_point(self, state: SystemState, guess: float | None = None) -> OperatingPoint:
        cache: dict = {}
        spec = self.pump_spec
        self._root_estimate = None
        if spec.kind == "positive_displacement":
            op = self._pd_point(state, guess, cache)
        else:
            op = self._centrifugal_point(state, guess, cache)
        estimate = self._root_estimate
        op.flow_estimate = estimate if estimate is not None and abs(estimate - op.flow) <= 1e-4 * op.flow else op.flow
        if op.point is not None and op.moving and op.point.sets:
            # e.g. a PD pump without slip "agrees" at any pressure: the line still sets at its rate
            return OperatingPoint("no_flow", 0.0, Sentence("no flow possible: product sets ({where}) at {q}",
                                                           where=op.point.where, q=Q(op.flow, "volume_flow")), op.point)
        if op.point is not None and op.moving:
            check_suction(self, op, state)
            motor = spec.motor_power   # beyond ANSI/HI 9.6.7 the shaft power is no figure (PUMP-HI-RANGE stands)
            if motor is not None and op.hi_in_range and op.shaft_power > motor:
                op.flags.append("motor_overloaded")
        return op

    def _viscosity_at_pump(self, point: SystemPoint | None, state: SystemState) -> float:
        t = point.pump_inlet_temperature if point is not None else state.source_temperature
        return self.product.viscosity(t)

    def _point(self, flow: float, state: SystemState, cache: dict) -> SystemPoint:
        self._differential(flow, state, cache)
        point = cache[round(flow, 12)]
        if isinstance(point, ComputationError):
            raise point
        return point

    def _pd_point(self, state: SystemState, guess: float | None, cache: dict) -> OperatingPoint:
        pump: PositiveDisplacementPump = self.pump
        spec = self.pump_spec
        relief = spec.relief_setting
        mu = self.product.viscosity(state.source_temperature)
        speed = spec.speed
        if spec.control == "fixed_flow":
            target = spec.flow_setpoint
            dp = self._differential(target, state, cache)
            point = self._point(target, state, cache)
            mu = self._viscosity_at_pump(point, state)
            if dp < HUGE_PRESSURE and (relief is None or dp <= relief):
                needed = (target + pump.slip(dp, mu, speed=1e9)) / pump.displacement_m3_per_rev
                limit = spec.max_speed or spec.speed
                if needed <= limit * (1 + 1e-9):
                    op = OperatingPoint("ok", target, f"flow held at its setpoint at {needed * 60:.0f} rpm", point,
                                        speed=needed)
                    op.shaft_power = pump.shaft_power(dp, mu, speed=needed)
                    return op
                speed = limit
                fallback = f"setpoint needs {needed * 60:.0f} rpm, more than the {limit * 60:.0f} rpm limit"
            else:
                speed = spec.max_speed or spec.speed
                fallback = "setpoint flow needs more pressure than the relief setting" if dp < HUGE_PRESSURE else \
                    Sentence("product sets at the setpoint flow ({where})", where=point.where)
            op = self._pd_fixed_speed(state, guess, cache, speed)
            if op.status == "ok":
                op.status = "rate_not_reachable"
            op.message = Sentence("{a}; {b}", a=fallback, b=op.message)
            return op
        return self._pd_fixed_speed(state, guess, cache, speed)

    def _pd_fixed_speed(self, state: SystemState, guess: float | None, cache: dict, speed: float) -> OperatingPoint:
        pump: PositiveDisplacementPump = self.pump
        relief = self.pump_spec.relief_setting
        q_theoretical = pump.theoretical_flow(speed)

        def residual(q):
            dp = self._differential(q, state, cache)
            mu = self._viscosity_at_pump(self._trial(q, cache), state)
            return q - pump.delivered_flow(min(dp, HUGE_PRESSURE), mu, speed)

        def over_relief(x):
            return self._differential(x, state, cache) - relief

        if relief is not None and guess is not None and self._last_relief_flow is not None:
            q_relief = self._warm_solve("relief", over_relief, q_theoretical, guess, ftol=20.0)
            if q_relief is not None:
                point = self._point(q_relief, state, cache)
                mu = self._viscosity_at_pump(point, state)
                delivered = pump.delivered_flow(relief, mu, speed)
                if delivered > q_relief:
                    self._last_relief_flow = q_relief
                    return self._relief_point(q_relief, point, delivered, relief, mu, speed)
        self._last_relief_flow = None
        # no guess (a start): the secant from the displacement, where a PD pump's line meets it
        # nearly (slip is a small share); bracketing only where that does not settle
        q = self._warm_solve("pd", residual, q_theoretical, q_theoretical if guess is None else guess,
                             ftol=1e-7 * q_theoretical, cold=guess is None)
        bracket = None if q is not None else bracket_down(residual, q_theoretical, guess)
        if q is None and bracket is None:
            q_low = q_theoretical * MIN_FLOW_FRACTION
            point = self._point(q_low, state, cache)
            reason = (Sentence("product sets ({where})", where=point.where) if point.sets else
                      "slip returns the whole displacement at the pressure the system needs")
            return self._no_flow(state, cache, q_low, Sentence("pump cannot move product: {r}", r=reason))
        if q is None:
            q = flow_root(residual, bracket[0], bracket[1])
        point = self._point(q, state, cache)
        mu = self._viscosity_at_pump(point, state)
        dp = point.pump_differential
        if relief is not None and dp > relief:
            q_relief = self._warm_solve("relief", over_relief, q, q if guess is None else guess, ftol=20.0,
                                        cold=guess is None)
            if q_relief is None:
                low = bracket_down(over_relief, q, None)
                if low is None:
                    return self._no_flow(state, cache, q * MIN_FLOW_FRACTION,
                                         Sentence("the line needs more than the relief setting {p} at any rate",
                                                  p=Q(relief, "pressure")))
                q_relief = flow_root(over_relief, low[0], low[1])
            self._last_relief_flow = q_relief
            point = self._point(q_relief, state, cache)
            return self._relief_point(q_relief, point, pump.delivered_flow(relief, mu, speed), relief, mu, speed)
        op = OperatingPoint("ok", q, Sentence("pump and line agree at {q} and {p}", q=Q(q, "volume_flow"),
                                              p=Q(dp, "pressure")), point, speed=speed)
        op.shaft_power = pump.shaft_power(dp, mu, speed)
        return op

    def _relief_point(self, q_relief, point, delivered, relief, mu, speed) -> OperatingPoint:
        op = OperatingPoint(
            "relief_lifting", q_relief,
            Sentence("relief valve lifting at {p}: the line takes {q} of the {delivered} the pump moves",
                     p=Q(relief, "pressure"), q=Q(q_relief, "volume_flow"), delivered=Q(delivered, "volume_flow")),
            point, speed=speed)
        op.relief_flow = max(0.0, delivered - q_relief)
        op.shaft_power = self.pump.shaft_power(relief, mu, speed)
        return op

    def _centrifugal_point(self, state: SystemState, guess: float | None, cache: dict) -> OperatingPoint:
        pump: CentrifugalPump = self.pump
        spec = self.pump_spec
        rho = self.product.density(state.source_temperature)
        nu = self.product.kinematic_viscosity(state.source_temperature)
        q_max = pump.max_flow(nu)

        def head_gap(q):
            dp = self._differential(q, state, cache)
            point = self._trial(q, cache)
            nu_pump = self.product.kinematic_viscosity(point.pump_inlet_temperature if point else state.source_temperature)
            return pump.head(q, nu_pump) - dp / (rho * GRAVITY)

        status = "ok"
        warm = None
        if spec.control == "fixed_speed":
            cold = guess is None and head_gap(q_max) <= 0.0   # a start: the secant down from the curve's end
            warm = self._warm_solve("centrifugal", lambda x: -head_gap(x), q_max, q_max if cold else guess,
                                    ftol=1e-4, cold=cold)
        if warm is not None:
            q = warm
            message = Sentence("pump and line agree at {q}", q=Q(q, "volume_flow"))
        elif spec.control == "fixed_flow" and spec.flow_setpoint <= q_max and head_gap(spec.flow_setpoint) >= 0.0:
            q = spec.flow_setpoint
            message = "flow held at its setpoint; the control valve takes the excess head"
        else:
            if head_gap(q_max) > 0.0:
                q, status = q_max, "beyond_curve"
                message = "the system needs less head than the pump makes at the end of its curve"
            else:
                q = None
                bracket = bracket_down(lambda x: -head_gap(x), q_max, guess)
                if bracket is None:
                    q_low = q_max * MIN_FLOW_FRACTION
                    point = self._point(q_low, state, cache)
                    reason = (Sentence("product sets ({where})", where=point.where) if point.sets else
                              Sentence("pump cannot overcome the static head at any rate: the system needs {need}, "
                                       "shut-off head is {shut}", need=Q(point.pump_differential / (rho * GRAVITY), "head", 1),
                                       shut=Q(pump.shut_off_head(nu), "head", 1)))
                    return self._no_flow(state, cache, q_low, reason)
                if q is None:
                    q = flow_root(head_gap, bracket[0], bracket[1])
                message = Sentence("pump and line agree at {q}", q=Q(q, "volume_flow"))
            if spec.control == "fixed_flow":
                status = "rate_not_reachable" if status == "ok" else status
                message = Sentence("setpoint {q} not reachable; {m}", q=Q(spec.flow_setpoint, "volume_flow"), m=message)
        point = self._point(q, state, cache)
        nu_pump = self.product.kinematic_viscosity(point.pump_inlet_temperature)
        head = pump.head(q, nu_pump)
        op = OperatingPoint(status, q, message, point, speed=spec.speed, pump_head=head)
        curve = pump.viscous_curve(nu_pump)
        op.hi_b, op.hi_in_range = curve.correction.b, curve.correction.in_range
        if op.hi_in_range or q == 0.0 or curve.efficiency_at(q) > 0.0:
            op.shaft_power = pump.shaft_power(q, head, rho, nu_pump)
        else:
            # far beyond ANSI/HI 9.6.7 its extrapolated efficiency falls to 0: no power can be given
            # (the stop PUMP-HI-RANGE says so, and the figures it would make are withheld)
            op.shaft_power = math.inf
        return op

    def _no_flow(self, state, cache, q_low, message) -> OperatingPoint:
        point = self._trial(q_low, cache)
        return OperatingPoint("no_flow", 0.0, Sentence("no flow possible: {m}", m=message), point)
