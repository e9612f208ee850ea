"""The Calibration tab in a real browser (Debian's Chromium through Playwright, the server and
browser fixtures of ``test_browser``): the demo log uploaded through the file input gives the
factors of ``python -m planner calibrate DEMO LOG --json``, and applying them changes the plan's key
figures to those of ``python -m planner plan`` on the written scenario."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from conftest import DEMO_DIR, ROOT
from test_browser import ARTIFACTS, _number, browser, page, settled_metrics, server, server_db  # noqa: F401  (fixtures)

pytestmark = pytest.mark.slow  # Chromium: left out of the fast loop (-m "not slow")

BARGE = DEMO_DIR / "fuel_oil_barge_discharge.toml"
DEMO_LOG = DEMO_DIR / "logs" / "barge_wren_2026-01-14.csv"


def _cli(*args) -> dict:
    done = subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT, capture_output=True, text=True,
                          timeout=600)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout)


def test_calibration_tab_fits_the_demo_log_and_applies_it(page, tmp_path):  # noqa: F811
    written = tmp_path / "calibrated.toml"
    expected = _cli("calibrate", str(BARGE), str(DEMO_LOG), "--json", "--write", str(written))
    plan = _cli("plan", str(written), "--json")
    assert page.get_by_text("Working on: demo file fuel_oil_barge_discharge.toml").count() == 1
    page.get_by_role("tab", name="Calibration").click()
    page.get_by_text("Upload a log").wait_for()
    page.locator("input[type=file]").nth(1).set_input_files(str(DEMO_LOG))
    page.get_by_text("Residual: discharge pressure (gauge)").first.wait_for()
    ARTIFACTS.mkdir(exist_ok=True)
    page.screenshot(path=str(ARTIFACTS / "calibration.png"), full_page=True)
    assert page.get_by_text("2 rows could not be read").count() == 1
    assert page.get_by_test_id("stDataFrame").count() == 3     # unread rows, factors, residuals
    page.get_by_role("button", name="Apply to the working scenario").click()
    page.get_by_text("Applied to the working scenario").wait_for()
    page.get_by_role("tab", name="Plan").click()
    page.get_by_text("Information (").first.click()
    page.get_by_text("Calibration in use").first.wait_for()
    shown = settled_metrics(page)
    assert _number(shown["Starting flow"]) == pytest.approx(plan["start"]["flow_m3_s"] * 3600.0, abs=0.006)
    assert set(expected["factors"]) == {"viscosity_factor", "heat_loss_factor", "slip_factor"}
