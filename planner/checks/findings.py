"""Findings: is the plan safe and valid?  One small check per concern.

Each check returns findings with a stable code of our own, a severity (info < caution < warning
< stop), where (line, segment, distance), a plain-words message with the value and the limit, and
what to do.  ``assess(plan)`` runs them all, most severe first; every plan carries the standing
caution.  Limits come from the scenario's ``[limits]`` (defaults: common practice), published
tables (``ratings``: ASME B16.5, IEC 60079-0) and the equipment data in the scenario.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from planner.checks.bounds import check_ranges
from planner.checks.caution import STANDING_CAUTION
from planner.checks.finding import DISCHARGE, SEVERITIES, SEVERITY_RANK, SUCTION, Finding  # noqa: F401  (re-exported)
from planner.correlations.friction import RE_LAMINAR_MAX, RE_TURBULENT_MIN
from planner.correlations.heat_transfer import VISCOSITY_RATIO_MAX, VISCOSITY_RATIO_MIN
from planner.correlations.ratings import temperature_class_limit
from planner.line.heat_path import jacket_temperature
from planner.line.march import Line, MarchResult
from planner.scenario.schema import Scenario
from planner.scenario.wording import Q, Sentence
from planner.transfer.plan import Plan
from planner.transfer.vessels import destination_level

PRODUCT_FAR_ABOVE_MAX_K = 50.0   # the product this far past its maximum is a stop, not a warning (planner choice)

# Stated ranges of correlations the march uses (their sources; see heat_transfer.py, rheology.py)
SIEDER_TATE_PR_MAX = 16700.0       # Sieder & Tate (1936): 0.48 < Pr < 16 700
GNIELINSKI_PR_MAX = 2000.0         # Gnielinski (1976): 0.5 < Pr < 2000


def _t(kelvin: float) -> Q:
    return Q(kelvin, "temperature")


def _p(pa: float) -> Q:
    return Q(pa, "pressure")


def _x(metres: float) -> Q:
    return Q(metres, "length")


def _segment_at(segments, x: float):
    for seg in segments:
        if seg.x_start - 1e-9 <= x <= seg.x_end + 1e-9:
            return seg
    return segments[-1]


@dataclass
class LineRun:
    """One steady march along one line: its name, the line (segments, heaters, product), the result and
    the gauge pressure its relative pressures are added to."""

    name: str
    line: Line
    result: MarchResult
    base_pressure: float


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


def _segment_steps(run: LineRun):
    """(segment, heater, its mid-step values) along one march."""
    steps = run.result.steps
    for seg, heater in zip(run.line.segments, run.line.heaters):
        inside = steps["segment"] == seg.index
        if inside.any():
            yield seg, heater, {key: values[inside] for key, values in steps.items()}


# -- checks on one line (evaluate and plan) -------------------------------------------------------

def line_surfaces(scenario: Scenario, run: LineRun) -> list[Finding]:
    """Jacket against the touch limit; heater sheath or steam tracer against the area's temperature
    class (IEC 60079-0) and the heater's exposure rating."""
    limits, tracing = scenario.limits, scenario.tracing
    out = []
    for seg, heater, steps in _segment_steps(run):
        jacket, xs = steps["jacket_temperature"], steps["x"]
        i = int(np.argmax(jacket))
        hottest, at = run.result.jacket_peak(seg.index, float(jacket[i]), float(xs[i]))
        if hottest > limits.touch_temperature:
            out.append(Finding(
                "SURFACE-HOT", "warning", "Hot surface",
                Sentence("jacket reaches {t}, above the touch limit {limit}", t=_t(hottest),
                         limit=_t(limits.touch_temperature)),
                "Fit personnel protection (guards or extra insulation) and warning signs where people can reach.",
                run.name, seg.name, at, hottest, limits.touch_temperature, "temperature"))
        if not heater.active:
            continue
        j = int(np.argmax(steps["sheath_temperature"]))
        worst, at = float(steps["sheath_temperature"][j]), float(xs[j])
        if heater.kind != "steam" and heater.setpoint is not None:
            # the thermostat lets the heater run flat out until the pipe reaches the setpoint: the
            # sheath is then hottest (setpoint + full output per run / sheath-to-pipe conductance)
            at_setpoint = heater.sheath_temperature(heater.setpoint, heater.capacity(heater.setpoint))
            if at_setpoint > worst:
                worst, at = at_setpoint, seg.x_start
        what = "steam tracer" if tracing.kind == "steam" else "heater sheath"
        if seg.hazardous_area_class:
            limit = temperature_class_limit(seg.hazardous_area_class)
            if worst > limit:
                out.append(Finding(
                    "TCLASS-EXCEEDED", "stop", "Tracer too hot for the hazardous area",
                    Sentence("{what} at {t} exceeds {cls} ({limit}, IEC 60079-0)", what=what, t=_t(worst),
                             cls=seg.hazardous_area_class, limit=_t(limit)),
                    "Lower the steam pressure or use a heater rated for the area's temperature class, with a "
                    "limiter where the design needs one; follow the site's hazardous-area rules.",
                    run.name, seg.name, at, worst, limit, "temperature"))
        exposure = tracing.max_exposure_temperature
        if exposure is not None and worst > exposure:
            out.append(Finding(
                "HEATER-EXPOSURE", "stop", "Heater above its exposure rating",
                Sentence("heater sheath at {t} exceeds its maximum exposure temperature {limit}", t=_t(worst),
                         limit=_t(exposure)),
                "Lower the setpoint or product temperature, or choose a heater with a higher exposure rating.",
                run.name, seg.name, at, worst, exposure, "temperature"))
    return out


