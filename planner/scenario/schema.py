"""The scenario: a typed, validated description of one transfer, read from TOML or JSON.

Quantities may be plain numbers (the field's default unit, listed in the JSON Schema: SI, with
temperatures in degC and insulation thickness in mm) or strings with units ("4 in", "55 degC",
"40 m3/h", "1250 ft", "350 cP", "180 cSt").  Inside the model every quantity is an SI float
(kelvin, Pa, m, m3/s ...).  Writing back gives plain numbers in the default units.

The scenario is spread over modules by concept: ``fields`` (quantity types and limits), ``product_spec``,
``line_spec`` (route and tracing), ``sections`` (site, operation, pump, vessels, costs, schedule, limits,
calibration), ``root`` (the ``Scenario`` model and its validation) and ``files`` (reading and writing).
This module is their one public face: import the scenario's names from here.
"""

from __future__ import annotations

# the public names of the scenario modules, in data-flow order
from planner.scenario.fields import (Ambient, COLDEST_K, Conductivity, ConductivitySlope, Density, DensitySlope,  # noqa: F401
                                     Diameter, Duration, DynamicViscosity, Elevation, Flow, GaugePressure,
                                     HEATER_OUTPUT_MAX_W_M, HEAT_PER_METRE_MAX_W_M, Head, KinematicViscosity, Length,
                                     LinearConductance, LinearPower, Power, Rating, Roughness, SpecificHeat,
                                     SpecificHeatSlope, Speed, TEMPERATURE_CEILING_K, Temperature, Thickness,
                                     VapourPressure, Volume, WindSpeed, YieldStress)
from planner.scenario.product_spec import LabPoint, ProductSpec, ViscositySpec  # noqa: F401
from planner.scenario.line_spec import (Fitting, InsulationLayer, Route, Segment, SelfRegulatingPoint, Surroundings,  # noqa: F401
                                        Tracing)
from planner.scenario.sections import (Calibration, CalibrationSource, Costs, CurvePoint, Destination, Limits,  # noqa: F401
                                       Operation, PumpSpec, Schedule, Site, Vessel, calibration_of,
                                       vessel_capacity)
from planner.scenario.weather_spec import Weather, WeatherHour, row_seconds, start_of, timestamp  # noqa: F401
from planner.scenario.uncertainty_spec import (DEFAULT_CONFIDENCE, FactorDistribution, ShiftDistribution,  # noqa: F401
                                               Uncertainty)
from planner.scenario.root import (SCHEMA_VERSION, Scenario, field_choices, field_constraints, json_schema, problems_from,  # noqa: F401
                                   scenario_from_dict)
from planner.scenario.files import (LONG_INTEGER_DIGITS, MAX_SCENARIO_CHARS, json_integer, load_scenario,  # noqa: F401
                                    parse_scenario_text, read_scenario_data, save_scenario, scenario_to_dict,
                                    scenario_to_json, scenario_to_readable_dict, scenario_to_toml)
