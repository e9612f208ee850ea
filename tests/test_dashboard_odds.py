"""The odds in the dashboard (AppTest, the real worker pool): the Odds view, the comparison's "With odds", the
summary kept with a saved revision and the report's block.

References: every number shown is checked against the planner run here on the same scenario
(``planner.sweeps.uncertainty.plan_odds``, ``planner.sweeps.compare_odds.compare_odds``) and formatted by the
planner's one formatter (``planner.reports.uncertainty_text``); the saved summary is read back with
``planner.records.store.PlanStore`` on the same file.  16 samples keep it quick (the statistics' own checks
are tests/test_uncertainty.py).
"""

from __future__ import annotations

import json

import re

import pytest
from streamlit.testing.v1 import AppTest

from conftest import DEMO_DIR, ROOT
from planner.reports.uncertainty_text import chance_lines, figure_rows, odds_summary, percentage, value_text
from planner.scenario.schema import load_scenario
from planner.sweeps.uncertainty import plan_odds
from test_dashboard_sharing import _click, _people, _sign_in, _texts, _view

APP = str(ROOT / "dashboard" / "app.py")
SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"
SAMPLES, SEED = 16, 21

pytestmark = pytest.mark.slow     # each test runs sampled plans in the dashboard's workers


@pytest.fixture(scope="module")
def expected():
    """The planner's own odds of the syrup demo at the samples the tests give."""
    return plan_odds(load_scenario(SYRUP), SAMPLES, SEED)


def _syrup(at: AppTest | None = None) -> AppTest:
    at = at or AppTest.from_file(APP, default_timeout=240).run()
    if at.session_state["demo_choice"] != SYRUP.name:
        at.selectbox(key="demo_choice").set_value(SYRUP.name).run()
    return at


def _box(at: AppTest, label: str):
    return [w for w in at.number_input if w.label == label][0]


def _work_out(at: AppTest, samples=SAMPLES, seed=SEED) -> AppTest:
    _box(at, "Samples").set_value(samples)
    _box(at, "Seed").set_value(seed)
    [b for b in at.button if b.label == "Work out the odds"][0].click()
    return at.run()


def _figures_table(at: AppTest):
    return next(t.value for t in at.table if list(t.value.columns)[:4] == ["Figure", "P10", "P50", "P90"])


def _shown(frame) -> list[list[str]]:
    return [[re.sub(r"\\(.)", r"\1", str(v)) for v in row] for row in frame.values.tolist()]


def _same(a, b, path: str = "") -> None:
    """Equal JSON-like values, floats to 1e-9 relative."""
    if isinstance(a, dict) and isinstance(b, dict):
        assert set(a) == set(b), path
        for key in a:
            _same(a[key], b[key], f"{path}.{key}")
    elif isinstance(a, list) and isinstance(b, list):
        assert len(a) == len(b), path
        for i, (x, y) in enumerate(zip(a, b)):
            _same(x, y, f"{path}[{i}]")
    elif isinstance(a, float) and isinstance(b, float):
        assert a == pytest.approx(b, rel=1e-9, abs=1e-12), path
    else:
        assert a == b, path


def _expected_rows(odds: dict, system: str) -> list[list[str]]:
    return [[r["label"], r["p10"], r["p50"], r["p90"], f"± {r['sampling_error']}"] for r in figure_rows(odds, system)]