def line_pressures(run: LineRun) -> list[Finding]:
    """Pressure along the line against each segment's own rating and its ASME B16.5 flange rating at the
    product temperature there."""
    out = []
    nodes = run.result.nodes
    pressures = run.base_pressure + nodes["pressure"]
    temps = nodes["temperature"]
    for seg in run.line.segments:
        inside = (nodes["x"] >= seg.x_start - 1e-9) & (nodes["x"] <= seg.x_end + 1e-9)
        if not inside.any():
            continue
        p, temp, xs = pressures[inside], temps[inside], nodes["x"][inside]
        i = int(np.argmax(p))
        if seg.pressure_rating is not None and p[i] > seg.pressure_rating:
            kind = {"hose": "hose", "loading_arm": "loading arm"}.get(seg.kind, "pipe")
            out.append(Finding(
                "PRESSURE-RATING", "stop", f"Pressure above the {kind} rating",
                Sentence("{p} at {x} exceeds the {kind} rating {limit}", p=_p(p[i]), x=_x(xs[i]), kind=kind,
                         limit=_p(seg.pressure_rating)),
                "Lower the flow or warm the product to cut the pressure; do not exceed the rating.",
                run.name, seg.name, float(xs[i]), float(p[i]), seg.pressure_rating, "pressure"))
        if seg.flange_class is not None:
            out.extend(_flange_findings(run.name, seg, p, temp, xs))
    return out


def _flange_findings(line: str, seg, p, temp, xs) -> list[Finding]:
    worst = None
    for k, tk in enumerate(temp):
        rating = seg.flange_rating_at(float(tk))
        if rating is None:
            return [Finding(
                "FLANGE-TEMP-RANGE", "warning", "Flange rating outside its table",
                Sentence("product at {t} is outside the ASME B16.5 Group 1.1 table ({low} to {high})",
                         t=_t(tk), low=_t(273.15 - 29.0), high=_t(273.15 + 450.0)),
                "Check the flange material's rating at this temperature with the piping engineer.",
                line, seg.name, float(xs[k]), float(tk), None, "temperature")]
        if p[k] > rating and (worst is None or p[k] - rating > worst[0]):
            worst = (p[k] - rating, k, rating)
    if worst is None:
        return []
    _, k, rating = worst
    return [Finding(
        "FLANGE-RATING", "stop", "Pressure above the flange rating",
        Sentence("{p} at {x} exceeds ASME B16.5 Class {cls} (Group 1.1) {limit} at {t}", p=_p(p[k]), x=_x(xs[k]),
                 cls=seg.flange_class, limit=_p(rating), t=_t(temp[k])),
        "Lower the pressure, or confirm the flanges' class and material with the piping engineer.",
        line, seg.name, float(xs[k]), float(p[k]), rating, "pressure")]


