"""Shared builders: small scenarios written as plain dicts, as a user would write a file."""

from __future__ import annotations

import copy
import os
import subprocess
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


ID_4IN_SCH40 = 0.10226  # ASME B36.10M via fluids.piping (REFERENCES.md)


def plan_scenario(**pump) -> dict:
    """An isothermal test bench: ambient = product temperature, constant viscosity and density."""
    data = base_scenario(product=newtonian_product(mu_pa_s=0.5, density=1100.0, cp=2000.0, k=0.2))
    data["route"]["segments"][0] = {"name": "run", "nps": "4", "schedule": "40", "length": 200.0,
                                    "elevation_change": 5.0}
    data["pump"] = {"kind": "positive_displacement", "speed": "300 rpm", "displacement": "1.0 L",
                    "mechanical_efficiency": 0.8, **pump}
    data["source"] = {"kind": "tank", "shape": "vertical_cylinder", "diameter": 10.0, "initial_volume": 200.0,
                      "volume_to_move": 100.0, "temperature": 20.0, "heat_loss_coefficient": 0.0}
    data["destination"] = {"diameter": 10.0, "initial_level": 1.0, "inlet": "top"}
    data["schedule"] = {"timeline_steps": 50, "line_start_temperature": 20.0}
    return data


@pytest.fixture
def scenario_dict():
    return base_scenario()


# -- the plans database on both back ends ---------------------------------------------------------------
IN_CI = os.environ.get("CI", "").strip().lower() in ("1", "true", "yes")


@pytest.fixture(scope="session")
def pg_server():
    """A throwaway PostgreSQL server for the whole run (tests/pg_server.py); skipped with the reason when
    it cannot start, except with CI=true, where that fails the run."""
    from pg_server import PgServer, PgUnavailable

    server = PgServer()
    try:
        server.start()
    except (PgUnavailable, OSError, subprocess.SubprocessError) as exc:
        server.stop()
        if IN_CI:
            pytest.fail(f"the PostgreSQL test server cannot start in CI: {exc}", pytrace=False)
        pytest.skip(f"the PostgreSQL test server cannot start: {exc}")
    yield server
    server.stop()


@pytest.fixture(params=["sqlite", pytest.param("postgres", marks=pytest.mark.postgres)])
def db_url(request, tmp_path):
    """An empty plans database: an SQLite file, then a fresh PostgreSQL database (its session key in the
    test's folder, not the project's default planner/data/session.key)."""
    if request.param == "sqlite":
        return f"sqlite:///{tmp_path / 'plans.sqlite'}"
    request.getfixturevalue("monkeypatch").setenv("PLANNER_SESSION_KEY_FILE", str(tmp_path / "session.key"))
    return request.getfixturevalue("pg_server").new_database()


PASSWORDS = {"root": "root-password-1", "ana": "ana-password-1", "ben": "ben-password-1",
             "sam": "sam-password-1", "sue": "sue-password-1"}
ROLES_OF = {"root": "admin", "ana": "planner", "ben": "planner", "sam": "supervisor", "sue": "supervisor"}


def make_people(store, names=("root", "ana", "ben", "sam", "sue")) -> dict:
    """Accounts for a test (as ``users add`` makes them): name -> Account.  Signing in is tested in
    tests/test_accounts.py; the store reads each account's name and role from the database itself."""
    from planner.records.accounts import AccountBook

    book = AccountBook(store)
    if book.count() == 0:
        book.add("root", "admin", PASSWORDS["root"])
    root = book.get("root")
    for name in names:
        if name != "root":
            book.add(name, ROLES_OF[name], PASSWORDS[name], by=root)
    return {name: book.get(name) for name in names}


def pytest_collection_modifyitems(config, items):
    """Every PostgreSQL case is also ``slow``: it needs the throwaway server (the fast loop leaves it out)."""
    for item in items:
        if item.get_closest_marker("postgres") is not None:
            item.add_marker(pytest.mark.slow)
