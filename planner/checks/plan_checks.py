"""Checks on a whole plan: operating point and motor, NPSH, surfaces and pressures along both lines at the
start, product temperature, flow regime and validity on the recorded profiles, tracing capacity, the
start-up, stops and restarts, the destination, the times and the calibration.  Each ``check_<concern>(plan)``
returns ``Finding`` records; ``checks.findings.CHECKS`` lists them.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from planner.checks.finding import DISCHARGE, SUCTION, Finding
from planner.checks.line_checks import (LineRun, _p, _run_hottest, _segment_at, _t, _x, line_poor_heat, line_pressures,
                                        line_product, line_regime, line_surfaces, product_hottest)
from planner.checks.validity import _march_temperatures, film_correlation_range, film_viscosity_ratio, viscosity_range
from planner.line.heat_path import jacket_temperature
from planner.scenario.wording import Q, Sentence
from planner.transfer.plan import Plan
from planner.transfer.vessels import destination_level
from planner.transfer.weather import weathered


def _profiles(plan: Plan) -> list[LineRun]:
    """The recorded start profiles.  The discharge line's pressures take the highest running discharge
    pressure of the timeline with the start's profile shape; the suction's, the source pressure."""
    out = []
    system = plan.system
    if plan.suction_profile is not None and system.suction_line is not None:
        out.append(LineRun(SUCTION, system.suction_line, plan.suction_profile,
                           system.source_pressure(_start_state(plan))))
    if plan.start_profile is not None:
        t = plan.timeline.arrays["discharge_pressure_pa"]
        peak_running = float(np.max(t)) if len(t) else 0.0
        base = max(plan.start.point.discharge_pressure, peak_running)
        out.append(LineRun(DISCHARGE, system.discharge_line, plan.start_profile, base))
    return out


def check_operating_point(plan: Plan) -> list[Finding]:
    op = plan.start
    out = []
    if op.status == "no_flow":
        out.append(Finding("FLOW-NONE", "stop", "No flow possible", op.message,
                           "Warm the product or the line, lower the static head or destination pressure, or use a "
                           "pump that makes more pressure."))
        if op.point is not None and op.point.sets:
            out.extend(_sets_at_trickle(plan))
    elif op.status == "rate_not_reachable":
        out.append(Finding("FLOW-SETPOINT-SHORT", "warning", "Flow setpoint not reachable", op.message,
                           "Accept the lower rate in the plan, raise the product temperature or choose a larger pump."))
    elif op.status == "beyond_curve":
        out.append(Finding("PUMP-BEYOND-CURVE", "warning", "Pump runs beyond its curve", op.message,
                           "Throttle the discharge to bring the pump back onto its curve."))
    elif op.status == "relief_lifting":
        out.append(Finding("RELIEF-LIFTING", "warning", "Relief valve lifting", op.message,
                           "Slow the pump or warm the product: running on the relief heats the product in the pump.",
                           value=op.point.pump_differential, limit=plan.scenario.pump.relief_setting,
                           quantity="pressure"))
    out.extend(_motor_overload(plan))
    return out


def _motor_overload(plan: Plan) -> list[Finding]:
    """The highest shaft power above the motor's rating at any running point (the start or a timeline
    increment) within the pump's method (beyond it, PUMP-HI-RANGE stands and the power is no figure)."""
    over = [op for op in [plan.start, *plan.timeline.operating_points]
            if "motor_overloaded" in op.flags and op.hi_in_range]
    if not over:
        return []
    op = max(over, key=lambda o: o.shaft_power)
    motor = plan.scenario.pump.motor_power
    when = "" if op is plan.start else " during the transfer"
    return [Finding("MOTOR-OVERLOAD", "stop", "Motor overloaded",
                    Sentence("shaft power {p}" + when + " is above the motor rating {limit}", p=Q(op.shaft_power, "power"),
                             limit=Q(motor, "power")),
                    "Reduce speed or flow, warm the product, or fit a larger motor.",
                    value=op.shaft_power, limit=motor, quantity="power")]


