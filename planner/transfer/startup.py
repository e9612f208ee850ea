"""Starting a transfer with cold product standing in the line: pre-warm it, or push it out.

Pre-warm: each traced segment's stagnant metre (product + metal) is brought from the line's start
temperature to the target by its tracing (``transients.evolve``); the line is ready when the slowest
traced segment is. Untraced segments stay cold and are listed.

Push cold: the pump starts against the line full of cold product. At the start the whole route
(suction and discharge) is cold; then a warm front advances with the flow (plug flow) through the
discharge line, the pressure falling as cold product leaves. The front is stepped through the line's
volume; at each position the discharge line is marched as a warm head and a cold tail.

Examples
--------
The oil transfer of ``scenario.examples`` (the oil line, ID 52.48 mm [1], traced at 100 W/m to
45 degC; a PD pump without slip, 0.25 L/rev at 300 rpm: 4.5 m^3/h, from a 5 m tank holding 60 m^3 at
40 degC into the top of a tank).
Pre-warm from 10 degC to the setpoint less the 1 K margin (44 degC): a lumped metre [3] with
C = 6558 J/(m K) (``transients.heat_capacity_per_metre``), the heater's 100 W/m and the loss of the
reference recipe (U = 0.2262 W/(m K), see ``heat_path.jacket_temperature``) takes
(C/U) ln((100 + 10 U) / (100 - 24 U)) = 2267 s, 37.8 min (by hand); pushing the cold contents
out, the warm front reaches the destination after a line volume, 0.2163 m^3 / 1.25e-3 m^3/s = 173 s
(the examples of ``prewarm`` and ``push_cold`` check both).

References
----------
[1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
[2] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow).
[3] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 5.1
    (the lumped capacitance method).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field

from planner.line.march import TEMPERATURE_CEILING_K, Line, MarchResult, march
from planner.line.route import LineSegment
from planner.transfer.pumps import HI_B_MAX
from planner.transfer.system import SystemState, TransferSystem
from planner.line.tracing import Heater
from planner.line.transients import evolve, gap_warmup
from planner.scenario.wording import Q, Sentence

PREWARM_HORIZON_S = 7 * 86400.0
PREWARM_MARGIN_K = 1.0  # "ready" within this of the target (the approach is asymptotic)


@dataclass
class PrewarmSegment:
    line: str
    segment: str
    traced: bool
    reached: bool
    time_s: float | None
    settles_at_k: float
    energy_j: float
    gap_m: float = 0.0                      # an untraced gap inside the segment (its own entry)


@dataclass
class Prewarm:
    target_k: float
    start_temperature_k: float
    possible: bool
    time_s: float | None
    energy_j: float
    segments: list[PrewarmSegment] = field(default_factory=list)
    untraced: list[str] = field(default_factory=list)
    message: str = ""
    stuck: list[str] = field(default_factory=list)      # parts whose contents stay set after the pre-warm
    stuck_message: str = ""
    too_hot: list[str] = field(default_factory=list)    # parts the heater would take past TEMPERATURE_CEILING_K


def prewarm_target(system: TransferSystem) -> float | None:
    """The temperature [K] a pre-warm aims at: the setpoint less the margin; for steam without one, the
    source's temperature (at most 5 K under the steam's) less the margin; None untraced.

    Examples
    --------
    The oil transfer of ``scenario.examples`` (setpoint 45 degC): 45 - 1 = 44 degC:

    >>> from planner.scenario.examples import example_scenario
    >>> round(prewarm_target(TransferSystem(example_scenario("oil transfer"))) - 273.15, 2)
    44.0
    """
    tracing = system.tracing
    if tracing.kind == "none":
        return None
    if tracing.setpoint is not None:
        return tracing.setpoint - PREWARM_MARGIN_K
    heater = system.discharge_line.heaters[0]
    steam = heater.steam_temperature or math.inf
    return min(system.source.temperature, steam - 5.0) - PREWARM_MARGIN_K


def _untraced_entry(result: Prewarm, name: str, seg, start: float, no_flow: float) -> None:
    """A segment without tracing: its contents stay at the start temperature."""
    result.untraced.append(f"{name}: {seg.name}")
    result.segments.append(PrewarmSegment(name, seg.name, False, False, None, start, 0.0))
    if start <= no_flow:
        result.stuck.append(f"{name}: {seg.name}")


def _traced_entry(result: Prewarm, name: str, seg, heater: Heater, product, start: float, target: float) -> float | None:
    """The traced length of a segment at the heater's full output; returns when it is ready (None: never)."""
    traced_m = seg.length - (seg.spec.untraced_length if seg.traced else 0.0)
    if start >= target:
        result.segments.append(PrewarmSegment(name, seg.name, True, True, 0.0, start, 0.0))
        return 0.0
    r = evolve(seg, heater, product, start, PREWARM_HORIZON_S, True, target=target, rising=True)
    result.segments.append(PrewarmSegment(name, seg.name, True, r.reached, r.time_s,
                                          _settles(result, f"{name}: {seg.name}", heater, r.settles_at_k),
                                          r.energy_j_per_m * traced_m))
    result.energy_j += r.energy_j_per_m * traced_m
    if not r.reached:
        result.possible = False
        return None
    return r.time_s


