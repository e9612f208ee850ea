"""Two small invented scenarios the worked examples of the docstrings share, so that each example
states its case in words and reads it from here instead of repeating it.

- ``"oil line"``: an oil of 1 Pa s at every temperature (Andrade a = b = 0), 900 kg/m^3,
  2000 J/(kg K), 0.13 W/(m K), in 100 m of NPS 2 Sch 40 under 50 mm of insulation of 0.04 W/(m K),
  untraced, in still air at 20 degC; 5 m^3/h in at 20 degC.
- ``"oil transfer"``: the same oil and line traced at 100 W/m to a 45 degC setpoint, moved by a PD
  pump without slip (0.25 L/rev at 300 rpm: 4.5 m^3/h) from a 5 m tank holding 60 m^3 at 40 degC
  into the top of a 5 m tank; started by pushing line contents at 10 degC out.

>>> example_scenario("oil line").route.segments[0].length
100.0
"""

from __future__ import annotations

import copy

from planner.scenario.schema import Scenario, scenario_from_dict

_OIL = {"name": "oil", "density": 900.0, "density_slope": 0.0, "specific_heat": 2000.0, "thermal_conductivity": 0.13,
        "no_flow_temperature": -40.0, "max_temperature": 200.0,
        "viscosity": {"law": "andrade", "coefficients": {"a": 0.0, "b": 0.0}}}
_RUN = {"segments": [{"name": "run", "nps": "2", "schedule": "40", "length": 100.0,
                      "insulation": [{"conductivity": 0.04, "thickness": "50 mm"}]}]}
_BENCH = {"name": "bench", "ambient_temperature": 20.0, "wind_speed": 0.0}

EXAMPLES: dict[str, dict] = {
    "oil line": {
        "schema_version": 1, "name": "example", "site": _BENCH, "product": _OIL, "route": _RUN,
        "tracing": {"kind": "none"}, "operation": {"flow": "5 m3/h", "inlet_temperature": 20.0},
    },
    "oil transfer": {
        "schema_version": 1, "name": "example", "site": _BENCH, "product": _OIL, "route": _RUN,
        "tracing": {"kind": "electric_constant", "output": "100 W/m", "setpoint": 45.0},
        "operation": {"flow": "4.5 m3/h", "inlet_temperature": 40.0},
        "pump": {"kind": "positive_displacement", "speed": "300 rpm", "displacement": "0.25 L"},
        "source": {"diameter": "5 m", "initial_volume": "60 m3", "volume_to_move": "45 m3", "temperature": 40.0},
        "destination": {"diameter": "5 m", "initial_level": "0 m", "inlet": "top"},
        "schedule": {"start_mode": "push_cold", "line_start_temperature": 10.0},
    },
}


def example_scenario(name: str) -> Scenario:
    """The validated example scenario ``name`` (a key of ``EXAMPLES``), a fresh copy each call."""
    if name not in EXAMPLES:
        raise ValueError(f"example: {name!r} is not one of {', '.join(map(repr, EXAMPLES))}")
    return scenario_from_dict(copy.deepcopy(EXAMPLES[name]))
