"""``python -m planner calibrate`` (planner/cli/calibrate_commands.py) on the demo log: JSON keys,
the written scenario, and errors as one message with exit status 2."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from conftest import DEMO_DIR, ROOT
from unit_words import assert_speaks

BARGE = DEMO_DIR / "fuel_oil_barge_discharge.toml"
DEMO_LOG = DEMO_DIR / "logs" / "barge_wren_2026-01-14.csv"
# the factors the demo log was made with (its comment lines; DEVELOPERS.md)
DEMO_TRUTH = {"viscosity_factor": 1.18, "heat_loss_factor": 1.35, "slip_factor": 1.5}


def run(*args):
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT, capture_output=True, text=True,
                          timeout=300)


@pytest.mark.slow
def test_demo_log_fits_back_and_writes_the_calibration(tmp_path):
    out_path = tmp_path / "barge_calibrated.toml"
    out = run("calibrate", str(BARGE), str(DEMO_LOG), "--fit", ",".join(DEMO_TRUTH), "--json", "--write", str(out_path))
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    for name, value in DEMO_TRUTH.items():
        f = doc["factors"][name]
        assert f["low"] <= value <= f["high"], (name, f)
        assert f["low"] <= f["value"] <= f["high"] and f["identifiable"]
    assert doc["log"]["rows"] == 100 and doc["log"]["rows_read"] == 98
    assert doc["log"]["unreadable"] == [{"reason": "discharge_pressure 'I/O Timeout' is not a number",
                                         "count": 2, "lines": [40, 41]}]
    assert doc["residuals"]["discharge_pressure"]["unit"] == "Pa"
    assert doc["residuals"]["discharge_pressure"]["rms"] == pytest.approx(4000.0, rel=0.35)   # the noise put in
    assert set(doc["correlation"]) == {"viscosity_factor/heat_loss_factor", "viscosity_factor/slip_factor",
                                       "heat_loss_factor/slip_factor"}
    assert doc["written"] == str(out_path) and not doc["warnings"]

    from planner.checks.findings import assess
    from planner.scenario.schema import load_scenario
    from planner.transfer.plan import make_plan

    written = load_scenario(out_path)
    assert written.calibration.source.file == DEMO_LOG.name
    assert written.calibration.slip_factor == pytest.approx(doc["factors"]["slip_factor"]["value"])
    assert "CALIBRATION-IN-USE" in [f.code for f in assess(make_plan(written, steps=10))]

    again = run("calibrate", str(BARGE), str(DEMO_LOG), "--fit", "viscosity_factor", "--write", str(out_path))
    assert again.returncode == 2 and "exists" in again.stderr and "Traceback" not in again.stderr


@pytest.mark.slow
def test_text_output_lists_factors_residuals_and_unreadable_rows():
    out = run("calibrate", str(BARGE), str(DEMO_LOG), "--fit", "viscosity_factor")
    assert out.returncode == 0, out.stderr
    for words in ("viscosity_factor", "95 % interval", "discharge pressure", "2 rows could not be read",
                  "line 40, 41", "bar"):
        assert words in out.stdout


@pytest.mark.parametrize("args, words", [
    ((str(BARGE), "no-such-log.csv"), "cannot open the log"),
    ((str(BARGE), str(DEMO_LOG), "--fit", "viscosity"), "unknown factor viscosity"),
    ((str(DEMO_DIR / "polyol_tank_transfer.toml"), str(DEMO_LOG), "--fit", "slip_factor"), "not positive-displacement"),
    ((str(BARGE), str(DEMO_LOG), "--columns", "no-map.toml"), "--columns: cannot open"),
])
@pytest.mark.slow
def test_errors_are_one_message(args, words):
    out = run("calibrate", *args)
    assert out.returncode == 2
    assert words in out.stderr and "Traceback" not in out.stderr


@pytest.mark.slow
def test_missing_column_names_it(tmp_path):
    log = tmp_path / "bad.csv"
    log.write_text("time [min],discharge_pressure [bar]\n" + "".join(f"{i},5\n" for i in range(8)))
    out = run("calibrate", str(BARGE), str(log))
    assert out.returncode == 2 and "no flow column" in out.stderr and "Traceback" not in out.stderr


def _long_log(path, rows: int) -> None:
    """The demo log's readable data rows repeated (times shifted on) to ``rows`` rows."""
    lines = DEMO_LOG.read_text(encoding="utf-8").splitlines()
    header = [ln for ln in lines if ln and not ln.startswith("#")][0]
    data = [ln.split(",") for ln in lines if ln and ln[0].isdigit() and "I/O" not in ln]
    out = ["time [s]," + header.split(",", 1)[1]]
    for i in range(rows):
        out.append(",".join([str(60 * i)] + data[i % len(data)][1:]))
    path.write_text("\n".join(out) + "\n", encoding="utf-8")


