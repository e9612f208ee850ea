"""Bounds of a finished plan: no figure outside the range of the method that made it, and none outside
what physics allows.  Every breach is a stop-level finding naming the figure and the bound.

Method ranges (a figure there is never shown as a result):

- ANSI/HI 9.6.7 corrects a centrifugal pump's water curve for viscosity only for its parameter B below
  ``pumps.HI_B_MAX`` (40) [HI 9.6.7]; beyond it the corrected efficiency falls towards 0 (B = 219 gives a
  shaft power 1e6 times the hydraulic power).  PUMP-HI-RANGE: at a running point (start or timeline),
  or at a point of the chosen start-up's push-out.
- The planner's models (air, insulation, product data) hold to ``scenario.schema.TEMPERATURE_CEILING_K``
  (773.15 K, the schema's highest temperature).  The march refuses past it; the pre-warm and the stop
  with the tracing on, which a heater without a thermostat can take anywhere, list the parts instead
  (``Prewarm.too_hot``, ``Hold.too_hot``): TEMPERATURE-CEILING.

Physical bounds (``check_bounds``, PLAN-BOUNDS; a guard against defects, property-tested on generated
scenarios in ``tests/test_plan_bounds.py``):

- every product, wall and jacket temperature lies between the coldest surrounding or starting
  temperature and the hottest heat source (source, its heating medium, the tracing), plus the
  temperature rise of dissipating the highest pressure the plan records and the line's fall
  (friction turns it into heat: dT = dp / (rho cp));
- the shaft power lies between the hydraulic power (flow x pump differential) and the motor's rating
  (above it: the stop MOTOR-OVERLOAD);
- times and energies are finite and not negative;
- vessel levels stay between the bottom and the level they started at (source) or rise from their
  starting level (destination).
"""

from __future__ import annotations

import math

import numpy as np

from planner.checks.finding import DISCHARGE, SUCTION, Finding
from planner.correlations.constants import GRAVITY
from planner.correlations.steam import saturation_temperature_gauge
from planner.scenario.schema import TEMPERATURE_CEILING_K
from planner.scenario.wording import Q, Sentence
from planner.transfer.plan import Plan
from planner.transfer.pumps import HI_B_MAX
from planner.transfer.vessels import coil_steam_pressure, level_from_volume

TEMPERATURE_TOLERANCE_K = 0.5    # iteration tolerances of the march and the transients are far below this
LEVEL_TOLERANCE_M = 1e-6
POWER_TOLERANCE = 1e-9           # relative

HEATING_INPUTS = ("lower tracing.output or tracing.circuits_per_metre, hold the pipe wall with a thermostat "
                  "(tracing.sensing = \"pipe_wall\" and a setpoint), or check calibration.heat_loss_factor and "
                  "the insulation: the heat put in is far more than the line can lose")


def _b(value: float) -> Q:
    return Q(value, "dimensionless", 1)


# -- method ranges --------------------------------------------------------------------------------

def check_pump_method(plan: Plan) -> list[Finding]:
    """ANSI/HI 9.6.7 beyond its B limit at a running point or in the chosen start-up's push-out."""
    out = []
    op = plan.pump_beyond_method
    if op is not None:
        when = "at the start" if op is plan.start else "during the transfer"
        out.append(Finding(
            "PUMP-HI-RANGE", "stop", "Centrifugal pump not rated for this viscosity",
            Sentence("ANSI/HI 9.6.7 parameter B = {b} " + when + " is above {limit}, the method's limit: the "
                     "centrifugal pump is not rated for this viscosity; its flow, shaft power, pump energy and "
                     "times are not given", b=_b(op.hi_b), limit=_b(HI_B_MAX)),
            "Use the maker's viscous performance data or a PD pump, or warm the product until B is 40 or less.",
            value=op.hi_b, limit=HI_B_MAX, quantity="dimensionless"))
    push = plan.chosen_push
    if push is not None and not push.hi_in_range:
        out.append(Finding(
            "PUMP-HI-RANGE", "stop", "Centrifugal pump not rated for the start-up's viscosity",
            Sentence("pushing the line's contents out at {t}: ANSI/HI 9.6.7 parameter B = {b} is above {limit}, "
                     "the method's limit: the centrifugal pump is not rated for this viscosity; the start-up time "
                     "is not given", t=Q(push.start_temperature_k, "temperature", 0), b=_b(push.hi_b),
                     limit=_b(HI_B_MAX)),
            "Pre-warm the line further (schedule.start_mode = \"prewarm\"), or use the maker's viscous "
            "performance data or a PD pump.", DISCHARGE, value=push.hi_b, limit=HI_B_MAX,
            quantity="dimensionless"))
    return out