def line_regime(scenario: Scenario, run: LineRun) -> list[Finding]:
    """Velocity bounds and transitional flow, segment by segment."""
    limits = scenario.limits
    out = []
    for seg, _, steps in _segment_steps(run):
        v, xs, re = steps["velocity"], steps["x"], steps["reynolds"]
        if v.max() > limits.max_velocity:
            i = int(np.argmax(v))
            out.append(Finding("VELOCITY-HIGH", "caution", "High velocity",
                               Sentence("{v} is above {limit}", v=Q(v[i], "speed"), limit=Q(limits.max_velocity, "speed")),
                               "Expect surge and wear at this rate; consider a larger line or a lower rate.",
                               run.name, seg.name, float(xs[i]), float(v[i]), limits.max_velocity, "speed"))
        if v.min() < limits.min_velocity:
            i = int(np.argmin(v))
            out.append(Finding("VELOCITY-LOW", "caution", "Very low velocity",
                               Sentence("{v} is below {limit}: long residence, cooling", v=Q(v[i], "speed", 3),
                                        limit=Q(limits.min_velocity, "speed")),
                               "Check the line does not cool or settle; a smaller line or higher rate helps.",
                               run.name, seg.name, float(xs[i]), float(v[i]), limits.min_velocity, "speed"))
        transitional = (re > RE_LAMINAR_MAX) & (re < RE_TURBULENT_MIN)
        if transitional.any():
            i = int(np.argmax(transitional))
            out.append(Finding("REGIME-TRANSITIONAL", "caution", "Transitional flow",
                               Sentence("Re {re} lies between 2300 and 4000: friction and heat transfer are uncertain",
                                        re=Q(re[i], "dimensionless")),
                               "Read pressures with margin; a different rate moves the flow out of transition.",
                               run.name, seg.name, float(xs[i]), float(re[i]), None, "dimensionless"))
    return out


def line_poor_heat(scenario: Scenario, run: LineRun) -> list[Finding]:
    """One note per traced line: where the laminar inner film is poorest."""
    if scenario.tracing.kind == "none":
        return []
    poorest = None
    for seg, _, steps in _segment_steps(run):
        if not seg.traced:
            continue
        film = np.where(steps["reynolds"] <= RE_LAMINAR_MAX, steps["film_coefficient"], np.inf)
        i = int(np.argmin(film))
        if poorest is None or film[i] < poorest[0]:
            poorest = (float(film[i]), seg.name, float(steps["x"][i]))
    limit = scenario.limits.poor_film_coefficient
    if poorest is None or not poorest[0] < limit:
        return []
    film, segment, x = poorest
    return [Finding("LAMINAR-POOR-HEAT", "info", "Laminar flow, poor heat transfer",
                    Sentence("inner film coefficient down to {h}: the tracing maintains but barely heats the moving "
                             "product", h=Q(film, "heat_transfer_coefficient")),
                    "Heat the product at the source, not with the tracing.",
                    run.name, segment, x, film, limit, "heat_transfer_coefficient")]


def line_product(scenario: Scenario, run: LineRun) -> list[Finding]:
    """The product setting in the line (the march stopped)."""
    product = scenario.product
    if run.result.summary.status != "product_sets":
        return []
    where = run.result.summary.sets_at_m
    return [Finding("PRODUCT-SETS", "stop", "Product sets in the line",
                    Sentence("the product falls below its no-flow temperature {limit} at {x}",
                             limit=_t(product.no_flow_temperature), x=_x(where)),
                    "Raise the setpoint or the product temperature, or move faster.",
                    run.name, _segment_at(run.line.segments, where).name, where, None, product.no_flow_temperature,
                    "temperature")]


def product_hottest(scenario: Scenario, hottest: list[tuple]) -> list[Finding]:
    """The hottest product ``(temperature, where, segment, at_m)`` against its maximum and flash point."""
    product, limits = scenario.product, scenario.limits
    t_max, where, seg_name, x = max(hottest, key=lambda item: item[0])
    out = []
    if t_max > product.max_temperature + PRODUCT_FAR_ABOVE_MAX_K:
        # far past its maximum the product is no longer the liquid its data describe (it degrades, boils
        # or cracks): not a plan to run
        out.append(Finding("PRODUCT-TOO-HOT", "stop", "Product far above its maximum temperature",
                           Sentence("the product reaches {t} ({where}), more than {margin} above its maximum {limit}",
                                    t=_t(t_max), where=where, margin=Q(PRODUCT_FAR_ABOVE_MAX_K, "temperature_difference"),
                                    limit=_t(product.max_temperature)),
                           "Lower the heating (tracing.output, tracing.circuits_per_metre, the setpoint or the steam "
                           "pressure) or the product temperature: the product's data do not hold this far above its "
                           "maximum.", where, seg_name, x, t_max, product.max_temperature, "temperature"))
    elif t_max > product.max_temperature:
        out.append(Finding("PRODUCT-TOO-HOT", "warning", "Product above its maximum temperature",
                           Sentence("the product reaches {t} ({where}), above its maximum {limit}", t=_t(t_max),
                                    where=where, limit=_t(product.max_temperature)),
                           "Lower the heating: the product may degrade (colour, cracking, polymerisation).",
                           where, seg_name, x, t_max, product.max_temperature, "temperature"))
    if product.flash_point is not None and t_max > product.flash_point - limits.flash_point_margin:
        out.append(Finding("FLASH-MARGIN", "warning", "Near or above the flash point",
                           Sentence("the product reaches {t} ({where}); flash point {flash}, wanted {margin} below it",
                                    t=_t(t_max), where=where, flash=_t(product.flash_point),
                                    margin=Q(limits.flash_point_margin, "temperature_difference")),
                           "Keep the product below its flash point less the margin, or treat vapour spaces as hazardous.",
                           where, seg_name, x, t_max, product.flash_point - limits.flash_point_margin, "temperature"))
    return out


