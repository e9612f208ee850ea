"""Source and destination vessels: level from volume, wetted area, lumped cooling of the contents.

Lumped vessel model: the contents are well mixed at one temperature T,

    m cp dT/dt = -U A_wetted (T - T_ambient) + P_heating

which over a step with frozen m, cp, U A and P is the exponential approach to
T_eq = T_ambient + P / (U A) with time constant m cp / (U A) (Newton's law of cooling; any heat
transfer text, e.g. Incropera, lumped capacitance method).

Heating while unloading is limited by its medium (``SourceHeating``):
- steam coils: a coil passes heat in proportion to the steam-to-contents difference,
  P = UA_coil (T_sat - T), with UA_coil sized so that it gives the rated power at the starting contents
  temperature and T_sat the saturation temperature at the coil's supply pressure (IAPWS-IF97).  The
  contents approach (UA T_amb + UA_coil T_sat) / (UA + UA_coil), never above T_sat.
- electric: the rated power until the contents reach the controller's cut-out temperature (default the
  product's maximum), then only what holds them there.
Each step is solved in closed form and returns the heat the medium delivered.
"""

from __future__ import annotations

import math

from dataclasses import dataclass

from planner.correlations.steam import saturation_temperature_gauge
from planner.scenario.schema import Destination, Scenario, Vessel

DEFAULT_COIL_STEAM_GAUGE_PA = 3.5e5  # vessel coils: assumed supply when the line is not steam traced


def _segment_area(radius: float, level: float) -> float:
    """Cross-section of liquid in a horizontal cylinder filled to ``level`` [m2]."""
    level = min(max(level, 0.0), 2.0 * radius)
    return radius * radius * math.acos((radius - level) / radius) - (radius - level) * math.sqrt(
        max(0.0, 2.0 * radius * level - level * level))


def level_from_volume(vessel: Vessel, volume: float) -> float:
    """Liquid level above the vessel bottom [m] for a volume of contents [m3].

    Examples
    --------
    A horizontal cylinder 2 m across, 5 m long, filled to a quarter of its diameter holds the
    fraction (theta - sin theta) / (2 pi) = 0.19550 of its volume, theta = 2 acos(1 - 2 h/D) (the
    circular segment [1], by hand); half its volume puts the level at the axis:

    >>> import math
    >>> from planner.scenario.schema import Vessel
    >>> tank = Vessel(shape="horizontal_cylinder", diameter="2 m", length="5 m", initial_volume="10 m3",
    ...               volume_to_move="5 m3", temperature="20 degC")
    >>> round(level_from_volume(tank, 0.19550 * math.pi * 5.0), 3), round(level_from_volume(tank, math.pi * 2.5), 6)
    (0.5, 1.0)

    References
    ----------
    [1] Perry's Chemical Engineers' Handbook, 8th ed., McGraw-Hill, 2008, section 10 (volumes of
        partially filled horizontal cylinders; the segment area r^2 acos((r-h)/r) - (r-h) sqrt(2rh - h^2)).
    """
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
    # Newton's method on the wetted cross-section A(h), whose slope is the chord 2 sqrt(2 r h - h^2),
    # kept inside a bisection bracket (A is monotone in h)
    low, high = 0.0, 2.0 * radius
    level = 2.0 * radius * target / full
    for _ in range(60):
        error = _segment_area(radius, level) - target
        if error < 0.0:
            low = level
        else:
            high = level
        chord = 2.0 * math.sqrt(max(0.0, 2.0 * radius * level - level * level))
        following = level - error / chord if chord > 0.0 else -1.0
        if not low < following < high:
            following = 0.5 * (low + high)
        if abs(following - level) <= 1e-13 * radius:
            return following
        level = following
    return level


def wetted_area(vessel: Vessel, volume: float) -> float:
    """Shell area in contact with the liquid [m2] (the lumped loss area).

    Examples
    --------
    A vertical cylinder 2 m across holding pi m^3 (level 1 m): wall pi x 2 x 1 plus bottom pi =
    9.425 m^2; a horizontal one 2 m x 5 m half full: half the shell, pi x 1 x 5, plus two half ends,
    pi = 18.850 m^2 (by hand, [1]):

    >>> import math
    >>> from planner.scenario.schema import Vessel
    >>> upright = Vessel(diameter="2 m", initial_volume="10 m3", volume_to_move="5 m3", temperature="20 degC")
    >>> lying = Vessel(shape="horizontal_cylinder", diameter="2 m", length="5 m", initial_volume="10 m3",
    ...                volume_to_move="5 m3", temperature="20 degC")
    >>> round(wetted_area(upright, math.pi), 3), round(wetted_area(lying, math.pi * 2.5), 3)
    (9.425, 18.85)

    References
    ----------
    [1] Perry's Chemical Engineers' Handbook, 8th ed., McGraw-Hill, 2008, section 10 (partially
        filled horizontal cylinders).
    """
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
    """Contents temperature after ``dt`` seconds of the lumped balance (exact for frozen coefficients).

    Examples
    --------
    50 t at 2000 J/(kg K) and 80 degC, UA 400 W/K to 10 degC air, two hours: Newton's law of cooling
    [1], 10 + 70 exp(-400 x 7200 / 1e8) = 78.01 degC (by hand):

    >>> round(cool_contents(353.15, 50_000.0, 2000.0, 400.0, 283.15, 0.0, 7200.0) - 273.15, 2)
    78.01

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 5.1
        (the lumped capacitance method).
    """
    return _lumped(temperature, mass * specific_heat, ua, t_ambient, heating_power, dt)