def _sets_at_trickle(plan: Plan) -> list[Finding]:
    point = plan.start.point
    suction_sets = point.suction is not None and point.suction.status != "ok"
    summary = point.suction if suction_sets else point.discharge
    line = SUCTION if suction_sets else DISCHARGE
    segments = (plan.system.suction_line if suction_sets else plan.system.discharge_line).segments
    where = summary.sets_at_m
    no_flow = plan.scenario.product.no_flow_temperature
    return [Finding("PRODUCT-SETS", "stop", "Product sets in the line",
                    Sentence("at a trickle the product falls below its no-flow temperature {limit} at {x}",
                             limit=_t(no_flow), x=_x(where)),
                    "Raise the setpoint or the product temperature, or insulate.",
                    line, _segment_at(segments, where).name, where, None, no_flow, "temperature")]


def check_npsh(plan: Plan) -> list[Finding]:
    op = plan.start
    if op.point is None or not op.moving:
        return []
    available, required = op.point.npsh_available, op.npsh_required
    margin = plan.scenario.limits.npsh_margin
    head = lambda v: Q(v, "head")  # noqa: E731
    if available < required:
        limited = op.npsh_limited_flow
        rate = Sentence("; the suction can feed about {q}", q=Q(limited, "volume_flow")) if limited else ""
        return [Finding("NPSH-SHORT", "stop", "Suction starved",
                        Sentence("NPSH available {a} is below the {r} the pump needs{rate}", a=head(available),
                                 r=head(required), rate=rate),
                        "Raise the source pressure or level, shorten or enlarge the suction line, warm the product, "
                        "or slow the pump.", line=SUCTION, value=available, limit=required, quantity="head")]
    if available < required + margin:
        return [Finding("NPSH-MARGIN-LOW", "warning", "Small NPSH margin",
                        Sentence("NPSH available {a} leaves {m} above the pump's {r}; wanted at least {want}",
                                 a=head(available), m=head(available - required), r=head(required), want=head(margin)),
                        "Treat the suction as marginal: watch for noise and falling flow; reduce suction losses.",
                        line=SUCTION, value=available, limit=required + margin, quantity="head")]
    return []


def check_surfaces(plan: Plan) -> list[Finding]:
    found = [f for run in _profiles(plan) for f in line_surfaces(plan.scenario, run)]
    if plan.weather is not None:       # the start's profile took the weather of the start-up's moment
        for f in found:
            f.message = Sentence("{m} ({w})", m=f.message, w=weather_note(plan, plan.startup_at_s, "in the start's weather"))
    return found


def weather_note(plan: Plan, at_s: float, label: str = "in the weather") -> Sentence:
    """Which weather a finding took: "in the weather at 03:40: -6.0 °C, wind 9.00 m/s" (without a
    ``schedule.start``, "after 5.20 h"; at the plan's start nothing)."""
    ambient, wind = plan.weather.state(at_s)
    when = plan.when(at_s) if plan.weather.start is not None or at_s > 0.0 else ""
    return Sentence("{label}{sep}{when}: {amb}, wind {w}", label=label, sep=" " if when else "", when=when,
                    amb=_t(ambient), w=Q(wind, "speed"))


def check_pressures(plan: Plan) -> list[Finding]:
    out = [f for run in _profiles(plan) for f in line_pressures(run)]
    push = plan.startup_push
    if push is not None:
        # the start: pushing the line's contents out (cold, or pre-warmed but cooler than the product)
        seg = plan.system.discharge_line.segments[0]
        peak, limit = push.peak_discharge_pressure_pa, seg.rating_at(push.start_temperature_k)
        if limit is not None and peak > limit:
            out.append(Finding("PRESSURE-START", "stop", "Start-up pressure above a rating",
                               Sentence("pushing the line's contents out at {t} needs {p} at the pump outlet, above "
                                        "{limit}", t=_t(push.start_temperature_k), p=_p(peak), limit=_p(limit)),
                               "Pre-warm the line (further), or start at a lower rate.",
                               DISCHARGE, seg.name, 0.0, peak, limit, "pressure"))
        if push.relief_lifts:
            out.append(Finding("RELIEF-LIFTING-START", "caution", "Relief valve lifts at the start",
                               push.message, "Expect a slow start; watch the pump's temperature.", DISCHARGE))
    dest = plan.scenario.destination
    if dest.max_pressure is not None and dest.pressure > dest.max_pressure:
        out.append(Finding("VESSEL-PRESSURE", "stop", "Destination above its design pressure",
                           Sentence("tank pressure {p} exceeds its design {limit}", p=_p(dest.pressure),
                                    limit=_p(dest.max_pressure)),
                           "Vent the tank to its design pressure before transfer.", value=dest.pressure,
                           limit=dest.max_pressure, quantity="pressure"))
    return out


