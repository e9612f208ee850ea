"""The transfer timeline: move the volume in equal increments, recomputing the operating point.

Each increment dV takes dt = dV (1/Q_a + 1/Q_b) / 2 with Q_a and Q_b the operating points at its start
and its end (the trapezoidal rule in volume: exact for a flow linear in 1/Q, second order otherwise);
tracing and pump energies likewise from power / Q.
Meanwhile the source cools or is heated (lumped vessel balance, ``vessels.heat_contents``) and its level falls,
the destination level rises, and tracing, pump and vessel heating draw power.

Examples
--------
The oil transfer of ``scenario.examples`` (the oil line, ID 52.48 mm [1], traced at 100 W/m to
45 degC; a PD pump without slip, 0.25 L/rev at 300 rpm: 4.5 m^3/h, from a 5 m tank holding 60 m^3 at
40 degC into the top of a tank).
At a constant 4.5 m^3/h the 45 m^3 take 10 h; the pump differential is the line's 6.714 bar [2] less
the tank's head, which falls from 3.056 m to 0.764 m (mean 16.86 kPa), so the motor draws
1.25e-3 x 6.546e5 / (0.85 x 0.92) = 1046 W for 10 h: 37.7 MJ (by hand; ``run_transfer``'s example).

References
----------
[1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
[2] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow) and
    chapter 2 (hydrostatics).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from planner.transfer.system import SystemState, TransferSystem
from planner.transfer.weather import evaluations_of, weathered
from planner.transfer.vessels import destination_level, heat_contents, level_from_volume, source_heating, wetted_area


@dataclass
class Timeline:
    arrays: dict                 # per increment start: time_s, flow_m3_s, ...
    total_time_s: float
    moved_m3: float
    completed: bool
    stop_reason: str
    statuses: list[str]
    flags: set[str] = field(default_factory=set)
    trace_energy_j: float = 0.0
    pump_energy_j: float = 0.0          # electrical, at the motor terminals
    vessel_heating_energy_j: float = 0.0
    operating_points: list = field(default_factory=list, repr=False)
    evaluations: int = 0


ROW_KEYS = ("time_s", "moved_m3", "flow_m3_s", "source_temperature_k", "pump_inlet_temperature_k",
            "outlet_temperature_k", "suction_pressure_pa", "discharge_pressure_pa", "pump_differential_pa",
            "shaft_power_w", "npsh_available_m", "trace_power_w", "source_level_m", "destination_level_m",
            "max_line_pressure_pa", "ambient_temperature_k", "wind_speed_m_s")


def _record(rows, system, op, point, state, flow, trace_power, time, moved, ambient, wind) -> None:
    """One row of the timeline: the increment's start."""
    source = system.source
    values = (time, moved, flow, state.source_temperature, point.pump_inlet_temperature, point.outlet_temperature,
              point.suction_pressure, point.discharge_pressure, point.pump_differential, op.shaft_power,
              point.npsh_available, trace_power, level_from_volume(source, state.source_volume),
              destination_level(system.destination, state.destination_volume_added), point.discharge_pressure,
              ambient, wind)
    for key, value in zip(ROW_KEYS, values):
        rows[key].append(value)


def run_transfer(system: TransferSystem, steps: int | None = None, first_guess: float | None = None,
                 weather=None, clock_s: float = 0.0) -> Timeline:
    """``weather`` (``transfer.weather.WeatherProfile``): each operating point, tracing power and the
    source's cooling at the ambient and wind of its time, ``clock_s`` + the time so far from the plan's
    start; None: the site's ambient throughout.

    Examples
    --------
    The oil transfer: 45 m^3 in 10 h, 37.7 MJ to the pump's motor (the module docstring, by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> timeline = run_transfer(TransferSystem(example_scenario("oil transfer")))
    >>> round(timeline.total_time_s / 3600, 3), round(timeline.moved_m3, 6), round(timeline.pump_energy_j / 1e6, 1)
    (10.0, 45.0, 37.7)
    """
    scenario = system.scenario
    source = scenario.source
    steps = steps or scenario.schedule.timeline_steps
    run = _Run(system, scenario, source.volume_to_move / steps, weather, clock_s)
    state = SystemState(source.temperature, source.initial_volume, 0.0)
    here = run.point_at(state, 0.0, first_guess)
    if here is None:
        run.completed, run.reason = False, run.points[-1].message
    for number in range(steps):
        if here is None:
            break
        run.record(here)
        guess = _next_guess(run.points)
        # the source over the increment, with its time predicted from the flow extrapolated to its end
        predicted_dt = run.increment / 2.0 * (1.0 / here.flow + 1.0 / guess)
        t_source, heat_j = run.contents_after(here, predicted_dt)
        end_state = SystemState(t_source, max(here.state.source_volume - run.increment, 0.0),
                                here.state.destination_volume_added + run.increment)
        end = run.point_at(end_state, run.time + predicted_dt, guess)
        last = number == steps - 1
        if end is None:   # the end cannot be moved: the increment at its start's rates (as far as known)
            run.completed, run.reason = (True, "") if last else (False, run.points[-1].message)
            t_source, heat_j = run.contents_after(here, run.increment / here.flow)
            run.advance(here, here, heat_j)
            break
        run.advance(here, end, heat_j)
        if last:
            run.record(end)
        here = end
    arrays = {k: np.array(v) for k, v in run.rows.items()}
    return Timeline(arrays, run.time, run.moved, run.completed, run.reason, run.statuses, run.flags, run.trace_j,
                    run.pump_j, run.vessel_j, run.points, evaluations_of(system) - run.evaluations_before)


