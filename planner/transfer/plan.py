"""The transfer plan: operating point at the start, start-up options, the timeline, stop/restart,
energy and cost — one call, ``make_plan(scenario)``.

Everything here strings together the steps of the other modules; each step can be called alone.

Examples
--------
The oil transfer of ``scenario.examples`` (the oil line, ID 52.48 mm [1], traced at 100 W/m to
45 degC; a PD pump without slip, 0.25 L/rev at 300 rpm: 4.5 m^3/h, from a 5 m tank holding 60 m^3 at
40 degC into the top of a tank).
Pushing the cold contents out starts at once at the pump's 4.5 m^3/h, so the whole transfer is the
10 h that 45 m^3 take, and the pump's energy is the 37.7 MJ worked out by hand in
``transfer.timeline`` (Hagen-Poiseuille [2] and hydrostatics); ``make_plan``'s example checks both.

References
----------
[1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
[2] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow) and
    chapter 2 (hydrostatics).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np


from planner.errors import ComputationError
from planner.transfer.changes import with_changes  # noqa: F401  (the levers' public name, imported from here too)
from planner.transfer.hold import Hold, hold_analysis
from planner.line.march import DEFAULT_STEP_M, MarchResult
from planner.line.products import scenario_product
from planner.scenario.budget import STARTUP_WEATHER_PASSES
from planner.scenario.wording import Q, Sentence
from planner.scenario.schema import Scenario
from planner.transfer.startup import Prewarm, PushCold, prewarm, push_cold
from planner.correlations.constants import J_PER_KWH  # noqa: F401  (re-exported: one definition)
from planner.correlations.steam import latent_heat, saturation_temperature_gauge
from planner.transfer.system import OperatingPoint, SystemState, TransferSystem
from planner.transfer.timeline import Timeline, run_transfer
from planner.transfer.vessels import coil_steam_pressure
from planner.transfer.weather import WeatherProfile, line_start_default, weather_profile, weathered



@dataclass(frozen=True)
class Energy:
    """Energy of the plan [J, kg]: heat delivered by the tracing and the vessel heating, and how it is
    bought (electricity or steam), and the pump's shaft energy."""

    tracing_j: float                 # heat put in by the tracing (pre-warm included)
    tracing_electric_j: float        # of which bought as electricity (0 when steam traced)
    tracing_steam_kg: float
    pump_j: float
    vessel_heating_j: float
    vessel_heating_electric_j: float
    vessel_heating_steam_kg: float

    @property
    def electrical_j(self) -> float:
        """Electricity bought: tracing, pump and vessel heating [J]."""
        return self.tracing_electric_j + self.pump_j + self.vessel_heating_electric_j

    @property
    def steam_kg(self) -> float:
        """Steam used by the tracing and the vessel heating [kg]."""
        return self.tracing_steam_kg + self.vessel_heating_steam_kg

    def as_dict(self) -> dict:
        """The documented ``energy`` keys of the plan JSON (kWh for electricity, as on a bill)."""
        return {
            "tracing_j": self.tracing_j, "tracing_kwh": self.tracing_electric_j / J_PER_KWH,
            "tracing_steam_kg": self.tracing_steam_kg, "pump_j": self.pump_j, "pump_kwh": self.pump_j / J_PER_KWH,
            "vessel_heating_j": self.vessel_heating_j,
            "vessel_heating_kwh": self.vessel_heating_electric_j / J_PER_KWH,
            "vessel_heating_steam_kg": self.vessel_heating_steam_kg,
            "electrical_j": self.electrical_j, "electrical_kwh": self.electrical_j / J_PER_KWH,
            "steam_kg": self.steam_kg,
        }


@dataclass(frozen=True)
class Costs:
    """Costs of the plan in the scenario's currency; ``complete`` is False when the start-up or the
    transfer cannot be carried out, and the total then covers only the part that can."""

    currency: str
    electricity: float
    steam: float
    demurrage: float
    demurrage_hours: float
    complete: bool

    @property
    def energy(self) -> float:
        return self.electricity + self.steam

    @property
    def total(self) -> float:
        return self.electricity + self.steam + self.demurrage

    def as_dict(self) -> dict:
        return {"currency": self.currency, "electricity": self.electricity, "steam": self.steam,
                "energy": self.energy, "demurrage": self.demurrage, "demurrage_hours": self.demurrage_hours,
                "total": self.total, "complete": self.complete}