def _settles(result: Prewarm, part: str, heater: Heater, heading_k: float) -> float:
    """Where a traced metre settles: a thermostat holds it at the setpoint, however far above that the
    heater's full output would take it (``heading_k``: the transient's full-output equilibrium, never
    reached under a thermostat).  Without one the metre goes on towards ``heading_k``; past
    TEMPERATURE_CEILING_K that is beyond the models (air, insulation, product data) and the part is
    listed in ``too_hot`` (NaN: no figure)."""
    if heater.setpoint is not None:
        return min(heading_k, heater.setpoint)
    if heading_k > TEMPERATURE_CEILING_K:
        result.too_hot.append(part)
        return math.nan
    return heading_k


def _gap_entry(result: Prewarm, name: str, seg, product, start: float, ends: float, ready_s: float) -> None:
    """An untraced gap inside a traced segment, warmed from its ends once they are ready: it must rise
    above the no-flow temperature (by the margin) for the contents to move."""
    gap = seg.spec.untraced_length
    target = product.no_flow_temperature + PREWARM_MARGIN_K
    g = gap_warmup(seg, product, gap, start, ends, target)
    label = f"{seg.name}, untraced gap"
    # a gap that starts movable but cools below the no-flow temperature before the line is ready sets
    reached = g.time_s is not None and not (g.falls_below_s is not None and g.falls_below_s < ready_s)
    time = ready_s + g.time_s if reached else None
    result.segments.append(PrewarmSegment(name, label, False, reached, time, g.settles_at_k, 0.0, gap))
    if not reached:
        result.stuck.append(f"{name}: {label}")
    elif time is not None:
        result.time_s = max(result.time_s, time)


def prewarm(system: TransferSystem, start_temperature: float) -> Prewarm:
    """Pre-warm from ``start_temperature`` [K]: each traced segment's metre brought to the target.

    Examples
    --------
    The oil transfer from 10 degC: 37.8 min by hand (the lumped metre of the module docstring [3]):

    >>> from planner.scenario.examples import example_scenario
    >>> round(prewarm(TransferSystem(example_scenario("oil transfer")), 283.15).time_s / 60, 1)
    37.8
    """
    target = prewarm_target(system)
    if target is None:
        if start_temperature >= system.source.temperature - PREWARM_MARGIN_K:
            return Prewarm(start_temperature, start_temperature, True, 0.0, 0.0,
                           message="the line is already at the product's temperature: no pre-warm needed")
        return Prewarm(start_temperature, start_temperature, False, None, 0.0,
                       message="the line has no tracing: it cannot be pre-warmed")
    result = Prewarm(target, start_temperature, True, 0.0, 0.0)
    no_flow = system.product.no_flow_temperature
    for name, line in (("suction", system.suction_line), ("discharge", system.discharge_line)):
        if line is None:
            continue
        for seg, heater in zip(line.segments, line.heaters):
            if not heater.active:
                _untraced_entry(result, name, seg, start_temperature, no_flow)
                continue
            full = Heater(system.tracing, 1.0, seg.ambient_temperature)   # the traced length at full output
            ready = _traced_entry(result, name, seg, full, line.product, start_temperature, target)
            if ready is not None:
                result.time_s = max(result.time_s, ready)
                if seg.spec.untraced_length > 0.0 and seg.traced:
                    _gap_entry(result, name, seg, line.product, start_temperature,
                               max(target + PREWARM_MARGIN_K, start_temperature), ready)
    _prewarm_messages(result, target, no_flow)
    return result


