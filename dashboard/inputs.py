"""The inputs: widgets that edit the working scenario dict, and the messages beside them.

The working scenario lives in ``st.session_state["work"]`` as a plain scenario dict (the form
``planner.scenario.schema.scenario_to_dict`` writes: numbers in the field's default unit, or strings with
a unit). Each widget shows its field in the chosen unit system and, when the operator changes it,
writes the new value back as an SI string with its unit (``"333.15 K"``) through an ``on_change``
callback, so that only edited fields change and every edit survives switching tabs or units.
The planner validates the dict; its ``ScenarioError.problems`` paths (``route.segments[0].length``)
are matched to the widgets and tables, and each message is shown beside its field.
"""

from __future__ import annotations

import copy
import math
import re
from dataclasses import dataclass
from typing import Any, Callable

import pandas as pd
import streamlit as st

from planner.correlations.materials import INSULATION_MATERIALS
from planner.scenario.presets import PRODUCT_PRESETS
from planner.scenario.schema import (Destination, ProductSpec, PumpSpec, Route, Segment, Surroundings, Tracing,
                                     Schedule, Vessel, ViscositySpec, field_choices)

from . import figures
from .display import (display_string, fit_quality_text, from_display, law_parameters_text, si_string, stored_to_si,
                      to_display, with_unit, words)
from .plaintext import escaped
from .results import product_preview

OWN_PRODUCT = "(own lab data)"
STEPS = {
    ("temperature", "SI"): 1.0, ("temperature", "US"): 1.0, ("pressure", "SI"): 0.1, ("pressure", "US"): 1.0,
    ("length", "SI"): 1.0, ("length", "US"): 1.0, ("small_length", "SI"): 5.0, ("small_length", "US"): 0.25,
    ("volume_flow", "SI"): 1.0, ("volume_flow", "US"): 5.0, ("volume", "SI"): 1.0, ("volume", "US"): 10.0,
    ("time", "SI"): 0.5, ("time", "US"): 0.5, ("power", "SI"): 1.0, ("power", "US"): 1.0,
    ("speed", "SI"): 0.5, ("speed", "US"): 1.0, ("linear_power", "SI"): 1.0, ("linear_power", "US"): 0.5,
    ("rotational_speed", "SI"): 10.0, ("rotational_speed", "US"): 10.0,
}
FORMATS = {"temperature": 1, "pressure": 2, "length": 2, "small_length": 2, "volume_flow": 2, "volume": 1,
           "time": 2, "power": 2, "speed": 2, "linear_power": 1, "rotational_speed": 0, "displacement": 3,
           "dynamic_viscosity": 1, "kinematic_viscosity": 1, "density": 1, "specific_heat": 3, "conductivity": 3,
           "heat_transfer_coefficient": 2, "linear_conductance": 2, "yield_stress": 1, None: 3}


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
        container.error(f"**{field_label}**{escaped(where)}: {escaped(message)}  \n{escaped(problem_path)}", icon="⚠️")


# ------------------------------------------------------------------------------------------ widgets

def number(container, problems: Problems, path: str, field_label: str, kind: str | None = None, *,
           help: str | None = None, decimals: int | None = None) -> None:
    """A number field in the display unit of ``kind`` (None: a plain number such as a price)."""
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


def select(container, problems: Problems, path: str, field_label: str, options, *,
           help: str | None = None, format_func: Callable = words) -> None:
    """A choice field; ``options`` are the schema's (``field_choices``), shown as words."""
    options = list(options)
    raw = get_path(work(), path)
    index = options.index(raw) if raw in options else None
    key = _wkey(path)
    container.selectbox(field_label, options, index=index, key=key, help=help, format_func=format_func,
                        disabled=locked(), on_change=_commit_value, args=(path, key))
    show_problems(container, problems, path, field_label)


def text(container, problems: Problems, path: str, field_label: str, *, help: str | None = None,
         optional: bool = False) -> None:
    raw = get_path(work(), path)
    key = _wkey(path)
    container.text_input(field_label, value="" if raw is None else str(raw), key=key, help=help,
                         disabled=locked(), on_change=_commit_value, args=(path, key, optional))
    show_problems(container, problems, path, field_label)