@pytest.mark.slow
def test_a_log_past_the_work_budget_is_refused_before_any_fitting(tmp_path):
    """Rows x most replays x steps a row (planner.scenario.budget.calibration_problems): 5,000 rows
    with three factors is past the default budget of 20,000,000 steps; the message names the log, says
    how many rows would do, and that many rows are inside the budget."""
    from planner.calibration.fit import max_evaluations
    from planner.scenario import budget
    from planner.scenario.schema import load_scenario

    log = tmp_path / "long.csv"
    _long_log(log, 5000)
    out = run("calibrate", str(BARGE), str(log), "--fit", ",".join(DEMO_TRUTH))
    assert out.returncode == 2 and "Traceback" not in out.stderr
    assert "log: the fit is estimated at" in out.stderr and "5,000 log rows x up to 161 replays" in out.stderr
    assert "work budget of 20,000,000" in out.stderr and "fit fewer factors (--fit)" in out.stderr
    most = int(out.stderr.split("resample the log to at most ")[1].split(" rows")[0].replace(",", ""))
    scenario = load_scenario(BARGE)
    assert max_evaluations(3) == 161
    assert budget.calibration_problems(scenario, most, 161, 3) == []
    assert budget.calibration_problems(scenario, most + 1, 161, 3) != []


@pytest.mark.slow
def test_the_demo_fit_stays_inside_its_bound_on_replays():
    """The bound the budget counts (planner.calibration.fit.max_evaluations) against the replays a
    real fit makes: the demo log with all three factors takes 30 (measured), the bound is 161."""
    from planner.calibration.fit import fit_calibration, max_evaluations
    from planner.calibration.log import read_log_file
    from planner.scenario.schema import load_scenario

    result = fit_calibration(load_scenario(BARGE), read_log_file(DEMO_LOG), list(DEMO_TRUTH))
    assert 10 <= result.evaluations <= max_evaluations(3)


@pytest.mark.slow
def test_text_output_speaks_the_chosen_unit_system():
    # issue 11: every output speaks the user's units; US text shows psi, °F differences and gpm only
    scenario = DEMO_DIR / "fuel_oil_barge_discharge.toml"
    log = DEMO_DIR / "logs" / "barge_wren_2026-01-14.csv"
    si, us = (run("calibrate", str(scenario), str(log), "--units", units) for units in ("si", "us"))
    assert si.returncode == us.returncode == 0, us.stderr
    assert " bar " in si.stdout and " psi " in us.stdout and " gpm " in us.stdout and " °F " in us.stdout
    assert_speaks(us.stdout, "US")
    assert_speaks(si.stdout, "SI")
    # the residuals are the same numbers: discharge pressure RMS in bar x 14.5038 = psi (NIST SP 811)
    si_row = next(line for line in si.stdout.splitlines() if line.strip().startswith("discharge pressure"))
    us_row = next(line for line in us.stdout.splitlines() if line.strip().startswith("discharge pressure"))
    assert float(us_row.split()[2]) == pytest.approx(float(si_row.split()[2]) * 14.5038, rel=2e-3)
