"""Inputs that drive checks, seen and edited on the page (AppTest, in SI and US units): the temperature
class, wall thickness and jacket emissivity of each segment, the destination's gas and design pressure,
the slip reference of a positive-displacement pump and the comparison's sensitivity shifts.

Unit factors are NIST SP 811 (exact): 1 in = 25.4 mm, 1 psi = 6894.757 Pa (to 7 figures), a kelvin
interval is 1.8 °F.  Temperature-class limits are IEC 60079-0 (T3 200 °C, T4 135 °C)."""

from __future__ import annotations

import copy

import pytest
from streamlit.testing.v1 import AppTest

from apptest_inputs import editor_with_column, number_field, open_section
from conftest import ROOT
from planner.errors import ScenarioError
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict

APP = str(ROOT / "dashboard" / "app.py")
BARGE = ROOT / "demo_scenarios" / "fuel_oil_barge_discharge.toml"
PSI_PA = 6894.757293168
IN_MM = 25.4


def _page(units: str, view: str = "Inputs", work: dict | None = None) -> AppTest:
    at = AppTest.from_file(APP, default_timeout=180).run()
    at.selectbox(key="demo_choice").set_value(BARGE.name).run()
    at.session_state["unit_system"] = units
    if work is not None:
        at.session_state["work"] = work
    at.session_state["view"] = view
    return at.run()


def _commit(work: dict, units: str, edits: dict, monkeypatch) -> dict:
    """The route table's own callback (``_commit_table``) as Streamlit calls it after the edits."""
    import streamlit as st

    from dashboard.views.inputs import table_editor

    state = {"work": copy.deepcopy(work), "unit_system": units, "gen": 1, "route-table": {"edited_rows": edits}}
    monkeypatch.setattr(st, "session_state", state)
    table_editor._commit_table("route.segments", "route-table", table_editor.SEGMENT_COLUMNS,
                               table_editor._new_segment)
    return state["work"]


@pytest.mark.parametrize("units", ["SI", "US"])
def test_temperature_class_wall_and_emissivity_are_seen_and_edited_in_the_route_table(units, monkeypatch):
    wall_unit = "mm" if units == "SI" else "in"
    at = _page(units)
    frame = editor_with_column(at, "Temperature class").value
    assert list(frame["Temperature class"][:2]) == ["T3", "T3"]          # the arm and the manifold
    assert frame["Temperature class"][2:].isna().all()
    wall = frame[f"Wall thickness [{wall_unit}]"]
    assert wall[0] == pytest.approx(7.0 if units == "SI" else 7.0 / IN_MM, rel=1e-9)
    assert list(frame["Jacket emissivity"][:2]) == pytest.approx([0.8, 0.15])
    # an edit in the table reaches the scenario in SI: a stricter class on the manifold, a thicker arm wall
    work = _commit(at.session_state["work"], units, {
        0: {f"Wall thickness [{wall_unit}]": 10.0 if units == "SI" else 10.0 / IN_MM, "Jacket emissivity": 0.5},
        1: {"Temperature class": "T4"}}, monkeypatch)
    segments = scenario_from_dict(work).route.segments
    assert segments[0].wall_thickness == pytest.approx(0.010, rel=1e-9)
    assert segments[0].jacket_emissivity == pytest.approx(0.5)
    assert segments[1].hazardous_area_class == "T4"
    # ... and drives the check: 3.5 bar(g) steam (about 148 °C, steam tables, from memory) is past T4 (135 °C)
    at = _page(units, "Plan", work)
    assert not at.exception
    texts = " ".join(e.value for e in [*at.error, *at.warning])
    assert "Tracer too hot for the hazardous area" in texts and "T4" in texts


