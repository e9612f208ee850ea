"""Stop and restart: how long the line may stand still, with its tracing on and with it failed.

After a stop each segment's stagnant contents cool from their running temperature (lumped metre,
``transients.evolve``). The line can no longer be restarted once any segment passes its limit: the
product's no-flow temperature or, if set, the temperature at which it reaches the limiting viscosity.
A product with a yield stress that has gelled at rest needs a restart pressure of about 4 tau_y L / D
over the gelled length (force balance on the plug, ``rheology.gelled_restart_pressure``).

Examples
--------
The oil transfer of ``scenario.examples`` (the oil line, ID 52.48 mm [1], traced at 100 W/m to
45 degC; a PD pump without slip, 0.25 L/rev at 300 rpm: 4.5 m^3/h, from a 5 m tank holding 60 m^3 at
40 degC into the top of a tank).
Stopped for an hour with the line at 40 degC and the tracing failed, a lumped metre [2] cools as
20 + 20 exp(-3600 U / C) = 37.70 degC (U = 0.2226 W/(m K) of the reference recipe at 20 K,
C = 6558 J/(m K): see ``heat_path.jacket_temperature``); it never reaches the no-flow -40 degC
(the example of ``hold_analysis`` checks it).

References
----------
[1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
[2] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 5.1
    (the lumped capacitance method).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from planner.correlations.constants import GRAVITY
from planner.correlations.rheology import gelled_restart_pressure
from planner.scenario.schema import TEMPERATURE_CEILING_K
from planner.transfer.system import TransferSystem
from planner.line.tracing import Heater
from planner.line.transients import evolve, gap_centre_after, gap_warmup
from planner.scenario.wording import Q, Sentence
from planner.transfer.hold_words import HOLD_HORIZON_S, HOLDS_WORDS, hours, hours_text  # noqa: F401  (the one wording)


@dataclass
class HoldSegment:
    line: str
    segment: str
    start_temperature_k: float
    limit_temperature_k: float
    time_to_limit_traced_s: float | None   # None: holds (never reaches the limit within 14 days)
    time_to_limit_failed_s: float | None
    after_stop_traced_k: float
    after_stop_failed_k: float


@dataclass
class Hold:
    limit_temperature_k: float
    limit_reason: str
    stop_duration_s: float
    time_to_limit_traced_s: float | None
    time_to_limit_failed_s: float | None
    first_to_set_traced: str
    first_to_set_failed: str
    restart_after_stop_traced: bool
    restart_after_stop_failed: bool
    gelled_restart_pressure_pa: float
    pump_pressure_limit_pa: float | None
    segments: list[HoldSegment] = field(default_factory=list)
    too_hot: list[str] = field(default_factory=list)   # parts the tracing takes past TEMPERATURE_CEILING_K


def limit_temperature(transfer: TransferSystem) -> tuple[float, str]:
    """The temperature [K] below which the line cannot restart, and why: the no-flow temperature or,
    when higher, the temperature at which the product reaches ``schedule.limiting_viscosity``.

    Examples
    --------
    The oil of ``scenario.examples`` made Andrade's exp(-10 + 3000 / T) [1] with a limiting viscosity
    of 5 Pa s: T = 3000 / (ln 5 + 10) = 258.41 K, -14.74 degC (by hand), above its -40 degC no-flow:

    >>> import copy
    >>> from planner.scenario.examples import EXAMPLES
    >>> from planner.scenario.schema import scenario_from_dict
    >>> doc = copy.deepcopy(EXAMPLES["oil transfer"])
    >>> doc["product"]["viscosity"]["coefficients"] = {"a": -10.0, "b": 3000.0}
    >>> doc["schedule"]["limiting_viscosity"] = "5 Pa s"
    >>> limit, reason = limit_temperature(TransferSystem(scenario_from_dict(doc)))
    >>> from planner.scenario.wording import render
    >>> round(limit - 273.15, 2), render(reason, "SI")
    (-14.74, 'limiting viscosity 5,000.0 mPa·s')

    References
    ----------
    [1] Andrade, E. N. da C., The viscosity of liquids, Nature 125 (1930) 309-310 [mem].
    """
    product = transfer.product
    limit, reason = product.no_flow_temperature, "no-flow temperature"
    mu_limit = transfer.scenario.schedule.limiting_viscosity
    if mu_limit is not None:
        low, high = 150.0, product.max_temperature + 150.0
        if product.viscosity(high) < mu_limit < product.viscosity(low):
            for _ in range(80):  # bisection: viscosity falls with temperature
                mid = 0.5 * (low + high)
                if product.viscosity(mid) > mu_limit:
                    low = mid
                else:
                    high = mid
            if high > limit:
                limit, reason = high, Sentence("limiting viscosity {mu}", mu=Q(mu_limit, "dynamic_viscosity"))
    return limit, reason


def hold_analysis(transfer: TransferSystem, running_temperatures: dict[tuple[str, int], float]) -> Hold:
    """``running_temperatures`` maps (line name, segment index) to the contents' temperature at the stop.

    Examples
    --------
    The oil transfer stopped an hour at 40 degC, tracing failed: 37.70 degC (the module docstring [2]):

    >>> from planner.scenario.examples import example_scenario
    >>> stop = hold_analysis(TransferSystem(example_scenario("oil transfer")), {("discharge", 0): 313.15})
    >>> round(stop.segments[0].after_stop_failed_k - 273.15, 1), stop.time_to_limit_failed_s
    (37.7, None)
    """
    limit, reason = limit_temperature(transfer)
    stop = transfer.scenario.schedule.stop_duration
    product = transfer.product
    segments = []
    gelled = 0.0
    for name, line in (("suction", transfer.suction_line), ("discharge", transfer.discharge_line)):
        if line is None:
            continue
        for seg, heater in zip(line.segments, line.heaters):
            t0 = running_temperatures.get((name, seg.index), transfer.source.temperature)
            gap = seg.spec.untraced_length if seg.traced and heater.active else 0.0
            if gap > 0.0:       # the traced length at full output; the gap its own cold spot
                heater = Heater(transfer.tracing, 1.0, seg.ambient_temperature)
            results = {on: _cooling(seg, heater, product, t0, limit, stop, on) for on in (True, False)}
            segments.append(HoldSegment(name, seg.name, t0, limit, results[True][0], results[False][0],
                                        results[True][1], results[False][1]))
            if gap > 0.0:
                segments.append(_gap_hold(name, seg, product, gap, t0, limit, stop, results[True][1],
                                          results[False]))
            if product.yield_stress > 0.0:
                gelled += gelled_restart_pressure(product.yield_stress, seg.length, seg.inside_diameter)

    def first(key):
        timed = [(getattr(s, key), s) for s in segments if getattr(s, key) is not None]
        if not timed:
            return None, "none within 14 days"
        t, s = min(timed, key=lambda item: item[0])
        return t, f"{s.line}: {s.segment}"

    t_on, who_on = first("time_to_limit_traced_s")
    t_off, who_off = first("time_to_limit_failed_s")
    spec = transfer.pump_spec
    if spec.kind == "positive_displacement":
        pump_limit = spec.relief_setting
    else:
        rho = product.density(transfer.source.temperature)
        nu = product.kinematic_viscosity(transfer.source.temperature)
        pump_limit = transfer.pump.shut_off_head(nu) * rho * GRAVITY
    hold = Hold(limit, reason, stop, t_on, t_off, who_on, who_off,
                all(s.after_stop_traced_k > limit for s in segments),
                all(s.after_stop_failed_k > limit for s in segments),
                gelled, pump_limit, segments)
    for s in segments:
        # a stagnant metre whose tracing has no thermostat can heat without end; past the ceiling the
        # models (air, insulation, product data) do not hold: no figure, a stop (checks.bounds)
        if s.after_stop_traced_k > TEMPERATURE_CEILING_K:
            hold.too_hot.append(f"{s.line}: {s.segment}")
            s.after_stop_traced_k = math.nan
    return hold


def _cooling(seg, heater, product, t0: float, limit: float, stop: float, on: bool) -> tuple[float | None, float]:
    """(seconds to the limit or None, temperature at the end of the stop) of a lumped metre."""
    if t0 <= limit:
        return 0.0, t0
    to_limit = evolve(seg, heater, product, t0, HOLD_HORIZON_S, on, target=limit, rising=False)
    after = evolve(seg, heater, product, t0, stop, on)
    return (to_limit.time_s if to_limit.reached else None), after.temperature_at_end_k


def _gap_hold(name: str, seg, product, gap: float, t0: float, limit: float, stop: float, traced_after: float,
              failed: tuple[float | None, float]) -> HoldSegment:
    """An untraced gap during a stop: with the tracing on, its ends stay at the traced pipe's
    temperature and the gap cools towards its fin temperature (``transients.gap_warmup``); with the
    tracing failed it cools like the rest of the segment."""
    label = f"{seg.name}, untraced gap"
    if t0 <= limit:
        return HoldSegment(name, label, t0, limit, 0.0, 0.0, t0, t0)
    warm = gap_warmup(seg, product, gap, t0, traced_after, limit)
    after = gap_centre_after(seg, product, gap, t0, traced_after, stop)
    return HoldSegment(name, label, t0, limit, warm.falls_below_s, failed[0], min(after, t0), failed[1])

