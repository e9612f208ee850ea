"""The dashboard never shows a stop as ok, and speaks the chosen unit system (AppTest, the real app).

The scenario is the syrup demo with its setpoint at 95 degC: the heater passes its 85 degC exposure
rating (a scenario input) and the pre-warm cannot reach the setpoint, both stop-level findings of the
planner (``planner.checks.findings.assess``, called here independently of the page).
"""

from __future__ import annotations

import re

import pytest
from streamlit.testing.v1 import AppTest

from apptest_inputs import number_field
from conftest import ROOT
from planner.checks.findings import assess
from planner.scenario.schema import load_scenario
from planner.transfer.plan import make_plan, with_changes
from unit_words import assert_speaks

APP = str(ROOT / "dashboard" / "app.py")
SYRUP = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"


def _unescaped(markdown: str) -> str:
    """Markdown source as a reader sees it: the backslash escapes that keep text literal removed."""
    return re.sub(r"\\(.)", r"\1", markdown)


def _texts(at: AppTest) -> list[str]:
    out = []
    for group in (at.error, at.warning, at.info, at.success, at.markdown, at.caption):
        out += [str(e.value) for e in group]
    out += [f"{m.label} {m.value} {m.delta or ''}" for m in at.metric]
    for table in at.table:
        out.append(table.value.to_string())
    return out


@pytest.fixture(scope="module")
def hot_page():
    at = AppTest.from_file(APP, default_timeout=90).run()
    if at.session_state["demo_choice"] != SYRUP.name:
        at.selectbox(key="demo_choice").set_value(SYRUP.name).run()
    at.session_state["view"] = "Inputs"
    at.run()
    number_field(at, "Setpoint").set_value(95.0).run()
    at.session_state["view"] = "Plan"
    at.run()
    assert not at.exception
    return at


def test_the_planner_calls_it_a_stop():
    found = assess(make_plan(with_changes(load_scenario(SYRUP), setpoint=95.0 + 273.15)))
    stops = {f.code for f in found if f.severity == "stop"}
    assert {"HEATER-EXPOSURE", "PREWARM-IMPOSSIBLE"} <= stops


def test_a_stop_is_never_presented_as_ok(hot_page):
    at = hot_page
    assert not [s.value for s in at.success], "a success box on a stop-level plan"
    status = [e.value for e in at.error if "STOP" in e.value]
    assert status and "Heater above its exposure rating" in status[0] and "At the start:" in status[0]
    metrics = {m.label: _unescaped(m.value) for m in at.metric}
    assert metrics["Start-up + transfer"] == metrics["Total cost"] == "not possible"
    reasons = [_unescaped(c.value) for c in at.caption]
    assert any(r.startswith("pre-warm: tracing cannot bring") for r in reasons), reasons


def test_the_page_speaks_us_units(hot_page):
    at = hot_page
    for text in _texts(at):
        assert_speaks(text, "SI")
    at.radio(key="unit_system").set_value("US").run()
    assert not at.exception
    texts = _texts(at)
    assert any("°F" in t for t in texts)
    for text in texts:
        assert_speaks(text, "US")
    at.radio(key="unit_system").set_value("SI").run()


def test_the_report_headline_follows_the_worst_finding():
    from dashboard.present.report import build_report_html
    from dashboard.compute.results import plan_results as build_bundle

    scenario = with_changes(load_scenario(SYRUP), setpoint=95.0 + 273.15)
    page = build_report_html(scenario, build_bundle(scenario), "US")
    head = page[page.index('<p class="headline stop">'):]
    head = head[:head.index("</p>")]
    assert "STOP: do not start as planned" in head and "185.0 °F" in head      # 85 degC = 185 degF (exact)
    assert "not possible: pre-warm: tracing cannot bring" in page
    import html
    import re

    summary = page[page.index('<p class="headline'):page.index("<h2>Inputs</h2>")]   # headline, figures, findings
    assert_speaks(html.unescape(re.sub(r"<[^>]+>", " ", summary)), "US")


def test_an_input_below_absolute_zero_is_reported_in_the_unit_typed():
    at = AppTest.from_file(APP, default_timeout=90).run()
    at.session_state["view"] = "Inputs"
    at.run()
    number_field(at, "Ambient temperature").set_value(-300.0).run()
    messages = [_unescaped(e.value) for e in at.error if _unescaped(e.value).startswith("**Ambient temperature**")]
    assert messages, [e.value for e in at.error]
    assert "-300 °C is at or below absolute zero (-273.15 °C)" in messages[0] and " K" not in messages[0]
    at.radio(key="unit_system").set_value("US").run()
    number_field(at, "Ambient temperature").set_value(-500.0).run()
    messages = [_unescaped(e.value) for e in at.error if _unescaped(e.value).startswith("**Ambient temperature**")]
    assert "-500 °F is at or below absolute zero (-459.67 °F)" in messages[0]
