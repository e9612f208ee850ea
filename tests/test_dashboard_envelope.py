"""The dashboard's operating envelope (comparison tab): its table equals ``planner.sweeps.envelope`` for the
same grid, and a bad ambient is refused beside the box (AppTest, the real worker pool)."""

from __future__ import annotations

from streamlit.testing.v1 import AppTest

from conftest import DEMO_DIR, ROOT
from test_dashboard import unescaped
from planner.scenario.schema import load_scenario
from planner.sweeps.envelope import envelope

APP = str(ROOT / "dashboard" / "app.py")
SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"


def _comparison_tab() -> AppTest:
    at = AppTest.from_file(APP, default_timeout=90).run()
    if at.session_state["demo_choice"] != SYRUP.name:
        at.selectbox(key="demo_choice").set_value(SYRUP.name).run()
    at.session_state["view"] = "Setpoint comparison"
    return at.run()


def _press_envelope(at: AppTest, values: str, ambients: str) -> AppTest:
    [w for w in at.text_input if w.label.startswith("Values [")][0].set_value(values)
    [w for w in at.text_input if w.label.startswith("Ambients [")][0].set_value(ambients)
    [b for b in at.button if b.label == "Envelope"][0].click()
    return at.run()


def test_the_envelope_table_equals_the_library_and_bad_ambients_are_named():
    expected = envelope(load_scenario(SYRUP), "setpoint", [313.15, 343.15], [253.15, 293.15])
    at = _press_envelope(_comparison_tab(), "40, 70", "-20, 20")
    assert not at.exception and not at.error, [e.value for e in at.error]
    table = at.dataframe[-1].value
    shown = list(table.iloc[:, 1])
    assert shown == ["40.0 °C" if v is not None and abs(v - 313.15) < 1e-9 else "none of the values"
                     for v in expected.line]
    assert list(table.iloc[:, 0]) == ["-20 °C", "20 °C"]
    at = _press_envelope(at, "40, 70", "-95")
    refused = [unescaped(e.value) for e in at.error]
    assert any("Ambients: ambient 1 (-95 °C): site.ambient_temperature: -95.0 °C is out of range: must be at least -90 °C"
               in e for e in refused), refused


def test_the_plan_report_ends_with_the_envelope_card_in_the_users_units():
    from dashboard.present.report import build_report_html
    from dashboard.compute.results import plan_results as build_bundle
    from planner.sweeps.envelope import envelope_json

    scenario = load_scenario(SYRUP)
    grid = envelope_json(envelope(scenario, "setpoint", [313.15, 343.15], [253.15, 293.15]))
    page = build_report_html(scenario, build_bundle(scenario), "US", envelope=grid)
    card = page[page.index('<section class="envelope-card">'):]
    assert "lowest trace setpoint" in card and "<td><b>104.0 °F</b></td>" in card and "-4 °F" in card   # 40 °C, -20 °C
    assert "°C" not in card
    assert '<section class="envelope-card">' not in build_report_html(scenario, build_bundle(scenario), "US")
