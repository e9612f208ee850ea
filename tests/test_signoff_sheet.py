"""The one-page sign-off sheet (``dashboard/present/signoff``): built from a real saved, reviewed revision in
SQLite (``PlanStore``, Argon2 accounts), its odds worked out for real (``plan_odds``, 16 Sobol plans), and
printed by real Chromium to PDF: one page.  The reference for every figure is the planner itself
(``key_figures``, ``figure_rows`` of ``odds_summary``) and the store's own ``verify`` for the chain head."""

from __future__ import annotations

import html
import re
import subprocess
from pathlib import Path

import pytest
from streamlit.testing.v1 import AppTest

from conftest import ROOT, make_people
from dashboard.compute.results import plan_results
from dashboard.present.signoff import SavedPart, build_signoff_html
from dashboard.views.signoff import sheet_maker
from planner.checks.findings import assess
from planner.records.store import PlanStore
from planner.reports.key_figures import figure_text
from planner.reports.saved_figures import saved_figures
from planner.reports.uncertainty_text import figure_rows, odds_summary
from planner.scenario.schema import load_scenario
from planner.sweeps.uncertainty import plan_odds
from planner.transfer.plan import make_plan, with_changes

APP = str(ROOT / "dashboard" / "app.py")
POLYOL = ROOT / "demo_scenarios" / "polyol_tank_transfer.toml"
SYRUP = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"
CHROMIUM = Path("/usr/bin/chromium")


def saved_with_odds(path):
    """A store at ``path``, its people, the polyol scenario and its saved figures with the odds (16 samples)."""
    store = PlanStore(path=path)
    people = make_people(store)
    scenario = load_scenario(POLYOL)
    plan = make_plan(scenario)
    results = saved_figures(plan, assess(plan))
    results["uncertainty"] = odds_summary(plan_odds(scenario, samples=16))
    return store, people, scenario, results


@pytest.fixture(scope="module")
def reviewed(tmp_path_factory):
    """Polyol plan saved with its odds, submitted by a planner and approved by a supervisor."""
    path = tmp_path_factory.mktemp("signoff") / "plans.sqlite"
    store, people, scenario, results = saved_with_odds(path)
    first = store.save("T-31 to T-07", scenario, people["ana"], site="east tank farm", results=results)
    store.submit(first.plan_id, 1, people["ana"], "ready")
    store.approve(first.plan_id, 1, people["sam"], "checked against the P-31 curve")
    revision = store.revision(first.plan_id, 1)
    saved = SavedPart(revision, store.reviews(first.plan_id, 1), store.verify().head,
                      tuple(store.revision_problems(first.plan_id, 1)))
    return path, store, scenario, plan_results(scenario), saved


def _text(page: str) -> str:
    return html.unescape(re.sub(r"<[^>]+>", " ", page))


def test_the_sheet_carries_the_figures_range_trail_and_chain_head(reviewed):
    _, store, scenario, results, saved = reviewed
    page = build_signoff_html(scenario, results, "SI", saved)
    text = " ".join(_text(page).split())
    for k in results.key_figures:
        assert f"{k.label} {figure_text(k, 'SI')}" in text
    rows = figure_rows(saved.revision.results["uncertainty"], "SI")
    for row in rows:
        assert f"{row['label']} {row['p10']} {row['p50']} {row['p90']}" in text
    levels = saved.revision.results["uncertainty"]["percentiles"]["transfer_time_s"]
    assert levels["p10"] <= levels["p50"] <= levels["p90"]
    head = store.verify()
    assert head.ok and len(head.head) == 64 and head.head in text
    assert "approved" in text and "sam" in text and "checked against the P-31 curve" in text
    assert "match the recorded history" in text
    for words in ("site procedures", "local codes", "licensed engineer"):
        assert words in text.lower()
    assert "Mixing tank" not in text and "Inputs that matter" in text and "Worst findings" in text


def test_without_odds_the_sheet_says_where_the_range_goes(reviewed):
    _, _, scenario, results, _ = reviewed
    text = " ".join(_text(build_signoff_html(scenario, results, "US")).split())
    assert "Range (P10 / P50 / P90): not worked out for this revision" in text
    assert "Not a saved revision" in text and "°F" in text and "°C" not in text


