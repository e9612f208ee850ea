"""Findings on the command line: first line, grouping, --json, --fail-on, --units, option checks.

Checked against the planner called in-process (``assess``) and against hand-set limits of the demo
scenarios (the syrup demo's heater exposure rating of 85 degC and product maximum of 70 degC are
inputs of the scenario file, not results).
"""

from __future__ import annotations

import json
import re
import subprocess
import sys

import pytest

from conftest import DEMO_FILES, ROOT
from planner.checks.findings import assess
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict, scenario_to_toml
from planner.transfer.plan import make_plan

SYRUP = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"
FINDING_KEYS = {"code", "severity", "title", "message", "where", "value", "limit", "quantity", "action"}


def run(*args):
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT, capture_output=True, text=True, timeout=300)


@pytest.fixture(scope="module")
def hot_syrup(tmp_path_factory):
    """The syrup demo with its setpoint at 95 degC: the heater passes its 85 degC exposure rating and the
    pre-warm cannot reach the setpoint (the issue's example)."""
    data = scenario_to_dict(load_scenario(SYRUP))
    data["tracing"]["setpoint"] = 95.0
    path = tmp_path_factory.mktemp("hot") / "hot_syrup.toml"
    path.write_text(scenario_to_toml(scenario_from_dict(data)), encoding="utf-8")
    return path


@pytest.mark.slow
def test_a_stop_level_plan_starts_with_stop_and_why(hot_syrup):
    out = run("plan", str(hot_syrup))
    assert out.returncode == 0, out.stderr                 # default: a computed plan exits 0
    first = out.stdout.splitlines()[0]
    assert first.startswith("STOP") and "Heater above its exposure rating" in first and "85.0 °C" in first
    # grouped by severity, most severe first, each with where, value, limit and what to do
    text = out.stdout
    assert text.index("  STOP (") < text.index("  WARNING (") < text.index("  CAUTION (") < text.index("  INFORMATION (")
    assert "Value: 98.3 °C; limit: 85.0 °C" in text and "What to do:" in text and "Where: discharge line," in text
    # impossible pre-warm: no partial total
    assert "total time: not possible: pre-warm: tracing cannot bring" in text
    assert "cost: not possible:" in text


@pytest.mark.slow
def test_plan_json_carries_the_findings_and_the_worst_severity(hot_syrup):
    out = run("plan", str(hot_syrup), "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    expected = assess(make_plan(load_scenario(hot_syrup)))
    assert doc["worst_severity"] == "stop"
    assert [f["code"] for f in doc["findings"]] == [f.code for f in expected]
    for f in doc["findings"]:
        assert FINDING_KEYS <= set(f) and set(f["where"]) == {"line", "segment", "at_m"}
    exposure = next(f for f in doc["findings"] if f["code"] == "HEATER-EXPOSURE")
    assert exposure["quantity"] == "temperature" and exposure["limit"] == pytest.approx(85.0 + 273.15, abs=1e-9)
    assert exposure["value"] > exposure["limit"]
    figures = doc["key_figures"]
    assert figures["total_time"]["value"] is None and figures["total_time"]["possible"] is False
    assert figures["total_time"]["why"].startswith("pre-warm: tracing cannot bring")
    assert figures["total_cost"]["value"] is None


@pytest.mark.slow
def test_fail_on_exits_3_when_such_a_finding_is_present(hot_syrup):
    assert run("plan", str(hot_syrup), "--fail-on", "stop").returncode == 3
    assert run("plan", str(hot_syrup), "--json", "--fail-on", "warning").returncode == 3
    # the demo as given: warnings (plan longer than its window) but no stop
    codes = {f.severity for f in assess(make_plan(load_scenario(SYRUP)))}
    assert "warning" in codes and "stop" not in codes
    assert run("plan", str(SYRUP), "--fail-on", "stop").returncode == 0
    assert run("plan", str(SYRUP), "--fail-on", "warning").returncode == 3


@pytest.mark.slow
def test_evaluate_checks_what_applies_to_one_line():
    # 500 degC at the inlet of a product whose maximum is 70 degC (scenario input)
    out = run("evaluate", str(SYRUP), "--inlet-temperature", "500 degC", "--json", "--fail-on", "warning")
    assert out.returncode == 3, out.stderr
    doc = json.loads(out.stdout)
    codes = {f["code"]: f for f in doc["findings"]}
    hot = codes["PRODUCT-TOO-HOT"]
    assert hot["value"] == pytest.approx(773.15, abs=1e-6) and hot["limit"] == pytest.approx(343.15, abs=1e-9)
    assert {"HEATER-EXPOSURE", "VISCOSITY-EXTRAPOLATED", "FLANGE-TEMP-RANGE"} <= set(codes)
    assert doc["worst_severity"] == "stop"
    text = run("evaluate", str(SYRUP), "--inlet-temperature", "500 degC").stdout
    assert text.splitlines()[0].startswith("STOP") and "PRODUCT-TOO-HOT" in text


@pytest.mark.slow
def test_evaluate_as_given_names_its_findings():
    out = run("evaluate", str(SYRUP), "--flow", "15 m3/h", "--json")
    doc = json.loads(out.stdout)
    assert doc["findings"][-1]["code"] == "PLANNING-ESTIMATE"
    assert doc["worst_severity"] in ("info", "caution", "warning", "stop")


@pytest.mark.parametrize("option, value", [("--flow", "15"), ("--inlet-temperature", "55")])
def test_a_bare_number_is_refused_with_a_request_for_a_unit(option, value):
    out = run("evaluate", str(SYRUP), option, value)
    assert out.returncode == 2 and "Traceback" not in out.stderr
    assert option in out.stderr and "no unit" in out.stderr and "Ra=" not in out.stderr


def test_options_are_checked_like_the_file_fields():
    # operation.flow allows at least 1e-6 m3/s (schema); the same check refuses the option
    out = run("evaluate", str(SYRUP), "--flow", "0.000001 m3/h")
    assert out.returncode == 2 and "--flow" in out.stderr and "out of range" in out.stderr


SI_WORDS = re.compile(r"°C|\bbar\b|m³|\bkW\b|\bmm\b|\d m\b|\d K\b|\bkg\b|mPa·s|m/s\b|W/\(m²")
US_WORDS = re.compile(r"°F|\bpsi\b|\bgpm\b|\bbbl\b|\d ft\b|\bhp\b|\blb\b|\bcP\b|BTU|ft/s")


@pytest.mark.slow
@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_text_output_speaks_the_chosen_units(path):
    for command in (["plan", str(path)], ["evaluate", str(path)]):
        us = run(*command, "--units", "us")
        si = run(*command)
        assert us.returncode == 0 and si.returncode == 0, us.stderr + si.stderr
        assert not SI_WORDS.findall(us.stdout), SI_WORDS.findall(us.stdout)
        assert not US_WORDS.findall(si.stdout), US_WORDS.findall(si.stdout)
