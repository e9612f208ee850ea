"""The operating envelope (``python -m planner envelope``): cells, the envelope line, JSON and CSV, refusals,
and the line's monotony on generated lines."""

from __future__ import annotations

import copy
import csv
import io
import json

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from conftest import DEMO_DIR
from planner.cli import main
from planner.scenario.budget import Budget, BudgetError, envelope_problems, use_budget
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict
from planner.sweeps.compare import compare
from planner.sweeps.envelope import envelope
from planner.sweeps.executors import local_executor
from planner.transfer.plan import with_changes

SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"
POLYOL = DEMO_DIR / "polyol_tank_transfer.toml"


def _run(capsys, *argv) -> tuple[int, str, str]:
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_each_cell_is_the_comparison_row_at_that_ambient():
    # the envelope adds no physics of its own: a cell is compare's row with every ambient shifted
    scenario = load_scenario(SYRUP)
    result = envelope(scenario, "setpoint", [313.15, 333.15], [253.15, 293.15])
    for ambient, row in zip(result.ambients, result.cells):
        shifted = with_changes(scenario, ambient_shift=ambient - scenario.site.ambient_temperature)
        reference = compare(shifted, "setpoint", [313.15, 333.15]).rows
        assert [c["total_time_s"] for c in row] == pytest.approx([r["total_time_s"] for r in reference], rel=1e-12)
        assert [c["worst_severity"] for c in row] == [r["worst_severity"] for r in reference]
    window = scenario.schedule.planned_window
    for row, line_value in zip(result.cells, result.line):
        fitting = [c["value"] for c in row if c["total_time_s"] is not None and c["total_time_s"] <= window
                   and not c["has_stop"]]
        assert line_value == (min(fitting) if fitting else None)


def test_cli_text_json_and_csv_give_the_same_cells(capsys):
    args = [SYRUP, "--ambient", "-20:20:40", "--setpoints", "40,60"]     # a range starting with a minus sign
    code, text, _ = _run(capsys, "envelope", *args)
    assert code == 0
    assert "envelope: the lowest setpoint" in text and "at  -20.0 °C:" in text
    code, out, _ = _run(capsys, "envelope", *args, "--json")
    data = json.loads(out)
    assert code == 0 and len(data["cells"]) == 4
    assert data["ambients_k"] == pytest.approx([253.15, 293.15]) and data["values"] == pytest.approx([313.15, 333.15])
    code, out, _ = _run(capsys, "envelope", *args, "--csv")
    rows = list(csv.DictReader(io.StringIO(out)))
    assert code == 0 and len(rows) == 4
    for row, cell in zip(rows, data["cells"]):
        assert float(row["value"]) == pytest.approx(cell["value"], rel=1e-11)
        assert float(row["total_time_s"]) == pytest.approx(cell["total_time_s"], rel=1e-11)
        assert row["worst_severity"] == cell["worst_severity"]
    assert [e["value"] for e in data["envelope"]] == pytest.approx([313.15, 313.15])   # 40 °C fits at both (5.8 h)


def test_us_units_take_fahrenheit_ambients(capsys):
    code, out, _ = _run(capsys, "envelope", SYRUP, "--ambient", "-4", "--setpoints", "104", "--units", "us", "--json")
    assert code == 0
    data = json.loads(out)
    assert data["ambients_k"] == pytest.approx([253.15]) and data["values"] == pytest.approx([313.15])


def test_past_the_budget_is_refused_naming_what_to_reduce(capsys, monkeypatch):
    scenario = load_scenario(SYRUP)
    with use_budget(Budget(envelope_steps=48_000)):          # about 7,600 steps a syrup plan: 6 cells
        with pytest.raises(BudgetError) as caught:
            envelope(scenario, "setpoint", [313.15, 323.15, 333.15], [263.15, 273.15, 283.15])
    assert caught.value.problems[0][0] == "--ambient" and "give at most 6 cells" in caught.value.problems[0][1]
    monkeypatch.setenv("PLANNER_WORK_BUDGET", "0.05")
    code, _, err = _run(capsys, "envelope", SYRUP, "--ambient", "-20:30:1", "--setpoints", "40:70:1")
    assert code == 2 and "--ambient: the envelope is 1,581 cells (51 ambients x 31 lever values)" in err
    assert "PLANNER_WORK_BUDGET" in err


