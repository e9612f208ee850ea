"""The Calibration tab (dashboard/views/calibration.py) through streamlit.testing.v1.AppTest: the demo
log fitted on the barge demo (the same numbers as ``planner.calibration.fit.fit_calibration``), applied
to the working scenario, and saved as a revision whose note names the log and its SHA-256
(checked through ``planner.records.store.PlanStore``); a bad log shows its message."""

from __future__ import annotations

import hashlib

import pytest
from streamlit.testing.v1 import AppTest

from conftest import DEMO_DIR, ROOT, PASSWORDS, make_people
from planner.calibration.fit import fit_calibration
from planner.calibration.log import read_log_file
from planner.records.store import PlanStore
from planner.scenario.schema import load_scenario

APP = str(ROOT / "dashboard" / "app.py")
BARGE = DEMO_DIR / "fuel_oil_barge_discharge.toml"
DEMO_LOG = DEMO_DIR / "logs" / "barge_wren_2026-01-14.csv"


@pytest.fixture
def db(tmp_path, monkeypatch):
    path = tmp_path / "plans.sqlite"
    monkeypatch.setenv("PLANNER_DB_PATH", str(path))
    return path


def _calibration_tab() -> AppTest:
    at = AppTest.from_file(APP, default_timeout=300).run()
    at.selectbox(key="demo_choice").set_value(BARGE.name).run()
    at.session_state["view"] = "Calibration"
    return at.run()


@pytest.mark.slow
def test_demo_log_fits_applies_and_saves(db):
    at = _calibration_tab()
    assert not at.exception, at.exception
    at.button(key="cal_use_demo").click().run()
    assert not at.exception, at.exception
    assert not [e.value for e in at.error]
    factors = [d.value for d in at.dataframe if "factor" in d.value.columns][0]
    # the page shows the planner's fit (default factors: viscosity, heat loss and, PD pump, slip)
    expected = fit_calibration(load_scenario(BARGE), read_log_file(DEMO_LOG))
    assert set(expected.factors) == {"viscosity_factor", "heat_loss_factor", "slip_factor"}
    shown = dict(zip(factors["factor"], factors["fitted"]))
    from dashboard.present.display import words

    for name, f in expected.factors.items():          # named in words ("heat-loss factor"), not by code
        assert shown[words(name)] == pytest.approx(f.value, abs=1e-4)
    assert any("2 rows could not be read" in w.value for w in at.warning)
    assert len(at.get("plotly_chart")) >= 1

    at.button(key="cal_apply").click().run()
    calibration = at.session_state["work"]["calibration"]
    assert calibration["viscosity_factor"] == pytest.approx(expected.factors["viscosity_factor"].value, rel=1e-9)
    assert calibration["source"]["sha256"] == hashlib.sha256(DEMO_LOG.read_bytes()).hexdigest()
    assert any("Applied to the working scenario" in s.value for s in at.success)
    assert any("In use now: viscosity factor" in c.value for c in at.caption)
    make_people(PlanStore(db), ("root", "ana"))      # saving needs a signed-in account
    at.run()
    at.text_input(key="si_name").set_value("ana")
    at.text_input(key="si_password").set_value(PASSWORDS["ana"])
    at.button(key="si_go").click().run()
    at.button(key="cal_save").click().run()
    assert not at.exception, at.exception
    assert any("Saved as revision 1" in s.value for s in at.success), [s.value for s in at.success]
    store = PlanStore(db)
    plan = store.plans()[0]
    revision = store.revision(plan.id, 1)
    assert DEMO_LOG.name in revision.note and calibration["source"]["sha256"] in revision.note
    assert revision.author == "ana"
    assert revision.scenario.calibration.viscosity_factor == pytest.approx(calibration["viscosity_factor"])


def test_without_a_log_the_tab_asks_for_one(db):
    at = _calibration_tab()
    assert not at.exception, at.exception
    assert any("Upload a log" in i.value for i in at.info)
    assert any("In use now: no calibration" in c.value for c in at.caption)


def test_a_log_that_cannot_be_read_shows_its_message():
    # the page's fit job with the bytes an upload would give: the planner's message, no traceback
    from dashboard.compute.calibration_data import fit_document as cached_fit
    from planner.scenario.schema import scenario_to_json

    scenario_json = scenario_to_json(load_scenario(BARGE))
    missing = cached_fit(scenario_json, b"time [min],discharge_pressure [bar]\n1,5\n", "bad.csv", "", ("viscosity_factor",))
    assert "no flow column" in missing["error"]
    bad_map = cached_fit(scenario_json, DEMO_LOG.read_bytes(), DEMO_LOG.name, "[columns\n", ("viscosity_factor",))
    assert "column map cannot be read as TOML" in bad_map["error"]
    rows = "time [min],flow [m3/h],discharge_pressure [bar]\n" + "".join(f"{i},100,5\n" for i in range(1600))
    big = cached_fit(scenario_json, rows.encode(), "big.csv", "", ("viscosity_factor",))
    assert "up to 1500 rows" in big["error"]
