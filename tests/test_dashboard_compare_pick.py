""""Use this value" on a comparison row and the mark of the present value (AppTest, the real app): the
row's value goes into the scenario through the planner's one checked assignment
(``transfer/changes.with_changes`` -> ``assign_field``), and the page's plan is then the planner's plan at
that value (``make_plan``, independently here)."""

from __future__ import annotations

import pytest
from streamlit.testing.v1 import AppTest

from conftest import ROOT
from dashboard.views.compare_pick import CURRENT_COLUMN, CURRENT_MARK, changed_fields, current_row
from planner.errors import ScenarioError
from planner.scenario.schema import load_scenario
from planner.transfer.plan import make_plan, with_changes

APP = str(ROOT / "dashboard" / "app.py")
POLYOL = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"


def _rows_table(at: AppTest):
    frames = [d.value for d in at.dataframe if CURRENT_COLUMN in d.value.columns]
    assert frames, "no comparison table"
    return frames[0]


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_use_this_value_sets_the_setpoint_and_moves_the_mark():
    scenario = load_scenario(POLYOL)
    at = AppTest.from_file(APP, default_timeout=180).run()
    at.selectbox(key="demo_choice").set_value(POLYOL.name).run()
    at.session_state["view"] = "Setpoint comparison"
    at.run()
    now_c = scenario.tracing.setpoint - 273.15
    [field] = [w for w in at.text_input if w.label.startswith("Values [")]
    field.set_value(f"{now_c - 10:.0f}, {now_c:.0f}, {now_c + 10:.0f}")
    [b for b in at.button if b.label == "Compare"][0].click()
    at = at.run()
    assert not at.exception, at.exception
    table = _rows_table(at)
    assert list(table[CURRENT_COLUMN]) == ["", CURRENT_MARK, ""]       # the scenario's present setpoint
    [row] = [s for s in at.selectbox if s.label == "Row"]
    row.set_value(2)
    [use] = [b for b in at.button if b.label == "Use this value"]
    use.click()
    at = at.run()
    assert not at.exception, at.exception
    new = now_c + 10 + 273.15
    assert at.session_state["work"]["tracing"]["setpoint"] == pytest.approx(new - 273.15, abs=1e-9)
    assert list(_rows_table(at)[CURRENT_COLUMN]) == ["", "", CURRENT_MARK]
    assert not [w.value for w in at.warning if "inputs have changed" in w.value]
    assert any("set to" in s.value for s in at.success)
    # the page's plan is the planner's at the new setpoint
    at.session_state["view"] = "Plan"
    at = at.run()
    expected = make_plan(with_changes(scenario, setpoint=new)).timeline.total_time_s / 3600.0
    shown = [m.value for m in at.metric if m.label == "Transfer time"][0]
    assert float(shown.split()[0].replace(",", "")) == pytest.approx(expected, abs=0.0051)


def test_the_assignment_is_the_checked_one():
    scenario = load_scenario(POLYOL)
    changed, fields = changed_fields(scenario, "pump_speed", scenario.pump.speed * 0.8)
    assert fields == {"pump.speed": pytest.approx(scenario.pump.speed * 0.8 * 60)}        # stored in rpm
    with pytest.raises(ScenarioError) as refused:
        changed_fields(scenario, "setpoint", 5000.0)      # far past the temperature ceiling
    assert "tracing.setpoint" in str(refused.value)
    rows = {"lever": "setpoint", "rows": [{"value": 300.0}, {"value": scenario.tracing.setpoint}]}
    assert current_row(rows, scenario) == 1 and current_row(rows, None) is None
