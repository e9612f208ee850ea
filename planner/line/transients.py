"""Lumped transients of a stagnant line, per metre of each segment: pre-warm and cool-down.

A metre of line (product, pipe metal) at one temperature T obeys

    C dT/dt = P_heater(T) - q_loss(T)

C = rho_p cp_p A_inside + m_steel c_steel [J/(m K)]; q_loss from the outward thermal path
(``heat_path.jacket_temperature``), P_heater the tracing's capacity at T (full output below the
setpoint; at the setpoint the thermostat holds it). Integrated in small exponential steps with the
coefficients linearised at each step (exact for constant coefficients).

An untraced gap inside a traced segment (valves, flanges: ``untraced_length``) is its own cold spot:
the traced pipe either side warms at the heater's full output, and the gap warms only by conduction
along the pipe wall and the contents from its two warm ends (``gap_warmup``), the fin equation

    C dT/dt = kA d2T/dx2 - U (T - T_amb),  T = T_end at both ends of the gap,

whose steady centre temperature is T_amb + (T_end - T_amb) / cosh(m L / 2), m = sqrt(U / kA)
(Incropera & DeWitt, ch. 3, the fin with both ends held), reached through the sine series of the
transient (separation of variables; Carslaw & Jaeger, *Conduction of Heat in Solids*, ch. 3), with
U, kA and C frozen at the mean of the start and end temperatures.  The untraced length of a segment is taken as one gap (the slowest way it can be split).

Lumped means the product's own conduction is taken as fast. For thick, viscous contents the centre
of a large pipe warms and cools more slowly than this says: treat warm-up times as the shortest
possible and cool-down times as the longest likely when the heater is on, and read them with margin.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from planner.line.brent import brentq

from planner.line.heat_path import jacket_temperature
from planner.line.products import Product
from planner.line.route import LineSegment
from planner.line.tracing import Heater

STEEL_DENSITY = 7850.0        # kg/m3 carbon steel [handbook]
STEEL_SPECIFIC_HEAT = 490.0   # J/(kg K) carbon steel at 20-100 degC [handbook, mem]
STEEL_CONDUCTIVITY = 45.0     # W/(m K) carbon steel near 100 degC [handbook, mem]
HOSE_WALL_CONDUCTIVITY = 0.25  # W/(m K) reinforced elastomer [mem]


def _metal_area(seg: LineSegment) -> float:
    return math.pi / 4.0 * (seg.outside_diameter ** 2 - seg.inside_diameter ** 2)


def heat_capacity_per_metre(seg: LineSegment, product: Product, temperature: float) -> float:
    """Heat capacity of a metre of line [J/(m K)]: contents rho cp A plus the wall (carbon steel
    7850 kg/m^3 x 490 J/(kg K) [2] [mem]; a hose wall 1200 x 1500 [mem]).

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC): 900 x 2000 x pi/4 x 0.05248^2 + 7850 x 490 x pi/4
    (0.0603^2 - 0.05248^2) = 3893 + 2665 = 6558 J/(m K) (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> from planner.line.route import build_line
    >>> seg = build_line(scenario.route, scenario.site)[0]
    >>> from planner.line.products import scenario_product
    >>> product = scenario_product(scenario)
    >>> round(heat_capacity_per_metre(seg, product, 293.15))
    6558

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    [2] Carbon steel density and specific heat: handbook values, e.g. Incropera & DeWitt, Table A.1
        (plain carbon steel: 7854 kg/m^3, 434-490 J/(kg K) near room temperature) [mem].
    """
    inside = product.density(temperature) * product.specific_heat(temperature) * seg.area
    metal_area = _metal_area(seg)
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


def heater_energy(power: float, power_slope: float, gap: float, dt: float, tau: float) -> float:
    """Heat a heater delivers [J/m] over ``dt`` [s] of a step of the exponential integrator: its output
    ``power`` [W/m] at the step's start, ``power_slope`` [W/(m K)] with the temperature, which moves
    toward equilibrium ``gap`` [K] away with time constant ``tau`` [s]:
    P dt + dP/dT gap (dt - tau (1 - exp(-dt / tau))), exact for an output linear in the temperature
    (steam; a self-regulating heater nearly) with the step's own linearisation.  The output at the step's
    start alone (a left sum) overstated the pre-warm energy by 2.8-3.4 % on the demos at 0.2 tau steps.

    Examples
    --------
    Steam tracing of 10 W/(m K) to 150 degC, a wall from 20 degC with tau = 1000 s settling at 150 degC:
    the output falls from 1300 W/m as 1300 exp(-t/tau), so over 500 s it delivers 1300 tau (1 - e^-0.5) =
    511.5 kJ/m (by hand, integrating the exponential):

    >>> round(heater_energy(1300.0, -10.0, 130.0, 500.0, 1000.0) / 1e3, 1)
    511.5
    """
    return power * dt + power_slope * gap * (dt - tau * -math.expm1(-dt / tau))


def evolve(seg: LineSegment, heater: Heater, product: Product, t_start: float, horizon_s: float,
           heater_on: bool, target: float | None = None, rising: bool = True) -> TransientResult:
    """Integrate a stagnant metre of ``seg`` from ``t_start`` for ``horizon_s`` seconds, stopping early
    where it crosses ``target`` (upwards if ``rising``).

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC), untraced, cooling from 60 degC for an hour: Newton's law of cooling
    [1] with the loss of the reference recipe (9.048 W/m at 40 K: U = 0.2262 W/(m K), see
    ``heat_path.jacket_temperature``) and C = 6558 J/(m K) gives 20 + 40 exp(-3600 U / C) = 55.33 degC;
    over a month it settles at the ambient:

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> from planner.line.route import build_line
    >>> seg = build_line(scenario.route, scenario.site)[0]
    >>> from planner.line.products import scenario_product
    >>> product = scenario_product(scenario)
    >>> from planner.line.tracing import Heater
    >>> heater = Heater(scenario.tracing)
    >>> round(evolve(seg, heater, product, 333.15, 3600.0, False).temperature_at_end_k - 273.15, 1)
    55.3
    >>> round(evolve(seg, heater, product, 333.15, 30 * 86400.0, False).settles_at_k - 273.15, 2)
    20.0

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 5.1
        (the lumped capacitance method).
    """
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
        power_slope = (heater.capacity(t + 0.5) - power) / 0.5 if power > 0.0 else 0.0
        if target is not None and ((rising and t < target <= t_new) or (not rising and t > target >= t_new)):
            dt_hit = tau * math.log((settles - t) / (settles - target))
            return TransientResult(True, time + dt_hit, settles, target,
                                   energy + heater_energy(power, power_slope, settles - t, dt_hit, tau))
        energy += heater_energy(power, power_slope, settles - t, dt, tau)
        time += dt
        t = t_new
    return TransientResult(False, None, settles, t, energy)


@dataclass
class GapWarmup:
    """An untraced gap warmed from its ends: when its centre reaches the target (None: it never does),
    and the temperature its centre settles at."""

    length_m: float
    time_s: float | None
    settles_at_k: float
    falls_below_s: float | None = None    # starting above the target: when it cools below it (None: never)


def gap_warmup(seg: LineSegment, product: Product, gap_m: float, t_start: float, t_ends: float,
               target: float) -> GapWarmup:
    """The centre of an untraced gap of ``gap_m`` metres whose ends are held at ``t_ends`` [K] from
    time 0, starting at ``t_start``: the time it takes to reach ``target`` (0 when it starts there).

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC); a 2 m gap with its ends at 60 degC: the fin with both ends held [1]
    settles at T_amb + (T_end - T_amb) / cosh(m L / 2) = 25.57 degC, m = sqrt(U / kA) with U =
    0.2226 W/(m K) (reference recipe at 40 degC, see ``heat_path.jacket_temperature``) and kA =
    45 x 6.926e-4 + 0.13 x 2.163e-3 = 0.03145 W m/K; it never reaches 30 degC:

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> from planner.line.route import build_line
    >>> seg = build_line(scenario.route, scenario.site)[0]
    >>> from planner.line.products import scenario_product
    >>> product = scenario_product(scenario)
    >>> gap = gap_warmup(seg, product, 2.0, 293.15, 333.15, 303.15)
    >>> round(gap.settles_at_k - 273.15, 1), gap.time_s
    (25.6, None)

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 3.6
        (fin of uniform cross-section, both ends at a prescribed temperature).
    [2] Carslaw, H. S., Jaeger, J. C., Conduction of Heat in Solids, 2nd ed., Oxford, 1959, chapter 3
        (the transient by its sine series).
    """
    settles, centre = _gap_model(seg, product, gap_m, t_start, t_ends)
    if t_start >= target:
        # already there; if it settles below the target it cools through it (then: when)
        below = _crossing(centre, target, rising=False) if settles < target else None
        return GapWarmup(gap_m, 0.0, settles, below)
    if settles <= target:
        return GapWarmup(gap_m, None, settles)
    return GapWarmup(gap_m, _crossing(centre, target, rising=True), settles)


def gap_centre_after(seg: LineSegment, product: Product, gap_m: float, t_start: float, t_ends: float,
                     time_s: float) -> float:
    """The centre temperature [K] of the gap ``time_s`` seconds after its ends were set to ``t_ends``.

    Examples
    --------
    The 2 m gap of ``gap_warmup``'s example (oil line, contents at the 20 degC ambient, ends at
    60 degC): after an hour the warmth has spread only sqrt(alpha t) = 0.13 m along it (alpha =
    kA / C = 0.03145 / 6558 = 4.8e-6 m^2/s), so the centre is still at 20.0 degC; after 30 days it
    has settled at the fin's 25.6 degC [1] (by hand, see ``gap_warmup``):

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.line.route import build_line
    >>> from planner.line.products import scenario_product
    >>> scenario = example_scenario("oil line")
    >>> seg, product = build_line(scenario.route, scenario.site)[0], scenario_product(scenario)
    >>> [round(gap_centre_after(seg, product, 2.0, 293.15, 333.15, t) - 273.15, 1) for t in (3600.0, 30 * 86400.0)]
    [20.0, 25.6]

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 3.6
        (fin with both ends at a prescribed temperature) and section 5.2 (diffusion length).
    """
    return _gap_model(seg, product, gap_m, t_start, t_ends)[1](time_s)


def _gap_model(seg: LineSegment, product: Product, gap_m: float, t_start: float, t_ends: float):
    """(steady centre temperature, centre temperature against time) of a gap, with the loss, the axial
    conductance and the heat capacity per metre frozen at the mean of the start and end temperatures."""
    t_amb = seg.ambient_temperature
    t_mid = 0.5 * (t_start + t_ends)
    _, q = jacket_temperature(seg, t_mid)
    u = q / (t_mid - t_amb) if abs(t_mid - t_amb) > 1e-6 else 0.0       # W/(m K) to the surroundings
    wall_k = HOSE_WALL_CONDUCTIVITY if seg.kind == "hose" else STEEL_CONDUCTIVITY
    ka = wall_k * _metal_area(seg) + product.conductivity(t_mid) * seg.area          # W m / K along it
    capacity = heat_capacity_per_metre(seg, product, t_mid)
    return _gap_centre(gap_m, max(u, 0.0), ka, capacity, t_start, t_ends, t_amb)


def _crossing(centre, target: float, rising: bool) -> float | None:
    """When the (monotonic) centre temperature crosses ``target``: the first doubling of the time
    that passes it brackets the crossing, Brent's method finds it (to a millisecond)."""
    def past(time: float) -> float:
        return centre(time) - target if rising else target - centre(time)

    low, high = 0.0, 1.0
    while past(high) < 0.0:
        low, high = high, 2.0 * high
        if high > GAP_HORIZON_S:
            return None
    if past(low) >= 0.0:
        return low
    return brentq(past, low, high, xtol=1e-3, rtol=1e-12)