def _start_state(plan: Plan):
    from planner.transfer.system import SystemState

    return SystemState(plan.scenario.source.temperature, plan.scenario.source.initial_volume)


def check_product_temperature(plan: Plan) -> list[Finding]:
    runs = _profiles(plan)
    hottest = [(plan.scenario.source.temperature, "source", None, None)]
    t = plan.timeline.arrays["source_temperature_k"]
    if len(t):
        hottest.append((float(np.max(t)), "source", None, None))
    hottest += [_run_hottest(run) for run in runs]
    out = [f for run in runs for f in line_product(plan.scenario, run)]
    return out + product_hottest(plan.scenario, hottest)


def check_flow_regime(plan: Plan) -> list[Finding]:
    runs = _profiles(plan)
    out = [f for run in runs for f in line_regime(plan.scenario, run)]
    return out + [f for run in runs for f in line_poor_heat(plan.scenario, run)]


def check_validity(plan: Plan) -> list[Finding]:
    runs = _profiles(plan)
    temperatures = _march_temperatures(runs) + [plan.scenario.source.temperature]
    if plan.startup_push is not None:
        temperatures.append(plan.startup_push.start_temperature_k)   # the line's contents pushed out at the start
    product = plan.system.product
    return viscosity_range(product, temperatures) + film_correlation_range(product, runs) + film_viscosity_ratio(runs)


def check_tracing_capacity(plan: Plan) -> list[Finding]:
    scenario = plan.scenario
    tracing = scenario.tracing
    if tracing.kind == "none" or tracing.setpoint is None:
        return []
    design = scenario.site.design_ambient_temperature or scenario.site.ambient_temperature
    shift = design - scenario.site.ambient_temperature
    out = []
    system = plan.system
    if plan.weather is not None:        # the weather of the plan's coldest moment, not the design ambient
        system, shift = weathered(plan.system, *plan.weather.state(plan.coldest_at_s)), 0.0
    for name, line in ((SUCTION, system.suction_line), (DISCHARGE, system.discharge_line)):
        if line is None:
            continue
        for seg, heater in zip(line.segments, line.heaters):
            if not heater.active:
                continue
            overridden = seg.spec.surroundings.ambient_temperature is not None
            at_design = seg if overridden else dataclasses.replace(seg, ambient_temperature=seg.ambient_temperature + shift)
            _, loss = jacket_temperature(at_design, tracing.setpoint)
            capacity = heater.capacity(tracing.setpoint)
            if loss > capacity:
                message = Sentence("at the design ambient {amb} the line loses {loss} at {t}, more than the tracing's {cap}",
                                   amb=_t(at_design.ambient_temperature), loss=Q(loss, "linear_power"),
                                   t=_t(tracing.setpoint), cap=Q(capacity, "linear_power"))
                if plan.weather is not None:
                    message = Sentence("at the plan's coldest hour, {when} ({amb}, wind {w}), the line loses {loss} at "
                                       "{t}, more than the tracing's {cap}", when=plan.when(plan.coldest_at_s),
                                       amb=_t(seg.ambient_temperature), w=Q(seg.wind_speed, "speed"),
                                       loss=Q(loss, "linear_power"), t=_t(tracing.setpoint),
                                       cap=Q(capacity, "linear_power"))
                out.append(Finding(
                    "TRACING-SHORT", "warning", "Tracing cannot hold the setpoint", message,
                    "Add insulation or heater output, or accept a lower maintain temperature in cold weather.",
                    name, seg.name, seg.x_start, loss, capacity, "linear_power"))
    return out