def _prewarm_messages(result: Prewarm, target: float, no_flow: float) -> None:
    if result.stuck:
        result.stuck_message = Sentence(
            "after pre-warming, the contents stay at or below the no-flow temperature {t} in: {parts}",
            t=Q(no_flow, "temperature", 0), parts=", ".join(result.stuck))
    if not result.possible:
        short = [s for s in result.segments if s.traced and not s.reached]
        worst = min(short, key=lambda s: s.settles_at_k)
        result.time_s = None
        result.message = Sentence("tracing cannot bring {seg} to {t}: it levels off near {settles}", seg=worst.segment,
                                  t=Q(target + PREWARM_MARGIN_K, "temperature", 0),
                                  settles=Q(worst.settles_at_k, "temperature", 0))
    else:
        result.message = Sentence("line ready after {t} of pre-warming", t=Q(result.time_s, "time"))
        if result.too_hot:
            result.message += Sentence("; with no thermostat the heater then takes {parts} on past {limit}, beyond the "
                                       "planner's models", parts=", ".join(result.too_hot),
                                       limit=Q(TEMPERATURE_CEILING_K, "temperature", 0))
        if result.untraced:
            result.message += Sentence("; untraced parts stay cold: {parts}", parts=", ".join(result.untraced))
        gaps = [s for s in result.segments if s.gap_m > 0.0]
        if gaps:
            pieces = {f"p{i}": Sentence("{seg} ({length}) near {t}", seg=s.segment, length=Q(s.gap_m, "length", 1),
                                        t=Q(s.settles_at_k, "temperature", 0))
                      for i, s in enumerate(gaps)}
            result.message += Sentence("; untraced gaps settle: " + ", ".join("{" + k + "}" for k in pieces), **pieces)


# -- push the cold plug out ------------------------------------------------------------------


def split_segments(segments: list[LineSegment], x: float) -> tuple[list[LineSegment], list[LineSegment]]:
    """Split a route at distance ``x``: (segments before, segments after), cutting one segment
    in two with its fittings and rise shared in proportion to length.

    Examples
    --------
    The 100 m oil line of ``scenario.examples`` cut at 40 m:

    >>> from planner.scenario.examples import example_scenario
    >>> head, tail = split_segments(TransferSystem(example_scenario("oil transfer")).discharge_line.segments, 40.0)
    >>> [s.length for s in head], [s.length for s in tail], tail[0].x_start
    ([40.0], [60.0], 40.0)
    """
    head, tail = [], []
    for seg in segments:
        if seg.x_end <= x + 1e-9:
            head.append(seg)
        elif seg.x_start >= x - 1e-9:
            tail.append(seg)
        else:
            share = (x - seg.x_start) / seg.length
            for part, fraction, x0 in ((head, share, seg.x_start), (tail, 1.0 - share, x)):
                part.append(dataclasses.replace(
                    seg, x_start=x0, length=seg.length * fraction, fitting_a=seg.fitting_a * fraction,
                    fitting_b=seg.fitting_b * fraction, elevation_change=seg.elevation_change * fraction))
    return head, tail


