"""A scenario with its levers moved: the one way the planner changes a validated scenario's values
(comparisons, envelopes, the odds' samples).

Each value is assigned as an SI float (``quantities.SI``) to a deep copy and checked against the same
range as a scenario file's; a value out of range raises ``ScenarioError`` naming its field.
"""

from __future__ import annotations

from pydantic import ValidationError

from planner.errors import ScenarioError
from planner.scenario.quantities import SI
from planner.scenario.schema import Scenario, problems_from


def with_changes(scenario: Scenario, setpoint: float | None = None, steam_pressure: float | None = None,
                 pump_speed: float | None = None, flow_limit: float | None = None,
                 ambient_shift: float = 0.0, wind_factor: float = 1.0) -> Scenario:
    """A validated copy of the scenario with levers moved (SI arguments: K, Pa gauge, rev/s, m3/s;
    ``ambient_shift`` in K added to every ambient temperature, the weather table's and the design day's
    too; ``wind_factor`` multiplies every wind speed).  The copy's fields are assigned as SI floats and
    checked against the same ranges as a scenario file's.

    Examples
    --------
    The oil transfer of ``scenario.examples`` with a 60 degC setpoint and 10 K colder air; the
    scenario itself keeps its 45 degC:

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil transfer")
    >>> changed = with_changes(scenario, setpoint=333.15, ambient_shift=-10.0)
    >>> round(changed.tracing.setpoint - 273.15, 2), round(changed.site.ambient_temperature - 273.15, 2)
    (60.0, 10.0)
    >>> round(scenario.tracing.setpoint - 273.15, 2)
    45.0
    """
    changed = scenario.model_copy(deep=True)
    if (pump_speed is not None or flow_limit is not None) and changed.pump is None:
        raise ScenarioError([("pump", "the scenario has no pump: its speed or flow cannot be changed")])
    if setpoint is not None:
        assign_field(changed.tracing, "tracing", "setpoint", SI(setpoint))
    if steam_pressure is not None:
        assign_field(changed.tracing, "tracing", "steam_pressure", SI(steam_pressure))
    if pump_speed is not None:
        if changed.pump.max_speed is not None and changed.pump.max_speed < pump_speed:
            assign_field(changed.pump, "pump", "max_speed", SI(pump_speed))
        assign_field(changed.pump, "pump", "speed", SI(pump_speed))
    if flow_limit is not None:
        assign_field(changed.pump, "pump", "flow_setpoint", SI(flow_limit))
        assign_field(changed.pump, "pump", "control", "fixed_flow")
    if ambient_shift:
        _shift_ambients(changed, ambient_shift)
    if wind_factor != 1.0:
        _scale_winds(changed, wind_factor)
    return changed


def _scale_winds(scenario: Scenario, factor: float) -> None:
    """Every wind speed times ``factor``: the site's and the segments' own (and any weather rows')."""
    site = scenario.site
    assign_field(site, "site", "wind_speed", SI(site.wind_speed * factor))
    for name, route in (("route", scenario.route), ("suction", scenario.suction)):
        for i, seg in enumerate(route.segments if route is not None else []):
            if seg.surroundings.wind_speed is not None:
                assign_field(seg.surroundings, f"{name}.segments[{i}].surroundings", "wind_speed",
                        SI(seg.surroundings.wind_speed * factor))
    weather = scenario.weather
    for i, row in enumerate(weather.hours if weather is not None and weather.hours else []):
        if row.wind_speed is not None:
            assign_field(row, f"weather.hours[{i}]", "wind_speed", SI(row.wind_speed * factor))


def assign_field(model, path: str, name: str, value) -> None:
    """Set one field of a scenario section, validated; a bad value raises ScenarioError naming its path.

    Examples
    --------
    A setpoint of 5000 K (an SI value, ``quantities.SI``) is past the schema's 773.15 K (500 degC)
    ceiling; the refusal says both in degC, as a scenario file gives them (``derived_units.derived_values_in``
    says them in the user's units instead):

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil transfer")
    >>> assign_field(scenario.tracing, "tracing", "setpoint", SI(5000.0))
    Traceback (most recent call last):
    ...
    planner.errors.ScenarioError: scenario is not valid:
      Setpoint (tracing.setpoint): 4726.85 °C is out of range: must be at most 500 °C
    """
    try:
        setattr(model, name, value)
    except ValidationError as exc:
        raise ScenarioError([(f"{path}.{p}" if p else path, m) for p, m in problems_from(exc)]) from None


def _shift_ambients(scenario: Scenario, shift: float) -> None:
    site = scenario.site
    assign_field(site, "site", "ambient_temperature", SI(site.ambient_temperature + shift))
    if site.design_ambient_temperature is not None:
        assign_field(site, "site", "design_ambient_temperature", SI(site.design_ambient_temperature + shift))
    weather = scenario.weather
    if weather is not None:     # the weather table's rows and the design day's extremes move with the site
        for i, row in enumerate(weather.hours):
            assign_field(row, f"weather.hours[{i}]", "ambient_temperature", SI(row.ambient_temperature + shift))
        extremes = ("coldest_temperature", "warmest_temperature")
        for name in (extremes[::-1] if shift > 0 else extremes):    # never coldest above warmest on the way
            if getattr(weather, name) is not None:
                assign_field(weather, "weather", name, SI(getattr(weather, name) + shift))
    for name, route in (("route", scenario.route), ("suction", scenario.suction)):
        for i, seg in enumerate(route.segments if route is not None else []):
            if seg.surroundings.ambient_temperature is not None:
                assign_field(seg.surroundings, f"{name}.segments[{i}].surroundings", "ambient_temperature",
                        SI(seg.surroundings.ambient_temperature + shift))
