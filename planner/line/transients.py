"""Lumped transients of a stagnant line, per metre of each segment: pre-warm and cool-down.

A metre of line (product, pipe metal) at one temperature T obeys

    C dT/dt = P_heater(T) - q_loss(T)

C = rho_p cp_p A_inside + m_steel c_steel [J/(m K)]; q_loss from the outward thermal path
(``heat_loss.jacket_temperature``), P_heater the tracing's capacity at T (full output below the
setpoint; at the setpoint the thermostat holds it). Integrated in small exponential steps with the
coefficients linearised at each step (exact for constant coefficients).

Lumped means the product's own conduction is taken as fast. For thick, viscous contents the centre
of a large pipe warms and cools more slowly than this says: treat warm-up times as the shortest
possible and cool-down times as the longest likely when the heater is on, and read them with margin.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from planner.line.heat_loss import jacket_temperature
from planner.line.products import Product
from planner.line.route import LineSegment
from planner.line.tracing import Heater

STEEL_DENSITY = 7850.0        # kg/m3 carbon steel [handbook]
STEEL_SPECIFIC_HEAT = 490.0   # J/(kg K) carbon steel at 20-100 degC [handbook, mem]


def heat_capacity_per_metre(seg: LineSegment, product: Product, temperature: float) -> float:
    inside = product.density(temperature) * product.specific_heat(temperature) * seg.area
    metal_area = math.pi / 4.0 * (seg.outside_diameter ** 2 - seg.inside_diameter ** 2)
    if seg.kind == "hose":
        return inside + metal_area * 1200.0 * 1500.0  # elastomer hose wall [mem]
    return inside + metal_area * STEEL_DENSITY * STEEL_SPECIFIC_HEAT


@dataclass
class TransientResult:
    reached: bool            # the target temperature was crossed within the horizon
    time_s: float | None     # when it was crossed
    settles_at_k: float      # where the temperature was heading at the end (local equilibrium)
    temperature_at_end_k: float
    energy_j_per_m: float    # heater energy delivered per metre until the end


def _rates(seg: LineSegment, heater: Heater, t: float, heater_on: bool) -> tuple[float, float, float]:
    """(net heat rate [W/m], its slope d/dT [W/(m K)], heater power [W/m]) at temperature t."""
    _, q_out = jacket_temperature(seg, t)
    _, q_out2 = jacket_temperature(seg, t + 0.5)
    loss_slope = (q_out2 - q_out) / 0.5
    if not heater_on or not heater.active:
        return -q_out, min(-loss_slope, -1e-6), 0.0
    power = heater.capacity(t)
    slope_power = (heater.capacity(t + 0.5) - power) / 0.5
    if heater.setpoint is not None and t >= heater.setpoint - 1e-3 and power >= q_out:
        return 0.0, -1.0, q_out  # the thermostat holds the setpoint
    return power - q_out, min(slope_power - loss_slope, -1e-6), power


def evolve(seg: LineSegment, heater: Heater, product: Product, t_start: float, horizon_s: float,
           heater_on: bool, target: float | None = None, rising: bool = True) -> TransientResult:
    """Integrate a stagnant metre of ``seg`` from ``t_start`` for ``horizon_s`` seconds, stopping early
    where it crosses ``target`` (upwards if ``rising``)."""
    t, time, energy = t_start, 0.0, 0.0
    capacity = heat_capacity_per_metre(seg, product, t_start)
    settles = t
    for _ in range(5000):
        if time >= horizon_s:
            break
        net, slope, power = _rates(seg, heater, t, heater_on)
        settles = t - net / slope
        remaining = horizon_s - time
        if abs(net) < 1e-9:  # held (thermostat) or settled: nothing changes any more
            energy += power * remaining
            time = horizon_s
            break
        tau = capacity / -slope
        dt = min(0.2 * tau, remaining)
        t_new = settles + (t - settles) * math.exp(-dt / tau)
        if heater_on and heater.setpoint is not None and t < heater.setpoint < t_new:
            # stop on the setpoint: the thermostat takes over there
            dt = tau * math.log((settles - t) / (settles - heater.setpoint))
            t_new = heater.setpoint
        if target is not None and ((rising and t < target <= t_new) or (not rising and t > target >= t_new)):
            dt_hit = tau * math.log((settles - t) / (settles - target))
            return TransientResult(True, time + dt_hit, settles, target, energy + power * dt_hit)
        energy += power * dt
        time += dt
        t = t_new
    return TransientResult(False, None, settles, t, energy)
