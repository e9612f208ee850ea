"""Words, numbers and charts the page got wrong (AppTest and the figures themselves, in SI and US): units of
the user's system everywhere, one decimals rule, one money format, exports with their header block, long
names shortened, the schema's text limits on the widgets, a hint over wide tables, readable charts.

Unit factors: NIST SP 811 (1 BTU/(h·ft²·°F) = 5.678263 W/(m²·K), a kelvin interval is 1.8 °F)."""

from __future__ import annotations

import io
import math
import re

import pandas as pd
import pytest
from streamlit.testing.v1 import AppTest

from apptest_inputs import number_field, open_section
from conftest import ROOT
from planner.scenario.schema import load_scenario
from planner.scenario.wording import DECIMALS

APP = str(ROOT / "dashboard" / "app.py")
BARGE = ROOT / "demo_scenarios" / "fuel_oil_barge_discharge.toml"
POLYOL = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"
W_PER_BTU_H_FT2_F = 5.678263


@pytest.fixture(scope="module")
def barge():
    from dashboard.compute.results import plan_results

    return plan_results(load_scenario(BARGE))


def _page(units: str, view: str, demo: str | None = BARGE.name) -> AppTest:
    at = AppTest.from_file(APP, default_timeout=180).run()
    if demo:
        at.selectbox(key="demo_choice").set_value(demo).run()
    at.session_state["unit_system"] = units
    at.session_state["view"] = view
    return at.run()


@pytest.mark.parametrize("units", ["SI", "US"])
def test_product_figures_and_the_shell_coefficient_are_in_the_users_units(units):
    at = _page(units, "Product")
    items = [str(v) for t in at.table for v in t.value.iloc[:, 0]]
    reference = "20 °C" if units == "SI" else "68 °F"
    assert {f"Density at {reference}", f"Specific heat at {reference}", f"Thermal conductivity at {reference}"} <= set(items)
    at.session_state["view"] = "Inputs"
    at = open_section(at.run(), "Source & destination")
    shell = number_field(at, "Shell heat-loss coefficient [")
    if units == "SI":
        assert shell.label.endswith("[W/(m²·K)]") and shell.value == pytest.approx(2.5)
    else:
        assert shell.label.endswith("[BTU/(h·ft²·°F)]") and shell.value == pytest.approx(2.5 / W_PER_BTU_H_FT2_F, rel=1e-6)


@pytest.mark.parametrize("units", ["SI", "US"])
def test_sensitivity_legend_is_in_the_users_units(units):
    from dashboard.compute.results import run_comparison
    from dashboard.present.figures import sensitivity_figure

    result = run_comparison(load_scenario(POLYOL), "setpoint", [303.15, 313.15], sensitivity=(5.0, 0.1))
    names = [t.name for t in sensitivity_figure(result, "temperature", units).data]
    ambient = [n for n in names if n.startswith("ambient")]
    assert ambient == (["ambient -5 K", "ambient +5 K"] if units == "SI" else ["ambient -9 °F", "ambient +9 °F"])


@pytest.mark.parametrize("units", ["SI", "US"])
def test_the_values_box_shows_the_tables_decimals_and_says_gauge(units):
    from dashboard.compute.results import default_comparison_values
    from dashboard.present.display import to_display

    at = _page(units, "Setpoint comparison")
    [lever] = [s for s in at.selectbox if s.label == "Compare"]
    at = lever.set_value("steam_pressure").run()
    unit = "bar" if units == "SI" else "psi"
    [box] = [w for w in at.text_input if w.label.startswith("Values [")]
    assert box.label == f"Values [{unit}] (gauge)"
    numbers = box.value.split(", ")
    assert all(len(n.split(".")[1]) == DECIMALS["pressure"] for n in numbers), numbers
    values = default_comparison_values(load_scenario(BARGE), "steam_pressure")
    assert [float(n) for n in numbers] == pytest.approx([to_display(v, "pressure", units) for v in values], abs=0.0051)


def test_money_has_one_format(barge):
    from dashboard.present.tables import energy_cost_frame
    from planner.reports.key_figures import figure_text
    from planner.scenario.wording import money_text
    from planner.sweeps.compare import recommend

    rows = [{"value": 298.15, "ok": True, "has_stop": False, "total_cost": 5964.875, "total_time_s": 20_800.0,
             "energy_cost": 1200.0, "demurrage": 4764.875, "currency": "EUR"}]
    _, _, reason = recommend(rows, "temperature")
    assert "lowest total cost 5,964.88 EUR" in reason and "energy 1,200.00 + demurrage 4,764.88" in reason
    total = barge.plan["costs"]["total"]
    assert energy_cost_frame(barge.plan, "SI")["Amount"].iloc[-1] == money_text(total, "EUR")
    [key] = [k for k in barge.key_figures if k.key == "total_cost"]
    assert figure_text(key) == money_text(total, "EUR") and re.fullmatch(r"\d{1,3}(,\d{3})*\.\d\d EUR", figure_text(key))
    # no second money format: amounts with a currency are written only by wording.money_text
    copies = []
    pattern = re.compile(r"(cost|demurrage|currency|cur\b).*\.2f\}|\.2f\}.*(cost|demurrage|currency|cur\b)")
    home = ROOT / "planner" / "scenario" / "wording.py"
    for path in sorted((ROOT / "planner").rglob("*.py")) + sorted((ROOT / "dashboard").rglob("*.py")):
        if path != home:
            copies += [f"{path.name}: {line.strip()}" for line in path.read_text().splitlines() if pattern.search(line)]
    assert copies == []