@dataclass
class PushCold:
    possible: bool
    message: str
    start_temperature_k: float
    initial_flow_m3_s: float
    initial_status: str
    peak_discharge_pressure_pa: float
    peak_pump_differential_pa: float
    initial_npsh_available_m: float
    front_time_s: float | None     # until warm product reaches the destination
    relief_lifts: bool
    rows: dict = field(default_factory=dict)   # front position steps: volume_fraction, flow, pressure, time
    hi_b: float | None = None       # centrifugal pump: the highest ANSI/HI 9.6.7 B over the push's points
    hi_in_range: bool = True        # False: some point lies beyond the method (no flow or time is given)
    suction_profile: MarchResult | None = None  # the suction line marched at the push's first flow, contents cold


def _front_position(segments: list[LineSegment], displaced_volume: float) -> float:
    """Plug flow: the distance [m] where the displaced volume [m3] ends."""
    acc = 0.0
    for seg in segments:
        v = seg.area * seg.length
        if acc + v >= displaced_volume:
            return seg.x_start + (displaced_volume - acc) / seg.area
        acc += v
    return segments[-1].x_end


def _front_system(system: TransferSystem, displaced: float, cold: float, previous: TransferSystem | None):
    """(the front's position [m], the system with the line cold beyond it) once ``displaced`` [m^3] of the
    discharge line's contents are out: at 0, the suction's contents are through and the discharge line
    still all cold; at the line's volume, the line is warm throughout."""
    segments = system.discharge_line.segments
    if displaced >= sum(s.area * s.length for s in segments) * (1.0 - 1e-12):
        return segments[-1].x_end, system.with_plug(None, None, cold, slopes_from=previous)
    x = _front_position(segments, displaced)
    head, tail = split_segments(segments, x)
    kept, product = system.discharge_line.kept, system.product
    return x, system.with_plug(Line(head, product, system.tracing, kept=kept),
                               Line(tail, product, system.tracing, kept=kept), cold, slopes_from=previous)