def checkbox(container, problems: Problems, path: str, field_label: str, *, default: bool = False,
             help: str | None = None) -> None:
    raw = get_path(work(), path)
    key = _wkey(path)
    container.checkbox(field_label, value=bool(default if raw is None else raw), key=key, help=help,
                       disabled=locked(), on_change=_commit_value, args=(path, key))
    show_problems(container, problems, path, field_label)


# ------------------------------------------------------------------------------------------ tables

@dataclass(frozen=True)
class Col:
    title: str
    get: Callable[[dict], Any]
    put: Callable[[dict, Any], None] | None = None
    kind: str | None = None        # quantity kind: a number in display units
    type: str = "number"           # number | text | select | bool | readonly
    options: tuple = ()
    help: str = ""
    format_func: Callable = words   # how a select column shows its options
    field: str = ""                # the scenario field, for messages

    def heading(self, unit_system: str) -> str:
        return with_unit(self.title, self.kind, unit_system) if self.kind else self.title


def _key_get(name: str):
    return lambda item: item.get(name)


def _key_put(name: str):
    def put(item: dict, value) -> None:
        if value is None or value == "":
            item.pop(name, None)
        else:
            item[name] = value
    return put


def _nan_to_none(value):
    if value is None:
        return None
    if isinstance(value, float) and math.isnan(value):
        return None
    return value


def _commit_table(path: str, key: str, columns: tuple, template: Callable[[list], dict]) -> None:
    state = st.session_state.get(key) or {}
    unit_system = system()
    items = copy.deepcopy(get_path(work(), path) or [])
    if not isinstance(items, list):
        items = []
    by_heading = {c.heading(unit_system): c for c in columns}

    def put(item: dict, heading: str, value) -> None:
        col = by_heading.get(heading)
        if col is None or col.put is None or col.type == "readonly":
            return
        value = _nan_to_none(value)
        if col.kind and value is not None:
            value = display_string(float(value), col.kind, unit_system)
        elif col.type == "text" and value is not None:
            value = str(value).strip() or None
        elif col.type == "bool":
            value = bool(value)
        elif col.type == "number" and value is not None:
            value = float(value)
        col.put(item, value)

    for index, changes in (state.get("edited_rows") or {}).items():
        i = int(index)
        if 0 <= i < len(items):
            for heading, value in changes.items():
                put(items[i], heading, value)
    for i in sorted({int(i) for i in state.get("deleted_rows") or []}, reverse=True):
        if 0 <= i < len(items):
            items.pop(i)
    for added in state.get("added_rows") or []:
        item = template(items)
        for heading, value in added.items():
            put(item, heading, value)
        items.append(item)
    set_path(work(), path, items)
    generations = st.session_state.setdefault("table_gen", {})
    generations[path] = generations.get(path, 0) + 1


