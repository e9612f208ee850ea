"""House rules on the dashboard's code (RULES.md, issue 9): no function in dashboard/ is longer than
80 lines, and the dashboard never defines its own copy of a choice list the schema owns."""

from __future__ import annotations

import ast

from conftest import ROOT

MAX_LINES = 80


def test_no_dashboard_function_is_longer_than_80_lines():
    long = []
    for path in sorted((ROOT / "dashboard").rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                lines = node.end_lineno - node.lineno + 1
                if lines > MAX_LINES:
                    long.append(f"{path.relative_to(ROOT)}:{node.lineno} {node.name} ({lines} lines)")
    assert not long, long


def test_inputs_take_choice_lists_from_the_schema():
    """A literal list of a schema field's choices in dashboard/views/inputs/ would be a copy that can drift."""
    from planner.scenario import schema

    choices = set()
    for model in (schema.ViscositySpec, schema.ProductSpec, schema.Tracing, schema.PumpSpec, schema.Vessel,
                  schema.Destination, schema.Route, schema.Schedule, schema.Segment, schema.Surroundings):
        for name in model.model_fields:
            try:
                choices.add(tuple(schema.field_choices(model, name)))
            except ValueError:
                pass
    tree = ast.parse("\n".join(p.read_text(encoding="utf-8")
                               for p in sorted((ROOT / "dashboard" / "views" / "inputs").glob("*.py"))))
    copies = []

    def literal(node) -> tuple | None:
        if isinstance(node, (ast.List, ast.Tuple)) and node.elts and all(isinstance(e, ast.Constant) for e in node.elts):
            return tuple(e.value for e in node.elts)
        return None

    for node in ast.walk(tree):
        if not isinstance(node, ast.Call):
            continue
        offered = [kw.value for kw in node.keywords if kw.arg == "options"]
        if getattr(node.func, "id", None) == "select" and len(node.args) >= 4:
            offered.append(node.args[3])
        for values in filter(None, map(literal, offered)):
            if any(set(values) <= set(c) for c in choices):
                copies.append((node.lineno, values))
    assert not copies, copies