@dataclass
class Plan:
    scenario: Scenario
    start: OperatingPoint
    start_profile: MarchResult | None
    timeline: Timeline
    prewarm: Prewarm
    push_cold: PushCold
    start_mode: str
    startup_time_s: float | None
    line_start_temperature_k: float
    hold: Hold
    energy: Energy
    costs: Costs
    total_time_s: float | None
    viscosity_factor: float = 1.0
    suction_profile: MarchResult | None = None
    system: TransferSystem | None = None
    after_prewarm: PushCold | None = None   # pushing out the pre-warmed (but cooler) contents
    weather: WeatherProfile | None = None   # the weather over the plan (None: the site's ambient throughout)
    startup_at_s: float = 0.0               # the moment [s from the start] whose weather the start-up took
    coldest_at_s: float = 0.0               # the coldest moment of the plan: the tracing's capacity
    stop_at_s: float = 0.0                  # the coldest moment of the transfer: the stop checked there
    transfer_at_s: float = 0.0              # when the transfer's timeline begins (after the start-up)

    def when(self, elapsed_s: float):
        """A moment of the plan in a sentence: "at 03:40" (with ``schedule.start``), else "after 5.2 h"."""
        return (self.weather or WeatherProfile((0.0,), (0.0,), (0.0,))).when(elapsed_s)

    @property
    def startup_push(self) -> PushCold | None:
        """The push-out that starts the transfer: of the cold contents, or of the pre-warmed ones."""
        if self.start_mode == "push_cold":
            return self.push_cold if self.push_cold.possible else None
        return self.after_prewarm if self.after_prewarm is not None and self.after_prewarm.possible else None

    @property
    def prewarm_stuck(self) -> str:
        """Why the contents cannot move once the pre-warm is done ("" when they can, and outside the
        pre-warm mode): set in an untraced part, or too cold or stiff to push out."""
        if self.start_mode != "prewarm" or not self.prewarm.possible:
            return ""
        if self.prewarm.stuck:
            return self.prewarm.stuck_message
        if self.after_prewarm is not None and not self.after_prewarm.possible:
            return Sentence("after pre-warming, the contents cannot be pushed out: {m}", m=self.after_prewarm.message)
        return ""

    @property
    def peak_discharge_pressure_pa(self) -> float | None:
        """The one definition of the peak discharge pressure [Pa gauge]: the highest pump-outlet pressure
        over the transfer timeline and over the push-out that starts it (cold or pre-warmed contents);
        None when the pump moves nothing at all."""
        values = [float(v) for v in self.timeline.arrays["discharge_pressure_pa"] if math.isfinite(v)]
        push = self.startup_push
        if push is not None and math.isfinite(push.peak_discharge_pressure_pa):
            values.append(float(push.peak_discharge_pressure_pa))
        return max(values) if values else None

    @property
    def pump_beyond_method(self) -> OperatingPoint | None:
        """The running operating point (the start or a timeline increment) with the highest ANSI/HI 9.6.7
        parameter B, when some running point lies beyond the method (B at or above ``pumps.HI_B_MAX``);
        None when every point is within it (or the pump is not centrifugal).  The figures its curve makes
        (flows, shaft power, pump energy, times) are then not results."""
        beyond = [op for op in [self.start, *self.timeline.operating_points] if op.hi_b is not None and
                  not op.hi_in_range]
        return max(beyond, key=lambda op: op.hi_b) if beyond else None

    @property
    def chosen_push(self) -> PushCold | None:
        """The push-out of the chosen start-up: of the cold contents, or of the pre-warmed ones (None when
        the start-up pushes nothing out)."""
        return self.push_cold if self.start_mode == "push_cold" else self.after_prewarm

    @property
    def ok(self) -> bool:
        return self.start.moving and self.timeline.completed