def test_the_environment_factor_raises_the_budget(monkeypatch):
    scenario = load_scenario(SYRUP)
    assert envelope_problems(scenario, 51, 31)             # 1,581 plans: past the default
    monkeypatch.setenv("PLANNER_WORK_BUDGET", "5")
    assert envelope_problems(scenario, 51, 31) == []


@pytest.mark.parametrize("argv, words", [
    (["--ambient", "-20:30:5", "--setpoints", "40", "--uncertainty"], "--uncertainty/--samples: sampled uncertainty"),
    (["--ambient", "-95,20", "--setpoints", "40"], "--ambient: ambient 1 (-95 °C): site.ambient_temperature"),
    (["--ambient", "10,10", "--setpoints", "40"], "--ambient: ambient 2 (10 °C) repeats an earlier ambient"),
    # the syrup demo's indoor segment (12 °C, 16 K above the site's -4 °C) moves with the site: past the 70 °C
    # limit, it is said in the units the user typed (it was said in kelvin)
    (["--ambient", "60", "--setpoints", "40"],
     "segments[2].surroundings.ambient_temperature: 76 °C is out of range: must be at most 70 °C"),
    (["--ambient", "140", "--setpoints", "104", "--units", "us"],
     "segments[2].surroundings.ambient_temperature: 168.8 °F is out of range: must be at most 158 °F"),
    (["--ambient", "hot", "--setpoints", "40"], "--ambient: cannot read the values 'hot'"),
    (["--ambient", "10", "--steam-pressures", "3"], "steam pressures are compared only on steam tracing"),
])
def test_bad_options_are_refused_with_exit_2(capsys, argv, words):
    code, out, err = _run(capsys, "envelope", SYRUP, *argv)
    assert code == 2 and out == "" and words in err and "Traceback" not in err


POLYOL_DATA = scenario_to_dict(load_scenario(POLYOL))
SETPOINTS = [283.15, 298.15, 313.15, 328.15]
AMBIENTS = [263.15, 278.15, 293.15]


def _generated_line(length_factor: float, insulation_factors: list[float], window_factor: float):
    """The polyol transfer with its route stretched, its insulation thickened or thinned, and a window near
    its own 30 °C / 20 °C total time, so the window binds somewhere in the grid."""
    data = copy.deepcopy(POLYOL_DATA)
    for seg, factor in zip(data["route"]["segments"], insulation_factors):
        seg["length"] *= length_factor
        for layer in seg.get("insulation", []):
            layer["thickness"] *= factor
    scenario = scenario_from_dict(data)
    middle = envelope(scenario, "setpoint", [303.15], [293.15]).cells[0][0]["total_time_s"]
    data["schedule"]["planned_window"] = middle * window_factor
    return scenario_from_dict(data)


@settings(max_examples=4, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(length=st.floats(0.4, 1.5), insulation=st.lists(st.floats(0.5, 1.6), min_size=4, max_size=4),
       window=st.floats(0.97, 1.03))
@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_a_colder_ambient_never_needs_a_lower_setpoint(length, insulation, window):
    """Property (physics: a colder surrounding takes more heat from the line, so no setpoint finishes sooner
    in the cold): along the ambients from warm to cold the envelope's setpoint never falls, and once no
    value fits, none fits colder either.  About 1 s a generated line on 2 workers."""
    scenario = _generated_line(length, insulation, window)
    with local_executor(2) as pool:
        result = envelope(scenario, "setpoint", SETPOINTS, AMBIENTS, executor=pool)
    needed = [float("inf") if v is None else v for v in result.line]      # AMBIENTS run cold to warm
    assert needed == sorted(needed, reverse=True), (needed, [[c["total_time_s"] for c in r] for r in result.cells])


def test_the_printable_card_shows_the_envelope_line_and_is_never_written_over_a_file(capsys, tmp_path):
    card = tmp_path / "card.html"
    args = ["envelope", SYRUP, "--ambient", "-20,20", "--setpoints", "40,70", "--card", card]
    code, _, _ = _run(capsys, *args)
    page = card.read_text(encoding="utf-8")
    assert code == 0 and "<script" not in page and "@page { size: A4 portrait" in page
    assert "lowest trace setpoint" in page and "<td><b>40.0 °C</b></td>" in page     # 40 °C fits at both ambients
    assert 'class="stop"' in page                       # 70 °C at -20 °C: a stop (the text table's STOP)
    code, _, err = _run(capsys, *args)
    assert code == 2 and "--card:" in err and "exists" in err
    assert card.read_text(encoding="utf-8") == page
