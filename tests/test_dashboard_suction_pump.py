"""The suction line's chart (Along the line) and the pump chart (Plan) in the real app (AppTest): the
page draws the planner's numbers (``make_plan``, ``pump_chart``) converted, never its own.  Unit factors:
NIST SP 811 (2008) Appendix B (1 psi = 6.894 757 E+03 Pa; 1 gal (US) = 3.785 411 784 E-03 m3).

The Plan view draws the pump chart only once the browser says the key figures are on screen
(``dashboard/views/deferred.py``); AppTest runs no JavaScript, so ``_open`` stands in for that signal by
setting the session key it would set (``page_shown``).  The real signal is tested in Chromium
(``tests/test_browser_deferred.py``)."""

from __future__ import annotations

import base64
import json

import numpy as np
import pytest
from streamlit.testing.v1 import AppTest

from conftest import ROOT
from planner.scenario.schema import load_scenario
from planner.transfer.plan import make_plan
from planner.transfer.pump_chart import pump_chart

APP = str(ROOT / "dashboard" / "app.py")
SYRUP = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"
POLYOL = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"
PSI_PER_PA = 1.0 / 6.894757e3
GPM_PER_M3_S = 60.0 / 3.785411784e-3


def _open(path, view: str, units: str = "SI", shown: bool = True) -> AppTest:
    """The app on demo ``path`` and ``view``; ``shown``: stand in for the browser's page-shown signal."""
    at = AppTest.from_file(APP, default_timeout=90).run()
    if at.session_state["demo_choice"] != path.name:
        at.selectbox(key="demo_choice").set_value(path.name).run()
    at.session_state["unit_system"] = units
    at.session_state["view"] = view
    if shown:
        at.session_state["page_shown"] = True
    at.run()
    assert not at.exception, at.exception
    return at


def _values(v) -> np.ndarray:
    if isinstance(v, dict) and "bdata" in v:
        return np.frombuffer(base64.b64decode(v["bdata"]), dtype=np.dtype(v["dtype"])).astype(float)
    return np.asarray([np.nan if x is None else x for x in v], dtype=float)


def _chart(at: AppTest, title_start: str) -> dict:
    for chart in at.get("plotly_chart"):
        spec = json.loads(chart.proto.spec)
        if spec["layout"]["title"]["text"].startswith(title_start):
            return spec
    raise AssertionError(f"no chart titled {title_start!r}")


def test_along_the_line_shows_the_suction_hose_at_each_moment():
    plan = make_plan(load_scenario(SYRUP))
    at = _open(SYRUP, "Along the line")
    spec = _chart(at, "Along the suction line")
    temperature = [t for t in spec["data"] if t.get("yaxis", "y") == "y" and t.get("showlegend") is not False]
    assert len(temperature) == 3      # running at the start, cold push-out, after the pre-warm
    pushes = {"cold contents": plan.push_cold, "after the pre-warm": plan.after_prewarm}
    matched = 0
    for trace in temperature:
        for words, push in pushes.items():
            if trace["name"].startswith(words):
                matched += 1
                assert _values(trace["y"])[0] == pytest.approx(push.start_temperature_k - 273.15, abs=1e-6)
                assert _values(trace["x"])[-1] == pytest.approx(6.0)
    assert matched == 2
    text = " ".join(str(m.value) for m in at.markdown) + " ".join(t.value.to_string() for t in at.table)
    assert "The suction line" in text and "Unloading hose H-3" in text and "During the pre-warm" in text


def test_pump_chart_in_us_units_is_the_planners():
    chart = pump_chart(make_plan(load_scenario(SYRUP)))
    at = _open(SYRUP, "Plan", units="US")
    spec = _chart(at, "Pump and system at the start")
    point = [t for t in spec["data"] if t["name"] == "operating point at the start"][0]
    assert _values(point["x"])[0] == pytest.approx(chart.operating_flow_m3_s * GPM_PER_M3_S, rel=1e-6)
    assert _values(point["y"])[0] == pytest.approx(chart.operating_value * PSI_PER_PA, rel=1e-6)
    assert spec["layout"]["yaxis"]["title"]["text"] == "Pump differential pressure [psi]"


def _pump_charts(at: AppTest) -> list:
    return [c for c in at.get("plotly_chart")
            if json.loads(c.proto.spec)["layout"]["title"]["text"].startswith("Pump and system at the start")]


def test_pump_chart_waits_for_the_page_shown_signal():
    """Before the browser's signal the Plan view has its key figures and tables and a line saying the pump
    chart is on its way, but no chart; once the signal's value is true the chart is drawn and kept."""
    at = _open(POLYOL, "Plan", shown=False)
    assert [m.value for m in at.metric] and any("Pump at the start" in m.value for m in at.markdown)
    assert not _pump_charts(at)
    assert any(c.value == "Pump chart loading…" for c in at.caption)
    assert "page_shown" not in at.session_state
    at.session_state["page_shown_signal"] = True          # what the component's value sets on its rerun
    at.run()
    assert at.session_state["page_shown"] is True and len(_pump_charts(at)) == 1
    assert not any(c.value == "Pump chart loading…" for c in at.caption)
    at.session_state["view"] = "Over time"
    at.run()
    at.session_state["view"] = "Plan"                       # the signal is not drawn again: the chart at once
    at.run()
    assert not at.exception and len(_pump_charts(at)) == 1


def test_centrifugal_pump_chart_draws_water_and_corrected_curves():
    chart = pump_chart(make_plan(load_scenario(POLYOL)))
    at = _open(POLYOL, "Plan")
    spec = _chart(at, "Pump and system at the start")
    names = [t["name"] for t in spec["data"]]
    assert names[0] == "pump on water (as given)" and names[1].startswith("pump on the product at ")
    corrected = spec["data"][1]
    assert _values(corrected["y"]) == pytest.approx(np.array(chart.corrected.value), rel=1e-9)   # head in m
    assert _values(corrected["x"]) == pytest.approx(np.array(chart.corrected.flow_m3_s) * 3600.0, rel=1e-9)


def test_the_report_carries_both_charts():
    from dashboard.compute.results import plan_results
    from dashboard.present.report import build_report_html

    scenario = load_scenario(SYRUP)
    page = build_report_html(scenario, plan_results(scenario), "US")
    assert "Along the suction line (source outlet to pump inlet)" in page
    assert "Pump and system at the start" in page and "Pump differential pressure [psi]" in page
