"""The transfer plan: operating point at the start, start-up options, the timeline, stop/restart,
energy and cost — one call, ``make_plan(scenario)``.

Everything here strings together the steps of the other modules; each step can be called alone.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from planner.errors import ComputationError
from planner.transfer.hold import Hold, hold_analysis
from planner.line.march import MarchResult
from planner.line.products import scenario_product
from planner.scenario.schema import Scenario, scenario_from_dict, scenario_to_dict
from planner.transfer.startup import Prewarm, PushCold, prewarm, push_cold
from planner.correlations.steam import latent_heat, saturation_temperature_gauge
from planner.transfer.system import OperatingPoint, SystemState, TransferSystem
from planner.transfer.timeline import Timeline, run_transfer

J_PER_KWH = 3.6e6
DEFAULT_COIL_STEAM_GAUGE_PA = 3.5e5  # vessel coils: assumed supply when the line is not steam traced


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
    energy: dict
    costs: dict
    total_time_s: float | None
    viscosity_factor: float = 1.0
    suction_profile: MarchResult | None = None
    system: TransferSystem | None = None
    after_prewarm: PushCold | None = None   # pushing out the pre-warmed (but cooler) contents

    @property
    def startup_push(self) -> PushCold | None:
        """The push-out that starts the transfer: of the cold contents, or of the pre-warmed ones."""
        if self.start_mode == "push_cold":
            return self.push_cold if self.push_cold.possible else None
        return self.after_prewarm if self.after_prewarm is not None and self.after_prewarm.possible else None

    @property
    def ok(self) -> bool:
        return self.start.moving and self.timeline.completed


def with_changes(scenario: Scenario, setpoint: float | None = None, steam_pressure: float | None = None,
                 pump_speed: float | None = None, flow_limit: float | None = None,
                 ambient_shift: float = 0.0) -> Scenario:
    """A validated copy of the scenario with levers moved (SI arguments: K, Pa gauge, rev/s, m3/s;
    ``ambient_shift`` in K added to every ambient temperature)."""
    data = scenario_to_dict(scenario)   # default units; values below are given with their unit
    if setpoint is not None:
        data["tracing"]["setpoint"] = f"{setpoint!r} K"
    if steam_pressure is not None:
        data["tracing"]["steam_pressure"] = f"{steam_pressure!r} Pa"
    if pump_speed is not None:
        data["pump"]["speed"] = f"{pump_speed!r} revolution/second"
        if data["pump"].get("max_speed") is not None and scenario.pump.max_speed < pump_speed:
            data["pump"]["max_speed"] = f"{pump_speed!r} revolution/second"
    if flow_limit is not None:
        data["pump"]["control"] = "fixed_flow"
        data["pump"]["flow_setpoint"] = f"{flow_limit!r} m**3/s"
    if ambient_shift:
        site = data["site"]
        site["ambient_temperature"] += ambient_shift          # degC plain numbers: a shift in K
        if site.get("design_ambient_temperature") is not None:
            site["design_ambient_temperature"] += ambient_shift
        for route in (data["route"], data.get("suction")):
            for seg in (route or {}).get("segments", []):
                if seg["surroundings"].get("ambient_temperature") is not None:
                    seg["surroundings"]["ambient_temperature"] += ambient_shift
    return scenario_from_dict(data)


def make_plan(scenario: Scenario, viscosity_factor: float = 1.0, steps: int | None = None,
              both_startups: bool = True) -> Plan:
    """The whole plan.  ``both_startups=False`` works out only the scenario's chosen start-up mode
    (comparisons); the other option is then marked as not evaluated."""
    product = scenario_product(scenario, viscosity_factor=viscosity_factor)   # with the [calibration] factor
    system = TransferSystem(scenario, product=product)
    source = scenario.source
    if source.temperature <= product.no_flow_temperature:
        raise ComputationError(
            f"source temperature {source.temperature - 273.15:.1f} °C is at or below the product's no-flow "
            f"temperature {product.no_flow_temperature - 273.15:.1f} °C: heat the source before transfer")
    state = SystemState(source.temperature, source.initial_volume)
    start = system.operating_point(state)
    start_profile = suction_profile = None
    running: dict[tuple[str, int], float] = {}
    if start.moving:
        point = system.at_flow(start.flow, state, record=True)
        start_profile = point.discharge_result
        _running_temperatures(system, start_profile, point, running)
        if system.suction_line is not None:
            from planner.line.march import march

            suction_profile = march(system.suction_line, start.flow, source.temperature,
                                    system.source_pressure(state), step=system.step)
    timeline = run_transfer(system, steps=steps, first_guess=start.flow if start.moving else None)
    design_ambient = scenario.site.design_ambient_temperature or scenario.site.ambient_temperature
    line_start = scenario.schedule.line_start_temperature or design_ambient
    mode = scenario.schedule.start_mode
    warm = prewarm(system, line_start) if both_startups or mode == "prewarm" else \
        Prewarm(line_start, line_start, False, None, 0.0, message="not evaluated")
    cold = push_cold(system, line_start) if both_startups or mode == "push_cold" else \
        PushCold(False, "not evaluated", line_start, 0.0, "", math.nan, math.nan, math.nan, None, False)
    after_prewarm = None
    if mode == "prewarm":
        startup_time = warm.time_s
        if warm.possible and start.moving and warm.target_k < source.temperature:
            # after pre-warming, the line's contents are at the pre-warm target, cooler than the
            # product: the transfer starts by pushing them out
            after_prewarm = push_cold(system, warm.target_k)
            if after_prewarm.possible:
                volume = sum(s.area * s.length for s in system.discharge_line.segments)
                startup_time += max(0.0, after_prewarm.front_time_s - volume / start.flow)
    else:
        if cold.possible and start.moving and system.discharge_line is not None:
            volume = sum(s.area * s.length for s in system.discharge_line.segments)
            startup_time = max(0.0, cold.front_time_s - volume / start.flow)
        else:
            startup_time = None
    hold = hold_analysis(system, running)
    energy, costs = _energy_and_costs(scenario, system, timeline, warm if mode == "prewarm" else None, startup_time)
    total = None if startup_time is None or not timeline.completed else startup_time + timeline.total_time_s
    return Plan(scenario, start, start_profile, timeline, warm, cold, mode, startup_time, line_start, hold,
                energy, costs, total, viscosity_factor, suction_profile, system, after_prewarm)


def _running_temperatures(system, profile, point, running):
    nodes_x = profile.nodes["x"]
    temps = profile.nodes["temperature"]
    for seg in system.discharge_line.segments:
        inside = (nodes_x >= seg.x_start - 1e-9) & (nodes_x <= seg.x_end + 1e-9)
        running[("discharge", seg.index)] = float(np.min(temps[inside])) if inside.any() else point.pump_inlet_temperature
    if system.suction_line is not None:
        for seg in system.suction_line.segments:
            running[("suction", seg.index)] = min(point.source_temperature, point.pump_inlet_temperature)


def _steam_latent(scenario: Scenario) -> float:
    pressure = scenario.tracing.steam_pressure if scenario.tracing.kind == "steam" else DEFAULT_COIL_STEAM_GAUGE_PA
    return latent_heat(saturation_temperature_gauge(pressure))


def _energy_and_costs(scenario: Scenario, system: TransferSystem, timeline: Timeline, warm: Prewarm | None,
                      startup_time: float | None) -> tuple[dict, dict]:
    tariffs = scenario.costs
    steam_traced = scenario.tracing.kind == "steam"
    latent = _steam_latent(scenario)
    trace_j = timeline.trace_energy_j + (warm.energy_j if warm is not None and warm.possible else 0.0)
    vessel_j = timeline.vessel_heating_energy_j
    energy = {
        "tracing_j": trace_j,
        "tracing_kwh": 0.0 if steam_traced else trace_j / J_PER_KWH,
        "tracing_steam_kg": trace_j / latent if steam_traced else 0.0,
        "pump_kwh": timeline.pump_energy_j / J_PER_KWH,
        "vessel_heating_j": vessel_j,
        "vessel_heating_kwh": vessel_j / J_PER_KWH if scenario.source.heating_medium == "electric" else 0.0,
        "vessel_heating_steam_kg": vessel_j / latent if scenario.source.heating_medium == "steam" else 0.0,
    }
    electricity = (energy["tracing_kwh"] + energy["pump_kwh"] + energy["vessel_heating_kwh"]) * tariffs.electricity_per_kwh
    steam_kg = energy["tracing_steam_kg"] + energy["vessel_heating_steam_kg"]
    steam_cost = steam_kg / 1000.0 * tariffs.steam_per_tonne
    hours_at_berth = ((startup_time or 0.0) + timeline.total_time_s) / 3600.0
    demurrage = hours_at_berth * tariffs.demurrage_per_hour
    costs = {
        "currency": tariffs.currency,
        "electricity": electricity,
        "steam": steam_cost,
        "energy": electricity + steam_cost,
        "demurrage": demurrage,
        "demurrage_hours": hours_at_berth,
        "total": electricity + steam_cost + demurrage,
        "complete": startup_time is not None and timeline.completed,
    }
    return energy, costs


def finite_or_none(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value
