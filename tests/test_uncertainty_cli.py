"""``plan --uncertainty``, ``compare --uncertainty`` and ``plans save --uncertainty`` from the command line:
the JSON keys of issue 21, the text in either unit system, refusals naming the option, the summary
kept with a saved revision; and the recommendation by odds on rows made by hand.
"""

from __future__ import annotations

import io
import json
import math
import re
import sys

import pytest

from conftest import DEMO_DIR
from planner.cli import main
from planner.sweeps.compare_odds import recommend_by_odds

SYRUP = str(DEMO_DIR / "syrup_railcar_unload.toml")
POLYOL = str(DEMO_DIR / "polyol_tank_transfer.toml")
FIGURE_KEYS = {"transfer_time_s", "total_time_s", "peak_pressure_pa", "max_jacket_temperature_k",
               "electrical_energy_j", "steam_kg", "total_cost"}
SI_WORDS = re.compile(r"°C|\bbar\b|m³|\bkW\b|\bmm\b|\d m\b|\d K\b|\bkg\b|mPa·s|m/s\b")   # as tests/test_cli_findings.py
US_WORDS = re.compile(r"°F|\bpsi\b|\bgpm\b|\bbbl\b|\d ft\b|\bhp\b|\blb\b|\bcP\b|BTU|ft/s")


def run(capsys, *argv) -> tuple[int, str, str]:
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def test_plan_uncertainty_json_has_the_documented_keys(capsys):
    code, out, _ = run(capsys, "plan", POLYOL, "--uncertainty", "--samples", 16, "--seed", 3, "--json")
    odds = json.loads(out)["uncertainty"]
    assert code == 0 and odds["samples"] == 16 and odds["seed"] == 3
    assert set(odds["percentiles"]) == FIGURE_KEYS
    assert FIGURE_KEYS <= set(odds["sampling_error"])
    for name in FIGURE_KEYS:
        assert set(odds["percentiles"][name]) == {"p10", "p50", "p90"}
        levels = [v for v in odds["percentiles"][name].values() if v is not None]
        assert levels == sorted(levels)
    assert 0.0 <= odds["probability_in_window"] <= 1.0 and 0.0 <= odds["stop_probability"] <= 1.0
    shares = [row["share"] for row in odds["sensitivity"]]
    assert shares == sorted(shares, reverse=True) and {"input", "share"} <= set(odds["sensitivity"][0])
    assert {i["input"] for i in odds["inputs"]} == {r["input"] for r in odds["sensitivity"]}
    fan = odds["fan"]
    assert len(fan["time_s"]) == len(fan["flow_m3_s"]["p50"]) == len(fan["outlet_temperature_k"]["p90"])
    assert all(a <= b + 1e-12 for a, b in zip(fan["flow_m3_s"]["p10"], fan["flow_m3_s"]["p90"]))


@pytest.mark.slow
def test_plan_uncertainty_text_in_either_unit_system(capsys):
    _, si, _ = run(capsys, "plan", POLYOL, "--uncertainty", "--samples", 16)
    _, us, _ = run(capsys, "plan", POLYOL, "--uncertainty", "--samples", 16, "--units", "us")
    block = lambda text: text[text.index("odds:"):]  # noqa: E731
    assert "P90" in block(si) and "chance to finish within the planned window" in block(si)
    assert not SI_WORDS.findall(block(us)), SI_WORDS.findall(block(us))
    assert not US_WORDS.findall(block(si)), US_WORDS.findall(block(si))
    assert "licensed engineer" in si.splitlines()[-1]         # the standing caution stays last


@pytest.mark.parametrize("option, value, words", [
    ("--samples", "100", "--samples: 100 samples: give a power of two"),
    ("--samples", "0", "--samples: 0 samples"),
    ("--seed", "-3", "--seed: -3: give a whole number"),
])
def test_bad_sampling_options_are_refused_by_name(capsys, option, value, words):
    code, _, err = run(capsys, "plan", SYRUP, "--uncertainty", option, value)
    assert code == 2 and words in err and "Traceback" not in err


