"""The Streamlit dashboard through streamlit.testing.v1.AppTest: every demo, a setpoint change, US units,
a bad input.  The reference for plan numbers is the planner itself (``make_plan``/``with_changes``,
the same numbers as ``python -m planner plan --json``); unit factors are from NIST SP 811 (2008),
Appendix B.  The dashboard must show them, not recompute them.
"""

from __future__ import annotations

import base64
import json
import re
import time

import numpy as np
import pytest
from streamlit.testing.v1 import AppTest

from apptest_inputs import editor_with_column, number_field, open_section
from conftest import DEMO_FILES, ROOT
from planner.transfer.plan import make_plan, with_changes
from planner.reports.plan_json import plan_json
from planner.reports.text import STANDING_CAUTION
from planner.scenario.schema import load_scenario
from planner.scenario.wording import render

APP = str(ROOT / "dashboard" / "app.py")
VIEWS = ["Plan", "Inputs", "Along the line", "Over time", "Setpoint comparison", "Product"]

# NIST SP 811 (2008) Appendix B.8: 1 gal (US) = 3.785 411 784 E-03 m3 (exact); 1 ft = 0.3048 m (exact);
# 1 psi = 6.894 757 E+03 Pa.
GPM_PER_M3_H = 1.0 / 3.785411784e-3 / 60.0        # = 4.402868 gpm per m3/h
PSI_PER_BAR = 1.0e5 / 6.894757e3                  # = 14.50377 psi per bar
FT_PER_M = 1.0 / 0.3048


def peak_discharge_pressure(doc: dict) -> float:
    """The README's definition: the highest pump discharge pressure over the timeline (and at the
    start), and over the push-out that starts the transfer (cold contents in push_cold mode; the
    pre-warmed contents when the JSON has ``startup.after_prewarm``)."""
    values = list(doc["timeline"]["arrays"]["discharge_pressure_pa"]) + [doc["start"]["discharge_pressure_pa"]]
    startup = doc["startup"]
    push = startup.get("push_cold") if startup["mode"] == "push_cold" else startup.get("after_prewarm")
    if push and push.get("possible"):
        values.append(push["peak_discharge_pressure_pa"])
    return max(values)


def unescaped(markdown: str) -> str:
    """Markdown source as read: backslash escapes (CommonMark 2.4) and ** dropped."""
    return re.sub(r"\\(.)", r"\1", markdown).replace("**", "")


def _app() -> AppTest:
    return AppTest.from_file(APP, default_timeout=60)


def _open(demo_name: str) -> AppTest:
    at = _app().run()
    if at.session_state["demo_choice"] != demo_name:
        at.selectbox(key="demo_choice").set_value(demo_name).run()
    return at


def _metric(at: AppTest, label: str) -> str:
    found = [m.value for m in at.metric if m.label == label]
    assert found, f"no metric {label!r}; metrics: {[m.label for m in at.metric]}"
    return found[0]


def _number(text: str) -> float:
    match = re.search(r"[-+]?\d[\d,]*\.?\d*", text)
    assert match, f"no number in {text!r}"
    return float(match.group(0).replace(",", ""))


def _view(at: AppTest, name: str) -> AppTest:
    at.session_state["view"] = name
    return at.run()


def _setpoint_input(at: AppTest):
    return number_field(at, "Setpoint")


@pytest.mark.slow
@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_app_runs_on_every_demo_and_shows_the_cli_numbers(path):
    at = _open(path.name)
    doc = plan_json(make_plan(load_scenario(path)))        # what `python -m planner plan --json` prints
    for view in VIEWS:
        _view(at, view)
        assert not at.exception, f"{view}: {at.exception}"
        broken = [e.value for e in at.error if "could not be drawn" in e.value]
        assert not broken, f"{view}: {broken}"
    # shown at 2 decimals in hours: equal to the JSON within half the last digit
    assert _number(_metric(at, "Transfer time")) == pytest.approx(doc["timeline"]["total_time_s"] / 3600.0, abs=0.0051)
    assert _number(_metric(at, "Starting flow")) == pytest.approx(doc["start"]["flow_m3_s"] * 3600.0, abs=0.0051)
    assert _number(_metric(at, "NPSH margin")) == pytest.approx(doc["start"]["npsh_margin_m"], abs=0.0051)
    assert _number(_metric(at, "Total cost")) == pytest.approx(doc["costs"]["total"], abs=0.0051)
    assert any(STANDING_CAUTION in w.value for w in at.warning), "the standing caution is missing"


