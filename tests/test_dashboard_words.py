"""What the page says, in words a person reads (issue 23, parts 5–6): no programmer names as labels, labels
in the user's unit system, a fit with no spare point said so, the input problems named by their fields,
one "Signed in as", and no save button offered to an account that may not save."""

from __future__ import annotations

import re

import pytest
from streamlit.testing.v1 import AppTest

from conftest import ROOT
from test_dashboard_sharing import _click, _people, _sign_in, _texts, _view, db  # noqa: F401  (db: fixture)

APP = str(ROOT / "dashboard" / "app.py")
BARGE = "fuel_oil_barge_discharge.toml"


def test_codes_read_as_words():
    from dashboard.present.display import words
    from dashboard.views.inputs.table_editor import _fittings_text

    text = _fittings_text({"fittings": [{"type": "elbow_90_long_radius", "count": 4}, {"type": "gate_valve"},
                                        {"type": "tee_run_through", "count": 2}]})
    assert text == "4× 90° elbow, long radius, 1× gate valve, 2× tee, run through"
    assert [words(n) for n in ("viscosity_factor", "heat_loss_factor", "slip_factor")] == [
        "viscosity factor", "heat-loss factor", "pump slip factor"]


def test_a_law_through_exactly_its_parameters_count_of_points_is_not_called_a_good_fit():
    from dashboard.present.display import fit_quality_text

    curve = {"rms_log_residual": 0.0, "max_relative_residual": 0.0, "n_points": 2, "parameters": {"a": 1.0, "b": 2.0}}
    assert "no spare point checks it" in fit_quality_text(curve)
    assert "no spare point" not in fit_quality_text({**curve, "n_points": 3})


def test_us_pages_give_the_reference_temperature_and_gauge_in_us_words():
    at = AppTest.from_file(APP, default_timeout=120).run()
    at.session_state["unit_system"] = "US"
    at = _view(at, "Product")
    items = [str(v) for t in at.table for v in t.value.iloc[:, 0]]
    assert "Density at 68 °F" in items and not any("°C" in i for i in items), items   # 20 °C = 68 °F exactly
    at.selectbox(key="demo_choice").set_value(BARGE).run()
    at = _view(at, "Setpoint comparison")
    [lever] = [s for s in at.selectbox if s.label == "Compare"]
    lever.set_value("steam_pressure").run()
    assert any(w.label == "Values [psi] (gauge)" for w in at.text_input), [w.label for w in at.text_input]


def test_input_problems_are_named_by_their_fields_not_their_paths():
    at = AppTest.from_file(APP, default_timeout=120).run()
    at.session_state["work"]["route"]["segments"][0]["length"] = "-3 m"
    at.run()
    summary = [e.value for e in at.error if "problem(s)" in e.value]
    assert summary and "Discharge route, row 1, Length" in summary[0] and "route.segments[0]" not in summary[0], summary


def test_signed_in_once_and_no_save_for_an_admin(db):  # noqa: F811
    _people(db)
    at = AppTest.from_file(APP, default_timeout=120).run()
    _sign_in(at, "root")                                     # the admin
    shown = _texts(at.sidebar.caption) + _texts(at.sidebar.success) + _texts(at.sidebar.markdown)
    assert sum(len(re.findall(r"Signed in as", s)) for s in shown) == 1, shown
    assert at.button(key="sv_save").disabled
    assert any("saving needs a planner or supervisor account" in c for c in _texts(at.sidebar.caption))
    _sign_in(at, "ana")                                      # a planner may save
    assert not at.button(key="sv_save").disabled