def make_plan(scenario: Scenario, viscosity_factor: float = 1.0, steps: int | None = None,
              both_startups: bool = True, march_step: float = DEFAULT_STEP_M) -> Plan:
    """The whole plan.  ``both_startups=False`` works out only the scenario's chosen start-up mode
    (comparisons); the other option is then marked as not evaluated.  ``march_step`` [m]: the
    longest step of every march of the plan (the grid test makes it finer).  With a ``[weather]``
    section the start-up, the timeline and the stop follow the weather (``transfer.weather``).

    Examples
    --------
    The oil transfer: 10 h and 37.7 MJ of pump energy (the module docstring, by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> plan = make_plan(example_scenario("oil transfer"))
    >>> round(plan.total_time_s / 3600, 3), round(plan.energy.pump_j / 1e6, 1)
    (10.0, 37.7)
    """
    product = scenario_product(scenario, viscosity_factor=viscosity_factor)   # with the [calibration] factor
    base = TransferSystem(scenario, product=product, step=march_step)
    source = scenario.source
    if source.temperature <= product.no_flow_temperature:
        raise ComputationError(Sentence(
            "source.temperature: {t} is at or below the product's no-flow temperature {limit} "
            "(product.no_flow_temperature): heat the source before transfer", t=Q(source.temperature, "temperature"),
            limit=Q(product.no_flow_temperature, "temperature")))
    weather = weather_profile(scenario)
    design_ambient = scenario.site.design_ambient_temperature or scenario.site.ambient_temperature
    if weather is not None and scenario.schedule.line_start_temperature is None:
        design_ambient = line_start_default(weather)
    line_start = scenario.schedule.line_start_temperature or design_ambient
    if weather is None:       # today's order: the timeline, then the start-up
        start, running = _start(base, scenario)
        timeline = run_transfer(base, steps=steps, first_guess=start[0].flow if start[0].moving else None)
        up = _startup(base, start[0], line_start, scenario.schedule.start_mode, both_startups)
        system, startup_at, coldest_at, stop_at, begins = base, 0.0, 0.0, 0.0, 0.0
    else:
        system, start, running, up, startup_at = _startup_in_weather(base, weather, line_start, both_startups)
        begins = _startup_hours(up)       # the transfer's clock: after the start-up
        timeline = run_transfer(base, steps=steps, first_guess=start[0].flow if start[0].moving else None,
                                weather=weather, clock_s=begins)
        coldest_at = weather.coldest_between(0.0, begins + timeline.total_time_s)
        stop_at = weather.coldest_between(begins, begins + timeline.total_time_s)
    warm, cold, after_prewarm, startup_time = up
    mode = scenario.schedule.start_mode
    hold = hold_analysis(system if weather is None else weathered(base, *weather.state(stop_at)), running)
    energy, costs = _energy_and_costs(scenario, system, timeline, warm if mode == "prewarm" else None, startup_time)
    total = None if startup_time is None or not timeline.completed else startup_time + timeline.total_time_s
    return Plan(scenario, start[0], start[1], timeline, warm, cold, mode, startup_time, line_start, hold,
                energy, costs, total, viscosity_factor, start[2], system, after_prewarm, weather, startup_at, coldest_at,
                stop_at, begins)


def _start(system: TransferSystem, scenario: Scenario) -> tuple[tuple, dict]:
    """(the operating point at the start, its discharge profile, the suction's profile) and the running
    temperatures per segment."""
    source = scenario.source
    state = SystemState(source.temperature, source.initial_volume)
    start = system.operating_point(state)
    start_profile = suction_profile = None
    running: dict[tuple[str, int], float] = {}
    if start.moving:
        point = system.at_flow(start.flow, state, record=True)
        start_profile = point.discharge_result
        _running_temperatures(system, start_profile, point, running)
        suction_profile = point.suction_result      # marched with the discharge, recorded
    return (start, start_profile, suction_profile), running


def _startup_in_weather(base: TransferSystem, weather, line_start: float, both_startups: bool):
    """The start and the start-up at the weather of the plan's start, then again at the coldest moment of
    the hours that start-up takes (a pre-warm or push-out runs through them), until that moment's weather
    state stays the same (at most ``STARTUP_WEATHER_PASSES`` in all): (system, start, running, the start-up,
    the moment [s] whose weather it took)."""
    mode = base.scenario.schedule.start_mode
    at = 0.0
    for attempt in range(STARTUP_WEATHER_PASSES):
        system = weathered(base, *weather.state(at))
        start, running = _start(system, base.scenario)
        up = _startup(system, start[0], line_start, mode, both_startups)
        later = weather.coldest_between(0.0, _startup_hours(up))
        if attempt == STARTUP_WEATHER_PASSES - 1 or weather.state(later) == weather.state(at):
            break
        at = later
    return system, start, running, up, at


def _startup_hours(up) -> float:
    """How long the start-up runs [s]: its time, or where it cannot be completed, the pre-warm's own time
    (contents stuck in a gap after it) or 0."""
    warm, startup_time = up[0], up[3]
    if startup_time is not None:
        return startup_time
    return warm.time_s if warm.possible and warm.time_s is not None and math.isfinite(warm.time_s) else 0.0