def table(container, problems: Problems, path: str, title: str, columns: tuple, template: Callable[[list], dict],
          *, row_name: Callable[[dict, int], str] | None = None, help: str = "") -> None:
    """An editable table of the list at ``path``; problems of its rows are listed under it."""
    unit_system = system()
    items = get_path(work(), path) or []
    if not isinstance(items, list):
        items = []
    rows = []
    for item in items:
        row = {}
        for col in columns:
            try:
                raw = col.get(item) if isinstance(item, dict) else None
                if col.kind:
                    si = stored_to_si(raw, col.kind) if raw is not None else None
                    row[col.heading(unit_system)] = None if si is None else to_display(si, col.kind, unit_system)
                else:
                    row[col.heading(unit_system)] = raw
            except (ValueError, TypeError, KeyError, AttributeError, IndexError):
                row[col.heading(unit_system)] = None
        rows.append(row)
    headings = [c.heading(unit_system) for c in columns]
    frame = pd.DataFrame(rows, columns=headings)
    config = {}
    for col in columns:
        heading = col.heading(unit_system)
        if col.kind or col.type == "number":
            frame[heading] = pd.to_numeric(frame[heading], errors="coerce").astype(float)
            config[heading] = st.column_config.NumberColumn(heading, help=col.help or None, width="small",
                                                            format=f"%.{FORMATS.get(col.kind, 3)}f")
        elif col.type == "bool":
            frame[heading] = frame[heading].fillna(True).astype(bool)
            config[heading] = st.column_config.CheckboxColumn(heading, help=col.help or None)
        elif col.type == "select":
            frame[heading] = frame[heading].astype(object)
            config[heading] = st.column_config.SelectboxColumn(heading, options=list(col.options), help=col.help or None,
                                                               format_func=col.format_func)
        elif col.type == "readonly":
            frame[heading] = frame[heading].astype(object)
            config[heading] = st.column_config.TextColumn(heading, disabled=True, help=col.help or None)
        else:
            frame[heading] = frame[heading].astype(object)
            config[heading] = st.column_config.TextColumn(heading, help=col.help or None)
    generation = st.session_state.get("table_gen", {}).get(path, 0)
    key = f"tb{st.session_state.get('gen', 0)}|{unit_system}|{path}|{generation}"
    if title:
        container.markdown(f"**{title}**" + (f" — {help}" if help else ""))
    container.data_editor(frame, key=key, num_rows="fixed" if locked() else "dynamic", hide_index=True,
                          column_config=config, disabled=locked(), on_change=_commit_table,
                          args=(path, key, columns, template), width="stretch")
    field_titles = {c.field: c.title for c in columns if c.field}
    for problem_path, message in problems.take(path):
        rest = problem_path[len(path):]
        match = re.match(r"\[(\d+)\]\.?(.*)", rest)
        if match:
            i = int(match.group(1))
            field = match.group(2)
            name = row_name(items[i], i) if row_name and i < len(items) and isinstance(items[i], dict) else f"row {i + 1}"
            field_text = field_titles.get(field.split(".")[0].split("[")[0], field) if field else ""
            container.error(f"**{title or 'table'}, row {i + 1}** ({escaped(name)})"
                            + (f", **{escaped(field_text)}**" if field_text else "")
                            + f": {escaped(message)}  \n{escaped(problem_path)}", icon="⚠️")
        else:
            container.error(f"**{title or 'table'}**: {escaped(message)}  \n{escaped(problem_path)}", icon="⚠️")


# -- route segments

def _insulation_get(item):
    layers = item.get("insulation") or []
    if not layers:
        return "none"
    first = layers[0]
    return first.get("material") or "own conductivity"


def _insulation_put(item, value):
    layers = item.get("insulation") or []
    if value in (None, "none"):
        item["insulation"] = []
    elif value == "own conductivity":
        return
    elif layers:
        layers[0]["material"] = value
        layers[0].pop("conductivity", None)
        item["insulation"] = layers
    else:
        item["insulation"] = [{"material": value, "thickness": 50.0}]


def _thickness_get(item):
    layers = item.get("insulation") or []
    return layers[0].get("thickness") if layers else None


def _thickness_put(item, value):
    layers = item.get("insulation") or []
    if value is None:
        item["insulation"] = layers[1:]
    elif layers:
        layers[0]["thickness"] = value
        item["insulation"] = layers
    else:
        item["insulation"] = [{"material": "mineral_wool", "thickness": value}]


def _location_get(item):
    return (item.get("surroundings") or {}).get("location", "outdoor")


def _location_put(item, value):
    item.setdefault("surroundings", {})["location"] = value or "outdoor"


def _fittings_text(item):
    fittings = item.get("fittings") or []
    return ", ".join(f"{f.get('count', 1)}× {f.get('type', '?')}" for f in fittings)


def _layers_note(item):
    layers = item.get("insulation") or []
    return f"+{len(layers) - 1} more layer(s)" if len(layers) > 1 else ""


