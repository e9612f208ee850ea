"""Shared builders: small scenarios written as plain dicts, as a user would write a file."""

from __future__ import annotations

import copy
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

DEMO_DIR = ROOT / "demo_scenarios"
DEMO_FILES = sorted(DEMO_DIR.glob("*.toml"))


def newtonian_product(mu_pa_s: float = 0.001, density: float = 1000.0, cp: float = 4180.0, k: float = 0.6,
                      no_flow_c: float = -40.0, max_c: float = 200.0) -> dict:
    """A product of constant viscosity (Andrade with b = 0) and constant density."""
    import math

    return {
        "name": "test liquid",
        "density": density, "density_slope": 0.0,
        "specific_heat": cp, "thermal_conductivity": k,
        "viscosity": {"law": "andrade", "coefficients": {"a": math.log(mu_pa_s), "b": 0.0}},
        "no_flow_temperature": no_flow_c, "max_temperature": max_c,
    }


def base_scenario(**overrides) -> dict:
    data = {
        "schema_version": 1,
        "name": "test line",
        "site": {"name": "test bench", "ambient_temperature": 20.0, "wind_speed": 0.0},
        "product": newtonian_product(),
        "route": {"segments": [{"name": "run", "nps": "2", "schedule": "40", "length": 100.0}]},
        "tracing": {"kind": "none"},
        "operation": {"flow": "5 m3/h", "inlet_temperature": 20.0},
    }
    for key, value in overrides.items():
        data[key] = value
    return copy.deepcopy(data)


@pytest.fixture
def scenario_dict():
    return base_scenario()