def _pdf_pages(pdf: bytes) -> int:
    return len(re.findall(rb"/Type\s*/Page(?!s)", pdf))


def _hot_syrup():
    """The syrup demo at a 95 degC setpoint: stop-level findings with long messages (the longest sheet)."""
    scenario = with_changes(load_scenario(SYRUP), setpoint=95.0 + 273.15)
    return scenario, plan_results(scenario)


@pytest.mark.slow  # Chromium: out of the fast loop
@pytest.mark.skipif(not CHROMIUM.exists(), reason="no /usr/bin/chromium")
@pytest.mark.parametrize("units", ["SI", "US"])
@pytest.mark.parametrize("case", ["reviewed polyol", "hot syrup"])
def test_chromium_prints_it_on_one_page(reviewed, tmp_path, units, case):
    _, _, scenario, results, saved = reviewed
    if case == "hot syrup":
        (scenario, results), saved = _hot_syrup(), None
        assert sum(f["severity"] == "stop" for f in results.findings) >= 2
    sheet = tmp_path / "sheet.html"
    sheet.write_text(build_signoff_html(scenario, results, units, saved), encoding="utf-8")
    pdf = tmp_path / "sheet.pdf"
    subprocess.run([str(CHROMIUM), "--headless", "--no-sandbox", "--disable-gpu", "--no-pdf-header-footer",
                    f"--print-to-pdf={pdf}", sheet.as_uri()], check=True, capture_output=True, timeout=120)
    assert _pdf_pages(pdf.read_bytes()) == 1


def test_the_review_view_offers_the_sheet_of_the_open_revision(reviewed, monkeypatch):
    path, _, _, _, saved = reviewed
    monkeypatch.setenv("PLANNER_DB_PATH", str(path))
    at = AppTest.from_file(APP, default_timeout=120)
    at.query_params.update({"plan": str(saved.revision.plan_id), "rev": "1", "view": "review"})
    at = at.run()
    assert not at.exception, at.exception
    buttons = [b for b in at.get("download_button") if "Sign-off sheet" in b.proto.label]
    assert buttons, "no sign-off sheet button in the Review view"


def test_the_views_sheet_is_the_open_revisions(reviewed):
    """What the Review view's button makes (``views/signoff.sheet_maker``) with the real store."""
    _, store, scenario, results, saved = reviewed
    page = sheet_maker(scenario, results, "SI", saved.revision, saved.trail, store)()
    text = " ".join(_text(page).split())
    assert store.verify().head in text and "Revision 1 of plan id" in text and "approved" in text
    assert "Transfer time " + figure_rows(saved.revision.results["uncertainty"], "SI")[0]["p10"] in text
    assert "Not a saved revision" in " ".join(_text(sheet_maker(scenario, results, "SI")()).split())


@pytest.mark.slow  # Chromium: out of the fast loop
@pytest.mark.skipif(not CHROMIUM.exists(), reason="no /usr/bin/chromium")
def test_a_long_trail_keeps_the_latest_steps_on_one_page(reviewed, tmp_path):
    """Ten review steps (the revision's two, five times over): the latest eight are listed, two counted."""
    _, _, scenario, results, saved = reviewed
    long = SavedPart(saved.revision, list(saved.trail) * 5, saved.chain_head, saved.history_problems)
    page = build_signoff_html(scenario, results, "SI", long)
    assert "2 earlier review steps are in the Review view" in _text(page)
    assert _text(page).count("checked against the P-31 curve") == 4      # 8 rows, every other one the approval
    sheet = tmp_path / "sheet.html"
    sheet.write_text(page, encoding="utf-8")
    pdf = tmp_path / "sheet.pdf"
    subprocess.run([str(CHROMIUM), "--headless", "--no-sandbox", "--disable-gpu", "--no-pdf-header-footer",
                    f"--print-to-pdf={pdf}", sheet.as_uri()], check=True, capture_output=True, timeout=120)
    assert _pdf_pages(pdf.read_bytes()) == 1