@pytest.mark.parametrize("units", ["SI", "US"])
def test_timeline_csv_is_rounded_and_has_a_header_block(barge, units):
    import planner
    from dashboard.present.tables import TIMELINE_COLUMNS, timeline_csv, timeline_frame
    from dashboard.present.display import with_unit

    text = timeline_csv(barge.plan, units, barge.scenario_name, now="2026-12-05 08:00 UTC")
    header = [line for line in text.splitlines() if line.startswith("#")]
    assert header == [f"# scenario: {barge.scenario_name}", f"# unit system: {units}", "# date: 2026-12-05 08:00 UTC",
                      f"# planner version: {planner.__version__}"]
    assert re.fullmatch(r"\d+\.\d+\.\d+", planner.__version__)
    frame = pd.read_csv(io.StringIO(text), comment="#")
    full = timeline_frame(barge.plan, units)
    assert list(frame.columns) == list(full.columns) and len(frame) == len(full)
    for key, title, kind in TIMELINE_COLUMNS:
        heading = with_unit(title, kind, units)
        if heading not in frame:
            continue
        digits = DECIMALS.get(kind, 2)
        assert frame[heading].to_numpy() == pytest.approx(full[heading].to_numpy(), abs=0.5 * 10 ** -digits + 1e-9,
                                                           nan_ok=True)
        assert all(round(v, digits) == v for v in frame[heading].dropna())


def test_long_names_are_shortened_and_text_limits_come_from_the_schema():
    from planner.records.terms import LIMITS
    from planner.scenario.schema import field_constraints

    at = AppTest.from_file(APP, default_timeout=180).run()
    at.session_state["work"]["name"] = "z" * 10_240
    at.session_state["work"]["product"]["name"] = "x" * 10_240
    at.session_state["work"]["route"]["segments"][0]["name"] = "y" * 10_240
    at.session_state["view"] = "Inputs"
    at = open_section(at.run(), "Product")
    [title] = [m.value for m in at.markdown if m.value.startswith("## Viscous Transfer Planner")]
    assert len(title) < 200 and "10,240 characters" in title
    [product] = [t for t in at.text_input if t.label == "Product name"]
    assert product.max_chars == field_constraints("product.name")["max_length"] == 120
    [plan] = [t for t in at.text_input if t.label == "Plan name"]
    assert plan.max_chars == LIMITS["name"]
    at = open_section(at, "Route")
    boxes = [e.value for e in at.error]
    named = [b for b in boxes if "yyyy" in b]
    assert named and all(len(b) < 400 and "10,240 characters" in b for b in named), [len(b) for b in named]
    assert all(len(b) < 2000 for b in boxes)


@pytest.mark.parametrize("units", ["SI", "US"])
def test_wide_route_tables_say_how_to_reach_the_hidden_columns(units):
    from dashboard.views.inputs.table_editor import SEGMENT_COLUMNS

    at = open_section(_page(units, "Inputs"), "Route")
    hints = [c.value for c in at.caption if "scroll the table sideways" in c.value]
    assert len(hints) == 2                         # discharge and suction route
    assert hints[0].startswith(f"{len(SEGMENT_COLUMNS)} columns") and "Temperature class" in hints[0]


# -- charts -------------------------------------------------------------------------------------------

def _decades(low: float, high: float) -> list[float]:
    return [10.0 ** k for k in range(math.ceil(math.log10(low) - 1e-12), math.floor(math.log10(high) + 1e-12) + 1)]


@pytest.mark.parametrize("units", ["SI", "US"])
def test_viscosity_chart_legend_clear_of_the_title_and_log_axis_labels_its_decades(barge, units):
    from dashboard.present.figures import viscosity_figure

    fig = viscosity_figure(barge.product, units)
    legend = fig.layout.legend
    assert legend.yref == "container" and legend.y == 0.0 and legend.yanchor == "bottom"   # at the foot
    ys = [v for t in fig.data for v in t.y if v is not None and v > 0]
    axis = fig.layout.yaxis
    assert axis.type == "log" and axis.tickmode == "array"
    ticks = list(axis.tickvals)
    decades = _decades(min(ys), max(ys))
    assert decades and all(any(math.isclose(d, t, rel_tol=1e-9) for t in ticks) for d in decades)
    assert [float(t.replace(",", "")) for t in axis.ticktext] == pytest.approx(ticks)


@pytest.mark.parametrize("units", ["SI", "US"])
def test_touch_limit_is_a_legend_line_and_every_series_has_its_own_colour(barge, units):
    from dashboard.present.figures import line_figure, timeline_figure
    from planner.scenario.wording import format_quantity

    fig = line_figure(barge.profile, barge.segments, units, touch_limit_k=barge.touch_limit_k)
    touch = [t for t in fig.data if t.name.startswith("touch limit")]
    assert [t.name for t in touch] == [f"touch limit {format_quantity(barge.touch_limit_k, 'temperature', units)}"]
    assert not [a for a in fig.layout.annotations if "touch limit" in (a.text or "")]
    timeline = timeline_figure(barge.plan, units, barge.destination_max_level)
    styles = {}
    for t in timeline.data:
        styles.setdefault((t.line.color, t.line.dash), []).append(t.name)
    assert all(len(names) == 1 for names in styles.values()), styles
    names = [t.name for t in timeline.data]
    assert "source" in names and "source level" in names
