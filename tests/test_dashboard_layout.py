"""Layout and plain-text rules of the dashboard's figures, tables and messages (issue 12.4-12.6, issue 9):
no raw codes, None or True in tables, no exponent figures, the currency on cost columns and axes,
axes not so narrow that a constant looks like a trend, the scenario's own touch limit, one list of view
names, plain text for user text and revision comparisons at the shown precision."""

from __future__ import annotations

import re

import numpy as np
import pandas as pd
import pytest

from conftest import DEMO_FILES
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict

CODE = re.compile(r"^[a-z0-9]+(_[a-z0-9]+)+$")          # snake_case: a code, not words


@pytest.fixture(scope="module")
def bundles():
    from dashboard.compute.results import plan_results as build_bundle

    return {p.stem: (load_scenario(p), build_bundle(load_scenario(p))) for p in DEMO_FILES}


def _bad_cells(frame: pd.DataFrame) -> list:
    bad = []
    for column in frame.columns:
        for value in frame[column]:
            text = str(value)
            if value is None or isinstance(value, bool) or text in ("None", "True", "False", "nan") \
                    or CODE.match(text) or re.search(r"\de[+-]\d", text):
                bad.append((column, value))
    return bad


def test_tables_show_words_not_codes_none_or_exponents(bundles):
    from dashboard.present import tables

    for name, (scenario, bundle) in bundles.items():
        plan = bundle.plan
        frames = {"segments": tables.segments_frame(bundle.segments, "SI"),
                  "start-up": tables.startup_hold_frame(plan, "SI"), "energy": tables.energy_cost_frame(plan, "US")}
        if bundle.push_cold_rows.get("time_s"):
            frames["push-cold"] = tables.push_cold_frame(bundle.push_cold_rows, "SI")
        for what, frame in frames.items():
            assert not _bad_cells(frame), (name, what, _bad_cells(frame))
        for finding in bundle.findings:
            for line in tables.finding_details(finding, "SI"):
                assert not re.search(r"\de[+-]\d", line), (name, line)


def test_numbers_of_any_size_have_no_exponent():
    from dashboard.present.display import general_number

    assert general_number(25821.769) == "25,822"             # a Reynolds number, as a finding shows it
    assert general_number(14.9947) == "14.99"
    assert general_number(0.0123456) == "0.01235"
    assert general_number(-3.61319) == "-3.613"
    assert general_number(None) == "—"


def test_comparison_costs_carry_the_currency_and_the_touch_limit_is_the_scenarios():
    """The touch limit line of the comparison's jacket panel is ``limits.touch_temperature`` (here 50 °C,
    not the 60 °C the figure used to draw whatever the scenario said)."""
    from dashboard.present import figures, tables
    from dashboard.compute.results import run_comparison

    data = scenario_to_dict(load_scenario(DEMO_FILES[-1]))
    data.setdefault("limits", {})["touch_temperature"] = "50 degC"
    data["costs"]["currency"] = "NZD"
    scenario = scenario_from_dict(data)
    setpoint = scenario.tracing.setpoint
    result = run_comparison(scenario, "setpoint", [setpoint - 5.0, setpoint])
    frame = tables.comparison_frame(result, "temperature", "SI")
    assert "Total cost [NZD]" in frame.columns and "Energy cost [NZD]" in frame.columns
    fig = figures.comparison_figure(result, "temperature", "SI")
    assert fig.layout.yaxis2.title.text == "NZD"
    # the limit is a dashed line named in the legend (no label on the plot for a curve to cross)
    touch = [t for t in fig.data if t.name.startswith("touch limit")]
    assert [t.yaxis for t in touch] == ["y4"] and list(touch[0].y) == pytest.approx([50.0, 50.0], abs=1e-9)
    line = figures.line_figure(*_line_args(scenario))
    touch = [t for t in line.data if t.name.startswith("touch limit")]
    assert [t.yaxis for t in touch] == ["y4"] and list(touch[0].y) == pytest.approx([50.0, 50.0], abs=1e-9)


def _line_args(scenario):
    from dashboard.compute.results import plan_results as build_bundle

    bundle = build_bundle(scenario)
    return bundle.profile, bundle.segments, "SI", "", bundle.touch_limit_k


def test_a_steady_series_is_drawn_on_a_readable_span():
    """A pressure wobbling by 0.002 bar gets at least 0.2 bar of axis (it is flat, not a trend); a real
    change keeps the automatic range."""
    from dashboard.present import figures

    t = np.linspace(0.0, 3600.0, 20)
    rows = {"time_s": list(t), "flow_m3_s": list(0.02 + 1e-7 * np.sin(t)),
            "discharge_pressure_pa": list(5.97e5 + 200.0 * np.sin(t)), "volume_fraction": list(t / t[-1])}
    fig = figures.push_cold_figure(rows, "SI")
    low, high = fig.layout.yaxis2.range
    assert high - low == pytest.approx(0.2 * 1.0 + 0.0, rel=0.7) and high - low >= 0.2 - 1e-12
    assert low < 5.97 < high
    assert fig.layout.yaxis.range[1] - fig.layout.yaxis.range[0] >= 1.0 - 1e-12        # 1 m³/h at least
    rows["discharge_pressure_pa"] = list(2e5 + 4e5 * t / t[-1])
    assert figures.push_cold_figure(rows, "SI").layout.yaxis2.range is None