def check_startup(plan: Plan) -> list[Finding]:
    window = plan.scenario.schedule.planned_window
    out = []
    if plan.start_mode == "prewarm" and not plan.prewarm.possible:
        out.append(Finding("PREWARM-IMPOSSIBLE", "stop", "Pre-warm cannot reach its target", plan.prewarm.message,
                           "Start by pushing the cold contents out if they can flow, or add heat."))
    if plan.prewarm_stuck:
        out.append(Finding("PREWARM-CONTENTS-STUCK", "stop", "The contents cannot move after the pre-warm",
                           plan.prewarm_stuck,
                           "Trace the untraced parts (valves, flanges, hoses), warm them by other means, or raise the "
                           "setpoint; do not start the pump against set contents."))
    if plan.start_mode == "push_cold" and not plan.push_cold.possible:
        out.append(Finding("COLD-START-IMPOSSIBLE", "stop", "The cold contents cannot be pushed out",
                           plan.push_cold.message, "Pre-warm the line first."))
    if plan.weather is not None:       # the start-up took the weather of one moment: say which
        for f in out:
            f.message = Sentence("{m} ({w})", m=f.message, w=weather_note(plan, plan.startup_at_s,
                                                                          "in the start-up's weather"))
    if not plan.timeline.completed:
        stopped = Sentence("after {v}: {why}", v=Q(plan.timeline.moved_m3, "volume"), why=plan.timeline.stop_reason)
        if plan.weather is not None:
            at = plan.transfer_at_s + plan.timeline.total_time_s
            stopped = Sentence("{when}, after {v} ({w}): {why}", when=plan.when(at), v=Q(plan.timeline.moved_m3, "volume"),
                               w=weather_note(plan, at, "in the weather"), why=plan.timeline.stop_reason)
        out.append(Finding("TRANSFER-STOPS", "stop", "Transfer cannot finish", stopped,
                           "Keep the source warm (heating coils) or raise the setpoint."))
    hours = lambda v: Q(v, "time")  # noqa: E731
    if plan.startup_time_s is not None and plan.startup_time_s > window:
        out.append(Finding("STARTUP-OVER-WINDOW", "warning", "Start-up longer than the window",
                           Sentence("start-up takes {t}, the planned window is {w}", t=hours(plan.startup_time_s),
                                    w=hours(window)),
                           "Begin pre-warming earlier, or keep the line maintained between moves.",
                           value=plan.startup_time_s, limit=window, quantity="time"))
    if plan.total_time_s is not None and plan.total_time_s > window and plan.pump_beyond_method is None:
        out.append(Finding("TIME-OVER-WINDOW", "warning", "Plan longer than the window",
                           Sentence("start-up and transfer take {t}, the planned window is {w}",
                                    t=hours(plan.total_time_s), w=hours(window)),
                           "Start earlier, move faster (warmer product), or plan a longer window.",
                           value=plan.total_time_s, limit=window, quantity="time"))
    return out