def _startup(system: TransferSystem, start: OperatingPoint, line_start: float, mode: str, both_startups: bool):
    """(pre-warm, cold push-out, push-out after the pre-warm, start-up time [s] or None)."""
    source = system.scenario.source
    warm = prewarm(system, line_start) if both_startups or mode == "prewarm" else \
        Prewarm(line_start, line_start, False, None, 0.0, message="not evaluated")
    cold = push_cold(system, line_start) if both_startups or mode == "push_cold" else \
        PushCold(False, "not evaluated", line_start, 0.0, "", math.nan, math.nan, math.nan, None, False)
    after_prewarm = None
    if mode == "prewarm":
        startup_time = warm.time_s
        # after pre-warming, the line's contents are at the pre-warm target (or warmer, if they started
        # so): where that is cooler than the product, the transfer starts by pushing them out
        contents = max(warm.target_k, line_start)
        if warm.possible and warm.stuck:
            startup_time = None                     # contents set in an untraced part: nothing moves
        elif warm.possible and start.moving and contents < source.temperature:
            # contents at the pre-warm's target, near the product's: the warm start's flow is a close guess
            after_prewarm = push_cold(system, contents, guess=start.flow)
            if after_prewarm.possible and after_prewarm.front_time_s is not None:
                volume = sum(s.area * s.length for s in system.discharge_line.segments)
                startup_time += max(0.0, after_prewarm.front_time_s - volume / start.flow)
            else:
                startup_time = None
    else:
        if cold.possible and cold.front_time_s is not None and start.moving and system.discharge_line is not None:
            volume = sum(s.area * s.length for s in system.discharge_line.segments)
            startup_time = max(0.0, cold.front_time_s - volume / start.flow)
        else:
            startup_time = None
    return warm, cold, after_prewarm, startup_time


def _running_temperatures(system, profile, point, running):
    nodes_x = profile.nodes["x"]
    temps = profile.nodes["temperature"]
    for seg in system.discharge_line.segments:
        inside = (nodes_x >= seg.x_start - 1e-9) & (nodes_x <= seg.x_end + 1e-9)
        running[("discharge", seg.index)] = float(np.min(temps[inside])) if inside.any() else point.pump_inlet_temperature
    if system.suction_line is not None:
        for seg in system.suction_line.segments:
            running[("suction", seg.index)] = min(point.source_temperature, point.pump_inlet_temperature)


def _steam_latent(pressure: float) -> float:
    """Latent heat [J/kg] of steam supplied at ``pressure`` (gauge) [Pa]."""
    return latent_heat(saturation_temperature_gauge(pressure))


def _energy_and_costs(scenario: Scenario, system: TransferSystem, timeline: Timeline, warm: Prewarm | None,
                      startup_time: float | None) -> tuple[Energy, Costs]:
    tariffs = scenario.costs
    steam_traced = scenario.tracing.kind == "steam"
    latent = _steam_latent(scenario.tracing.steam_pressure)
    coil_latent = _steam_latent(coil_steam_pressure(scenario))
    trace_j = timeline.trace_energy_j + (warm.energy_j if warm is not None and warm.possible else 0.0)
    vessel_j = timeline.vessel_heating_energy_j
    medium = scenario.source.heating_medium
    energy = Energy(
        tracing_j=trace_j, tracing_electric_j=0.0 if steam_traced else trace_j,
        tracing_steam_kg=trace_j / latent if steam_traced else 0.0, pump_j=timeline.pump_energy_j,
        vessel_heating_j=vessel_j, vessel_heating_electric_j=vessel_j if medium == "electric" else 0.0,
        vessel_heating_steam_kg=vessel_j / coil_latent if medium == "steam" else 0.0)
    electricity = energy.electrical_j / J_PER_KWH * tariffs.electricity_per_kwh
    steam_cost = energy.steam_kg / 1000.0 * tariffs.steam_per_tonne
    hours_at_berth = ((startup_time or 0.0) + timeline.total_time_s) / 3600.0
    costs = Costs(currency=tariffs.currency, electricity=electricity, steam=steam_cost,
                  demurrage=hours_at_berth * tariffs.demurrage_per_hour, demurrage_hours=hours_at_berth,
                  complete=startup_time is not None and timeline.completed)
    return energy, costs