SEGMENT_COLUMNS = (
    Col("Name", _key_get("name"), _key_put("name"), type="text", field="name"),
    Col("Kind", lambda i: i.get("kind", "pipe"), _key_put("kind"), type="select", options=field_choices(Segment, "kind"),
        field="kind"),
    Col("NPS", lambda i: None if i.get("nps") is None else str(i.get("nps")), _key_put("nps"), type="text", field="nps",
        help="nominal pipe size, e.g. 4 or 1-1/2; leave empty and give the inside diameter instead"),
    Col("Schedule", _key_get("schedule"), _key_put("schedule"), type="text", field="schedule", help="e.g. 40, 80, 10S"),
    Col("Inside diameter", _key_get("inside_diameter"), _key_put("inside_diameter"), kind="small_length",
        field="inside_diameter", help="hoses, arms and pipes given by bore (leave NPS empty)"),
    Col("Length", _key_get("length"), _key_put("length"), kind="length", field="length"),
    Col("Rise", _key_get("elevation_change"), _key_put("elevation_change"), kind="length", field="elevation_change",
        help="outlet height minus inlet height (negative: falls)"),
    Col("Insulation", _insulation_get, _insulation_put, type="select",
        options=tuple(["none"] + sorted(INSULATION_MATERIALS) + ["own conductivity"]), field="insulation"),
    Col("Insulation thickness", _thickness_get, _thickness_put, kind="small_length", field="insulation"),
    Col("Traced", lambda i: i.get("traced", True), _key_put("traced"), type="bool", field="traced"),
    Col("Untraced gaps", _key_get("untraced_length"), _key_put("untraced_length"), kind="length", field="untraced_length",
        help="flanges, valves and supports left without tracing"),
    Col("Rating", _key_get("pressure_rating"), _key_put("pressure_rating"), kind="pressure", field="pressure_rating",
        help="MAWP of the pipe, hose or arm (gauge); hoses and arms need one"),
    Col("Flange class", _key_get("flange_class"), _key_put("flange_class"), type="select",
        options=field_choices(Segment, "flange_class"), field="flange_class", help="ASME B16.5 class; empty: none",
        format_func=lambda c: f"class {c}"),
    Col("Location", _location_get, _location_put, type="select", options=field_choices(Surroundings, "location"),
        field="surroundings"),
    Col("Fittings", _fittings_text, None, type="readonly", field="fittings", help="edit fittings in the scenario file"),
    Col("More layers", _layers_note, None, type="readonly"),
)


def _new_segment(items: list) -> dict:
    if items and isinstance(items[-1], dict):
        item = copy.deepcopy(items[-1])
        item["fittings"] = []
        item["elevation_change"] = 0.0
        item["untraced_length"] = 0.0
    else:
        item = {"kind": "pipe", "nps": "4", "schedule": "40", "insulation": [{"material": "mineral_wool", "thickness": 50.0}],
                "traced": True}
    item["name"] = f"Segment {len(items) + 1}"
    item["length"] = 10.0
    return item


LAB_POINT_COLUMNS = (
    Col("Temperature", _key_get("temperature"), _key_put("temperature"), kind="temperature", field="temperature"),
    Col("Viscosity μ", _key_get("viscosity"), _key_put("viscosity"), kind="dynamic_viscosity", field="viscosity",
        help="dynamic viscosity; or give the kinematic viscosity instead"),
    Col("Kinematic ν", _key_get("kinematic_viscosity"), _key_put("kinematic_viscosity"),
        kind="kinematic_viscosity", field="kinematic_viscosity", help="kinematic viscosity (oils); or give μ"),
)

CURVE_COLUMNS = (
    Col("Flow", _key_get("flow"), _key_put("flow"), kind="volume_flow", field="flow"),
    Col("Head", _key_get("head"), _key_put("head"), kind="length", field="head"),
    Col("Efficiency", _key_get("efficiency"), _key_put("efficiency"), field="efficiency", help="on water, 0 to 1"),
)


# ------------------------------------------------------------------------------------------ sections

def _change_preset(key: str) -> None:
    choice = st.session_state.get(key)
    data = work()
    product = data.get("product") or {}
    if choice == OWN_PRODUCT:
        try:
            full = ProductSpec.model_validate(product).model_dump(mode="json", exclude_none=True)
        except Exception:  # noqa: BLE001  (invalid product: keep what is there)
            full = dict(product)
        full.pop("preset", None)
        full["illustrative"] = False
        data["product"] = full
    else:
        data["product"] = ProductSpec.model_validate({"preset": choice}).model_dump(mode="json", exclude_none=True)
    st.session_state["gen"] = st.session_state.get("gen", 0) + 1