@dataclass
class _Point:
    """An operating point of the timeline with what it was worked out at."""

    op: object
    point: object
    flow: float
    state: SystemState
    trace_power: float
    ambient: float
    wind: float
    time: float


class _Run:
    """The timeline's running sums.  Each increment dV is taken by the trapezoidal rule between the
    operating points at its start and its end: dt = dV (1/Q_a + 1/Q_b) / 2, and each energy likewise
    from power / Q (second order: a left sum, dV / Q_a, erred by 2.8 % on the syrup demo's tracing
    energy at 60 increments, its power falling steadily as the railcar's heating warms the product)."""

    def __init__(self, system, scenario, increment, weather, clock_s):
        self.base = self.system = system
        self.scenario, self.increment, self.weather, self.clock_s = scenario, increment, weather, clock_s
        self.motor_efficiency = scenario.pump.motor_efficiency
        self.heating = source_heating(scenario)
        self.shell_u = scenario.source.heat_loss_coefficient * system.heat_loss_factor
        self.rows = {k: [] for k in ROW_KEYS}
        self.statuses: list[str] = []
        self.flags: set[str] = set()
        self.points: list = []
        self.time = self.moved = self.trace_j = self.pump_j = self.vessel_j = 0.0
        self.completed, self.reason = True, ""
        self.evaluations_before = evaluations_of(system)

    def point_at(self, state: SystemState, time: float, guess: float | None) -> _Point | None:
        """The operating point at ``state``, ``time`` [s] into the transfer; None where nothing moves."""
        ambient, wind = self.scenario.site.ambient_temperature, self.scenario.site.wind_speed
        if self.weather is not None:
            ambient, wind = self.weather.state(self.clock_s + time)
            self.system = weathered(self.base, ambient, wind)
        op = self.system.operating_point(state, guess=guess)
        self.points.append(op)
        if not op.moving:
            return None
        flow, point = op.flow, op.point
        if "suction_starved" in op.flags and op.npsh_limited_flow:
            # the operator throttles to the rate the suction can feed
            flow = op.npsh_limited_flow
            point = self.system.at_flow(flow, state)
        self.flags.update(op.flags)
        trace_power = point.discharge.trace_power_w + (point.suction.trace_power_w if point.suction else 0.0)
        return _Point(op, point, flow, state, trace_power, ambient, wind, time)

    def contents_after(self, here: _Point, dt: float) -> tuple[float, float]:
        """The source's temperature after ``dt`` [s] from ``here`` (cooled, or heated no hotter than its
        medium), and the heat its heating delivered [J]; the contents and their wetted shell taken at the
        increment's mid volume, as they shrink over it (second order, as the time)."""
        product, state = self.system.product, here.state
        volume = max(state.source_volume - self.increment / 2.0, 0.5 * state.source_volume)
        mass = product.density(state.source_temperature) * volume
        ua = self.shell_u * wetted_area(self.scenario.source, volume)
        return heat_contents(state.source_temperature, mass, product.specific_heat(state.source_temperature), ua,
                             here.ambient, self.heating, dt)

    def record(self, p: _Point) -> None:
        _record(self.rows, self.system, p.op, p.point, p.state, p.flow, p.trace_power, p.time, self.moved,
                p.ambient, p.wind)
        self.statuses.append(p.op.status)

    def advance(self, a: _Point, b: _Point, heat_j: float) -> None:
        """One increment from ``a`` to ``b`` (the same point: the left rule)."""
        half = self.increment / 2.0
        self.time += half * (1.0 / a.flow + 1.0 / b.flow)
        self.trace_j += half * (a.trace_power / a.flow + b.trace_power / b.flow)
        self.pump_j += half * (a.op.shaft_power / a.flow + b.op.shaft_power / b.flow) / self.motor_efficiency
        self.vessel_j += heat_j
        self.moved += self.increment
        if b is not a:
            b.time = self.time   # its row's time: the corrected one (it was worked out at the predicted)


def _next_guess(points) -> float:
    """The next increment's flow extrapolated from the last increments of the same outcome (equal volume
    increments): quadratic from three, linear from two, else the last flow; from the solver's root
    estimates so that the tolerance left in one step is not doubled into the next."""
    op = points[-1]
    same = [op]
    for earlier in reversed(points[-3:-1]):
        if earlier.status != op.status:
            break
        same.append(earlier)
    flows = [p.flow_estimate or p.flow for p in same]
    if len(flows) == 3:
        return max(3.0 * flows[0] - 3.0 * flows[1] + flows[2], 0.5 * op.flow)
    if len(flows) == 2:
        return max(2.0 * flows[0] - flows[1], 0.5 * op.flow)
    return flows[0]