def check_stops(plan: Plan) -> list[Finding]:
    hold = plan.hold
    stop = hold.stop_duration_s
    hours = lambda v: Q(v, "time")  # noqa: E731
    out = []
    if hold.time_to_limit_traced_s is not None and hold.time_to_limit_traced_s < stop:
        message = Sentence("{seg} reaches its limit ({limit}, {why}) after {t}; planned stop {stop}",
                           seg=hold.first_to_set_traced, limit=_t(hold.limit_temperature_k),
                           why=hold.limit_reason, t=hours(hold.time_to_limit_traced_s), stop=hours(stop))
        if plan.weather is not None:
            message = _stop_in_weather(plan, Sentence("{seg} reaches its limit ({limit}, {why})",
                                                      seg=hold.first_to_set_traced, limit=_t(hold.limit_temperature_k),
                                                      why=hold.limit_reason), hold.time_to_limit_traced_s)
        out.append(Finding("HOLD-SHORT", "warning", "A stop sets the line even with tracing on", message,
                           "Keep stops shorter, trace and insulate that part, or clear it before stopping.",
                           segment=hold.first_to_set_traced, value=hold.time_to_limit_traced_s, limit=stop,
                           quantity="time"))
    if hold.time_to_limit_failed_s is not None and hold.time_to_limit_failed_s < stop:
        message = Sentence("with the tracing off, {seg} reaches its limit after {t}; planned stop {stop}",
                           seg=hold.first_to_set_failed, t=hours(hold.time_to_limit_failed_s), stop=hours(stop))
        if plan.weather is not None:
            message = _stop_in_weather(plan, Sentence("with the tracing off, {seg} reaches its limit",
                                                      seg=hold.first_to_set_failed), hold.time_to_limit_failed_s)
        out.append(Finding("HOLD-SHORT-FAILED", "caution", "A stop with failed tracing sets the line", message,
                           "Have a plan to clear or re-heat the line if the tracing trips.",
                           segment=hold.first_to_set_failed, value=hold.time_to_limit_failed_s, limit=stop,
                           quantity="time"))
    if hold.gelled_restart_pressure_pa > 0 and hold.pump_pressure_limit_pa is not None and \
            hold.gelled_restart_pressure_pa > hold.pump_pressure_limit_pa:
        out.append(Finding("RESTART-GELLED", "warning", "A gelled line cannot be restarted by the pump",
                           Sentence("restart needs about {p} (4 τy L / D), the pump gives at most {limit}",
                                    p=_p(hold.gelled_restart_pressure_pa), limit=_p(hold.pump_pressure_limit_pa)),
                           "Do not let the line stand long enough to gel, or plan a flush.",
                           value=hold.gelled_restart_pressure_pa, limit=hold.pump_pressure_limit_pa,
                           quantity="pressure"))
    return out


def _stop_in_weather(plan: Plan, who: Sentence, to_limit_s: float) -> Sentence:
    """A stop at the transfer's coldest moment, and the hour its limit is reached: "a stop at 04:00 (the
    transfer's coldest moment: ...): X reaches its limit at 04:32, 0.53 h into the stop; planned stop 3.00 h"."""
    at = plan.stop_at_s
    ambient, wind = plan.weather.state(at)
    return Sentence("a stop {start} (the transfer's coldest moment: {amb}, wind {w}): {who} {when}, {t} into the "
                    "stop; planned stop {stop}", start=plan.when(at), amb=_t(ambient), w=Q(wind, "speed"), who=who,
                    when=plan.when(at + to_limit_s), t=Q(to_limit_s, "time"), stop=Q(plan.hold.stop_duration_s, "time"))


def check_destination(plan: Plan) -> list[Finding]:
    dest = plan.scenario.destination
    levels = plan.timeline.arrays["destination_level_m"]
    if dest.max_level is None or not len(levels):
        return []
    final = destination_level(dest, plan.timeline.moved_m3)   # after the last increment
    if final <= dest.max_level:
        return []
    return [Finding("OVERFILL", "stop", "Destination overfills",
                    Sentence("the level reaches {v}, above the maximum {limit}", v=Q(final, "length", 2),
                             limit=Q(dest.max_level, "length", 2)),
                    "Reduce the volume or choose another tank.", value=final, limit=dest.max_level,
                    quantity="length")]


def check_times(plan: Plan) -> list[Finding]:
    """Start-up, transfer and stops against the schedule; the destination's level."""
    return check_startup(plan) + check_stops(plan) + check_destination(plan)


def check_calibration(plan: Plan) -> list[Finding]:
    """Info: the plan applies site factors fitted to a logged transfer, and where they came from."""
    calibration = plan.scenario.calibration
    if calibration is None or not calibration.in_use:
        return []
    factors = (f"viscosity × {calibration.viscosity_factor:.3g}, heat loss × {calibration.heat_loss_factor:.3g}, "
               f"pump slip × {calibration.slip_factor:.3g}")
    source = calibration.source
    origin = (f"fitted to the log {source.file} (SHA-256 {source.sha256[:12]}…)" if source is not None
              else "entered by hand (no log named)")
    when = f" on {calibration.fitted_at}" if calibration.fitted_at else ""
    return [Finding("CALIBRATION-IN-USE", "info", "Calibration in use",
                    f"this plan applies the site calibration: {factors}; {origin}{when}",
                    "Check the calibration still fits this product and line (refit to a recent log with "
                    "`python -m planner calibrate`); remove [calibration] to plan with the model alone.")]
