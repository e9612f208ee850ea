"""The input widgets: a field's value in the chosen unit system, written back to the working scenario
dict on change, and the problems shown beside it.

The working scenario lives in ``st.session_state["work"]`` as a plain scenario dict (the form
``planner.scenario.schema.scenario_to_dict`` writes: numbers in the field's default unit, or strings with
a unit). Each widget shows its field in the chosen unit system and, when the operator changes it,
writes the new value back as a string with its unit through an ``on_change`` callback, so that only
edited fields change and every edit survives switching tabs or units.  A widget's label is the field's
label of ``planner.scenario.labels`` (the words error messages use) unless the page adds to it.
"""

from __future__ import annotations

import re
from typing import Callable

import streamlit as st

from planner.scenario.labels import field_label as _field_label
from planner.scenario.schema import field_constraints

from dashboard.present.display import display_string, stored_to_si, to_display, with_unit, words
from dashboard.present.plaintext import escaped

STEPS = {
    ("temperature", "SI"): 1.0, ("temperature", "US"): 1.0, ("pressure", "SI"): 0.1, ("pressure", "US"): 1.0,
    ("length", "SI"): 1.0, ("length", "US"): 1.0, ("small_length", "SI"): 5.0, ("small_length", "US"): 0.25,
    ("volume_flow", "SI"): 1.0, ("volume_flow", "US"): 5.0, ("volume", "SI"): 1.0, ("volume", "US"): 10.0,
    ("time", "SI"): 0.5, ("time", "US"): 0.5, ("power", "SI"): 1.0, ("power", "US"): 1.0,
    ("speed", "SI"): 0.5, ("speed", "US"): 1.0, ("linear_power", "SI"): 1.0, ("linear_power", "US"): 0.5,
    ("rotational_speed", "SI"): 10.0, ("rotational_speed", "US"): 10.0,
    ("temperature_difference", "SI"): 1.0, ("temperature_difference", "US"): 1.0,
}
FORMATS = {"temperature": 1, "pressure": 2, "length": 2, "small_length": 2, "volume_flow": 2, "volume": 1,
           "time": 2, "power": 2, "speed": 2, "linear_power": 1, "rotational_speed": 0, "displacement": 3,
           "dynamic_viscosity": 1, "kinematic_viscosity": 1, "density": 1, "specific_heat": 3, "conductivity": 3,
           "heat_transfer_coefficient": 2, "linear_conductance": 2, "yield_stress": 1, "temperature_difference": 1,
           None: 3}


# ------------------------------------------------------------------------------------------ paths

_TOKEN = re.compile(r"([^.\[\]]+)|\[(\d+)\]")


def split_path(path: str) -> list:
    parts = []
    for name, index in _TOKEN.findall(path):
        parts.append(int(index) if index else name)
    return parts


def get_path(data, path: str, default=None):
    node = data
    for part in split_path(path):
        if isinstance(part, int):
            if not isinstance(node, list) or part >= len(node):
                return default
        elif not isinstance(node, dict) or part not in node:
            return default
        node = node[part]
    return node


def set_path(data: dict, path: str, value) -> None:
    parts = split_path(path)
    node = data
    for part, following in zip(parts[:-1], parts[1:]):
        if isinstance(part, int):
            node = node[part]
            continue
        if not isinstance(node.get(part), (dict, list)):
            node[part] = [] if isinstance(following, int) else {}
        node = node[part]
    node[parts[-1]] = value


def del_path(data: dict, path: str) -> None:
    parts = split_path(path)
    parent = get_path(data, ".".join(str(p) for p in parts[:-1])) if len(parts) > 1 else data
    if isinstance(parent, dict):
        parent.pop(parts[-1], None)


def _under(problem_path: str, prefix: str) -> bool:
    return problem_path == prefix or problem_path.startswith(prefix + ".") or problem_path.startswith(prefix + "[")


class Problems:
    """The validation problems of this run; each is shown once, beside the first field that claims it."""

    def __init__(self, problems: list[tuple[str, str]]):
        self.items = list(problems)
        self.shown: set[int] = set()

    def take(self, prefix: str) -> list[tuple[str, str]]:
        found = []
        for i, (path, message) in enumerate(self.items):
            if i not in self.shown and _under(path, prefix):
                self.shown.add(i)
                found.append((path, message))
        return found

    def count(self, prefix: str) -> int:
        return sum(1 for path, _ in self.items if _under(path, prefix))

    def rest(self) -> list[tuple[str, str]]:
        return [item for i, item in enumerate(self.items) if i not in self.shown]