def test_the_odds_view_shows_the_planners_odds_in_si_and_us(expected):
    at = _view(_syrup(), "Odds")
    at = _work_out(at)
    assert not at.exception and not at.error, [e.value for e in at.error]
    assert _shown(_figures_table(at)) == _expected_rows(expected, "SI")
    assert "h" in _shown(_figures_table(at))[0][2] and "EUR" in _shown(_figures_table(at))[-1][2]
    boxes = _texts(at.success) + _texts(at.warning)
    for line in chance_lines(expected, "SI"):
        assert any(line in b for b in boxes), line
    charts = at.get("plotly_chart")
    assert len(charts) == 3                   # total time with the window, the fan, the shares
    total_chart = json.loads(charts[0].proto.spec)
    marks = [a["text"] for a in total_chart["layout"].get("annotations", [])]
    assert "planned window" in marks and "this plan" in marks     # the plan's own total beside the samples'
    captions = _texts(at.caption)
    assert any("plans per bin at 16 samples" in c for c in captions)   # shares called rough at 16 samples
    # the same odds in US customary units: the kept result, shown again (no new run)
    at.radio(key="unit_system").set_value("US").run()
    assert not at.exception and not at.error
    assert _shown(_figures_table(at)) == _expected_rows(expected, "US")
    assert "°F" in _shown(_figures_table(at))[3][2] and "psi" in _shown(_figures_table(at))[2][2]
    boxes = _texts(at.success) + _texts(at.warning)
    assert any(chance_lines(expected, "US")[0] in b for b in boxes)


def test_bad_samples_and_seed_are_refused_naming_the_box_and_the_limit():
    at = _view(_syrup(), "Odds")
    at = _work_out(at, samples=100)
    errors = _texts(at.error)
    assert any(e.startswith("Samples: 100 samples: give a power of two from 16 to 4096") for e in errors), errors
    assert not [t for t in at.table if list(t.value.columns)[:1] == ["Figure"]]        # nothing ran
    at = _work_out(at, samples=16, seed=-1)
    errors = _texts(at.error)
    assert any(e.startswith("Seed: -1: give a whole number from 0 to 4294967295") for e in errors), errors
    at = _work_out(at, samples=8192, seed=21)
    assert any(e.startswith("Samples: 8192 samples") for e in _texts(at.error))
    assert not at.exception


def test_a_saved_revision_keeps_the_odds_and_the_review_shows_the_range(tmp_path, monkeypatch, expected):
    monkeypatch.setenv("PLANNER_DB_PATH", str(tmp_path / "plans.sqlite"))
    store, _ = _people(tmp_path / "plans.sqlite")
    at = _work_out(_view(_syrup(), "Odds"))
    _sign_in(at, "ana")
    _click(at, "sv_save")
    assert any("Saved as revision 1" in s for s in _texts(at.success)), _texts(at.sidebar.error)
    [row] = store.plans()
    saved = store.revision(row.id, 1).results["uncertainty"]
    # the CLI's `plans save --uncertainty` keeps the same (to the last digits of another process's sums)
    _same(saved, odds_summary(expected))
    assert "fan" not in saved and saved["samples"] == SAMPLES and saved["seed"] == SEED
    at = _view(at, "Review")
    assert not at.exception
    shown = next(t.value for t in at.table if list(t.value.columns)[:4] == ["Figure", "P10", "P50", "P90"])
    assert _shown(shown) == _expected_rows(expected, "SI")
    assert any(chance_lines(expected, "SI")[0] in m for m in _texts(at.markdown))


def test_a_plan_saved_without_odds_keeps_none(tmp_path, monkeypatch):
    monkeypatch.setenv("PLANNER_DB_PATH", str(tmp_path / "plans.sqlite"))
    store, _ = _people(tmp_path / "plans.sqlite")
    at = _syrup()
    _sign_in(at, "ana")
    _click(at, "sv_save")
    [row] = store.plans()
    assert "uncertainty" not in store.revision(row.id, 1).results


def test_the_report_shows_the_range_in_the_users_units(expected):
    from dashboard.compute.results import plan_results
    from dashboard.present.report import build_report_html

    scenario = load_scenario(SYRUP)
    results = plan_results(scenario)
    page = build_report_html(scenario, results, "US", odds=(odds_summary(expected), "as kept with saved revision 1"))
    block = page[page.index("<h2>The odds of the plan</h2>"):page.index("<h2>Findings</h2>")]
    for row in figure_rows(expected, "US"):       # a saved summary (null beyond) reads as the planner's own rows
        assert f"<td>{row['label']}</td>" in block and f"<td>{row['p50']}</td>" in block and \
            f"<td>{row['p90']}</td>" in block
    assert "as kept with saved revision 1" in block and "°F" in block and "°C" not in block
    assert chance_lines(expected, "US")[2].split(",")[0] in block.replace("&#x27;", "'")
    assert "<h2>The odds of the plan</h2>" not in build_report_html(scenario, results, "US")


