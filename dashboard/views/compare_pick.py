"""A comparison row's value taken into the scenario ("Use this value"), and the row of the value the
scenario has now marked in the comparison table.

The value goes through the planner's one checked assignment (``planner.transfer.changes.with_changes``,
which sets the lever's field with ``assign_field``: a value its field refuses raises ``ScenarioError``
naming the field); the fields it changed are then written into the working scenario dict as
``scenario_to_dict`` writes them, and the input widgets start afresh to show them.  A comparison does
not depend on the lever's own present value (each row sets it), so it stays the comparison of the
changed scenario.
"""

from __future__ import annotations

import math

import pandas as pd
import streamlit as st

from planner.checks.lever_values import LEVERS, SAME_RELATIVE, lever_decimals
from planner.errors import ScenarioError
from planner.scenario.schema import Scenario, scenario_to_dict, scenario_to_json
from planner.transfer.changes import with_changes

from dashboard import state
from dashboard.present.display import fmt
from dashboard.present.plaintext import escaped

from .inputs.fields import locked, set_path

CURRENT_COLUMN = "Now"
CURRENT_MARK = "◀ current value"


def current_value(scenario: Scenario | None, lever: str) -> float | None:
    """The scenario's present value of ``lever`` (SI), None when it has none (no pump, no flow setpoint)."""
    spec = LEVERS[lever]
    section = getattr(scenario, spec.section, None) if scenario is not None else None
    value = getattr(section, spec.field, None) if section is not None else None
    if spec.field == "flow_setpoint" and getattr(section, "control", None) != "fixed_flow":
        return None       # a flow setpoint the pump does not follow is no present value of the lever
    return None if value is None else float(value)


def current_row(result: dict, scenario: Scenario | None) -> int | None:
    """The index of the row at the scenario's present value (within ``SAME_RELATIVE``), or None."""
    now = current_value(scenario, result["lever"])
    if now is None:
        return None
    for i, row in enumerate(result["rows"]):
        value = row.get("value")
        if value is not None and math.isclose(value, now, rel_tol=SAME_RELATIVE, abs_tol=1e-12):
            return i
    return None


def mark_current(frame: pd.DataFrame, result: dict, scenario: Scenario | None) -> pd.DataFrame:
    """The comparison table with a first column marking the row of the present value."""
    index = current_row(result, scenario)
    frame = frame.copy()
    frame.insert(0, CURRENT_COLUMN, [CURRENT_MARK if i == index else "" for i in range(len(frame))])
    return frame


def changed_fields(scenario: Scenario, lever: str, value_si: float) -> tuple[Scenario, dict[str, object]]:
    """The scenario with the lever at ``value_si`` (``with_changes``: ``assign_field``, checked) and the
    fields that changed as ``{"section.field": value as scenario_to_dict writes it}``."""
    changed = with_changes(scenario, **{LEVERS[lever].keyword: value_si})
    section = LEVERS[lever].section
    before = scenario_to_dict(scenario).get(section) or {}
    after = scenario_to_dict(changed).get(section) or {}
    return changed, {f"{section}.{key}": value for key, value in after.items() if before.get(key) != value}


def use_value(scenario: Scenario, result: dict, index: int, unit_system: str) -> str:
    """Put row ``index``'s value into the working scenario; the message to show (raises ScenarioError)."""
    lever = result["lever"]
    value = result["rows"][index]["value"]
    changed, fields = changed_fields(scenario, lever, value)
    work = st.session_state["work"]
    for path, new in fields.items():
        set_path(work, path, new)
    state.new_generation()               # the input widgets show the new value
    saved = st.session_state.get("comparison")
    if saved is not None and saved.get("result") is result:
        saved["json"] = scenario_to_json(changed)
    decimals = lever_decimals(result["kind"], [r.get("value") for r in result["rows"]], system=unit_system)
    return f"{result.get('lever_label', lever)} set to {fmt(value, result['kind'], unit_system, decimals)}"


def use_value_controls(result: dict, scenario: Scenario | None, unit_system: str) -> None:
    """Pick a row and press "Use this value": the scenario's field takes the row's value."""
    rows = [i for i, r in enumerate(result["rows"]) if r.get("value") is not None]
    if scenario is None or not rows:
        return
    gen = st.session_state.get("gen", 0)
    left, right = st.columns([3, 1])
    start = result.get("recommended") if result.get("recommended") in rows else rows[0]
    decimals = lever_decimals(result["kind"], [result["rows"][i]["value"] for i in rows], system=unit_system)
    index = left.selectbox("Row", rows, index=rows.index(start), key=f"cmp_pick{gen}",
                           format_func=lambda i: fmt(result["rows"][i]["value"], result["kind"], unit_system, decimals)
                           + (" (recommended)" if i == result.get("recommended") else ""))
    disabled = locked()
    pressed = right.button("Use this value", key=f"cmp_use{gen}", disabled=disabled,
                           help="an approved revision is open: unlock it under Review to change its inputs"
                           if disabled else "set the scenario's field to this row's value")
    if pressed:
        try:
            message = use_value(scenario, result, index, unit_system)
        except ScenarioError as exc:
            st.error(escaped(str(exc)))
            return
        st.session_state["cmp_used_msg"] = message      # said once, above the table, after the rerun
        st.rerun()


def used_message() -> None:
    """The last "Use this value", said once."""
    message = st.session_state.pop("cmp_used_msg", None)
    if message:
        st.success(escaped(message) + " — the plan above is worked out again with it.")