def test_a_wall_thickness_on_an_nps_segment_is_refused_by_name():
    """An NPS segment takes its schedule's wall (ASME B36.10 via ``line/route._diameters``): a wall thickness
    given there would not count, so the scenario refuses it, naming the field and the row, in the CLI's
    loader and on the page, rather than show it as if it counted."""
    scenario = load_scenario(BARGE)
    assert scenario.route.segments[1].nps is not None
    arm = scenario.route.segments[0]
    from planner.line.route import _diameters

    assert _diameters(arm.model_copy(update={"wall_thickness": 0.020}))[1] == pytest.approx(arm.inside_diameter + 0.040)
    work = scenario_to_dict(scenario)
    work["route"]["segments"][1]["wall_thickness"] = "20 mm"
    with pytest.raises(ScenarioError) as caught:
        scenario_from_dict(copy.deepcopy(work))
    text = str(caught.value)
    assert "route.segments[1]" in text and "wall_thickness" in text and "schedule" in text
    at = _page("SI", work=work)
    at = open_section(at, "Route")
    shown = " ".join(box.value for box in [*at.error, *at.warning]).replace("\\", "")   # markdown escapes
    assert "row 2" in shown and "wall_thickness: the schedule sets the wall" in shown, shown


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
@pytest.mark.parametrize("units", ["SI", "US"])
def test_destination_pressures_and_pump_slip_reference_are_inputs(units):
    pressure = (lambda pa: pa / 1e5) if units == "SI" else (lambda pa: pa / PSI_PA)
    p_unit = "bar" if units == "SI" else "psi"
    at = _page(units)
    design = number_field(at, f"Tank design pressure (gauge) [{p_unit}]")
    assert design.value == pytest.approx(pressure(0.05e5), rel=1e-6)
    gas = number_field(at, f"Gas pressure in the tank (gauge) [{p_unit}]")
    assert gas.value == pytest.approx(0.0, abs=1e-12)
    at = gas.set_value(round(pressure(0.08e5), 4)).run()                   # above the design pressure
    assert scenario_from_dict(at.session_state["work"]).destination.pressure == pytest.approx(0.08e5, rel=1e-4)
    slip_p = number_field(at, f"Differential pressure of the slip figure [{p_unit}]")
    assert slip_p.value == pytest.approx(pressure(8e5), rel=1e-6)
    slip_mu = number_field(at, "Viscosity of the slip figure [")
    assert slip_mu.label.endswith("[mPa·s]" if units == "SI" else "[cP]") and slip_mu.value == pytest.approx(200.0)
    at = slip_mu.set_value(250.0).run()
    pump = scenario_from_dict(at.session_state["work"]).pump
    assert pump.slip_reference_viscosity == pytest.approx(0.25, rel=1e-9)
    assert pump.slip_reference_pressure == pytest.approx(8e5, rel=1e-9)
    at.session_state["view"] = "Plan"
    at = at.run()
    texts = " ".join(e.value for e in [*at.error, *at.warning])
    assert "Destination above its design pressure" in texts


@pytest.mark.parametrize("units", ["SI", "US"])
def test_sensitivity_shifts_take_the_comparisons_defaults_and_the_budgets_limits(units):
    from planner.scenario.budget import active_budget

    at = _page(units, "Setpoint comparison")
    [box] = [c for c in at.checkbox if c.label == "With sensitivity"]
    at = box.check().run()
    [shift] = [n for n in at.number_input if n.label.startswith("Ambient ± [")]
    [viscosity] = [n for n in at.number_input if n.label == "Viscosity ± [%]"]
    per_k = 1.0 if units == "SI" else 1.8
    assert shift.label == ("Ambient ± [K]" if units == "SI" else "Ambient ± [°F]")
    assert shift.value == pytest.approx(10.0 * per_k) and viscosity.value == pytest.approx(20.0)
    assert shift.max == pytest.approx(active_budget().max_ambient_shift_k * per_k)
    assert viscosity.max == pytest.approx(active_budget().max_viscosity_uncertainty * 100.0)


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
@pytest.mark.parametrize("units", ["SI", "US"])
def test_the_checks_own_limits_are_inputs(units):
    """The film coefficient the laminar check calls poor (20 W/(m²·K) = 3.52 BTU/(h·ft²·°F)), the flash-point
    margin (10 K = 18 °F), the lowest velocity and the source's gas pressure are on the page; lowering the
    film limit below the barge line's film coefficient (about 8.5 W/(m²·K) here) clears the finding."""
    film = "Film coefficient counted as poor ["
    at = _page(units, "Plan")
    assert "Laminar flow, poor heat transfer" in " ".join(e.value for e in at.info)
    at.session_state["view"] = "Inputs"
    at = at.run()
    field = number_field(at, film)
    per_w = 1.0 if units == "SI" else 1.0 / 5.678263
    assert field.value == pytest.approx(20.0 * per_w, rel=1e-6)
    assert number_field(at, "Margin below the flash point [").value == pytest.approx(10.0 if units == "SI" else 18.0)
    assert number_field(at, "Lowest line velocity [").value == pytest.approx(0.05 if units == "SI" else 0.05 / 0.3048)
    assert number_field(at, "Gas pressure in the source (gauge) [").value == pytest.approx(0.0, abs=1e-12)
    at = number_field(at, film).set_value(round(5.0 * per_w, 4)).run()
    assert scenario_from_dict(at.session_state["work"]).limits.poor_film_coefficient == pytest.approx(5.0, rel=1e-4)
    at.session_state["view"] = "Plan"
    at = at.run()
    assert "Laminar flow, poor heat transfer" not in " ".join(e.value for e in [*at.info, *at.warning, *at.error])
