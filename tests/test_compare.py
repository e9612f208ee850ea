"""Setpoint comparison and the recommendation rules."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from conftest import DEMO_FILES, ROOT
from planner.checks.compare import compare, parse_range, recommend, shutdown_pool
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict

SYRUP = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"


def syrup(demurrage: float, exposure_c: float | None = None):
    data = scenario_to_dict(load_scenario(SYRUP))
    data["costs"]["demurrage_per_hour"] = demurrage
    if exposure_c is not None:
        data["tracing"]["max_exposure_temperature"] = exposure_c
    return scenario_from_dict(data)


SETPOINTS = [t + 273.15 for t in (40.0, 45.0, 50.0, 55.0, 60.0)]   # compare takes SI values [K]


def test_parse_range():
    assert parse_range("40:70:5") == [40, 45, 50, 55, 60, 65, 70]
    assert parse_range("40, 52.5,65") == [40, 52.5, 65]
    with pytest.raises(ValueError, match="START:STOP:STEP"):
        parse_range("70:40:5")


def test_recommendation_skips_stop_rows_and_says_why():
    rows = [
        {"value": 313.15, "ok": True, "has_stop": True, "total_cost": 10.0, "total_time_s": 3600.0, "stop_codes": ["NPSH-SHORT"]},
        {"value": 323.15, "ok": True, "has_stop": False, "total_cost": 30.0, "total_time_s": 3600.0, "energy_cost": 5.0,
         "demurrage": 25.0, "currency": "EUR"},
        {"value": 333.15, "ok": True, "has_stop": False, "total_cost": 20.0, "total_time_s": 3600.0, "energy_cost": 8.0,
         "demurrage": 12.0, "currency": "EUR"},
    ]
    best, runner, reason = recommend(rows, "temperature")
    assert (best, runner) == (2, 1)
    assert "60.0 °C" in reason and "runner-up 50.0 °C" in reason and "1 value(s) excluded" in reason
    # the same reason in US customary units: 60 degC = 140 degF, 50 degC = 122 degF (exact)
    assert "140.0 °F" in reason.render("US") and "runner-up 122.0 °F" in reason.render("US")
    assert "°C" not in reason.render("US")
    for r in rows:
        r["has_stop"], r["stop_codes"] = True, ["FLOW-NONE"]
    best, runner, reason = recommend(rows, "temperature")
    assert best is None and "FLOW-NONE" in reason


def test_without_demurrage_the_cheapest_energy_setpoint_wins():
    c = compare(syrup(0.0), "setpoint", SETPOINTS, workers=1)
    allowed = [i for i, r in enumerate(c.rows) if not r["has_stop"] and r["total_time_s"] is not None]
    cheapest = min(c.rows[i]["energy_cost"] for i in allowed)
    assert c.rows[c.recommended]["energy_cost"] == pytest.approx(cheapest, rel=1e-9)   # ties are allowed
    assert c.rows[c.recommended]["demurrage"] == 0.0


def test_with_huge_demurrage_the_fastest_allowed_setpoint_wins():
    c = compare(syrup(1.0e5), "setpoint", SETPOINTS, workers=1)
    allowed = [i for i, r in enumerate(c.rows) if not r["has_stop"] and r["total_time_s"] is not None]
    fastest = min(allowed, key=lambda i: c.rows[i]["total_time_s"])
    assert c.rows[c.recommended]["total_time_s"] == pytest.approx(c.rows[fastest]["total_time_s"], rel=1e-6)


def test_a_stop_level_row_is_never_recommended():
    # Fuel-oil barge: steam tracing through a T3 area (IEC 60079-0: 200 degC).  Higher steam pressure
    # pre-warms faster and so saves demurrage, but above about 14.5 bar(g) the tracer passes 200 degC.
    fuel = ROOT / "demo_scenarios" / "fuel_oil_barge_discharge.toml"
    c = compare(load_scenario(fuel), "steam_pressure", [p * 1e5 for p in (4.0, 8.0, 12.0, 15.0, 17.0)], workers=1)
    stops = [i for i, r in enumerate(c.rows) if r["has_stop"]]
    assert stops == [3, 4]
    assert all("TCLASS-EXCEEDED" in c.rows[i]["stop_codes"] for i in stops)
    cheapest_overall = min(range(5), key=lambda i: c.rows[i]["total_cost"])
    assert cheapest_overall in stops           # the rule matters here
    assert c.recommended is not None and c.recommended not in stops


def test_parallel_rows_equal_serial_rows():
    serial = compare(syrup(85.0), "setpoint", SETPOINTS, workers=1)
    progress = []
    try:
        parallel = compare(syrup(85.0), "setpoint", SETPOINTS, workers=2, progress=lambda d, n: progress.append((d, n)))
    finally:
        shutdown_pool()
    assert [r["total_cost"] for r in parallel.rows] == pytest.approx([r["total_cost"] for r in serial.rows], rel=1e-12)
    assert progress[-1] == (len(SETPOINTS), len(SETPOINTS))


def test_sensitivity_reruns_with_ambient_and_viscosity_moved():
    c = compare(syrup(85.0), "setpoint", [318.15, 328.15], workers=1, sensitivity=True, ambient_shift=10.0,
                viscosity_uncertainty=0.3)
    assert set(c.sensitivity) == {"ambient -10 K", "ambient +10 K", "viscosity -30 %", "viscosity +30 %"}
    # thicker product: a longer transfer costs more demurrage at every setpoint
    thick = c.sensitivity["viscosity +30 %"]["total_costs"]
    thin = c.sensitivity["viscosity -30 %"]["total_costs"]
    assert all(a > b for a, b in zip(thick, thin))


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_compare_cli_on_every_demo(path):
    scenario = load_scenario(path)
    args = ["--steam-pressures", "2:6:2"] if scenario.tracing.kind == "steam" else ["--setpoints", "40:60:10"]
    out = subprocess.run([sys.executable, "-m", "planner", "compare", str(path), *args, "--json"], cwd=ROOT,
                         capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert len(doc["rows"]) == 3
    assert doc["reason"]
    if doc["recommended_index"] is not None:
        assert not doc["rows"][doc["recommended_index"]]["has_stop"]
    text = subprocess.run([sys.executable, "-m", "planner", "compare", str(path), *args], cwd=ROOT,
                          capture_output=True, text=True, timeout=300)
    assert text.returncode == 0 and "recommendation:" in text.stdout