@pytest.mark.slow
def test_setpoint_change_moves_the_times_as_the_planner_says():
    path = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"
    scenario = load_scenario(path)
    before = make_plan(scenario)
    after = make_plan(with_changes(scenario, setpoint=30.0 + 273.15))
    # the change must be visible at the page's resolution (0.01 h), else the test proves nothing
    assert abs(after.timeline.total_time_s - before.timeline.total_time_s) / 3600.0 > 0.05
    at = _view(_open(path.name), "Inputs")
    assert _number(_metric(at, "Transfer time")) == pytest.approx(before.timeline.total_time_s / 3600.0, abs=0.0051)
    started = time.perf_counter()
    _setpoint_input(at).set_value(30.0).run()
    elapsed = time.perf_counter() - started
    assert not at.exception
    assert _number(_metric(at, "Transfer time")) == pytest.approx(after.timeline.total_time_s / 3600.0, abs=0.0051)
    assert _number(_metric(at, "Start-up + transfer")) == pytest.approx(after.total_time_s / 3600.0, abs=0.0051)
    assert _number(_metric(at, "Starting flow")) == pytest.approx(after.start.flow * 3600.0, abs=0.0051)
    print(f"\nsetpoint change to updated plan (AppTest run, Inputs tab open): {elapsed:.3f} s")


def _spec(at: AppTest, index: int = 0) -> dict:
    charts = at.get("plotly_chart")
    assert charts, "no chart on the page"
    return json.loads(charts[index].proto.spec)


def _array(trace_values) -> np.ndarray:
    if isinstance(trace_values, dict) and "bdata" in trace_values:
        return np.frombuffer(base64.b64decode(trace_values["bdata"]), dtype=np.dtype(trace_values["dtype"]))
    return np.asarray(trace_values, dtype=float)


@pytest.mark.slow
def test_us_units_show_the_same_quantities_converted():
    path = DEMO_FILES[0]
    doc = plan_json(make_plan(load_scenario(path)))
    at = _view(_open(path.name), "Along the line")
    si_spec = _spec(at)
    assert _metric(at, "Starting flow").endswith("m³/h")
    at.radio(key="unit_system").set_value("US").run()
    assert not at.exception
    flow = _metric(at, "Starting flow")
    assert flow.endswith("gpm")
    assert _number(flow) == pytest.approx(doc["start"]["flow_m3_s"] * 3600.0 * GPM_PER_M3_H, abs=0.0051)
    peak = _metric(at, "Peak discharge pressure")
    assert peak.endswith("psi")
    assert _number(peak) == pytest.approx(peak_discharge_pressure(doc) / 1e5 * PSI_PER_BAR, abs=0.0051)
    # the chart along the line: distance in ft, temperatures in °F (°F = °C × 9/5 + 32, exact)
    us_spec = _spec(at)
    assert us_spec["layout"]["xaxis4"]["title"]["text"].endswith("[ft]")
    x_si, x_us = _array(si_spec["data"][0]["x"]), _array(us_spec["data"][0]["x"])
    np.testing.assert_allclose(x_us, x_si * FT_PER_M, rtol=1e-9)
    t_si, t_us = _array(si_spec["data"][0]["y"]), _array(us_spec["data"][0]["y"])
    np.testing.assert_allclose(t_us, t_si * 9.0 / 5.0 + 32.0, rtol=1e-9)
    # inputs and tables too: the route table's lengths in ft, the ambient in °F
    _view(at, "Inputs")
    route = editor_with_column(at, "Length [ft]").value
    scenario = load_scenario(path)
    np.testing.assert_allclose(route["Length [ft]"].to_numpy(), [s.length * FT_PER_M for s in scenario.route.segments],
                               rtol=1e-9)
    ambient = number_field(at, "Ambient temperature")
    assert ambient.label.endswith("[°F]")
    assert ambient.value == pytest.approx((scenario.site.ambient_temperature - 273.15) * 9.0 / 5.0 + 32.0, abs=1e-9)


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_us_setpoint_entry_is_read_in_fahrenheit():
    path = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"
    after = make_plan(with_changes(load_scenario(path), setpoint=30.0 + 273.15))
    at = _view(_open(path.name), "Inputs")
    at.radio(key="unit_system").set_value("US").run()
    assert _setpoint_input(at).value == pytest.approx(104.0)      # 40 °C = 104 °F
    _setpoint_input(at).set_value(86.0).run()                      # 86 °F = 30 °C
    assert _number(_metric(at, "Transfer time")) == pytest.approx(after.timeline.total_time_s / 3600.0, abs=0.0051)


