"""One rule, one definition (issue 24): each test fails when a second copy of a rule appears in
``planner/`` or ``dashboard/``, or when two outputs that should read the one definition disagree."""

from __future__ import annotations

import ast
import pathlib
import re

from conftest import DEMO_FILES, ROOT
from planner.checks.finding import LINES, MOST_SEVERE_FIRST, SEVERITIES
from planner.checks.findings import assess, assess_line
from planner.line.model import evaluate, line_from_scenario
from planner.scenario.schema import load_scenario
from planner.scenario.units import SI_UNITS, si_unit_text
from planner.transfer.plan import make_plan

SOURCES = sorted(p for folder in ("planner", "dashboard") for p in (ROOT / folder).rglob("*.py")
                 if "__pycache__" not in p.parts)


def _rel(path: pathlib.Path) -> str:
    return str(path.relative_to(ROOT))


def _string_constants(path: pathlib.Path):
    for node in ast.walk(ast.parse(path.read_text())):
        if isinstance(node, ast.Constant) and isinstance(node.value, str):
            yield node.lineno, node.value


def _sequences_named(path: pathlib.Path):
    """Top-level names bound to a tuple, a list or a rank table built from one (an order)."""
    for node in ast.parse(path.read_text()).body:
        if isinstance(node, ast.Assign) and isinstance(node.value, (ast.Tuple, ast.List, ast.Call, ast.DictComp)):
            for target in node.targets:
                if isinstance(target, ast.Name):
                    yield node.lineno, target.id


# -- the severity order ------------------------------------------------------------------------------

def test_the_severity_order_is_written_once():
    """``checks/finding.py`` holds the order (SEVERITIES, SEVERITY_RANK, MOST_SEVERE_FIRST); no other module
    lists three severities in a row or keeps a table of its own."""
    words = "|".join(SEVERITIES)
    listing = re.compile(rf"""["']({words})["']\s*,\s*["']({words})["']\s*,\s*["']({words})["']""")
    home = ROOT / "planner" / "checks" / "finding.py"
    copies = []
    for path in SOURCES:
        if path == home:
            continue
        text = path.read_text()
        copies += [f"{_rel(path)}: {m.group(0)}" for m in listing.finditer(text)]
        copies += [f"{_rel(path)}:{line} {name}" for line, name in _sequences_named(path) if "SEVERIT" in name]
    assert not copies, "a second copy of the severity order:\n" + "\n".join(copies)
    assert MOST_SEVERE_FIRST == ("stop", "warning", "caution", "info")


# -- the lines' names --------------------------------------------------------------------------------

def test_evaluate_and_plan_name_the_discharge_line_alike():
    """The discharge line is "discharge" in ``evaluate``'s findings (one line) and in ``plan``'s."""
    path = next(p for p in DEMO_FILES if p.stem == "fuel_oil_barge_discharge")
    scenario = load_scenario(path)
    line = line_from_scenario(scenario)
    from planner.checks.finding import DISCHARGE

    one_line = assess_line(scenario, line, evaluate(scenario, line=line), name=DISCHARGE)
    whole = assess(make_plan(scenario))
    named = {f.line for f in one_line + whole if f.line is not None}
    assert named and named <= set(LINES), named
    assert "route" not in named
    # the command passes the one name: no module passes its own spelling of a line to assess_line
    calls = [f"{_rel(p)}" for p in SOURCES if re.search(r"assess_line\([^)]*name=\"", p.read_text())]
    assert not calls, calls


# -- unit spellings ------------------------------------------------------------------------------------

# spellings of SI units that are not the one table's (scenario/units.py UNIT_TEXT / si_unit_text)
# (the units a person types in a file, quantities.FILE_UNITS, are pint's input spellings: "m3", "kg/m3")
OTHER_SPELLINGS = {"m3/s", "m³/s", "W/(m2 K)", "W/(m2.K)", "W/(m²·K)", "rev/s", "J/(kg K)", "W/(m K)", "W/(m·K)"}