def test_the_comparison_with_odds_shows_each_values_chance(tmp_path):
    from planner.sweeps.compare_odds import compare_odds, comparison_odds_json

    values = [313.15, 318.15, 328.15]                 # 40, 45, 55 °C
    ref = comparison_odds_json(compare_odds(load_scenario(SYRUP), "setpoint", values, samples=SAMPLES, seed=SEED))
    at = _view(_syrup(), "Setpoint comparison")
    [c for c in at.checkbox if c.label == "With odds"][0].check().run()
    [w for w in at.text_input if w.label.startswith("Values [")][0].set_value("40, 45, 55")
    _box(at, "Samples").set_value(SAMPLES)
    [b for b in at.button if b.label == "Compare with odds"][0].click()
    at.run()
    assert not at.exception and not at.error, [e.value for e in at.error]
    table = next(d.value for d in at.dataframe if "In window, no stop" in d.value.columns)
    for shown, row in zip(table.to_dict("records"), ref["rows"]):
        assert shown["In window, no stop"] == f"{percentage(row['chance'])} ± {percentage(row['chance_error'])}"
        p90 = float("inf") if row["p90_total_time_s"] is None else row["p90_total_time_s"]
        assert shown["P90 total time"] == value_text(p90, "time", "SI")
        assert shown["P50 cost"] == value_text(row["p50_cost"], "money", "SI", "EUR")
    marks = list(table["By the odds"])
    assert marks[ref["recommended_index"]] == "recommended"
    for i in ref["not_told_apart"]:
        assert marks[i] == "cannot be told apart"
    assert any(s.startswith("By the odds: ") for s in _texts(at.success) + _texts(at.warning))


def test_two_revisions_odds_differ_as_shown(expected):
    from dashboard.present.saved import diff_frames
    from planner.records.revision import diff_values

    before = {"currency": "EUR", "uncertainty": odds_summary(expected)}
    after = {"currency": "EUR", "uncertainty": odds_summary(expected)}
    after["uncertainty"]["percentiles"]["total_cost"]["p50"] += 25.0
    after["uncertainty"]["percentiles"]["peak_pressure_pa"]["p50"] += 1e-3     # below the shown precision
    after["uncertainty"]["probability_in_window_no_stop"] = 0.5
    _, results = diff_frames({"inputs": [], "results": diff_values(before, after)}, 1, 2, "US", "EUR", "EUR")
    rows = [tuple(r) for r in results.values.tolist()]
    p50 = expected["percentiles"]["total_cost"]["p50"]
    assert ("Odds: P50 total cost", value_text(p50, "money", "US", "EUR"),
            value_text(p50 + 25.0, "money", "US", "EUR")) in rows
    assert ("Odds: in the window with no stop", percentage(expected["probability_in_window_no_stop"]), "50 %") in rows
    assert len(rows) == 2
    _, results = diff_frames({"inputs": [], "results": diff_values({"currency": "EUR"}, before)}, 1, 2, "SI")
    assert [tuple(r) for r in results.values.tolist()] == [("Odds", "—", f"{SAMPLES} samples, seed {SEED}")]


def test_odds_past_their_time_limit_are_stopped_with_what_to_reduce(monkeypatch):
    monkeypatch.setenv("PLANNER_ODDS_TIME_LIMIT_S", "0.5")
    at = _work_out(_view(_syrup(), "Odds"), samples=256, seed=7)      # a seed no other test runs: not kept yet
    errors = _texts(at.error)
    assert any("the sampling of the odds was stopped after 0.5 s, the dashboard's time limit: give fewer samples"
               in e for e in errors), errors
    assert not at.exception
