"""The whole plan: levers applied as validated copies, and ``plan --json`` on every demo.

The steps a plan strings together have their own test modules: test_system.py (operating point),
test_timeline.py, test_startup.py, test_hold.py, test_vessels.py."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from conftest import DEMO_FILES, ROOT
from planner.transfer.plan import with_changes
from planner.scenario.schema import load_scenario


def test_lever_changes_are_validated_copies():
    scenario = load_scenario(DEMO_FILES[0])
    changed = with_changes(scenario, steam_pressure=7e5, ambient_shift=-5.0)
    assert changed.tracing.steam_pressure == pytest.approx(7e5)
    assert changed.site.ambient_temperature == pytest.approx(scenario.site.ambient_temperature - 5.0)
    assert changed.route == scenario.route


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_plan_json_on_every_demo(path):
    out = subprocess.run([sys.executable, "-m", "planner", "plan", str(path), "--json"], cwd=ROOT,
                         capture_output=True, text=True, timeout=180)
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["start"]["status"] in ("ok", "relief_lifting", "rate_not_reachable", "beyond_curve", "no_flow")
    arrays = doc["timeline"]["arrays"]
    assert len(arrays["time_s"]) == 24 + 1 == doc["timeline"]["steps"]   # each increment's start, and the end
    assert doc["timeline"]["total_time_s"] > 0
    assert doc["costs"]["total"] == pytest.approx(doc["costs"]["energy"] + doc["costs"]["demurrage"])



def test_a_source_too_cold_to_flow_is_refused_naming_the_field_in_the_units_asked(tmp_path):
    # the barge demo with the bitumen preset (no-flow 100 degC) and its source at 55 degC: the refusal said
    # "source temperature 55.0 °C is ...", naming no field to change
    from planner.scenario.schema import scenario_to_dict

    data = scenario_to_dict(load_scenario(next(p for p in DEMO_FILES if "barge" in p.name)))
    data["product"] = {"preset": "paving_bitumen_70_100"}
    path = tmp_path / "bitumen.json"
    path.write_text(json.dumps(data))
    for units, words in (("si", "source.temperature: 55.0 °C"), ("us", "source.temperature: 131.0 °F")):
        out = subprocess.run([sys.executable, "-m", "planner", "plan", str(path), "--units", units],
                             cwd=ROOT, capture_output=True, text=True, timeout=60)
        assert out.returncode == 2 and "Traceback" not in out.stderr
        assert out.stderr.startswith(f"error: {words} is at or below the product's no-flow temperature")
        assert "(product.no_flow_temperature)" in out.stderr