# ------------------------------------------------------------------------------------------ state

def work() -> dict:
    return st.session_state["work"]


def system() -> str:
    return st.session_state.get("unit_system", "SI")


def locked() -> bool:
    """An approved saved revision is open: every input is read-only (``dashboard.sharing.apply_lock``)."""
    return bool(st.session_state.get("inputs_locked"))


def _wkey(path: str) -> str:
    return f"in{st.session_state.get('gen', 0)}|{system()}|{path}"


def _stored_number(raw, kind):
    if raw is None:
        return None
    if kind is None:
        return float(raw) if isinstance(raw, (int, float)) and not isinstance(raw, bool) else None
    return stored_to_si(raw, kind)


def _commit_number(path: str, kind: str | None, key: str) -> None:
    value = st.session_state.get(key)
    data = work()
    if value is None:
        del_path(data, path)
    elif kind is None:
        set_path(data, path, float(value))
    else:
        set_path(data, path, display_string(float(value), kind, system()))


def _commit_value(path: str, key: str, empty_is_none: bool = False) -> None:
    value = st.session_state.get(key)
    if isinstance(value, str):
        value = value.strip()
    if empty_is_none and (value is None or value == ""):
        del_path(work(), path)
    else:
        set_path(work(), path, value)


def show_problems(container, problems: Problems, path: str, field_label: str) -> None:
    for problem_path, message in problems.take(path):
        where = "" if problem_path == path else f" ({problem_path[len(path):].lstrip('.')})"
        container.error(f"**{field_label}**{escaped(where)}: {escaped(message)}  \n{escaped(problem_path)}", icon=":material/warning:")


# ------------------------------------------------------------------------------------------ widgets

def _label(path: str, label: str | None) -> str:
    """The widget's label: the field's label (``planner.scenario.labels``, the words error messages use),
    or the page's own words where it adds to them."""
    text = label or _field_label(path)
    if not text:
        raise KeyError(f"no label for {path}: add it to planner/scenario/labels.py")
    return text


def number(container, problems: Problems, path: str, kind: str | None = None, *, label: str | None = None,
           help: str | None = None, decimals: int | None = None) -> None:
    """A number field in the display unit of ``kind`` (None: a plain number such as a price)."""
    field_label = _label(path, label)
    raw = get_path(work(), path)
    try:
        si = _stored_number(raw, kind)
    except (ValueError, TypeError) as exc:
        si = None
        container.caption(escaped(f"the file's value {raw!r} could not be read: {exc}"))
    value = None if si is None else (to_display(si, kind, system()) if kind else si)
    digits = FORMATS.get(kind, 2) if decimals is None else decimals
    key = _wkey(path)
    container.number_input(
        with_unit(field_label, kind, system()), value=None if value is None else float(value),
        step=STEPS.get((kind, system()), 10.0 ** -min(digits, 2)), format=f"%.{digits}f", key=key, help=help,
        placeholder="empty: the planner's default" if value is None else None, disabled=locked(),
        on_change=_commit_number, args=(path, kind, key))
    show_problems(container, problems, path, field_label)


def select(container, problems: Problems, path: str, options, *, label: str | None = None,
           help: str | None = None, format_func: Callable = words) -> None:
    """A choice field; ``options`` are the schema's (``field_choices``), shown as words."""
    field_label = _label(path, label)
    options = list(options)
    raw = get_path(work(), path)
    index = options.index(raw) if raw in options else None
    key = _wkey(path)
    container.selectbox(field_label, options, index=index, key=key, help=help, format_func=format_func,
                        disabled=locked(), on_change=_commit_value, args=(path, key))
    show_problems(container, problems, path, field_label)


def text(container, problems: Problems, path: str, *, label: str | None = None, help: str | None = None,
         optional: bool = False) -> None:
    field_label = _label(path, label)
    raw = get_path(work(), path)
    key = _wkey(path)
    container.text_input(field_label, value="" if raw is None else str(raw), key=key, help=help,
                         max_chars=field_constraints(path).get("max_length"),   # the schema's limit
                         disabled=locked(), on_change=_commit_value, args=(path, key, optional))
    show_problems(container, problems, path, field_label)


def checkbox(container, problems: Problems, path: str, *, label: str | None = None, default: bool = False,
             help: str | None = None) -> None:
    field_label = _label(path, label)
    raw = get_path(work(), path)
    key = _wkey(path)
    container.checkbox(field_label, value=bool(default if raw is None else raw), key=key, help=help,
                       disabled=locked(), on_change=_commit_value, args=(path, key))
    show_problems(container, problems, path, field_label)