def push_cold(system: TransferSystem, start_temperature: float, positions: int = 4,
              guess: float | None = None) -> PushCold:
    """Push the cold contents (at ``start_temperature`` [K]) out, at ``positions`` fronts along the line;
    ``guess`` [m^3/s]: a flow to start the first operating point's search from (the warm start's).

    Examples
    --------
    The oil transfer: the front arrives after a line volume, 0.2163 / 1.25e-3 = 173 s (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> round(push_cold(TransferSystem(example_scenario("oil transfer")), 283.15).front_time_s)
    173
    """
    product = system.product
    state0 = SystemState(start_temperature, system.source.initial_volume)
    if start_temperature <= product.no_flow_temperature:
        return PushCold(False, Sentence("the line's contents at {t} are below the no-flow temperature {limit}: they will "
                                        "not move; pre-warm first", t=Q(start_temperature, "temperature"),
                                        limit=Q(product.no_flow_temperature, "temperature")),
                        start_temperature, 0.0, "no_flow", math.nan, math.nan, math.nan, None, False)
    first = system.operating_point(state0, guess=guess)
    points = [first]
    if not first.moving:
        return PushCold(False, Sentence("cold start: {m}", m=first.message), start_temperature, 0.0, first.status,
                        math.nan, math.nan, math.nan, None, False)
    warm_state = SystemState(system.source.temperature, system.source.initial_volume)
    segments = system.discharge_line.segments
    volume = sum(s.area * s.length for s in segments)
    suction_volume = sum(s.area * s.length for s in system.suction_line.segments) if system.suction_line else 0.0
    rows = {"volume_fraction": [], "flow_m3_s": [], "discharge_pressure_pa": [], "pump_differential_pa": [],
            "time_s": [], "status": []}
    time = suction_volume / first.flow
    peak_p, peak_dp = first.point.discharge_pressure, first.point.pump_differential
    relief = first.status == "relief_lifting"
    rows_append = [(0.0, first.flow, first.point.discharge_pressure, first.point.pump_differential, 0.0, first.status)]
    guess = first.flow
    previous_plug = None
    for k in range(0, positions + 1):
        fraction = k / positions
        x, plugged = _front_system(system, fraction * volume, start_temperature, previous_plug)
        previous_plug = plugged
        op = plugged.operating_point(warm_state, guess=guess)
        points.append(op)
        if not op.moving:
            return PushCold(False, Sentence("with the front at {x}: {m}", x=Q(x, "length"), m=op.message),
                            start_temperature, first.flow,
                            first.status, peak_p, peak_dp, first.point.npsh_available, None, relief, {})
        if k > 0:   # the trapezoidal rule in the front's volume, as the timeline's (a left sum at 8 positions,
                    # from the all-cold start's flow, overstated the front's time by 3.5-6.8 % on the demos)
            previous_fraction, previous_flow = rows_append[-1][0], rows_append[-1][1]
            time += (fraction - previous_fraction) * volume * (1.0 / previous_flow + 1.0 / op.flow) / 2.0
        rows_append.append((fraction, op.flow, op.point.discharge_pressure, op.point.pump_differential, time, op.status))
        peak_p = max(peak_p, op.point.discharge_pressure)
        peak_dp = max(peak_dp, op.point.pump_differential)
        relief = relief or op.status == "relief_lifting"
        # next guess: the flow extrapolated along the front positions (it rises smoothly as cold
        # product leaves), from the solver's own root estimates as the timeline does
        latest = op.flow_estimate or op.flow
        guess = latest
        if len(rows_append) >= 3 and rows_append[-2][5] == op.status:
            guess = max(2.0 * latest - rows_append[-2][1], 0.5 * latest)
    if not all(p.hi_in_range for p in points):
        return _push_beyond_pump_method(start_temperature, first, points, peak_p, peak_dp, relief)
    for row in rows_append:
        for key, value in zip(rows, row):
            rows[key].append(value)
    message = Sentence("starting against the line's contents at {t}: {q} and {p}; warm product reaches the "
                       "destination after {time}", t=Q(start_temperature, "temperature", 0),
                       q=Q(first.flow, "volume_flow"), p=Q(first.point.discharge_pressure, "pressure"),
                       time=Q(time, "time", 2))
    if relief:
        message += " (relief valve lifts during the start)"
    return PushCold(True, message, start_temperature, first.flow, first.status, peak_p, peak_dp,
                    first.point.npsh_available, time, relief, rows, _highest_b(points),
                    suction_profile=_suction_at(system, first.flow, state0))


def _suction_at(system: TransferSystem, flow: float, state: SystemState) -> MarchResult | None:
    """The suction line's march at ``flow`` from the source in ``state`` (what the push's first operating
    point took, recorded along its length); None without a suction line."""
    if system.suction_line is None:
        return None
    return march(system.suction_line, flow, state.source_temperature, system.source_pressure(state), step=system.step)


def _highest_b(points) -> float | None:
    values = [p.hi_b for p in points if p.hi_b is not None]
    return max(values) if values else None


def _push_beyond_pump_method(start_temperature: float, first, points, peak_p: float, peak_dp: float,
                             relief: bool) -> PushCold:
    """A push whose centrifugal pump runs beyond ANSI/HI 9.6.7 (B above its limit) at some front position:
    its flow and time come from an extrapolated curve and are not given (NaN, None).  The pressures stay
    for the rating checks: the corrected curve keeps the shut-off head of the water curve."""
    b = _highest_b(points)
    message = Sentence("starting against the line's contents at {t}: the centrifugal pump is not rated for their "
                       "viscosity (ANSI/HI 9.6.7 B = {b}, above {limit}); no flow or time is given",
                       t=Q(start_temperature, "temperature", 0), b=Q(b, "dimensionless", 1),
                       limit=Q(HI_B_MAX, "dimensionless"))
    return PushCold(True, message, start_temperature, math.nan, first.status, peak_p, peak_dp,
                    first.point.npsh_available, None, relief, {}, b, False)