@pytest.mark.slow
def test_compare_uncertainty_rows(capsys):
    code, out, _ = run(capsys, "compare", POLYOL, "--setpoints", "20,40", "--uncertainty", "--samples", 16, "--json")
    odds = json.loads(out)["uncertainty"]
    assert code == 0 and odds["samples"] == 16 and len(odds["rows"]) == 2
    for row in odds["rows"]:
        assert {"value", "chance", "chance_error", "p90_total_time_s", "p50_cost", "p90_cost"} <= set(row)
    assert odds["named_index"] in (0, 1) and odds["reason"]


def _rows(costs: list[list[float]], window_ok: list[list[bool]]):
    raw = [[{"total_cost": c, "total_time_s": 1.0 if ok else 3.0, "stop_codes": []} for c, ok in zip(cs, oks)]
           for cs, oks in zip(costs, window_ok)]
    rows = []
    for value, r in enumerate(raw):
        chance = sum(x["total_time_s"] <= 2.0 for x in r) / len(r)
        rows.append({"value": 300.0 + value, "chance": chance, "p50_cost": sorted(x["total_cost"] for x in r)[len(r) // 2],
                     "odds": {"currency": "EUR"}})
    return rows, raw


def test_recommendation_by_odds_lowest_p50_cost_reaching_the_confidence():
    # row 0 cheap but finishes 50 % of the time; rows 1 and 2 always finish, row 2 clearly cheaper than 1
    n = 16
    rows, raw = _rows([[10.0 + i for i in range(n)], [50.0 + i for i in range(n)], [40.0 + i for i in range(n)]],
                      [[i % 2 == 0 for i in range(n)], [True] * n, [True] * n])
    best, named, reason, close = recommend_by_odds(rows, raw, 2.0, 0.9, "temperature")
    assert best == named == 2 and close == [] and "lowest P50 cost" in reason
    # rows 1 and 2 at the same costs but for a scatter far inside their sampling error: not told apart
    rows, raw = _rows([[50.0 + i for i in range(n)], [50.0 + i + 0.01 * (-1) ** i for i in range(n)]],
                      [[True] * n, [True] * n])
    best, _, reason, close = recommend_by_odds(rows, raw, 2.0, 0.9, "temperature")
    assert close and "cannot be told apart" in reason


def test_no_row_reaches_the_confidence():
    n = 16
    rows, raw = _rows([[10.0] * n, [20.0] * n], [[i % 2 == 0 for i in range(n)], [i % 4 != 0 for i in range(n)]])
    best, named, reason, _ = recommend_by_odds(rows, raw, 2.0, 0.9, "temperature")
    assert best is None and named == 1 and "no value reaches the confidence" in reason and "75 %" in reason


@pytest.mark.slow
def test_saved_revision_keeps_the_odds(tmp_path, capsys, monkeypatch):
    from planner.records.store import PlanStore

    db = f"sqlite:///{tmp_path / 'plans.sqlite'}"
    monkeypatch.setenv("PLANNER_SESSION_KEY_FILE", str(tmp_path / "session.key"))

    def with_password(password, *argv):
        monkeypatch.setattr(sys, "stdin", io.StringIO(password + "\n"))
        return run(capsys, *argv)

    code, _, err = with_password("root-password-1", "users", "add", "root", "--role", "admin", "--password-stdin",
                                 "--db", db)
    assert code == 0, err
    code, _, err = with_password("root-password-1\nana-password-1", "users", "add", "ana", "--role", "planner",
                                 "--admin", "root", "--password-stdin", "--db", db)
    assert code == 0, err
    code, out, err = with_password("ana-password-1", "plans", "save", POLYOL, "--name", "Polyol", "--user", "ana",
                                   "--password-stdin", "--uncertainty", "--samples", 16, "--json", "--db", db)
    assert code == 0, err
    saved = PlanStore(url=db).revision(json.loads(out)["plan_id"], 1).results["uncertainty"]
    assert saved["samples"] == 16 and set(saved["percentiles"]) == FIGURE_KEYS and "fan" not in saved
    assert math.isfinite(saved["percentiles"]["transfer_time_s"]["p50"])