def _run_hottest(run: LineRun) -> tuple:
    temps = run.result.nodes["temperature"]
    i = int(np.argmax(temps))
    x = float(run.result.nodes["x"][i])
    return float(temps[i]), run.name, _segment_at(run.line.segments, x).name, x


def viscosity_range(product, temperatures: list[float]) -> list[Finding]:
    """The viscosity law used outside its lab points at any of ``temperatures`` [K]."""
    fit = product.fit
    outside = [t for t in temperatures if product.is_extrapolation(t)]
    if not outside:
        return []
    worst = max(outside, key=lambda t: max(fit.t_min - t, t - fit.t_max))
    return [Finding("VISCOSITY-EXTRAPOLATED", "caution", "Viscosity law extrapolated",
                    Sentence("{t} lies outside the lab points ({low} to {high})", t=_t(worst), low=_t(fit.t_min),
                             high=_t(fit.t_max)),
                    "Measure the viscosity at this temperature before relying on the pressures.",
                    value=worst, limit=fit.t_max if worst > fit.t_max else fit.t_min, quantity="temperature")]


def film_correlation_range(product, runs: list[LineRun]) -> list[Finding]:
    """The product's Prandtl number against the range of the film correlation in use."""
    worst_ratio, where = 0.0, None
    for run in runs:
        steps, nodes = run.result.steps, run.result.nodes
        for k in range(len(steps["x"])):
            t = float(np.interp(steps["x"][k], nodes["x"], nodes["temperature"]))
            pr = product.specific_heat(t) * steps["viscosity"][k] / product.conductivity(t)
            limit = SIEDER_TATE_PR_MAX if steps["reynolds"][k] <= RE_LAMINAR_MAX else GNIELINSKI_PR_MAX
            if pr > limit and pr / limit > worst_ratio:
                x = float(steps["x"][k])
                worst_ratio, where = pr / limit, (run.name, _segment_at(run.line.segments, x).name, x, pr, limit)
    if where is None:
        return []
    name, seg, x, pr, limit = where
    return [Finding("CORRELATION-RANGE", "caution", "Film correlation beyond its range",
                    Sentence("Prandtl number {pr} is above the {limit} its correlation was fitted to",
                             pr=Q(pr, "dimensionless"), limit=Q(limit, "dimensionless")),
                    "Read the product temperatures along the line with margin.", name, seg, x, pr, limit,
                    "dimensionless")]


def film_viscosity_ratio(runs: list[LineRun]) -> list[Finding]:
    """Bulk-to-wall viscosity ratio outside the range of the film's property correction (Sieder & Tate
    1936: 0.0044 < mu/mu_w < 9.75): the march holds the correction at the range's edge there, so the film
    coefficient (and the product temperature it sets) is less certain."""
    worst, where = 0.0, None
    for run in runs:
        steps = run.result.steps
        for k, ratio in enumerate(steps["viscosity_ratio"]):
            ratio = float(ratio)
            if VISCOSITY_RATIO_MIN <= ratio <= VISCOSITY_RATIO_MAX:
                continue
            limit = VISCOSITY_RATIO_MIN if ratio < VISCOSITY_RATIO_MIN else VISCOSITY_RATIO_MAX
            excess = math.inf if ratio <= 0.0 else abs(math.log(ratio / limit))
            if where is None or excess > worst:
                x = float(steps["x"][k])
                worst, where = excess, (run.name, _segment_at(run.line.segments, x).name, x, ratio, limit)
    if where is None:
        return []
    name, seg, x, ratio, limit = where
    side = "below" if ratio < limit else "above"
    return [Finding("FILM-VISCOSITY-RATIO", "caution", "Wall viscosity beyond the film correlation's range",
                    Sentence("bulk-to-wall viscosity ratio {ratio} is " + side + " the {limit} the film's "
                             "viscosity correction was fitted to; the correction is held at {limit}",
                             ratio=Q(ratio, "dimensionless"), limit=Q(limit, "dimensionless")),
                    "Read the product temperatures along this part of the line with margin (a wall much colder "
                    "or hotter than the product: a bare hose or arm, or strong tracing).",
                    name, seg, x, ratio, limit, "dimensionless")]