def test_unit_spellings_come_from_one_table():
    """No module of ``planner/`` or ``dashboard/`` spells an SI unit as a string of its own; findings, the
    comparison's levers and the calibration's residuals write ``si_unit_text(kind)``."""
    home = ROOT / "planner" / "scenario" / "units.py"
    copies = [f"{_rel(p)}:{line} {value!r}" for p in SOURCES if p != home
              for line, value in _string_constants(p) if value.strip() in OTHER_SPELLINGS or value.endswith(" m3/s")]
    assert not copies, "unit spellings outside scenario/units.py:\n" + "\n".join(copies)


def test_findings_units_agree_with_the_schema_spelling():
    """The JSON ``findings[].unit`` is the unit the schema's descriptions write for the same SI unit."""
    from planner.reports.plan_json import plan_json
    from planner.scenario.schema import json_schema

    scenario = load_scenario(DEMO_FILES[0])
    doc = plan_json(make_plan(scenario), scenario)
    units = {f["quantity"]: f["unit"] for f in doc["findings"] if f["quantity"]}
    for kind, unit in units.items():
        assert unit == si_unit_text(kind), (kind, unit)
    schema_text = str(json_schema())
    # a kind whose SI unit is its default unit is written in the schema exactly as findings write it
    assert si_unit_text("heat_transfer_coefficient") == "W/(m²·K)" and "W/(m²·K)" in schema_text
    assert si_unit_text("volume_flow") == "m³/s" and "m³/s" in schema_text
    assert all(si_unit_text(kind) != SI_UNITS[kind] or "*" not in SI_UNITS[kind] for kind in SI_UNITS)


# -- the scenario's canonical JSON -------------------------------------------------------------------

def test_one_canonical_json_text_of_a_scenario():
    """``schema.scenario_to_json`` (scenario/files.py) is the one canonical text: the store saves it and the dashboard compares
    with it; no module writes a scenario dict to JSON on its own."""
    from planner.scenario.schema import scenario_from_dict, scenario_to_dict, scenario_to_json

    scenario = load_scenario(DEMO_FILES[0])
    shuffled = dict(reversed(list(scenario_to_dict(scenario).items())))
    assert scenario_to_json(scenario_from_dict(shuffled)) == scenario_to_json(scenario)
    writers = [f"{_rel(p)}" for p in SOURCES if re.search(r"json\.dumps\(\s*scenario_to_dict\(", p.read_text())
               and p != ROOT / "planner" / "scenario" / "files.py"]
    assert not writers, "a second canonical JSON form:\n" + "\n".join(writers)


# -- key figures and display decimals --------------------------------------------------------------------

def _classes_named(name: str) -> list[str]:
    return [f"{_rel(p)}:{n.lineno}" for p in SOURCES for n in ast.walk(ast.parse(p.read_text()))
            if isinstance(n, ast.ClassDef) and n.name == name]


def test_one_key_figure_class_and_one_rendering():
    """``reports/key_figures.py`` defines the key figure and ``figure_text`` renders it ("not possible: why",
    "not given: why"); no other module writes those words before a reason."""
    assert _classes_named("KeyFigure") == ["planner/reports/key_figures.py:" + str(
        next(n.lineno for n in ast.walk(ast.parse((ROOT / "planner/reports/key_figures.py").read_text()))
             if isinstance(n, ast.ClassDef) and n.name == "KeyFigure"))]
    home = ROOT / "planner" / "reports" / "key_figures.py"
    copies = [f"{_rel(p)}:{line}" for p in SOURCES if p != home for line, value in _string_constants(p)
              if re.match(r"not (possible|given): ", value)]
    assert not copies, copies