GAP_HORIZON_S = 30 * 86400.0
GAP_TERMS = 400
SHORTEST_GAP_M = 1e-3   # shorter untraced gaps take their ends' temperature at once


def _gap_centre(gap_m: float, u: float, ka: float, capacity: float, t_start: float, t_ends: float, t_amb: float):
    """(steady centre temperature, T_centre(t)) of the fin equation with both ends stepped to ``t_ends`` at t = 0 from a uniform
    ``t_start``: the steady profile less its sine series, mode n (odd) with coefficient
    (4 / (n pi)) [(t_amb - t_start) + (t_ends - t_amb) k^2 / (k^2 + m^2)], k = n pi / L, decaying at
    (u + ka k^2) / capacity; the series is summed in closed form term by term (exact for frozen
    coefficients)."""
    if gap_m < SHORTEST_GAP_M:
        # a gap this short follows its ends at once (its slowest mode decays in well under a second)
        return t_ends, lambda time: t_ends
    m2 = u / ka
    m_half = math.sqrt(m2) * gap_m / 2.0
    settles = t_amb + (t_ends - t_amb) / math.cosh(m_half) if m_half < 700.0 else t_amb
    n = 2.0 * np.arange(GAP_TERMS) + 1.0
    k2 = (n * math.pi / gap_m) ** 2
    signs = np.where(np.arange(GAP_TERMS) % 2 == 0, 1.0, -1.0)
    amplitudes = signs * 4.0 / (n * math.pi) * ((t_amb - t_start) + (t_ends - t_amb) * k2 / (k2 + m2))
    rates = (u + ka * k2) / capacity

    def centre(time: float) -> float:
        exponents = rates * time
        live = exponents < 700.0
        return settles - float(np.dot(amplitudes[live], np.exp(-exponents[live])))

    return settles, centre