@pytest.mark.slow
def test_bad_value_shows_its_message_beside_the_field_and_keeps_the_last_results():
    path = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"
    doc = plan_json(make_plan(load_scenario(path)))
    at = _view(_open(path.name), "Inputs")
    wind = number_field(at, "Wind speed")
    wind.set_value(75.0).run()
    assert not at.exception
    beside = [unescaped(e.value) for e in at.error if e.value.startswith("**Wind speed**")]
    assert beside, [e.value for e in at.error]
    assert "must be at most 60 m/s" in beside[0] and "site.wind_speed" in beside[0]
    assert any("last good inputs" in i.value for i in at.info)
    # the last good results stay on the page
    assert _number(_metric(at, "Transfer time")) == pytest.approx(doc["timeline"]["total_time_s"] / 3600.0, abs=0.0051)
    for view in VIEWS:
        _view(at, view)
        assert not at.exception, view
    # a bad cell in the route table: the message names the table, the row, the segment and the column
    work = at.session_state["work"]
    work["site"]["wind_speed"] = 3.0
    work["route"]["segments"][1]["length"] = "0 m"
    at.session_state["work"] = work
    _view(at, "Inputs")
    open_section(at, "Route")
    row = [e.value for e in at.error if "row 2" in e.value and "problem(s)" not in e.value]   # beside the table, not the summary
    assert row, [e.value for e in at.error]
    assert "Pipe rack to syrup house" in row[0] and "**Length**" in row[0] and "at least 0.01 m" in unescaped(row[0])


def test_report_is_self_contained_and_carries_the_cautions():
    from dashboard.present.display import extra_caution
    from planner.reports.key_figures import figure_text
    from dashboard.present.report import build_report_html
    from dashboard.compute.results import plan_results

    scenario = load_scenario(DEMO_FILES[0])
    bundle = plan_results(scenario)
    page = build_report_html(scenario, bundle, "US")
    assert page.count("<script") >= 2 and re.search(r"<script[^>]*\bsrc\s*=", page) is None   # nothing fetched
    assert "Plotly.newPlot" in page and len(page) > 3_000_000     # plotly.js inlined (about 4.6 MB)
    assert page.count(STANDING_CAUTION) >= 2 and extra_caution(scenario.limits.touch_temperature).render("US") in page
    assert "about 140 °F burn" in page          # 60 degC = 140 degF (exact)
    for k in bundle.key_figures:
        assert figure_text(k, "US") in page
    for f in bundle.findings:
        assert f["code"] in page


def test_csv_exports_follow_the_unit_system():
    from dashboard.present import tables
    from dashboard.compute.results import plan_results

    scenario = load_scenario(DEMO_FILES[0])
    bundle = plan_results(scenario)
    flows = np.asarray(bundle.plan["timeline"]["arrays"]["flow_m3_s"])
    us = tables.timeline_frame(bundle.plan, "US")
    np.testing.assert_allclose(us["Flow [gpm]"].to_numpy(), flows * 3600.0 * GPM_PER_M3_H, rtol=1e-9)
    si = tables.timeline_frame(bundle.plan, "SI")
    np.testing.assert_allclose(si["Flow [m³/h]"].to_numpy(), flows * 3600.0, rtol=1e-12)
    text = tables.csv_text(tables.profile_frame(bundle.profile, bundle.segments, "US"))
    header = text.splitlines()[0]
    assert "Distance from pump [ft]" in header and "Bulk temperature [°F]" in header and "Pressure (gauge) [psi]" in header


def test_table_edits_are_written_back_in_si(monkeypatch):
    """The route table's callback, as Streamlit calls it after an edit (US units on the page)."""
    import copy

    import streamlit as st

    from dashboard.views.inputs import table_editor as inputs
    from planner.scenario.schema import scenario_from_dict, scenario_to_dict

    original = scenario_to_dict(load_scenario(DEMO_FILES[-1]))
    state = {"work": copy.deepcopy(original), "unit_system": "US", "gen": 1}
    monkeypatch.setattr(st, "session_state", state)
    key = "route-table"
    state[key] = {"edited_rows": {0: {"Length [ft]": 100.0, "Insulation thickness [in]": 2.0}},
                  "deleted_rows": [2], "added_rows": [{"Name": "Extra run", "Length [ft]": 50.0}]}
    inputs._commit_table("route.segments", key, inputs.SEGMENT_COLUMNS, inputs._new_segment)
    segments = scenario_from_dict(state["work"]).route.segments
    # NIST SP 811: 1 ft = 0.3048 m, 1 in = 25.4 mm (exact)
    assert segments[0].length == pytest.approx(30.48, rel=1e-12)
    assert segments[0].insulation[0].thickness == pytest.approx(0.0508, rel=1e-12)
    assert [s.name for s in segments] == [original["route"]["segments"][0]["name"], original["route"]["segments"][1]["name"],
                                          "Extra run"]
    assert segments[2].length == pytest.approx(15.24, rel=1e-12)
    # untouched cells keep their stored values exactly
    assert state["work"]["route"]["segments"][1] == original["route"]["segments"][1]
    assert state["table_gen"]["route.segments"] == 1


def _press_compare(at: AppTest, values: str) -> AppTest:
    field = [w for w in at.text_input if w.label.startswith("Values [")]
    assert field, [w.label for w in at.text_input]
    field[0].set_value(values)
    [b for b in at.button if b.label == "Compare"][0].click()
    return at.run()


