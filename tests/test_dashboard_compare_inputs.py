"""The comparison's inputs on the page (AppTest): the levers are named by the one lever table and the field
labels (``checks/lever_values.LEVERS``, ``scenario/labels``), and the sensitivity shifts can be set, in the
user's unit system, with the comparison's own defaults."""

from __future__ import annotations

import pytest
from streamlit.testing.v1 import AppTest

from conftest import ROOT
from planner.scenario.schema import load_scenario
from planner.scenario.wording import render

APP = str(ROOT / "dashboard" / "app.py")
POLYOL = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"


def _comparison_page(units: str) -> AppTest:
    at = AppTest.from_file(APP, default_timeout=120).run()
    at.selectbox(key="demo_choice").set_value(POLYOL.name).run()
    at.session_state["unit_system"] = units
    at.session_state["view"] = "Setpoint comparison"
    return at.run()


def test_levers_are_named_by_their_fields():
    from planner.checks.lever_values import LEVERS
    from planner.scenario.labels import FIELD_LABELS

    at = _comparison_page("SI")
    [lever] = [s for s in at.selectbox if s.label == "Compare"]
    shown = list(lever.options)                # as the page shows them
    expected = [FIELD_LABELS[f"{LEVERS[k].section}.{LEVERS[k].field}"] for k in ("setpoint", "pump_speed", "flow_limit")]
    assert shown == expected                  # the polyol line is electric-traced: no steam pressure lever


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_sensitivity_shifts_are_inputs_in_the_users_units():
    """US units: the default ambient shift 10 K reads 18 °F (NIST SP 811: a temperature interval of 1 K is
    1.8 °F, exact).  Shifts of 9 °F (5 K) and 10 % give the cases ``compare`` gives with those shifts."""
    from planner.sweeps.compare import compare

    at = _comparison_page("US")
    [box] = [c for c in at.checkbox if c.label == "With sensitivity"]
    at = box.check().run()
    [shift] = [n for n in at.number_input if n.label == "Ambient ± [°F]"]
    [viscosity] = [n for n in at.number_input if n.label == "Viscosity ± [%]"]
    assert shift.value == pytest.approx(18.0, abs=1e-9) and viscosity.value == pytest.approx(20.0)
    shift.set_value(9.0)
    viscosity.set_value(10.0)
    [field] = [w for w in at.text_input if w.label.startswith("Values [")]
    field.set_value("86, 104")                # 30 and 40 °C
    [b for b in at.button if b.label == "Compare"][0].click()
    at = at.run()
    assert not at.exception, at.exception
    expected = compare(load_scenario(POLYOL), "setpoint", [303.15, 313.15], sensitivity=True, ambient_shift=5.0,
                       viscosity_uncertainty=0.1)
    frames = [d.value for d in at.dataframe if "Case" in d.value.columns]
    assert frames, "no sensitivity table"
    cases = list(frames[0]["Case"])
    assert cases == [render(name, "US") for name in expected.sensitivity]
    assert any("9" in c and "°F" in c for c in cases) and any("10 %" in c for c in cases), cases
