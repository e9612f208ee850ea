"""Setpoint comparison and the recommendation rules."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from conftest import DEMO_FILES, ROOT
from planner.sweeps.compare import TIE_BAND, compare, parse_range, recommend
from planner.sweeps.executors import local_executor
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


def _gentlest_within_the_band(c, key: str) -> None:
    """The recommendation is the lowest setpoint whose ``key`` is within TIE_BAND of the best allowed row's
    (costs here move with that one figure)."""
    allowed = [i for i, r in enumerate(c.rows) if not r["has_stop"] and r["total_time_s"] is not None]
    best = min(c.rows[i][key] for i in allowed)
    within = [i for i in allowed if c.rows[i][key] <= best * (1 + TIE_BAND) + 1e-9]
    assert c.recommended == min(within, key=lambda i: c.rows[i]["value"])


def test_without_demurrage_the_cheapest_energy_setpoint_wins():
    c = compare(syrup(0.0), "setpoint", SETPOINTS)
    _gentlest_within_the_band(c, "energy_cost")
    assert c.rows[c.recommended]["demurrage"] == 0.0


def test_with_huge_demurrage_the_fastest_allowed_setpoint_wins():
    c = compare(syrup(1.0e5), "setpoint", SETPOINTS)
    _gentlest_within_the_band(c, "total_time_s")


def test_a_stop_level_row_is_never_recommended():
    # Fuel-oil barge: steam tracing through a T3 area (IEC 60079-0: 200 degC).  Higher steam pressure
    # pre-warms faster and so saves demurrage, but above about 14.5 bar(g) the tracer passes 200 degC.
    fuel = ROOT / "demo_scenarios" / "fuel_oil_barge_discharge.toml"
    c = compare(load_scenario(fuel), "steam_pressure", [p * 1e5 for p in (4.0, 8.0, 12.0, 15.0, 17.0)])
    stops = [i for i, r in enumerate(c.rows) if r["has_stop"]]
    assert stops == [3, 4]
    assert all("TCLASS-EXCEEDED" in c.rows[i]["stop_codes"] for i in stops)
    cheapest_overall = min(range(5), key=lambda i: c.rows[i]["total_cost"])
    assert cheapest_overall in stops           # the rule matters here
    assert c.recommended is not None and c.recommended not in stops


def test_parallel_rows_equal_serial_rows():
    serial = compare(syrup(85.0), "setpoint", SETPOINTS)
    progress = []
    with local_executor(2) as pool:      # the caller owns the pool: the library keeps none
        parallel = compare(syrup(85.0), "setpoint", SETPOINTS, executor=pool, progress=lambda d, n: progress.append((d, n)))
    assert [r["total_cost"] for r in parallel.rows] == pytest.approx([r["total_cost"] for r in serial.rows], rel=1e-12)
    assert progress[-1] == (len(SETPOINTS), len(SETPOINTS))


def test_sensitivity_reruns_with_ambient_and_viscosity_moved():
    c = compare(syrup(85.0), "setpoint", [318.15, 328.15], sensitivity=True, ambient_shift=10.0,
                viscosity_uncertainty=0.3)
    assert set(c.sensitivity) == {"ambient -10 K", "ambient +10 K", "viscosity -30 %", "viscosity +30 %"}
    # thicker product: a longer transfer costs more demurrage at every setpoint
    thick = c.sensitivity["viscosity +30 %"]["total_costs"]
    thin = c.sensitivity["viscosity -30 %"]["total_costs"]
    assert all(a > b for a, b in zip(thick, thin))


@pytest.mark.slow
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


def _row(value_k: float, cost: float) -> dict:
    return {"value": value_k, "ok": True, "has_stop": False, "total_cost": cost, "total_time_s": 20_800.0,
            "energy_cost": 14.9, "demurrage": cost - 14.9, "currency": "EUR"}


def test_near_equal_costs_are_no_clear_difference_and_the_gentler_value_is_recommended():
    # issue 20.4: the syrup demo starred 45 degC over 25 degC on 0.05 EUR of 506 EUR (0.01 %)
    rows = [_row(298.15, 505.99), _row(318.15, 505.94)]
    best, runner, reason = recommend(rows, "temperature")
    assert (best, runner) == (0, 1)
    assert reason.startswith("25.0 °C: no clear difference in total cost among 2 values (505.94 to 505.99 EUR, "
                             "within 1 % of the lowest): the gentlest, 25.0 °C, is recommended")
    # just outside the band (1 % of 505.94 is 5.06 EUR) the cheaper one wins again
    best, _, reason = recommend([_row(298.15, 505.94 + 5.07), _row(318.15, 505.94)], "temperature")
    assert best == 1 and "lowest total cost 505.94 EUR" in reason
    best, _, _ = recommend([_row(298.15, 505.94 + 5.05), _row(318.15, 505.94)], "temperature")
    assert best == 0


def test_the_syrup_demo_says_no_clear_difference_in_text_json_and_notes_the_end_of_the_range():
    from planner.sweeps.compare import comparison_json, comparison_table

    c = compare(load_scenario(SYRUP), "setpoint", [298.15, 318.15])
    assert c.recommended == 0 and c.tied == [0, 1]
    doc = comparison_json(c)
    assert doc["no_clear_difference"] and doc["tied_indices"] == [0, 1]
    assert doc["tie_band"] == {"relative": 0.01, "at_least": 0.005}
    assert doc["end_of_range"].startswith("25.0 °C is at the end of the range you gave (its lowest value)")
    text = comparison_table(c, "US")
    assert "no clear difference" in text and "note: 77.0 °F is at the end of the range you gave" in text


def test_a_recommendation_at_the_top_of_the_range_says_extend_it():
    # issue 20.4: on the barge the recommended steam pressure was always the top of the typed range
    fuel = ROOT / "demo_scenarios" / "fuel_oil_barge_discharge.toml"
    c = compare(load_scenario(fuel), "steam_pressure", [p * 1e5 for p in (2.0, 4.0, 6.0)])
    assert c.recommended == 2 and not c.tied
    assert c.end_of_range == ("6.00 bar is at the end of the range you gave (its highest value): a value above it may "
                              "be better still; extend the range above 6.00 bar to see")
    from planner.sweeps.compare import end_of_range_note

    assert end_of_range_note([2e5, 6e5, 4e5], 2, "pressure") is None               # inside the range given
    assert end_of_range_note([2e5, 6e5, 4e5], 0, "pressure").startswith("2.00 bar is at the end of the range you gave "
                                                                        "(its lowest value): a value below it may be")
    assert end_of_range_note([2e5, 6e5], 1, "pressure", extendable=lambda p: p <= 6e5) is None   # the field's end


def test_values_are_shown_as_given_not_rounded_into_another_value():
    # a 0.5 rpm row read "0 rpm" and 2.5 rpm "2 rpm" (the display table's 0 decimals); setpoints 40.25 and
    # 40.3 degC both read "40.2"/"40.3" in one system and "104.5 degF" twice in the other: a lever's values get
    # the decimals that show each as it is (within 0.5 %) and tell them apart, in either unit system
    from planner.checks.lever_values import lever_decimals

    speeds = [0.5 / 60.0, 2.5 / 60.0, 100.0 / 60.0]                  # rev/s
    rows = [_row(v, c) for v, c in zip(speeds, (900.0, 700.0, 500.0))]
    assert lever_decimals("rotational_speed", speeds) == 1
    _, _, reason = recommend(rows, "rotational_speed")
    assert reason.startswith("100.0 rpm: lowest total cost 500.00 EUR") and "runner-up 2.5 rpm" in reason
    setpoints = [313.4, 313.45]                                      # 40.25 and 40.30 degC; 104.45 and 104.54 degF
    assert lever_decimals("temperature", setpoints) == 2
    _, _, reason = recommend([_row(v, 500.0) for v in setpoints], "temperature")
    assert "the gentlest, 40.25 °C" in reason.render("SI") and "the gentlest, 104.45 °F" in reason.render("US")
    # round values keep the display table's decimals
    assert lever_decimals("temperature", [313.15, 318.15, 323.15]) == 1 and lever_decimals("pressure", [2e5, 4e5]) == 2


POLYOL = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"
BARGE = ROOT / "demo_scenarios" / "fuel_oil_barge_discharge.toml"


def _cli(*argv) -> str:
    import contextlib
    import io

    from planner.cli import main

    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert main(list(argv)) == 0
    return out.getvalue()


def test_a_row_beyond_the_pumps_method_withholds_what_the_plan_withholds(tmp_path):
    # the polyol demo's centrifugal pump at 10 x the viscosity runs at ANSI/HI 9.6.7 B above 40 (the
    # method's limit, HI 9.6.7-2015 section 7.6) during the transfer: `plan` gives no flow, times, energies
    # or cost; the comparison row gave them all (7.8 m3/h, 83.57 h, 799.8 EUR) and "inf" as the total
    from planner.reports.plan_json import plan_json
    from planner.transfer.plan import make_plan

    data = scenario_to_dict(load_scenario(POLYOL))
    data["calibration"] = {"viscosity_factor": 10.0}
    path = tmp_path / "thick.json"
    path.write_text(json.dumps(data))
    plan = plan_json(make_plan(scenario_from_dict(data)))
    assert plan["withheld"] is not None and plan["start"]["flow_m3_s"] is None
    row = json.loads(_cli("compare", str(path), "--setpoints", "40", "--json"))["rows"][0]
    assert "PUMP-HI-RANGE" in row["stop_codes"]
    for key in ("start_flow_m3_s", "transfer_time_s", "total_time_s", "tracing_kwh", "pump_kwh", "energy_cost",
                "demurrage", "total_cost"):
        assert row[key] is None, key
    assert row["peak_pressure_pa"] == pytest.approx(plan["peak_discharge_pressure_pa"], rel=1e-9)  # the line's own
    line = next(l for l in _cli("compare", str(path), "--setpoints", "40").splitlines() if l.strip().startswith("40.0"))
    assert line.split()[1:7] == ["—"] * 6 and "inf" not in line


def test_a_row_that_cannot_run_shows_no_total_and_no_transfer_time(tmp_path):
    # 0.001 rpm: the barge's pump cannot move the product; the plan's transfer time is "not possible",
    # the row said 0.00 h; a plan with a stop during the start-up has no total: the text printed "inf"
    data = scenario_to_dict(load_scenario(BARGE))
    path = tmp_path / "barge.json"
    path.write_text(json.dumps(data))
    doc = json.loads(_cli("compare", str(path), "--pump-speeds", "0.001,420", "--json"))
    stuck = doc["rows"][0]
    assert stuck["status"] == "no_flow" and stuck["transfer_time_s"] is None and stuck["total_cost"] is None
    assert doc["rows"][1]["transfer_time_s"] > 0.0
    text = _cli("compare", str(SYRUP), "--setpoints", "40,500")
    assert "inf" not in text
    hot = next(l for l in text.splitlines() if l.strip().startswith("500.0"))
    assert hot.split()[3] == "—" and hot.split()[6] == "—"           # total h and total cost