def check_temperature_ceiling(plan: Plan) -> list[Finding]:
    """Parts a heater without a thermostat takes past the ceiling (pre-warm, stop), and any other
    temperature of the plan past it."""
    out = []
    for what, parts in (("pre-warming at the heater's full output", plan.prewarm.too_hot),
                        ("during a stop with the tracing on", plan.hold.too_hot)):
        if parts:
            out.append(_ceiling_finding(Sentence("{what}, {parts} heat past {limit}, beyond the planner's models",
                                                 what=what, parts=", ".join(parts),
                                                 limit=Q(TEMPERATURE_CEILING_K, "temperature", 0)), None))
    hottest = max(((t, name) for name, values in _temperatures(plan) for t in values if t > TEMPERATURE_CEILING_K),
                  default=None)
    if hottest is not None:
        out.append(_ceiling_finding(Sentence("the {name} reaches {t}, past {limit}, beyond the planner's models",
                                             name=hottest[1], t=Q(hottest[0], "temperature"),
                                             limit=Q(TEMPERATURE_CEILING_K, "temperature", 0)), hottest[0]))
    return out


def _ceiling_finding(message, value: float | None) -> Finding:
    return Finding("TEMPERATURE-CEILING", "stop", "Heated past the models' range", message,
                   HEATING_INPUTS[0].upper() + HEATING_INPUTS[1:] + ".", value=value, limit=TEMPERATURE_CEILING_K,
                   quantity="temperature")


# -- physical bounds ------------------------------------------------------------------------------

def _temperatures(plan: Plan) -> list[tuple[str, np.ndarray]]:
    """Every product, wall and jacket temperature of the plan [K] by figure (finite values only)."""
    found = []
    arrays = plan.timeline.arrays
    for key, name in (("source_temperature_k", "source temperature"),
                      ("pump_inlet_temperature_k", "pump inlet temperature"),
                      ("outlet_temperature_k", "outlet temperature")):
        found.append((name, arrays[key]))
    for line, profile in ((DISCHARGE, plan.start_profile), (SUCTION, plan.suction_profile)):
        if profile is None or not profile.nodes:
            continue
        found.append((f"{line} line's product temperature", profile.nodes["temperature"]))
        found.append((f"{line} line's pipe wall", profile.steps["wall_temperature"]))
        found.append((f"{line} line's jacket", profile.steps["jacket_temperature"]))
    warm = plan.prewarm
    # after a pre-warm the contents are at its target, or at their own temperature if they started warmer
    found.append(("pre-warm temperature", [s.settles_at_k for s in warm.segments] +
                  ([max(warm.target_k, plan.line_start_temperature_k)] if warm.possible else [])))
    found.append(("temperature after a stop", [t for s in plan.hold.segments
                                               for t in (s.after_stop_traced_k, s.after_stop_failed_k)]))
    found.append(("line's starting temperature", [plan.line_start_temperature_k]))
    clean = []
    for name, values in found:
        values = np.asarray(values, dtype=float)
        clean.append((name, values[np.isfinite(values)]))
    return clean


