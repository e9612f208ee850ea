"""Findings: is the plan safe and valid?  One small check per concern.

Each check returns findings with a stable code of our own, a severity (info < caution < warning
< stop), where (line, segment, distance), a plain-words message with the value and the limit, and
what to do.  ``assess(plan)`` runs them all, most severe first; every plan carries the standing
caution.  Limits come from the scenario's ``[limits]`` (defaults: common practice), published
tables (``ratings``: ASME B16.5, IEC 60079-0) and the equipment data in the scenario.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from planner.line.heat_loss import jacket_temperature
from planner.transfer.plan import Plan
from planner.correlations.ratings import flange_rating, temperature_class_limit
from planner.reports.text import STANDING_CAUTION

SEVERITIES = ("info", "caution", "warning", "stop")
SEVERITY_RANK = {name: i for i, name in enumerate(SEVERITIES)}

# Stated ranges of correlations the march uses (their sources; see heat_transfer.py, rheology.py)
SIEDER_TATE_PR_MAX = 16700.0       # Sieder & Tate (1936): 0.48 < Pr < 16 700
GNIELINSKI_PR_MAX = 2000.0         # Gnielinski (1976): 0.5 < Pr < 2000
HI_B_MAX = 40.0                    # ANSI/HI 9.6.7: B up to 40


@dataclass
class Finding:
    code: str
    severity: str
    title: str
    message: str
    action: str
    line: str | None = None
    segment: str | None = None
    at_m: float | None = None
    value: float | None = None
    limit: float | None = None
    unit: str = ""

    def as_dict(self) -> dict:
        return dataclasses.asdict(self)


def _c(kelvin: float) -> str:
    return f"{kelvin - 273.15:.1f} °C"


def _bar(pa: float) -> str:
    return f"{pa / 1e5:.2f} bar"


def _segment_at(segments, x: float):
    for seg in segments:
        if seg.x_start - 1e-9 <= x <= seg.x_end + 1e-9:
            return seg
    return segments[-1]


def _profiles(plan: Plan):
    """(line name, segments, MarchResult, inlet gauge pressure) for the recorded start profiles."""
    out = []
    system = plan.system
    if plan.suction_profile is not None and system.suction_line is not None:
        out.append(("suction", system.suction_line.segments, plan.suction_profile, 0.0))
    if plan.start_profile is not None:
        out.append(("discharge", system.discharge_line.segments, plan.start_profile, plan.start.point.discharge_pressure))
    return out


def _heater_of(plan: Plan, line: str, seg):
    system = plan.system
    owner = system.suction_line if line == "suction" else system.discharge_line
    return owner.heaters[seg.index]


def _segment_steps(plan: Plan):
    """(line name, segment, its mid-step values) along the recorded start profiles."""
    for name, segments, result, _ in _profiles(plan):
        steps = result.steps
        for seg in segments:
            inside = steps["segment"] == seg.index
            if inside.any():
                yield name, seg, {key: values[inside] for key, values in steps.items()}


# -- checks -------------------------------------------------------------------------------------------

def check_operating_point(plan: Plan) -> list[Finding]:
    op = plan.start
    out = []
    if op.status == "no_flow":
        out.append(Finding("FLOW-NONE", "stop", "No flow possible", op.message,
                           "Warm the product or the line, lower the static head or destination pressure, or use a "
                           "pump that makes more pressure."))
        if op.point is not None and op.point.sets:
            summary = op.point.suction if op.point.suction is not None and op.point.suction.status != "ok" \
                else op.point.discharge
            line = "suction" if summary is op.point.suction else "discharge"
            segments = (plan.system.suction_line if line == "suction" else plan.system.discharge_line).segments
            where = summary.sets_at_m
            no_flow = plan.scenario.product.no_flow_temperature
            out.append(Finding("PRODUCT-SETS", "stop", "Product sets in the line",
                               f"at a trickle the product falls below its no-flow temperature {_c(no_flow)} at "
                               f"{where:.0f} m", "Raise the setpoint or the product temperature, or insulate.",
                               line, _segment_at(segments, where).name, where, None, no_flow, "K"))
    elif op.status == "rate_not_reachable":
        out.append(Finding("FLOW-SETPOINT-SHORT", "warning", "Flow setpoint not reachable", op.message,
                           "Accept the lower rate in the plan, raise the product temperature or choose a larger pump."))
    elif op.status == "beyond_curve":
        out.append(Finding("PUMP-BEYOND-CURVE", "warning", "Pump runs beyond its curve", op.message,
                           "Throttle the discharge to bring the pump back onto its curve."))
    elif op.status == "relief_lifting":
        out.append(Finding("RELIEF-LIFTING", "warning", "Relief valve lifting", op.message,
                           "Slow the pump or warm the product: running on the relief heats the product in the pump.",
                           value=op.point.pump_differential, limit=plan.scenario.pump.relief_setting, unit="Pa"))
    if "motor_overloaded" in op.flags:
        motor = plan.scenario.pump.motor_power
        out.append(Finding("MOTOR-OVERLOAD", "stop", "Motor overloaded",
                           f"shaft power {op.shaft_power / 1e3:.2f} kW is above the motor rating {motor / 1e3:.2f} kW",
                           "Reduce speed or flow, warm the product, or fit a larger motor.",
                           value=op.shaft_power, limit=motor, unit="W"))
    if op.hi_b is not None and not op.hi_in_range:
        out.append(Finding("PUMP-HI-RANGE", "warning", "Viscosity correction outside its method",
                           f"ANSI/HI 9.6.7 parameter B = {op.hi_b:.1f} is above {HI_B_MAX:.0f}: the corrected curve is "
                           "an extrapolation", "Use the pump maker's viscous performance data, or a PD pump.",
                           value=op.hi_b, limit=HI_B_MAX))
    return out


def check_npsh(plan: Plan) -> list[Finding]:
    op = plan.start
    if op.point is None or not op.moving:
        return []
    available, required = op.point.npsh_available, op.npsh_required
    margin = plan.scenario.limits.npsh_margin
    if available < required:
        limited = op.npsh_limited_flow
        rate = f"; the suction can feed about {limited * 3600:.1f} m³/h" if limited else ""
        return [Finding("NPSH-SHORT", "stop", "Suction starved",
                        f"NPSH available {available:.2f} m is below the {required:.2f} m the pump needs{rate}",
                        "Raise the source pressure or level, shorten or enlarge the suction line, warm the product, "
                        "or slow the pump.", line="suction", value=available, limit=required, unit="m")]
    if available < required + margin:
        return [Finding("NPSH-MARGIN-LOW", "warning", "Small NPSH margin",
                        f"NPSH available {available:.2f} m leaves {available - required:.2f} m above the pump's "
                        f"{required:.2f} m; wanted at least {margin:.2f} m", "Treat the suction as marginal: watch for "
                        "noise and falling flow; reduce suction losses.", line="suction", value=available,
                        limit=required + margin, unit="m")]
    return []


def check_surfaces(plan: Plan) -> list[Finding]:
    limits = plan.scenario.limits
    tracing = plan.scenario.tracing
    out = []
    for name, seg, steps in _segment_steps(plan):
        jacket, xs = steps["jacket_temperature"], steps["x"]
        i = int(np.argmax(jacket))
        if jacket[i] > limits.touch_temperature:
            out.append(Finding(
                "SURFACE-HOT", "warning", "Hot surface",
                f"jacket reaches {_c(jacket[i])}, above the touch limit {_c(limits.touch_temperature)}",
                "Fit personnel protection (guards or extra insulation) and warning signs where people can reach.",
                name, seg.name, float(xs[i]), float(jacket[i]), limits.touch_temperature, "K"))
        sheath = steps["sheath_temperature"]
        j = int(np.argmax(sheath))
        worst, at = float(sheath[j]), float(xs[j])
        heater = _heater_of(plan, name, seg)
        heater_active = heater.active
        if heater_active and heater.kind != "steam" and heater.setpoint is not None:
            # the thermostat lets the heater run flat out until the pipe reaches the setpoint: the
            # sheath is then hottest (setpoint + full output per run / sheath-to-pipe conductance)
            full = heater.capacity(heater.setpoint)
            at_setpoint = heater.sheath_temperature(heater.setpoint, full)
            if at_setpoint > worst:
                worst, at = at_setpoint, seg.x_start
        sheath = np.array([worst])
        j = 0
        xs = np.array([at])
        if seg.hazardous_area_class and heater_active:
            limit = temperature_class_limit(seg.hazardous_area_class)
            if sheath[j] > limit:
                out.append(Finding(
                    "TCLASS-EXCEEDED", "stop", "Tracer too hot for the hazardous area",
                    f"{'steam tracer' if tracing.kind == 'steam' else 'heater sheath'} at {_c(sheath[j])} exceeds "
                    f"{seg.hazardous_area_class} ({_c(limit)}, IEC 60079-0)",
                    "Lower the steam pressure or use a heater rated for the area's temperature class, with a "
                    "limiter where the design needs one; follow the site's hazardous-area rules.",
                    name, seg.name, float(xs[j]), float(sheath[j]), limit, "K"))
        exposure = tracing.max_exposure_temperature
        if exposure is not None and heater_active and sheath[j] > exposure:
            out.append(Finding(
                "HEATER-EXPOSURE", "stop", "Heater above its exposure rating",
                f"heater sheath at {_c(sheath[j])} exceeds its maximum exposure temperature {_c(exposure)}",
                "Lower the setpoint or product temperature, or choose a heater with a higher exposure rating.",
                name, seg.name, float(xs[j]), float(sheath[j]), exposure, "K"))
    return out


def check_pressures(plan: Plan) -> list[Finding]:
    out = []
    t = plan.timeline.arrays
    peak_running = float(np.max(t["discharge_pressure_pa"])) if len(t["discharge_pressure_pa"]) else 0.0
    for name, segments, result, inlet in _profiles(plan):
        nodes = result.nodes
        base = inlet
        if name == "discharge":
            # the highest running discharge pressure of the timeline, with the start's profile shape
            base = max(inlet, peak_running)
        if name == "suction":
            base = plan.system.source_pressure(_start_state(plan))
        pressures = base + nodes["pressure"]
        temps = nodes["temperature"]
        for seg in segments:
            inside = (nodes["x"] >= seg.x_start - 1e-9) & (nodes["x"] <= seg.x_end + 1e-9)
            if not inside.any():
                continue
            p, temp, xs = pressures[inside], temps[inside], nodes["x"][inside]
            i = int(np.argmax(p))
            if seg.pressure_rating is not None and p[i] > seg.pressure_rating:
                kind = {"hose": "hose", "loading_arm": "loading arm"}.get(seg.kind, "pipe")
                out.append(Finding(
                    "PRESSURE-RATING", "stop", f"Pressure above the {kind} rating",
                    f"{_bar(p[i])} at {xs[i]:.0f} m exceeds the {kind} rating {_bar(seg.pressure_rating)}",
                    "Lower the flow or warm the product to cut the pressure; do not exceed the rating.",
                    name, seg.name, float(xs[i]), float(p[i]), seg.pressure_rating, "Pa"))
            if seg.flange_class is not None:
                ratings = [flange_rating(seg.flange_class, tk) for tk in temp]
                worst = None
                for k, rating in enumerate(ratings):
                    if rating is None:
                        out.append(Finding(
                            "FLANGE-TEMP-RANGE", "warning", "Flange rating outside its table",
                            f"product at {_c(temp[k])} is outside the ASME B16.5 Group 1.1 table (-29 to 450 °C)",
                            "Check the flange material's rating at this temperature with the piping engineer.",
                            name, seg.name, float(xs[k]), float(temp[k]), None, "K"))
                        break
                    if p[k] > rating and (worst is None or p[k] - rating > worst[0]):
                        worst = (p[k] - rating, k, rating)
                if worst is not None:
                    _, k, rating = worst
                    out.append(Finding(
                        "FLANGE-RATING", "stop", "Pressure above the flange rating",
                        f"{_bar(p[k])} at {xs[k]:.0f} m exceeds ASME B16.5 Class {seg.flange_class} (Group 1.1) "
                        f"{_bar(rating)} at {_c(temp[k])}",
                        "Lower the pressure, or confirm the flanges' class and material with the piping engineer.",
                        name, seg.name, float(xs[k]), float(p[k]), rating, "Pa"))
    # the start: pushing the line's contents out (cold, or pre-warmed but cooler than the product)
    push = plan.startup_push
    if push is not None:
        seg = plan.system.discharge_line.segments[0]
        peak = push.peak_discharge_pressure_pa
        limits = [r for r in (seg.pressure_rating,
                              flange_rating(seg.flange_class, push.start_temperature_k)
                              if seg.flange_class else None) if r is not None]
        if limits and peak > min(limits):
            out.append(Finding("PRESSURE-START", "stop", "Start-up pressure above a rating",
                               f"pushing the line's contents out at {_c(push.start_temperature_k)} needs {_bar(peak)} at "
                               f"the pump outlet, above {_bar(min(limits))}",
                               "Pre-warm the line (further), or start at a lower rate.",
                               "discharge", seg.name, 0.0, peak, min(limits), "Pa"))
        if push.relief_lifts:
            out.append(Finding("RELIEF-LIFTING-START", "caution", "Relief valve lifts at the start",
                               push.message, "Expect a slow start; watch the pump's temperature.", "discharge"))
    dest = plan.scenario.destination
    if dest.max_pressure is not None and dest.pressure > dest.max_pressure:
        out.append(Finding("VESSEL-PRESSURE", "stop", "Destination above its design pressure",
                           f"tank pressure {_bar(dest.pressure)} exceeds its design {_bar(dest.max_pressure)}",
                           "Vent the tank to its design pressure before transfer.", value=dest.pressure,
                           limit=dest.max_pressure, unit="Pa"))
    return out


def _start_state(plan: Plan):
    from planner.transfer.system import SystemState

    return SystemState(plan.scenario.source.temperature, plan.scenario.source.initial_volume)


def check_product_temperature(plan: Plan) -> list[Finding]:
    product = plan.scenario.product
    limits = plan.scenario.limits
    out = []
    hottest = [(plan.scenario.source.temperature, "source", None, None)]
    t = plan.timeline.arrays
    if len(t["source_temperature_k"]):
        k = int(np.argmax(t["source_temperature_k"]))
        hottest.append((float(t["source_temperature_k"][k]), "source", None, None))
    for name, segments, result, _ in _profiles(plan):
        temps = result.nodes["temperature"]
        i = int(np.argmax(temps))
        x = float(result.nodes["x"][i])
        hottest.append((float(temps[i]), name, _segment_at(segments, x).name, x))
        if result.summary.status == "product_sets":
            where = result.summary.sets_at_m
            out.append(Finding("PRODUCT-SETS", "stop", "Product sets in the line",
                               f"the product falls below its no-flow temperature {_c(product.no_flow_temperature)} at "
                               f"{where:.0f} m", "Raise the setpoint or the product temperature, or move faster.",
                               name, _segment_at(segments, where).name, where, None, product.no_flow_temperature, "K"))
    t_max, where, seg_name, x = max(hottest, key=lambda item: item[0])
    if t_max > product.max_temperature:
        out.append(Finding("PRODUCT-TOO-HOT", "warning", "Product above its maximum temperature",
                           f"the product reaches {_c(t_max)} ({where}), above its maximum {_c(product.max_temperature)}",
                           "Lower the heating: the product may degrade (colour, cracking, polymerisation).",
                           where, seg_name, x, t_max, product.max_temperature, "K"))
    if product.flash_point is not None and t_max > product.flash_point - limits.flash_point_margin:
        out.append(Finding("FLASH-MARGIN", "warning", "Near or above the flash point",
                           f"the product reaches {_c(t_max)} ({where}); flash point {_c(product.flash_point)}, wanted "
                           f"{limits.flash_point_margin:.0f} K below it",
                           "Keep the product below its flash point less the margin, or treat vapour spaces as hazardous.",
                           where, seg_name, x, t_max, product.flash_point - limits.flash_point_margin, "K"))
    return out


def check_flow_regime(plan: Plan) -> list[Finding]:
    limits = plan.scenario.limits
    out = []
    for name, seg, steps in _segment_steps(plan):
        v, xs, re = steps["velocity"], steps["x"], steps["reynolds"]
        if v.max() > limits.max_velocity:
            i = int(np.argmax(v))
            out.append(Finding("VELOCITY-HIGH", "caution", "High velocity",
                               f"{v[i]:.2f} m/s is above {limits.max_velocity:.2f} m/s",
                               "Expect surge and wear at this rate; consider a larger line or a lower rate.",
                               name, seg.name, float(xs[i]), float(v[i]), limits.max_velocity, "m/s"))
        if v.min() < limits.min_velocity:
            i = int(np.argmin(v))
            out.append(Finding("VELOCITY-LOW", "caution", "Very low velocity",
                               f"{v[i]:.3f} m/s is below {limits.min_velocity:.2f} m/s: long residence, cooling",
                               "Check the line does not cool or settle; a smaller line or higher rate helps.",
                               name, seg.name, float(xs[i]), float(v[i]), limits.min_velocity, "m/s"))
        transitional = (re >= 2300.0) & (re < 4000.0)
        if transitional.any():
            i = int(np.argmax(transitional))
            out.append(Finding("REGIME-TRANSITIONAL", "caution", "Transitional flow",
                               f"Re {re[i]:.0f} lies between 2300 and 4000: friction and heat transfer are uncertain",
                               "Read pressures with margin; a different rate moves the flow out of transition.",
                               name, seg.name, float(xs[i]), float(re[i]), None, ""))
    if plan.scenario.tracing.kind != "none":
        # one note per line: where the traced, laminar film is poorest
        poorest: dict[str, tuple] = {}
        for name, seg, steps in _segment_steps(plan):
            if not seg.traced:
                continue
            film = np.where(steps["reynolds"] < 2300.0, steps["film_coefficient"], np.inf)
            i = int(np.argmin(film))
            if film[i] < poorest.get(name, (np.inf,))[0]:
                poorest[name] = (float(film[i]), seg.name, float(steps["x"][i]))
        for name, (film, segment, x) in poorest.items():
            if film < limits.poor_film_coefficient:
                out.append(Finding("LAMINAR-POOR-HEAT", "info", "Laminar flow, poor heat transfer",
                                   f"inner film coefficient down to {film:.1f} W/(m²·K): the tracing maintains but "
                                   f"barely heats the moving product", "Heat the product at the source, not with the tracing.",
                                   name, segment, x, film, limits.poor_film_coefficient, "W/m2K"))
    return out


def check_validity(plan: Plan) -> list[Finding]:
    product = plan.system.product
    out = []
    fit = product.fit
    t_values = []
    for _, _, result, _ in _profiles(plan):
        t_values.extend([float(result.nodes["temperature"].min()), float(result.nodes["temperature"].max())])
    t_values.append(plan.scenario.source.temperature)
    if plan.startup_push is not None:
        t_values.append(plan.startup_push.start_temperature_k)   # the line's contents pushed out at the start
    outside = [t for t in t_values if product.is_extrapolation(t)]
    if outside:
        worst = max(outside, key=lambda t: max(fit.t_min - t, t - fit.t_max))
        out.append(Finding("VISCOSITY-EXTRAPOLATED", "caution", "Viscosity law extrapolated",
                           f"{_c(worst)} lies outside the lab points ({_c(fit.t_min)} to {_c(fit.t_max)})",
                           "Measure the viscosity at this temperature before relying on the pressures.",
                           value=worst, limit=fit.t_max if worst > fit.t_max else fit.t_min, unit="K"))
    worst_pr = 0.0
    where = None
    for name, segments, result, _ in _profiles(plan):
        steps = result.steps
        # Prandtl number of the product along the line
        for k in range(len(steps["x"])):
            t = float(np.interp(steps["x"][k], result.nodes["x"], result.nodes["temperature"]))
            pr = product.specific_heat(t) * steps["viscosity"][k] / product.conductivity(t)
            limit = SIEDER_TATE_PR_MAX if steps["reynolds"][k] < 2300 else GNIELINSKI_PR_MAX
            if pr > limit and pr / limit > worst_pr:
                worst_pr, where = pr / limit, (name, _segment_at(segments, steps["x"][k]).name, float(steps["x"][k]), pr, limit)
    if where is not None:
        name, seg, x, pr, limit = where
        out.append(Finding("CORRELATION-RANGE", "caution", "Film correlation beyond its range",
                           f"Prandtl number {pr:,.0f} is above the {limit:,.0f} its correlation was fitted to",
                           "Read the product temperatures along the line with margin.", name, seg, x, pr, limit, ""))
    return out


def check_tracing_capacity(plan: Plan) -> list[Finding]:
    scenario = plan.scenario
    tracing = scenario.tracing
    if tracing.kind == "none" or tracing.setpoint is None:
        return []
    design = scenario.site.design_ambient_temperature or scenario.site.ambient_temperature
    shift = design - scenario.site.ambient_temperature
    out = []
    system = plan.system
    for name, line in (("suction", system.suction_line), ("discharge", system.discharge_line)):
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
                out.append(Finding(
                    "TRACING-SHORT", "warning", "Tracing cannot hold the setpoint",
                    f"at the design ambient {_c(at_design.ambient_temperature)} the line loses {loss:.1f} W/m at "
                    f"{_c(tracing.setpoint)}, more than the tracing's {capacity:.1f} W/m",
                    "Add insulation or heater output, or accept a lower maintain temperature in cold weather.",
                    name, seg.name, seg.x_start, loss, capacity, "W/m"))
    return out


def check_times(plan: Plan) -> list[Finding]:
    schedule = plan.scenario.schedule
    window = schedule.planned_window
    out = []
    if plan.start_mode == "prewarm" and not plan.prewarm.possible:
        out.append(Finding("PREWARM-IMPOSSIBLE", "stop", "Pre-warm cannot reach its target", plan.prewarm.message,
                           "Start by pushing the cold contents out if they can flow, or add heat."))
    if plan.start_mode == "push_cold" and not plan.push_cold.possible:
        out.append(Finding("COLD-START-IMPOSSIBLE", "stop", "The cold contents cannot be pushed out",
                           plan.push_cold.message, "Pre-warm the line first."))
    if not plan.timeline.completed:
        out.append(Finding("TRANSFER-STOPS", "stop", "Transfer cannot finish",
                           f"after {plan.timeline.moved_m3:.1f} m³: {plan.timeline.stop_reason}",
                           "Keep the source warm (heating coils) or raise the setpoint."))
    if plan.startup_time_s is not None and plan.startup_time_s > window:
        out.append(Finding("STARTUP-OVER-WINDOW", "warning", "Start-up longer than the window",
                           f"start-up takes {plan.startup_time_s / 3600:.1f} h, the planned window is {window / 3600:.1f} h",
                           "Begin pre-warming earlier, or keep the line maintained between moves.",
                           value=plan.startup_time_s, limit=window, unit="s"))
    if plan.total_time_s is not None and plan.total_time_s > window:
        out.append(Finding("TIME-OVER-WINDOW", "warning", "Plan longer than the window",
                           f"start-up and transfer take {plan.total_time_s / 3600:.1f} h, the planned window is "
                           f"{window / 3600:.1f} h", "Start earlier, move faster (warmer product), or plan a longer window.",
                           value=plan.total_time_s, limit=window, unit="s"))
    hold = plan.hold
    stop = hold.stop_duration_s
    if hold.time_to_limit_traced_s is not None and hold.time_to_limit_traced_s < stop:
        out.append(Finding("HOLD-SHORT", "warning", "A stop sets the line even with tracing on",
                           f"{hold.first_to_set_traced} reaches its limit ({_c(hold.limit_temperature_k)}, "
                           f"{hold.limit_reason}) after {hold.time_to_limit_traced_s / 3600:.1f} h; planned stop "
                           f"{stop / 3600:.1f} h", "Keep stops shorter, trace and insulate that part, or clear it "
                           "before stopping.", segment=hold.first_to_set_traced, value=hold.time_to_limit_traced_s,
                           limit=stop, unit="s"))
    if hold.time_to_limit_failed_s is not None and hold.time_to_limit_failed_s < stop:
        out.append(Finding("HOLD-SHORT-FAILED", "caution", "A stop with failed tracing sets the line",
                           f"with the tracing off, {hold.first_to_set_failed} reaches its limit after "
                           f"{hold.time_to_limit_failed_s / 3600:.1f} h; planned stop {stop / 3600:.1f} h",
                           "Have a plan to clear or re-heat the line if the tracing trips.",
                           segment=hold.first_to_set_failed, value=hold.time_to_limit_failed_s, limit=stop, unit="s"))
    if hold.gelled_restart_pressure_pa > 0 and hold.pump_pressure_limit_pa is not None and \
            hold.gelled_restart_pressure_pa > hold.pump_pressure_limit_pa:
        out.append(Finding("RESTART-GELLED", "warning", "A gelled line cannot be restarted by the pump",
                           f"restart needs about {_bar(hold.gelled_restart_pressure_pa)} (4 τy L / D), the pump gives "
                           f"at most {_bar(hold.pump_pressure_limit_pa)}", "Do not let the line stand long enough to gel, "
                           "or plan a flush.", value=hold.gelled_restart_pressure_pa,
                           limit=hold.pump_pressure_limit_pa, unit="Pa"))
    dest = plan.scenario.destination
    levels = plan.timeline.arrays["destination_level_m"]
    if dest.max_level is not None and len(levels):
        final = float(levels[-1]) + plan.scenario.source.volume_to_move / plan.timeline.arrays["time_s"].size / (
            np.pi * dest.diameter ** 2 / 4.0)
        if final > dest.max_level:
            out.append(Finding("OVERFILL", "stop", "Destination overfills",
                               f"the level reaches {final:.2f} m, above the maximum {dest.max_level:.2f} m",
                               "Reduce the volume or choose another tank.", value=final, limit=dest.max_level, unit="m"))
    return out


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


def standing_caution() -> Finding:
    return Finding("PLANNING-ESTIMATE", "info", "Planning estimate", STANDING_CAUTION,
                   "Follow site procedures, hazardous-area rules and pressure ratings; ask a licensed engineer.")


CHECKS = (check_operating_point, check_npsh, check_surfaces, check_pressures, check_product_temperature,
          check_flow_regime, check_validity, check_tracing_capacity, check_times, check_calibration)


def assess(plan: Plan) -> list[Finding]:
    """All findings of a plan, most severe first; the standing caution is always last."""
    found: list[Finding] = []
    for check in CHECKS:
        found.extend(check(plan))
    found.sort(key=lambda f: -SEVERITY_RANK[f.severity])
    found.append(standing_caution())
    return found


def count_by_severity(findings: list[Finding]) -> dict[str, int]:
    counts = {name: 0 for name in SEVERITIES}
    for f in findings:
        counts[f.severity] += 1
    return counts
