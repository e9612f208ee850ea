"""The transfer timeline: move the volume in equal increments, recomputing the operating point.

Each increment dV takes dt = dV / Q with Q the operating point at the increment's start (left
Riemann sum; exact for a constant flow, first order otherwise, so at least 50 increments are used).
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
    """``weather`` (``transfer.weather.WeatherProfile``): each increment's operating point, tracing power and
    source cooling at the ambient and wind of its start, ``clock_s`` + the time so far from the plan's
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
    product = system.product
    steps = steps or scenario.schedule.timeline_steps
    increment = source.volume_to_move / steps
    state = SystemState(source.temperature, source.initial_volume, 0.0)
    ambient = scenario.site.ambient_temperature
    motor_efficiency = scenario.pump.motor_efficiency
    heating = source_heating(scenario)
    shell_u = source.heat_loss_coefficient * system.heat_loss_factor
    rows = {k: [] for k in ROW_KEYS}
    statuses: list[str] = []
    flags: set[str] = set()
    time = 0.0
    moved = 0.0
    trace_j = pump_j = vessel_j = 0.0
    guess = first_guess
    completed, reason = True, ""
    points = []
    evaluations_before = evaluations_of(system)
    wind = scenario.site.wind_speed
    base = system
    for _ in range(steps):
        if weather is not None:
            ambient, wind = weather.state(clock_s + time)
            system = weathered(base, ambient, wind)
        op = system.operating_point(state, guess=guess)
        points.append(op)
        if not op.moving:
            completed, reason = False, op.message
            break
        flow = op.flow
        point = op.point
        if "suction_starved" in op.flags and op.npsh_limited_flow:
            # the operator throttles to the rate the suction can feed
            flow = op.npsh_limited_flow
            point = system.at_flow(flow, state)
        flags.update(op.flags)
        trace_power = point.discharge.trace_power_w + (point.suction.trace_power_w if point.suction else 0.0)
        dt = increment / flow
        _record(rows, system, op, point, state, flow, trace_power, time, moved, ambient, wind)
        statuses.append(op.status)
        trace_j += trace_power * dt
        pump_j += op.shaft_power / motor_efficiency * dt
        # the source cools (or is heated, no hotter than its medium) over the increment, then gives up dV
        mass = product.density(state.source_temperature) * state.source_volume
        ua = shell_u * wetted_area(source, state.source_volume)
        t_source, heat_j = heat_contents(state.source_temperature, mass, product.specific_heat(state.source_temperature),
                                         ua, ambient, heating, dt)
        vessel_j += heat_j
        state = SystemState(t_source, max(state.source_volume - increment, 0.0),
                            state.destination_volume_added + increment)
        time += dt
        moved += increment
        # next guess: the flow extrapolated from the last two steps (the flow drifts smoothly), from
        # the solver's root estimates so that the tolerance left in one step is not doubled into the next
        guess = _next_guess(points)
    arrays = {k: np.array(v) for k, v in rows.items()}
    return Timeline(arrays, time, moved, completed, reason, statuses, flags, trace_j, pump_j, vessel_j, points,
                    evaluations_of(base) - evaluations_before)


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