def temperature_bounds(plan: Plan) -> tuple[float, float]:
    """(coldest, hottest) temperature [K] the plan's product, walls and jackets may take: the coldest
    surrounding or starting temperature, and the hottest heat source plus the rise of dissipating the
    highest recorded pressure and the line's total fall."""
    scenario, system = plan.scenario, plan.system
    source, tracing = scenario.source, scenario.tracing
    segments = [seg for line in (system.suction_line, system.discharge_line) if line is not None
                for seg in line.segments]
    cold = [scenario.site.ambient_temperature, source.temperature, plan.line_start_temperature_k]
    cold += [seg.ambient_temperature for seg in segments]
    if scenario.site.design_ambient_temperature is not None:
        cold.append(scenario.site.design_ambient_temperature)
    if plan.weather is not None:       # every ambient the plan's weather gave (the timeline's, the stop's)
        cold += [float(a) for a in plan.timeline.arrays["ambient_temperature_k"]]
        cold += [plan.weather.state(t)[0] for t in (plan.startup_at_s, plan.stop_at_s, plan.coldest_at_s)]
    hot = list(cold)
    if source.heating_power > 0.0:
        hot.append(saturation_temperature_gauge(coil_steam_pressure(scenario)) if source.heating_medium == "steam"
                   else source.heating_limit_temperature or scenario.product.max_temperature)
    hot.append(_tracing_hottest(plan, tracing))
    product = system.product
    rho_cp = min(product.density(t) * product.specific_heat(t) for t in (min(cold), max(hot)))
    pressures = [0.0, plan.peak_discharge_pressure_pa or 0.0, scenario.source.pressure]
    if plan.start.point is not None:
        pressures.append(plan.start.point.discharge_pressure)
    fall = sum(max(0.0, -seg.elevation_change) for seg in segments) + max(0.0, source.outlet_height)
    rise = (max(pressures) + product.density(min(cold)) * GRAVITY * fall) / rho_cp
    return min(cold) - TEMPERATURE_TOLERANCE_K, max(hot) + rise + TEMPERATURE_TOLERANCE_K


def _tracing_hottest(plan: Plan, tracing) -> float:
    """The hottest temperature the tracing can give [K]: steam's saturation temperature; a self-regulating
    heater's zero-output temperature; a constant-wattage heater's hottest sheath in the march or its
    setpoint, or (no thermostat) the ceiling itself."""
    if tracing.kind == "none":
        return -math.inf
    if tracing.kind == "steam":
        return saturation_temperature_gauge(tracing.steam_pressure)
    if tracing.kind == "electric_self_regulating" and not tracing.output_curve:
        return tracing.zero_output_temperature
    if tracing.setpoint is None or tracing.sensing == "ambient" or tracing.kind == "electric_self_regulating":
        return TEMPERATURE_CEILING_K
    sheaths = [float(np.max(p.steps["sheath_temperature"])) for p in (plan.start_profile, plan.suction_profile)
               if p is not None and p.steps and len(p.steps["sheath_temperature"])]
    return max([tracing.setpoint, *sheaths])


def _bounds_finding(figure: str, value: float, bound: str, limit: float, quantity: str) -> Finding:
    return Finding("PLAN-BOUNDS", "stop", "A figure outside its physical bounds",
                   Sentence("{figure} is {value}, " + bound + " {limit}: the plan is not consistent and is not to "
                            "be used", figure=figure, value=Q(value, quantity), limit=Q(limit, quantity)),
                   "Report this scenario to the planner's maintainers; do not plan with it.",
                   value=value, limit=limit, quantity=quantity)


def _temperature_breaches(plan: Plan) -> list[Finding]:
    low, high = temperature_bounds(plan)
    out = []
    for name, values in _temperatures(plan):
        if len(values) and values.min() < low:
            out.append(_bounds_finding(name, float(values.min()), "below the coldest surrounding", low,
                                       "temperature"))
        if len(values) and values.max() > high:
            out.append(_bounds_finding(name, float(values.max()), "above the hottest heat source", high,
                                       "temperature"))
    return out


def _power_breaches(plan: Plan) -> list[Finding]:
    """Shaft power against the hydraulic power and the motor's rating at every running point within the
    pump's method (beyond it PUMP-HI-RANGE stands instead)."""
    motor = plan.scenario.pump.motor_power
    out = []
    for op in [plan.start, *plan.timeline.operating_points]:
        if op.point is None or not op.moving or not op.hi_in_range:
            continue
        hydraulic = op.flow * max(op.point.pump_differential, 0.0)
        if not op.shaft_power >= hydraulic * (1.0 - POWER_TOLERANCE):
            out.append(_bounds_finding("shaft power", op.shaft_power, "below the hydraulic power", hydraulic, "power"))
            break
        if motor is not None and op.shaft_power > motor * (1.0 + POWER_TOLERANCE) and \
                "motor_overloaded" not in op.flags:
            out.append(_bounds_finding("shaft power", op.shaft_power, "above the motor rating", motor, "power"))
            break
    return out


