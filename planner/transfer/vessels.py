"""Source and destination vessels: level from volume, wetted area, lumped cooling of the contents.

Lumped vessel model: the contents are well mixed at one temperature T,

    m cp dT/dt = -U A_wetted (T - T_ambient) + P_heating

which over a step with frozen m, cp, U A and P is the exponential approach to
T_eq = T_ambient + P / (U A) with time constant m cp / (U A) (Newton's law of cooling; any heat
transfer text, e.g. Incropera, lumped capacitance method).
"""

from __future__ import annotations

import math

from planner.scenario.schema import Destination, Vessel


def _segment_area(radius: float, level: float) -> float:
    """Cross-section of liquid in a horizontal cylinder filled to ``level`` [m2]."""
    level = min(max(level, 0.0), 2.0 * radius)
    return radius * radius * math.acos((radius - level) / radius) - (radius - level) * math.sqrt(
        max(0.0, 2.0 * radius * level - level * level))


def level_from_volume(vessel: Vessel, volume: float) -> float:
    """Liquid level above the vessel bottom [m] for a volume of contents [m3]."""
    volume = max(volume, 0.0)
    if vessel.shape == "vertical_cylinder":
        return volume / (math.pi * vessel.diameter ** 2 / 4.0)
    if vessel.shape == "box":
        return volume / (vessel.length * vessel.width)
    radius = vessel.diameter / 2.0
    target = volume / vessel.length
    full = math.pi * radius * radius
    if target >= full:
        return 2.0 * radius
    low, high = 0.0, 2.0 * radius
    for _ in range(60):  # bisection: area is monotone in level
        mid = 0.5 * (low + high)
        if _segment_area(radius, mid) < target:
            low = mid
        else:
            high = mid
    return 0.5 * (low + high)


def wetted_area(vessel: Vessel, volume: float) -> float:
    """Shell area in contact with the liquid [m2] (the lumped loss area)."""
    level = level_from_volume(vessel, volume)
    if vessel.shape == "vertical_cylinder":
        return math.pi * vessel.diameter * level + math.pi * vessel.diameter ** 2 / 4.0
    if vessel.shape == "box":
        return vessel.length * vessel.width + 2.0 * (vessel.length + vessel.width) * level
    radius = vessel.diameter / 2.0
    angle = 2.0 * math.acos((radius - min(level, 2 * radius)) / radius)  # wetted arc angle
    return radius * angle * vessel.length + 2.0 * _segment_area(radius, level)


def cool_contents(temperature: float, mass: float, specific_heat: float, ua: float, t_ambient: float,
                  heating_power: float, dt: float) -> float:
    """Contents temperature after ``dt`` seconds of the lumped balance (exact for frozen coefficients)."""
    if ua <= 0.0:
        return temperature + heating_power * dt / (mass * specific_heat)
    t_eq = t_ambient + heating_power / ua
    return t_eq + (temperature - t_eq) * math.exp(-ua * dt / (mass * specific_heat))


def destination_level(dest: Destination, added_volume: float) -> float:
    return dest.initial_level + added_volume / (math.pi * dest.diameter ** 2 / 4.0)