def product_section(c, problems: Problems) -> None:
    product = work().get("product") or {}
    options = sorted(PRODUCT_PRESETS) + [OWN_PRODUCT]
    current = product.get("preset") if product.get("preset") in PRODUCT_PRESETS else OWN_PRODUCT
    key = _wkey("product.preset")
    c.selectbox("Product", options, index=options.index(current), key=key, on_change=_change_preset, args=(key,),
                format_func=lambda k: PRODUCT_PRESETS[k]["name"] if k in PRODUCT_PRESETS else k,
                disabled=locked(),
                help="a preset (illustrative figures) or your own lab data; fields edited below override the preset")
    show_problems(c, problems, "product.preset", "Product")
    if product.get("illustrative"):
        c.info("Preset figures are illustrative, not a data sheet: enter your product's lab data before a real transfer.")
    left, right = c.columns([6, 5])
    text(left, problems, "product.name", "Product name")
    select(left, problems, "product.viscosity.law", "Viscosity law", field_choices(ViscositySpec, "law"),
           help="andrade: 2+ points; vft: 3+ points; walther (ASTM D341, oils): 2+ points")
    table(left, problems, "product.viscosity.points", "Lab points", LAB_POINT_COLUMNS, lambda items: {},
          row_name=lambda item, i: f"point {i + 1}", help="one viscosity per row, dynamic or kinematic")
    show_problems(left, problems, "product.viscosity", "Viscosity")
    curve, _ = product_preview(product)
    if curve is not None:
        right.plotly_chart(figures.viscosity_figure(curve, system(), height=380, compact=True),
                           key="product_preview_chart")
        right.caption(escaped(f"Fitted {words(curve['law'])} law ({law_parameters_text(curve)}); "
                            f"{fit_quality_text(curve)}. Outside the shaded range the law is extrapolated."))
    else:
        right.info("The curve appears when the product's fields are valid (see the messages on the left).")
    a, b, d = c.columns(3)
    number(a, problems, "product.density", "Density", "density")
    number(a, problems, "product.density_reference_temperature", "Density measured at", "temperature")
    number(a, problems, "product.specific_heat", "Specific heat", "specific_heat")
    number(b, problems, "product.thermal_conductivity", "Thermal conductivity", "conductivity")
    number(b, problems, "product.no_flow_temperature", "No-flow temperature", "temperature",
           help="pour, setting or crystallisation temperature")
    number(b, problems, "product.max_temperature", "Highest allowed temperature", "temperature")
    number(d, problems, "product.flash_point", "Flash point (if any)", "temperature")
    select(d, problems, "product.rheology", "Rheology", field_choices(ProductSpec, "rheology"))
    if product.get("rheology", "newtonian") != "newtonian":
        number(d, problems, "product.flow_index", "Flow index n", None)
        number(d, problems, "product.yield_stress", "Yield stress", "yield_stress")


def route_section(c, problems: Problems) -> None:
    select(c, problems, "route.fitting_method", "Fittings method", field_choices(Route, "fitting_method"),
           help="Hooper 2-K or Darby 3-K loss coefficients")
    table(c, problems, "route.segments", "Discharge route (pump to destination)", SEGMENT_COLUMNS, _new_segment,
          row_name=lambda item, i: item.get("name") or f"segment {i + 1}",
          help="add a row at the bottom, delete with the row's checkbox")
    if work().get("suction") is not None:
        table(c, problems, "suction.segments", "Suction route (source to pump)", SEGMENT_COLUMNS, _new_segment,
              row_name=lambda item, i: item.get("name") or f"segment {i + 1}")
    else:
        c.caption("No suction route: the pump sits at the source outlet.")
    show_problems(c, problems, "route", "Discharge route")
    show_problems(c, problems, "suction", "Suction route")


def tracing_section(c, problems: Problems) -> None:
    tracing = work().get("tracing") or {}
    kind = tracing.get("kind", "none")
    a, b = c.columns(2)
    select(a, problems, "tracing.kind", "Tracing", field_choices(Tracing, "kind"))
    number(a, problems, "tracing.setpoint", "Setpoint" + (" (optional for steam)" if kind == "steam" else ""),
           "temperature", help="thermostat setpoint on the pipe wall")
    if kind in ("electric_constant", "electric_self_regulating"):
        number(a, problems, "tracing.output", "Heater output" + (" at 10 °C pipe" if kind == "electric_self_regulating" else ""),
               "linear_power")
    if kind == "electric_self_regulating":
        number(b, problems, "tracing.zero_output_temperature", "Pipe temperature of zero output", "temperature")
    if kind == "steam":
        number(a, problems, "tracing.steam_pressure", "Steam pressure (gauge)", "pressure")
        checkbox(b, problems, "tracing.heat_transfer_cement", "Heat-transfer cement")
    if kind != "none":
        number(b, problems, "tracing.circuits_per_metre", "Runs per metre of pipe", None, decimals=1)
        number(b, problems, "tracing.max_exposure_temperature", "Heater's maximum exposure temperature", "temperature")
    show_problems(c, problems, "tracing", "Tracing")