@dataclass(frozen=True)
class SourceHeating:
    """The source's heating: ``medium`` "steam" or "electric", ``rated_power`` [W], ``limit_k`` the
    temperature it cannot heat past [K] (steam saturation; the electric cut-out) and, for steam, the coil
    conductance ``coil_ua`` [W/K]."""

    medium: str
    rated_power: float
    limit_k: float
    coil_ua: float = 0.0

    @property
    def active(self) -> bool:
        return self.rated_power > 0.0


def coil_steam_pressure(scenario: Scenario) -> float:
    """Gauge supply pressure of the source's steam coils [Pa].

    Examples
    --------
    The oil transfer of ``scenario.examples`` is traced electrically and gives no coil pressure, so
    the coils take the assumed 3.5 bar(g): 4.513 bar absolute, where water boils at 148.0 degC
    (IAPWS-IF97 [1]; steam tables give 147.90 degC at 4.5 bar and 150.28 degC at 4.75 bar [mem]):

    >>> from planner.scenario.examples import example_scenario
    >>> pressure = coil_steam_pressure(example_scenario("oil transfer"))
    >>> pressure, round(saturation_temperature_gauge(pressure) - 273.15, 1)
    (350000.0, 148.0)

    References
    ----------
    [1] Wagner, W., et al., The IAPWS Industrial Formulation 1997 for the Thermodynamic Properties of
        Water and Steam, J. Eng. Gas Turbines Power 122 (2000) 150-182 (region 4, saturation line).
    """
    source = scenario.source
    if source is not None and source.heating_steam_pressure is not None:
        return source.heating_steam_pressure
    return scenario.tracing.steam_pressure if scenario.tracing.kind == "steam" else DEFAULT_COIL_STEAM_GAUGE_PA


def source_heating(scenario: Scenario) -> SourceHeating:
    """The source's heating medium: steam coils sized to the rated power at the starting temperature,
    UA_coil = P / (T_sat - T_start), T_sat at the coils' supply pressure; or electric up to its cut-out.

    Examples
    --------
    100 kW of coils on 3 barg steam in contents at 40 degC: T_sat = 416.88 K (IAPWS-IF97 [1], iapws
    1.5.5 ``_TSat_P``), UA_coil = 1e5 / (416.88 - 313.15) = 964.0 W/K (by hand):

    >>> from planner.scenario.schema import scenario_from_dict
    >>> scenario = scenario_from_dict({"schema_version": 1, "name": "example",
    ...     "site": {"name": "bench", "ambient_temperature": 20.0, "wind_speed": 0.0},
    ...     "product": {"name": "oil", "density": 900.0, "density_slope": 0.0, "specific_heat": 2000.0,
    ...                 "thermal_conductivity": 0.13, "no_flow_temperature": -40.0, "max_temperature": 200.0,
    ...                 "viscosity": {"law": "andrade", "coefficients": {"a": 0.0, "b": 0.0}}},
    ...     "route": {"segments": [{"name": "run", "nps": "2", "schedule": "40", "length": 100.0}]},
    ...     "operation": {"flow": "4.5 m3/h", "inlet_temperature": 40.0},
    ...     "pump": {"kind": "positive_displacement", "speed": "300 rpm", "displacement": "0.25 L"},
    ...     "source": {"diameter": "5 m", "initial_volume": "60 m3", "volume_to_move": "45 m3", "temperature": 40.0,
    ...                "heating_power": "100 kW", "heating_steam_pressure": "3 bar"},
    ...     "destination": {"diameter": "5 m", "initial_level": "0 m", "inlet": "top"}})
    >>> heat = source_heating(scenario)
    >>> heat.medium, round(heat.limit_k, 2), round(heat.coil_ua, 1)
    ('steam', 416.88, 964.0)

    References
    ----------
    [1] IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997, section 8.
    """
    source = scenario.source
    if source.heating_medium == "steam":
        t_sat = saturation_temperature_gauge(coil_steam_pressure(scenario))
        drive = t_sat - source.temperature
        return SourceHeating("steam", source.heating_power, t_sat,
                             source.heating_power / drive if drive > 0.0 else 0.0)
    limit = source.heating_limit_temperature
    return SourceHeating("electric", source.heating_power,
                         limit if limit is not None else scenario.product.max_temperature)


def _lumped(t: float, mcp: float, ua: float, t_eq_drive: float, power: float, dt: float) -> float:
    """The lumped balance m cp dT/dt = -ua (T - t_eq_drive) + power over dt (exact)."""
    if ua <= 0.0:
        return t + power * dt / mcp
    t_eq = t_eq_drive + power / ua
    return t_eq + (t - t_eq) * math.exp(-ua * dt / mcp)