def test_one_list_of_view_names():
    from dashboard.views import TAB_TITLES, VIEW_TITLES, view_module
    from planner.records.links import VIEWS

    assert tuple(VIEW_TITLES) == VIEWS
    assert TAB_TITLES == [VIEW_TITLES[v] for v in VIEWS]
    for view in VIEWS:            # one module per view, named as the view
        module = view_module(view)
        assert callable(module.draw) and isinstance(module.NEEDS_RESULTS, bool), view


def test_input_choices_are_the_schemas():
    from dashboard.views.inputs import table_editor as inputs
    from planner.scenario import schema

    assert schema.field_choices(schema.Tracing, "kind") == ("none", "electric_constant", "electric_self_regulating",
                                                             "steam")
    assert schema.field_choices(schema.Segment, "flange_class") == (150, 300, 600, 900, 1500, 2500)
    columns = {c.title: c for c in inputs.SEGMENT_COLUMNS}
    assert columns["Kind"].options == schema.field_choices(schema.Segment, "kind")
    assert columns["Location"].options == schema.field_choices(schema.Surroundings, "location")
    with pytest.raises(ValueError):
        schema.field_choices(schema.Segment, "length")


def test_revision_comparison_lists_only_figures_that_differ_as_shown():
    from dashboard.present.saved import diff_frames

    diff = {"inputs": [], "results": [("npsh_margin_m", 4.3312, 4.3288), ("transfer_time_s", 3600.0, 7200.0),
                                      ("currency", "EUR", "EUR")]}
    _, results = diff_frames(diff, 1, 2, "SI", "EUR", "EUR")
    assert list(results["Figure"]) == ["Transfer time"]
    assert list(results.iloc[0][1:]) == ["1.00 h", "2.00 h"]


PAYLOADS = ["![p](http://198.51.100.7/p.png)", "<img src=x onerror=alert(1)>", "[l](http://198.51.100.7)",
            "**b** _i_ `c` :red[r] $x$ ~~s~~", "- item\n1. two\n# head\n---", "www.example.com a@b.org",
            "a \\ b & c &amp; d | e"]


@pytest.mark.parametrize("text", PAYLOADS)
def test_plain_text_escapes_every_markdown_opener(text):
    """CommonMark 0.31 section 2.4: a backslash before ASCII punctuation stands for the character itself;
    un-escaping gives the text back, and no unescaped opener is left."""
    from dashboard.present.plaintext import JOINER, escaped

    shown = escaped(text)
    back = re.sub(r"\\(.)", r"\1", shown.replace(JOINER, "")).replace("  \n", "\n")
    assert back == "\n".join(line.strip() for line in text.split("\n"))
    bare = re.sub(r"\\.", "", shown)
    assert not re.search(r"[\\`*_\[\]()<>!#|~$:{}&@^]", bare), shown
    assert not re.search(r"(^|\n)([-+=]\s|\d+[.)]\s)", bare), shown
    assert not re.search(r"(?<!\u2060)(https?|www)", shown, re.I), shown


def _cells(row: str) -> list[str]:
    """A markdown table row's cells as a reader sees them: split at unescaped "|", escapes resolved."""
    from dashboard.present.plaintext import JOINER

    parts = re.split(r"(?<!\\)\|", row.strip())
    assert parts[0] == "" and parts[-1] == "", row                   # the row opens and closes with "|"
    return [re.sub(r"\\(.)", r"\1", p.strip().replace(JOINER, "")) for p in parts[1:-1]]


@pytest.mark.parametrize("text", PAYLOADS)
def test_markdown_tables_keep_user_text_as_text(text):
    """The Plan view's tables are markdown (no pandas on the first page): each cell is one escaped line, so
    markup stays text and a "|" or a line break in user text neither splits a cell nor ends a row."""
    from dashboard.present.plaintext import markdown_table

    lines = markdown_table(("Item", text), [("a", text), (text, None)]).split("\n")
    assert len(lines) == 4 and re.fullmatch(r"\|( --- \|){2}", lines[1]), lines
    one_line = " ".join(text.split())
    assert [_cells(line) for line in (lines[0], lines[2], lines[3])] == [
        ["Item", one_line], ["a", one_line], [one_line, "—"]]
    for line in lines:
        bare = re.sub(r"\\.", "", line)
        assert not re.search(r"[\\`*_\[\]()<>!#~$:{}&@^]", bare), line
        assert not re.search(r"(?<!\u2060)(https?|www)", line, re.I), line


def test_plan_tables_show_segment_names_as_text():
    """A segment name with markup, as the start-up table names the first segment to reach the stop limit:
    the row keeps its two cells and the name reads back as typed."""
    from dashboard.compute.results import plan_results as build_bundle
    from dashboard.present import tables
    from dashboard.present.plaintext import markdown_table

    data = scenario_to_dict(load_scenario(DEMO_FILES[0]))
    names = [f"S{i} | ![p](http://198.51.100.7/p.png) <b>x</b>" for i in range(len(data["route"]["segments"]))]
    for segment, name in zip(data["route"]["segments"], names):
        segment["name"] = name
    plan = build_bundle(scenario_from_dict(data)).plan
    rows = tables.startup_hold_rows(plan, "SI")
    lines = markdown_table(tables.STARTUP_HOLD_COLUMNS, rows).split("\n")
    assert [_cells(line) for line in lines[2:]] == [list(row) for row in rows]
    named = [cells[1] for cells in map(_cells, lines[2:]) if cells[0] == "Time to limit, tracing on"]
    assert len(named) == 1 and any(name in named[0] for name in names), named
    assert list(tables.startup_hold_frame(plan, "SI").itertuples(index=False, name=None)) == rows