def pump_section(c, problems: Problems) -> None:
    pump = work().get("pump")
    if pump is None:
        c.warning("The scenario has no pump: the plan needs one (add a [pump] table to the file).")
        show_problems(c, problems, "pump", "Pump")
        return
    a, b = c.columns(2)
    select(a, problems, "pump.kind", "Pump type", field_choices(PumpSpec, "kind"))
    text(a, problems, "pump.name", "Pump name")
    number(a, problems, "pump.speed", "Speed", "rotational_speed")
    number(a, problems, "pump.max_speed", "Highest speed (optional)", "rotational_speed")
    number(b, problems, "pump.motor_power", "Motor power", "power")
    number(b, problems, "pump.npsh_required", "NPSH required", "length")
    select(b, problems, "pump.control", "Control", field_choices(PumpSpec, "control"))
    if pump.get("control") == "fixed_flow":
        number(b, problems, "pump.flow_setpoint", "Flow setpoint", "volume_flow")
    if pump.get("kind") == "centrifugal":
        table(c, problems, "pump.curve", "Water curve (first point at zero flow)", CURVE_COLUMNS, lambda items: {},
              row_name=lambda item, i: f"point {i + 1}")
    else:
        number(a, problems, "pump.displacement", "Displacement per revolution", "displacement")
        number(b, problems, "pump.slip_flow", "Slip at the reference pressure and viscosity", "volume_flow")
        number(b, problems, "pump.relief_setting", "Relief valve setting (differential)", "pressure")
        number(a, problems, "pump.mechanical_efficiency", "Mechanical efficiency", None, decimals=2)
    show_problems(c, problems, "pump", "Pump")


def vessels_section(c, problems: Problems) -> None:
    a, b = c.columns(2)
    a.markdown("**Source**")
    source = work().get("source") or {}
    select(a, problems, "source.kind", "Source", field_choices(Vessel, "kind"))
    text(a, problems, "source.name", "Source name")
    select(a, problems, "source.shape", "Shape", field_choices(Vessel, "shape"))
    shape = source.get("shape", "vertical_cylinder")
    if shape in ("horizontal_cylinder", "vertical_cylinder"):
        number(a, problems, "source.diameter", "Diameter", "length")
    if shape in ("horizontal_cylinder", "box"):
        number(a, problems, "source.length", "Length", "length")
    if shape == "box":
        number(a, problems, "source.width", "Width", "length")
    number(a, problems, "source.initial_volume", "Volume in the source", "volume")
    number(a, problems, "source.volume_to_move", "Volume to move", "volume")
    number(a, problems, "source.temperature", "Product temperature in the source", "temperature")
    number(a, problems, "source.outlet_height", "Source bottom above the suction inlet", "length")
    number(a, problems, "source.heat_loss_coefficient", "Shell heat-loss coefficient", "heat_transfer_coefficient")
    number(a, problems, "source.heating_power", "Heating while unloading", "power")
    select(a, problems, "source.heating_medium", "Heating medium", field_choices(Vessel, "heating_medium"))
    if get_path(work(), "source.heating_medium") == "electric":
        number(a, problems, "source.heating_limit_temperature", "Heating cut-out temperature", "temperature",
               help="the contents are not heated past this; empty: the product's maximum")
    else:
        number(a, problems, "source.heating_steam_pressure", "Coil steam pressure (gauge)", "pressure",
               help="the contents are not heated past its saturation temperature; empty: the tracing's steam, else 3.5 bar")
    show_problems(a, problems, "source", "Source")
    b.markdown("**Destination**")
    text(b, problems, "destination.name", "Destination name")
    number(b, problems, "destination.diameter", "Tank diameter", "length")
    number(b, problems, "destination.initial_level", "Level at the start", "length")
    number(b, problems, "destination.max_level", "Highest allowed level", "length")
    select(b, problems, "destination.inlet", "Inlet", field_choices(Destination, "inlet"))
    show_problems(b, problems, "destination", "Destination")