def _amounts(plan: Plan) -> list[tuple[str, float | None, str]]:
    """Times [s] and energies [J, kg] of the plan: (figure, value or None when not worked out, quantity).
    Beyond ANSI/HI 9.6.7 the transfer's times and energies are not given (PUMP-HI-RANGE) and not checked."""
    t, e, warm, hold = plan.timeline, plan.energy, plan.prewarm, plan.hold
    out = [("pre-warm time", warm.time_s, "time"), ("pre-warm energy", warm.energy_j, "energy"),
           ("time to the limit in a stop, tracing on", hold.time_to_limit_traced_s, "time"),
           ("time to the limit in a stop, tracing failed", hold.time_to_limit_failed_s, "time")]
    if plan.pump_beyond_method is not None:
        return out
    out += [("transfer time", t.total_time_s, "time"), ("start-up time", plan.startup_time_s, "time"),
            ("total time", plan.total_time_s, "time"), ("tracing energy", e.tracing_j, "energy"),
            ("pump energy", e.pump_j, "energy"), ("vessel heating energy", e.vessel_heating_j, "energy"),
            ("steam", e.steam_kg, "mass"), ("total cost", plan.costs.total, "dimensionless")]
    for name, push in (("push-out", plan.push_cold), ("push-out after pre-warm", plan.after_prewarm)):
        if push is not None and push.possible:
            out.append((f"{name} time", push.front_time_s, "time"))
    times = t.arrays["time_s"]
    if len(times):
        out.append(("timeline time step", float(np.min(np.diff(times))) if len(times) > 1 else 0.0, "time"))
    return out


def _amount_breaches(plan: Plan) -> list[Finding]:
    out = []
    for name, value, quantity in _amounts(plan):
        if value is not None and not (math.isfinite(value) and value >= 0.0):
            out.append(Finding("PLAN-BOUNDS", "stop", "A figure outside its physical bounds",
                               Sentence("{figure} is {value}: times and energies are finite and not negative; the "
                                        "plan is not consistent and is not to be used", figure=name,
                                        value=f"{value!r}"),
                               "Report this scenario to the planner's maintainers; do not plan with it.",
                               value=value if math.isfinite(value) else None, limit=0.0, quantity=quantity))
    return out


def _level_breaches(plan: Plan) -> list[Finding]:
    arrays, source, dest = plan.timeline.arrays, plan.scenario.source, plan.scenario.destination
    out = []
    levels = arrays["source_level_m"]
    top = level_from_volume(source, source.initial_volume)
    if len(levels) and (levels.min() < -LEVEL_TOLERANCE_M or levels.max() > top + LEVEL_TOLERANCE_M):
        worst = float(levels.min() if levels.min() < 0.0 else levels.max())
        out.append(_bounds_finding("the source's level", worst, "outside the vessel (from its bottom to the "
                                   "starting level)", 0.0 if worst < 0.0 else top, "length"))
    levels = arrays["destination_level_m"]
    if len(levels) and not (np.all(np.isfinite(levels)) and levels.min() >= dest.initial_level - LEVEL_TOLERANCE_M):
        out.append(_bounds_finding("the destination's level", float(np.nanmin(levels)), "below its starting level",
                                   dest.initial_level, "length"))
    return out


def check_bounds(plan: Plan) -> list[Finding]:
    """The physical bounds of a finished plan (a guard against defects)."""
    return _temperature_breaches(plan) + _power_breaches(plan) + _amount_breaches(plan) + _level_breaches(plan)


def check_ranges(plan: Plan) -> list[Finding]:
    """All bounds: the methods' ranges and the physical bounds."""
    return check_pump_method(plan) + check_temperature_ceiling(plan) + check_bounds(plan)