def test_display_decimals_are_one_table():
    """``scenario/wording.py`` DECIMALS is the only table of decimals per quantity kind (a dict with three or
    more kinds mapped to small integers); a transfer time reads alike in a finding and a key figure."""
    from planner.reports.key_figures import figure_text, key_figures
    from planner.scenario.wording import Q

    kinds = {"temperature", "pressure", "volume_flow", "time", "length", "power", "head", "volume"}
    home = ROOT / "planner" / "scenario" / "wording.py"
    tables = []
    for path in SOURCES:
        for node in ast.walk(ast.parse(path.read_text())):
            if isinstance(node, ast.Dict) and path != home:
                keys = {k.value for k in node.keys if isinstance(k, ast.Constant)}
                numbers = [v for v in node.values if isinstance(v, ast.Constant) and isinstance(v.value, int)]
                if len(keys & kinds) >= 3 and len(numbers) == len(node.values):
                    tables.append(f"{_rel(path)}:{node.lineno}")
    # the Inputs page's entry precision (dashboard/views/inputs/fields.py FORMATS) is the widgets' step, not a display rule
    known = {"dashboard/views/inputs/fields.py"}
    assert [t for t in tables if t.split(":")[0] not in known] == []
    plan = make_plan(load_scenario(DEMO_FILES[0]))
    transfer = {k.key: k for k in key_figures(plan)}["transfer_time"]
    assert figure_text(transfer) == Q(transfer.value, "time").text("SI")


# -- hours as text -----------------------------------------------------------------------------------------

def test_hours_as_text_have_one_wording():
    """Times read through ``format_quantity`` (the "time" decimals) or ``transfer.hold_words.hours``; no module
    divides by 3600 to write hours itself."""
    from planner.transfer.hold_words import HOLDS_WORDS, hours_text

    own = re.compile(r"/\s*3600(\.0)?\s*:[^}]*f\}\s*h")
    copies = [f"{_rel(p)}" for p in SOURCES if own.search(p.read_text())]
    assert not copies, copies
    assert hours_text(9000.0) == "2.50 h" and hours_text(None) == HOLDS_WORDS == "holds 14 days"


# -- one meaning per name --------------------------------------------------------------------------------

def test_plain_means_json_ready_data_only():
    """``plain`` is ``planner.plain.plain`` (JSON-ready data); the dashboard's markdown escaping is
    ``plaintext.escaped``: no other module defines a function named ``plain``."""
    defined = [f"{_rel(p)}:{n.lineno}" for p in SOURCES for n in ast.walk(ast.parse(p.read_text()))
               if isinstance(n, ast.FunctionDef) and n.name == "plain"]
    assert defined == [f"planner/plain.py:{next(n.lineno for n in ast.parse((ROOT / 'planner/plain.py').read_text()).body if isinstance(n, ast.FunctionDef) and n.name == 'plain')}"]


def test_system_has_one_meaning_per_module():
    """``system`` is a unit system ("SI"/"US") or a ``TransferSystem``, never both in one module: a name bound
    to a TransferSystem is called ``transfer`` where the module also speaks of unit systems."""
    clashes = []
    for path in SOURCES:
        unit, transfer = [], []
        for node in ast.walk(ast.parse(path.read_text())):
            if isinstance(node, ast.arg) and node.arg == "system":
                annotation = ast.unparse(node.annotation) if node.annotation is not None else ""
                (transfer if "TransferSystem" in annotation else unit if annotation == "str" else []).append(node.lineno)
            if isinstance(node, ast.Assign) and any(isinstance(t, ast.Name) and t.id == "system" for t in node.targets):
                value = ast.unparse(node.value)
                if value.endswith(".system") or "TransferSystem(" in value:
                    transfer.append(node.lineno)
                elif "UNIT_CHOICES" in value or '"SI"' in value:
                    unit.append(node.lineno)
        if unit and transfer:
            clashes.append(f"{_rel(path)}: unit system at {unit[:3]}, TransferSystem at {transfer[:3]}")
    assert not clashes, "\n".join(clashes)