def site_section(c, problems: Problems) -> None:
    a, b = c.columns(2)
    a.markdown("**Site and weather**")
    number(a, problems, "site.ambient_temperature", "Ambient temperature", "temperature")
    number(a, problems, "site.wind_speed", "Wind speed", "speed")
    number(a, problems, "site.design_ambient_temperature", "Design (coldest) ambient", "temperature",
           help="the coldest ambient the plan must hold at; empty: the ambient")
    show_problems(a, problems, "site", "Site")
    b.markdown("**Limits of the checks**")
    number(b, problems, "limits.touch_temperature", "Touch limit for jackets", "temperature")
    number(b, problems, "limits.npsh_margin", "NPSH margin wanted", "length")
    number(b, problems, "limits.max_velocity", "Highest line velocity", "speed")
    show_problems(b, problems, "limits", "Limits")


def costs_section(c, problems: Problems) -> None:
    a, b = c.columns(2)
    a.markdown("**Tariffs and demurrage**")
    text(a, problems, "costs.currency", "Currency")
    number(a, problems, "costs.electricity_per_kwh", "Electricity per kWh", None, decimals=3)
    number(a, problems, "costs.steam_per_tonne", "Steam per tonne", None, decimals=2)
    number(a, problems, "costs.demurrage_per_hour", "Demurrage per hour", None, decimals=2)
    show_problems(a, problems, "costs", "Costs")
    b.markdown("**Planned window and start-up**")
    number(b, problems, "schedule.planned_window", "Planned window", "time")
    select(b, problems, "schedule.start_mode", "Start-up", field_choices(Schedule, "start_mode"))
    number(b, problems, "schedule.line_start_temperature", "Line contents at the start", "temperature",
           help="empty: the design ambient")
    number(b, problems, "schedule.stop_duration", "Stop to check restart for", "time")
    show_problems(b, problems, "schedule", "Schedule")


SECTIONS = [
    # (tab title, problem prefixes, renderer)
    ("Product", ("product",), product_section),
    ("Route", ("route", "suction"), route_section),
    ("Tracing", ("tracing",), tracing_section),
    ("Pump", ("pump",), pump_section),
    ("Source & destination", ("source", "destination"), vessels_section),
    ("Site & limits", ("site", "limits"), site_section),
    ("Costs & schedule", ("costs", "schedule"), costs_section),
]


SECTION_KEY = "input_section"


def _section_label(title: str, problems: Problems, prefixes: tuple) -> str:
    n = sum(problems.count(p) for p in prefixes)
    return f"⚠️ {title} ({n})" if n else title


def _open_section() -> str:
    """The title of the sub-tab open in the last run (its label may have gained or lost a warning)."""
    shown = str(st.session_state.get(SECTION_KEY) or "")
    for title, _, _ in SECTIONS:
        if shown == title or shown.startswith(f"⚠️ {title} ("):
            return title
    return SECTIONS[0][0]


def render_inputs(container, problems: Problems) -> None:
    """The input sections as sub-tabs (only the open one runs); a sub-tab whose fields have problems
    carries a warning sign and the count.  The open sub-tab stays open when its label changes (an
    invalid value adds the warning), so the message stays in view beside its field."""
    labels = [_section_label(title, problems, prefixes) for title, prefixes, _ in SECTIONS]
    current = _open_section()
    default = labels[[title for title, _, _ in SECTIONS].index(current)]
    tabs = container.tabs(labels, key=SECTION_KEY, default=default, on_change="rerun")
    for tab, (_, _, renderer) in zip(tabs, SECTIONS):
        if tab.open is not False:
            renderer(tab, problems)
    prefixes = [prefix for _, section_prefixes, _ in SECTIONS for prefix in section_prefixes]
    rest = [(p, m) for p, m in problems.rest() if not any(_under(p, prefix) for prefix in prefixes)]
    if rest:
        container.error("Other problems in the scenario:  \n" + "  \n".join(
            f"{escaped(p or '(file)')}: {escaped(m)}" for p, m in rest))