def _time_to(t: float, target: float, mcp: float, ua: float, t_amb: float, power: float) -> float:
    """Seconds for the lumped balance to carry ``t`` to ``target`` (inf if it never gets there)."""
    if ua <= 0.0:
        rate = power / mcp
        return (target - t) / rate if rate != 0.0 and (target - t) / rate >= 0.0 else math.inf
    t_eq = t_amb + power / ua
    if (t - t_eq) == 0.0:
        return math.inf
    ratio = (target - t_eq) / (t - t_eq)
    return -mcp / ua * math.log(ratio) if 0.0 < ratio <= 1.0 else math.inf


def _electric_step(t: float, mcp: float, ua: float, t_amb: float, heat: SourceHeating, dt: float):
    power, cut, energy = heat.rated_power, heat.limit_k, 0.0
    if t < cut:
        reach = _time_to(t, cut, mcp, ua, t_amb, power)
        if reach >= dt:
            return _lumped(t, mcp, ua, t_amb, power, dt), power * dt
        t, energy, dt = cut, power * reach, dt - reach
    elif t > cut:
        reach = _time_to(t, cut, mcp, ua, t_amb, 0.0)     # the heater is off until the contents cool to cut
        if reach >= dt:
            return _lumped(t, mcp, ua, t_amb, 0.0, dt), 0.0
        t, dt = cut, dt - reach
    hold = ua * (cut - t_amb)                              # the controller holds the cut-out temperature
    if hold <= 0.0:
        return _lumped(t, mcp, ua, t_amb, 0.0, dt), energy
    if hold <= power:
        return cut, energy + hold * dt
    return _lumped(t, mcp, ua, t_amb, power, dt), energy + power * dt


def heat_contents(temperature: float, mass: float, specific_heat: float, ua: float, t_ambient: float,
                  heat: SourceHeating, dt: float) -> tuple[float, float]:
    """Contents temperature after ``dt`` [s] with the shell loss ``ua`` [W/K] and the heating, and the
    heat the heating delivered [J] (the lumped balance in closed form, coefficients frozen).

    Examples
    --------
    A tonne at 2000 J/(kg K), no shell loss, one hour: 10 kW electric heating adds 36 MJ, 18 K; a steam
    coil of UA 100 W/K at 416.88 K (3 barg, IAPWS-IF97 [2]) brings it to 416.88 - 123.73
    exp(-100 x 3600 / 2e6) = 313.53 K, and the heat it delivered is what the contents gained,
    2e6 x 20.38 = 40.76 MJ (energy balance [1], by hand):

    >>> electric = SourceHeating("electric", 10e3, 400.0)
    >>> heat_contents(293.15, 1000.0, 2000.0, 0.0, 293.15, electric, 3600.0)
    (311.15, 36000000.0)
    >>> t, delivered = heat_contents(293.15, 1000.0, 2000.0, 0.0, 293.15,
    ...                              SourceHeating("steam", 10e3, 416.88, coil_ua=100.0), 3600.0)
    >>> round(t, 2), round(delivered / 1e6, 2)
    (313.53, 40.76)

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 5.1
        (the lumped capacitance method).
    [2] IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997, section 8.
    """
    mcp = mass * specific_heat
    if not heat.active:
        return cool_contents(temperature, mass, specific_heat, ua, t_ambient, 0.0, dt), 0.0
    if heat.medium == "electric":
        return _electric_step(temperature, mcp, ua, t_ambient, heat, dt)
    g = ua + heat.coil_ua
    if g <= 0.0:
        return temperature, 0.0
    t_eq = (ua * t_ambient + heat.coil_ua * heat.limit_k) / g
    decay = math.exp(-g * dt / mcp)
    t_new = t_eq + (temperature - t_eq) * decay
    # delivered: coil_ua * integral (T_sat - T) dt, T = t_eq + (T0 - t_eq) e^(-t/tau), tau = mcp / g
    delivered = heat.coil_ua * ((heat.limit_k - t_eq) * dt - (temperature - t_eq) * mcp / g * (1.0 - decay))
    return t_new, max(delivered, 0.0)


def destination_level(dest: Destination, added_volume: float) -> float:
    """Level [m] of the receiving tank (a vertical cylinder) after ``added_volume`` [m3].

    Examples
    --------
    pi m^3 into a tank 2 m across standing at 1 m raises it by V / (pi D^2 / 4) = 1 m [1]:

    >>> import math
    >>> from planner.scenario.schema import Destination
    >>> destination_level(Destination(diameter="2 m", initial_level="1 m"), math.pi)
    2.0

    References
    ----------
    [1] Volume of a cylinder, any geometry text; e.g. Perry's Chemical Engineers' Handbook, 8th ed.,
        section 10.
    """
    return dest.initial_level + added_volume / (math.pi * dest.diameter ** 2 / 4.0)
