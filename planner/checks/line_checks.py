"""Checks on one line at one flow (``evaluate`` and each line of a plan): surface and sheath temperatures,
pressures against ratings (ASME B16.5 flanges), velocity and flow regime, poor heat transfer, the product
setting or past its maximum.  Each takes a ``LineRun`` (one steady march along one line) and returns
``Finding`` records; ``checks.findings`` runs them.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from planner.checks.finding import Finding
from planner.correlations.friction import RE_LAMINAR_MAX, RE_TURBULENT_MIN
from planner.correlations.ratings import B16_5_MIN_TEMPERATURE_C, B16_5_TEMPERATURES_C, temperature_class_limit
from planner.line.march import Line, MarchResult
from planner.scenario.schema import Scenario
from planner.scenario.units import kelvin
from planner.scenario.wording import Q, Sentence

PRODUCT_FAR_ABOVE_MAX_K = 50.0   # the product this far past its maximum is a stop, not a warning (planner choice)


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
                         t=_t(tk), low=_t(kelvin(B16_5_MIN_TEMPERATURE_C)), high=_t(kelvin(B16_5_TEMPERATURES_C[-1]))),
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
