"""The scenario's fields as the dashboard's Inputs page labels them, so that every error message can
name the field in the user's words as well as by its path (``route.segments[1].length`` ->
"Discharge route, row 2, Length").  ``tests/test_messages_and_exports.py`` (``test_labels_are_the_pages_own_words``)
checks these against the page."""

from __future__ import annotations

import re

FIELD_LABELS = {
    "name": "Scenario name",
    "product.name": "Product name", "product.viscosity.law": "Viscosity law", "product.viscosity": "Viscosity",
    "product.density": "Density", "product.density_reference_temperature": "Density measured at",
    "product.specific_heat": "Specific heat", "product.thermal_conductivity": "Thermal conductivity",
    "product.no_flow_temperature": "No-flow temperature", "product.max_temperature": "Highest allowed temperature",
    "product.flash_point": "Flash point (if any)", "product.rheology": "Rheology", "product.flow_index": "Flow index n",
    "product.yield_stress": "Yield stress", "route.fitting_method": "Fittings method",
    "tracing.kind": "Tracing", "tracing.setpoint": "Setpoint", "tracing.output": "Heater output",
    "tracing.zero_output_temperature": "Pipe temperature of zero output",
    "tracing.steam_pressure": "Steam pressure (gauge)", "tracing.heat_transfer_cement": "Heat-transfer cement",
    "tracing.circuits_per_metre": "Runs per metre of pipe",
    "tracing.max_exposure_temperature": "Heater's maximum exposure temperature",
    "pump.kind": "Pump type", "pump.name": "Pump name", "pump.speed": "Speed", "pump.max_speed": "Highest speed (optional)",
    "pump.motor_power": "Motor power", "pump.npsh_required": "NPSH required", "pump.control": "Control",
    "pump.flow_setpoint": "Flow setpoint", "pump.displacement": "Displacement per revolution",
    "pump.slip_flow": "Slip at the reference pressure and viscosity",
    "pump.relief_setting": "Relief valve setting (differential)", "pump.mechanical_efficiency": "Mechanical efficiency",
    "source.kind": "Source", "source.name": "Source name", "source.shape": "Shape", "source.diameter": "Diameter",
    "source.length": "Length", "source.width": "Width", "source.initial_volume": "Volume in the source",
    "source.volume_to_move": "Volume to move", "source.temperature": "Product temperature in the source",
    "source.outlet_height": "Source bottom above the suction inlet",
    "source.heat_loss_coefficient": "Shell heat-loss coefficient", "source.heating_power": "Heating while unloading",
    "source.heating_medium": "Heating medium", "source.heating_steam_pressure": "Coil steam pressure (gauge)",
    "source.heating_limit_temperature": "Heating cut-out temperature", "destination.name": "Destination name",
    "destination.diameter": "Tank diameter", "destination.initial_level": "Level at the start",
    "destination.max_level": "Highest allowed level", "destination.inlet": "Inlet",
    "destination.pressure": "Gas pressure in the tank (gauge)", "destination.max_pressure": "Tank design pressure (gauge)",
    "pump.slip_reference_pressure": "Differential pressure of the slip figure",
    "pump.slip_reference_viscosity": "Viscosity of the slip figure",
    "site.ambient_temperature": "Ambient temperature", "site.wind_speed": "Wind speed",
    "site.design_ambient_temperature": "Design (coldest) ambient",
    "limits.touch_temperature": "Touch limit for jackets", "limits.npsh_margin": "NPSH margin wanted",
    "limits.max_velocity": "Highest line velocity", "limits.min_velocity": "Lowest line velocity",
    "limits.flash_point_margin": "Margin below the flash point",
    "limits.poor_film_coefficient": "Film coefficient counted as poor", "source.pressure": "Gas pressure in the source (gauge)", "costs.currency": "Currency",
    "costs.electricity_per_kwh": "Electricity per kWh", "costs.steam_per_tonne": "Steam per tonne",
    "costs.demurrage_per_hour": "Demurrage per hour", "schedule.planned_window": "Planned window",
    "schedule.start_mode": "Start-up", "schedule.line_start_temperature": "Line contents at the start",
    "schedule.stop_duration": "Stop to check restart for",
    "operation.flow": "Flow", "operation.inlet_temperature": "Inlet temperature",
}

# Tables on the page: path -> (table title, {field: column title})
TABLES = {
    "route.segments": ("Discharge route", {
        "name": "Name", "kind": "Kind", "nps": "NPS", "schedule": "Schedule", "inside_diameter": "Inside diameter",
        "length": "Length", "elevation_change": "Rise", "insulation": "Insulation", "traced": "Traced",
        "untraced_length": "Untraced gaps", "pressure_rating": "Rating", "flange_class": "Flange class",
        "surroundings": "Location", "fittings": "Fittings", "wall_thickness": "Wall thickness",
        "jacket_emissivity": "Jacket emissivity", "hazardous_area_class": "Temperature class"}),
    "product.viscosity.points": ("Lab points", {
        "temperature": "Temperature", "viscosity": "Viscosity μ", "kinematic_viscosity": "Kinematic ν"}),
    "pump.curve": ("Water curve", {"flow": "Flow", "head": "Head", "efficiency": "Efficiency"}),
}
TABLES["suction.segments"] = ("Suction route", TABLES["route.segments"][1])

_ROW = re.compile(r"^(?P<table>[a-z_.]+)\[(?P<row>\d+)\](?:\.(?P<field>[a-z_]+))?")


def field_label(path: str) -> str:
    """The page's words for the field at ``path`` ("" when the page has no label for it)."""
    if path in FIELD_LABELS:
        return FIELD_LABELS[path]
    match = _ROW.match(path)
    if match and match.group("table") in TABLES:
        title, columns = TABLES[match.group("table")]
        where = f"{title}, row {int(match.group('row')) + 1}"
        column = columns.get(match.group("field") or "")
        return f"{where}, {column}" if column else where
    return ""


def named(path: str) -> str:
    """``Label (path)``, or just the path when the page has no label for it."""
    label = field_label(path)
    return f"{label} ({path})" if label and path else path