def _march_temperatures(runs: list[LineRun]) -> list[float]:
    values = []
    for run in runs:
        temps = run.result.nodes["temperature"]
        values.extend([float(temps.min()), float(temps.max())])
    return values


def assess_line(scenario: Scenario, line: Line, result: MarchResult, name: str = DISCHARGE,
                base_pressure: float = 0.0) -> list[Finding]:
    """The checks that apply to one line alone (``python -m planner evaluate``), most severe first, the
    standing caution last: product setting or above its maximum, jacket touch temperature, heater sheath
    against temperature class and exposure rating, pressure against ratings (``result``'s pressures
    plus ``base_pressure``, gauge), velocity and regime, viscosity law and film correlation ranges."""
    run = LineRun(name, line, result, base_pressure)
    found = line_product(scenario, run) + product_hottest(scenario, [_run_hottest(run)])
    found += line_surfaces(scenario, run) + line_pressures(run) + line_regime(scenario, run)
    found += line_poor_heat(scenario, run)
    found += viscosity_range(line.product, _march_temperatures([run]))
    found += film_correlation_range(line.product, [run]) + film_viscosity_ratio([run])
    return _ordered(found)


# -- checks on the plan --------------------------------------------------------------------------------

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
    return [f for run in _profiles(plan) for f in line_surfaces(plan.scenario, run)]


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
                out.append(Finding(
                    "TRACING-SHORT", "warning", "Tracing cannot hold the setpoint",
                    Sentence("at the design ambient {amb} the line loses {loss} at {t}, more than the tracing's {cap}",
                             amb=_t(at_design.ambient_temperature), loss=Q(loss, "linear_power"),
                             t=_t(tracing.setpoint), cap=Q(capacity, "linear_power")),
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
    if not plan.timeline.completed:
        out.append(Finding("TRANSFER-STOPS", "stop", "Transfer cannot finish",
                           Sentence("after {v}: {why}", v=Q(plan.timeline.moved_m3, "volume"),
                                    why=plan.timeline.stop_reason),
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
        out.append(Finding("HOLD-SHORT", "warning", "A stop sets the line even with tracing on",
                           Sentence("{seg} reaches its limit ({limit}, {why}) after {t}; planned stop {stop}",
                                    seg=hold.first_to_set_traced, limit=_t(hold.limit_temperature_k),
                                    why=hold.limit_reason, t=hours(hold.time_to_limit_traced_s), stop=hours(stop)),
                           "Keep stops shorter, trace and insulate that part, or clear it before stopping.",
                           segment=hold.first_to_set_traced, value=hold.time_to_limit_traced_s, limit=stop,
                           quantity="time"))
    if hold.time_to_limit_failed_s is not None and hold.time_to_limit_failed_s < stop:
        out.append(Finding("HOLD-SHORT-FAILED", "caution", "A stop with failed tracing sets the line",
                           Sentence("with the tracing off, {seg} reaches its limit after {t}; planned stop {stop}",
                                    seg=hold.first_to_set_failed, t=hours(hold.time_to_limit_failed_s), stop=hours(stop)),
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


def standing_caution() -> Finding:
    return Finding("PLANNING-ESTIMATE", "info", "Planning estimate", STANDING_CAUTION,
                   "Follow site procedures, hazardous-area rules and pressure ratings; ask a licensed engineer.")


CHECKS = (check_operating_point, check_npsh, check_surfaces, check_pressures, check_product_temperature,
          check_flow_regime, check_validity, check_tracing_capacity, check_times, check_calibration, check_ranges)


def _ordered(found: list[Finding]) -> list[Finding]:
    found = sorted(found, key=lambda f: -SEVERITY_RANK[f.severity])
    return found + [standing_caution()]


def assess(plan: Plan) -> list[Finding]:
    """All findings of a plan, most severe first; the standing caution is always last."""
    found: list[Finding] = []
    for check in CHECKS:
        found.extend(check(plan))
    return _ordered(found)


def count_by_severity(findings: list) -> dict[str, int]:
    """Findings (objects or their dicts) counted by severity."""
    counts = {name: 0 for name in SEVERITIES}
    for f in findings:
        counts[f["severity"] if isinstance(f, dict) else f.severity] += 1
    return counts


def worst_severity(findings: list) -> str:
    """The most severe level among the findings (objects or dicts); "info" when there are none."""
    levels = [f["severity"] if isinstance(f, dict) else f.severity for f in findings]
    return max(levels, key=SEVERITY_RANK.__getitem__, default="info")