def _comparison_shown(at: AppTest) -> str:
    assert not at.exception
    broken = [e.value for e in at.error if "could not be drawn" in e.value]
    assert not broken, broken
    recommended = [unescaped(s.value) for s in at.success if s.value.startswith("Recommended:")]
    assert recommended, [e.value for e in at.error] + [s.value for s in at.success]
    return recommended[0]


@pytest.mark.slow
def test_the_setpoint_comparison_can_be_run_again():
    """Issue 12.1: the same values twice, again after SI -> US, and in a second session (another
    browser) that finds the comparison already worked out by the first: each shows the result.
    The reference is ``planner.sweeps.compare.compare`` on the same values."""
    from planner.sweeps.compare import compare

    path = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"
    expected = compare(load_scenario(path), lever="setpoint", values=[303.15, 313.15])   # SI: 30 and 40 °C
    best = expected.rows[expected.recommended]["value"] - 273.15
    at = _view(_open(path.name), "Setpoint comparison")
    first = _comparison_shown(_press_compare(at, "30, 40"))
    assert first == f"Recommended: {render(expected.reason, 'SI')}", first
    assert first.startswith(f"Recommended: {best:.1f} °C: "), first     # the value once
    # with two values the recommendation is at an end of the range: the page says to extend it (issue 20.4)
    assert expected.end_of_range and render(expected.end_of_range, "SI") in [unescaped(i.value) for i in at.info]
    assert _comparison_shown(_press_compare(at, "30, 40")) == first
    at.radio(key="unit_system").set_value("US").run()
    again = _comparison_shown(_press_compare(at, "86, 104"))              # the same setpoints in °F
    assert f"{best * 9 / 5 + 32:.1f} °F" in again
    other = _view(_open(path.name), "Setpoint comparison")                # a second session
    assert _comparison_shown(_press_compare(other, "30, 40")) == first


def test_an_invalid_value_keeps_its_inputs_sub_tab_open():
    """Issue 12.2: the sub-tab with the field stays open (its label gains the warning) and the message
    is drawn beside the field; the limit is the schema's (Site.wind_speed at most 60 m/s)."""
    from dashboard.views.inputs import SECTION_KEY

    at = _view(_open(DEMO_FILES[0].name), "Inputs")
    open_section(at, "Site & limits")
    number_field(at, "Wind speed").set_value(75.0).run()
    assert not at.exception
    assert at.session_state[SECTION_KEY] == "⚠️ Site & limits (1)"
    beside = [e.value for e in at.error if e.value.startswith("**Wind speed**")]
    assert beside and "60 m/s" in unescaped(beside[0])
    assert [w for w in at.number_input if w.label.startswith("Wind speed")][0].value == pytest.approx(75.0)
    # fixing it keeps the sub-tab open too, and the warning goes
    number_field(at, "Wind speed").set_value(5.0).run()
    assert at.session_state[SECTION_KEY] == "Site & limits"
    assert not [e.value for e in at.error if e.value.startswith("**Wind speed**")]


def test_result_tables_show_each_quantity_at_its_display_decimals():
    """One format per number: the page's and the report's result tables show a figure at the decimals the text
    outputs use for its quantity (``wording.DECIMALS``: flows and pressures 2, temperatures 1, times 2), a share
    in per cent at 1, positions along the line at 2 (centimetres); they showed every column at 3 ("12.500 %",
    "225.525 gpm")."""
    from dashboard.present import tables
    from dashboard.present.report import _table
    from dashboard.compute.results import plan_results

    bundle = plan_results(load_scenario(DEMO_FILES[0]))
    timeline = tables.timeline_frame(bundle.plan, "US")
    assert {k: timeline.attrs["decimals"][k] for k in ("Time [h]", "Flow [gpm]", "Source temperature [°F]",
                                                       "Discharge pressure [psi]")} == {
        "Time [h]": 2, "Flow [gpm]": 2, "Source temperature [°F]": 1, "Discharge pressure [psi]": 2}
    html = _table(timeline)
    first_flow = timeline["Flow [gpm]"].iloc[0]
    assert f"<td>{first_flow:,.2f}</td>" in html and f"<td>{first_flow:,.3f}</td>" not in html
    push = tables.push_cold_frame(bundle.push_cold_rows, "SI")
    assert push.attrs["decimals"]["Line volume pushed out [%]"] == 1
    assert "<td>25.0</td>" in _table(push) and "25.000" not in _table(push)
    profile = tables.profile_frame(bundle.profile, bundle.segments, "SI")
    assert profile.attrs["decimals"]["Distance from pump [m]"] == 2
    assert profile.attrs["decimals"]["Bulk temperature [°C]"] == 1
