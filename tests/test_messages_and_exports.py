"""Error messages in the user's words, field labels as the page shows them, and scenario files
written with units that read back to exactly the same plan."""

from __future__ import annotations

import json
import re

import pytest

from conftest import DEMO_FILES, ROOT, base_scenario
from planner.errors import ScenarioError
from planner.reports.plan_json import plan_json
from planner.scenario.labels import FIELD_LABELS, field_label
from planner.scenario.schema import load_scenario, parse_scenario_text, scenario_from_dict, scenario_to_toml
from planner.transfer.plan import make_plan


def problems(data) -> dict[str, str]:
    with pytest.raises(ScenarioError) as caught:
        scenario_from_dict(data)
    return dict(caught.value.problems), str(caught.value)


def test_a_value_is_reported_in_the_unit_it_was_given_and_only_once():
    data = base_scenario()
    data["operation"]["inlet_temperature"] = "-300 degC"
    data["route"]["segments"][0]["length"] = "-45 m"
    data["operation"]["flow"] = "-3 m3/h"
    found, text = problems(data)
    t = found["operation.inlet_temperature"]
    assert "-300 °C" in t and "-273.15 °C" in t and " K" not in t          # 0 K = -273.15 degC (exact)
    length = found["route.segments[0].length"]
    assert length.count("-45") == 1 and "at least 0.01 m" in length
    # the schema's lower flow bound 1e-6 m3/s, in the unit given: 1e-6 * 3600 = 0.0036 m3/h
    assert "-3 m³/h" in found["operation.flow"] and "at least 0.0036 m³/h" in found["operation.flow"]
    # the whole message names each field as the page labels it, and its path
    assert "Inlet temperature (operation.inlet_temperature): -300 °C" in text
    assert "Discharge route, row 1, Length (route.segments[0].length)" in text


def test_us_values_are_reported_in_us_units():
    data = base_scenario()
    data["site"]["ambient_temperature"] = "-500 degF"
    data["site"]["wind_speed"] = "200 ft/s"          # limit 60 m/s = 196.85 ft/s (NIST SP 811: 1 ft = 0.3048 m)
    found, _ = problems(data)
    assert "-500 °F" in found["site.ambient_temperature"] and "-459.67 °F" in found["site.ambient_temperature"]
    assert "at most 196.85 ft/s" in found["site.wind_speed"]


def test_labels_are_the_pages_own_words():
    """The Inputs page labels its fields from the one table (``scenario/labels.FIELD_LABELS``): every field a
    widget edits has a label there, and no widget spells a label of that table again."""
    source = (ROOT / "dashboard" / "views" / "inputs" / "sections.py").read_text(encoding="utf-8")
    paths = re.findall(r'(?:number|select|text|checkbox)\([a-z]+, problems, "([a-z_.]+)"', source)
    assert len(paths) > 50
    assert [p for p in paths if not FIELD_LABELS.get(p)] == []
    quoted = set(re.findall(r'"([^"]+)"', source))
    assert sorted(quoted & set(FIELD_LABELS.values()) - {"Product", "Source", "Tracing"}) == []
    assert field_label("route.segments[1].length") == "Discharge route, row 2, Length"
    assert field_label("suction.segments[0].pressure_rating") == "Suction route, row 1, Rating"
    assert field_label("pump.curve[2].head") == "Water curve, row 3, Head"


@pytest.mark.parametrize("system", ["SI", "US"])
@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_exported_files_carry_units_and_read_back_to_the_same_plan(path, system):
    scenario = load_scenario(path)
    text = scenario_to_toml(scenario, system)
    back = parse_scenario_text(text, "toml")
    assert back == scenario
    # quantities are written with units as a person would
    unit_strings = re.findall(r'= "(-?[0-9.e+-]+) ([^"]+)"', text)
    assert len(unit_strings) > 20
    if system == "SI":
        assert re.search(r'temperature = "-?[0-9.]+ degC"', text)
        assert 'planned_window = "' in text and ' h"' in text
    else:
        assert re.search(r'temperature = "-?[0-9.]+ degF"', text) and "degC" not in text
    a = json.dumps(plan_json(make_plan(scenario)), sort_keys=True)
    b = json.dumps(plan_json(make_plan(back)), sort_keys=True)
    assert a == b


def test_export_spells_the_issue_examples():
    data = base_scenario()
    data["pump"] = {"kind": "positive_displacement", "speed": "300 rpm", "displacement": "1.0 L", "relief_setting": "10 bar"}
    data["tracing"] = {"kind": "electric_constant", "setpoint": 55.0, "output": "30 W/m"}
    data["schedule"] = {"planned_window": "8 h"}
    text = scenario_to_toml(scenario_from_dict(data))
    assert 'relief_setting = "10 bar"' in text and 'setpoint = "55 degC"' in text and 'planned_window = "8 h"' in text
