"""Editable tables of the inputs (route segments, lab points, the pump curve): rows of the working
scenario dict in display units, written back on change, with each row's problems beside the table."""

from __future__ import annotations

import copy
import math
import re
from dataclasses import dataclass
from typing import Any, Callable

import pandas as pd
import streamlit as st

from planner.correlations.materials import INSULATION_MATERIALS
from planner.errors import shortened
from planner.scenario.labels import TABLES
from planner.scenario.schema import Segment, Surroundings, field_choices, field_constraints

from dashboard.present.display import display_string, stored_to_si, to_display, with_unit, words
from dashboard.present.plaintext import escaped

from .fields import FORMATS, Problems, get_path, locked, set_path, system, work

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
    limits: dict | None = None     # the schema's bounds of a plain number (``field_constraints``)

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


WIDE_TABLE_COLUMNS = 8       # more columns than a page shows at once: the page says how to reach the rest


def wide_table_hint(headings: list[str]) -> str:
    """The hint over a table wider than the page: how many columns, which ones lie to the right."""
    return (f"{len(headings)} columns — scroll the table sideways (or widen it with its full-screen button) for "
            f"the rest, up to {escaped(', '.join(headings[-4:]))}; hover a column title for what it means.")


def _text_limit(path: str, field: str) -> int | None:
    """The schema's most characters of a text column (``field_constraints``), None when it has none."""
    try:
        return field_constraints(f"{path}[0].{field}").get("max_length") if field else None
    except (KeyError, AttributeError):
        return None


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
            bounds = col.limits or {}
            config[heading] = st.column_config.NumberColumn(heading, help=col.help or None, width="small",
                                                            format=f"%.{FORMATS.get(col.kind, 3)}f",
                                                            min_value=bounds.get("ge"), max_value=bounds.get("le"))
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
            config[heading] = st.column_config.TextColumn(heading, help=col.help or None,
                                                          max_chars=_text_limit(path, col.field))
    generation = st.session_state.get("table_gen", {}).get(path, 0)
    key = f"tb{st.session_state.get('gen', 0)}|{unit_system}|{path}|{generation}"
    if title:
        container.markdown(f"**{title}**" + (f" — {help}" if help else ""))
    if len(columns) > WIDE_TABLE_COLUMNS:
        container.caption(wide_table_hint(headings))
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
            container.error(f"**{title or 'table'}, row {i + 1}** ({escaped(shortened(name))})"
                            + (f", **{escaped(field_text)}**" if field_text else "")
                            + f": {escaped(message)}  \n{escaped(problem_path)}", icon=":material/warning:")
        else:
            container.error(f"**{title or 'table'}**: {escaped(message)}  \n{escaped(problem_path)}", icon=":material/warning:")


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
    return ", ".join(f"{f.get('count', 1)}× {words(f.get('type', '?'))}" for f in fittings)


def _layers_note(item):
    layers = item.get("insulation") or []
    return f"+{len(layers) - 1} more layer(s)" if len(layers) > 1 else ""


_SEG = TABLES["route.segments"][1]           # the column titles error messages use (planner/scenario/labels)
_SEG_LIMITS = {"jacket_emissivity": field_constraints("route.segments[0].jacket_emissivity")}

SEGMENT_COLUMNS = (
    Col(_SEG["name"], _key_get("name"), _key_put("name"), type="text", field="name"),
    Col(_SEG["kind"], lambda i: i.get("kind", "pipe"), _key_put("kind"), type="select",
        options=field_choices(Segment, "kind"), field="kind"),
    Col(_SEG["nps"], lambda i: None if i.get("nps") is None else str(i.get("nps")), _key_put("nps"), type="text",
        field="nps", help="nominal pipe size, e.g. 4 or 1-1/2; leave empty and give the inside diameter instead"),
    Col(_SEG["schedule"], _key_get("schedule"), _key_put("schedule"), type="text", field="schedule",
        help="e.g. 40, 80, 10S"),
    Col(_SEG["inside_diameter"], _key_get("inside_diameter"), _key_put("inside_diameter"), kind="small_length",
        field="inside_diameter", help="hoses, arms and pipes given by bore (leave NPS empty)"),
    Col(_SEG["wall_thickness"], _key_get("wall_thickness"), _key_put("wall_thickness"), kind="small_length",
        field="wall_thickness", help="only for a segment given by its inside diameter (an NPS segment takes its "
                                     "schedule's wall); empty: the kind's usual wall"),
    Col(_SEG["length"], _key_get("length"), _key_put("length"), kind="length", field="length"),
    Col(_SEG["elevation_change"], _key_get("elevation_change"), _key_put("elevation_change"), kind="length",
        field="elevation_change", help="outlet height minus inlet height (negative: falls)"),
    Col(_SEG["insulation"], _insulation_get, _insulation_put, type="select",
        options=tuple(["none"] + sorted(INSULATION_MATERIALS) + ["own conductivity"]), field="insulation"),
    Col("Insulation thickness", _thickness_get, _thickness_put, kind="small_length", field="insulation"),
    Col(_SEG["jacket_emissivity"], _key_get("jacket_emissivity"), _key_put("jacket_emissivity"),
        field="jacket_emissivity", limits=_SEG_LIMITS["jacket_emissivity"],
        help=f"of the outer surface (bare steel or jacket); empty: {Segment.model_fields['jacket_emissivity'].default:g}"),
    Col(_SEG["traced"], lambda i: i.get("traced", True), _key_put("traced"), type="bool", field="traced"),
    Col(_SEG["untraced_length"], _key_get("untraced_length"), _key_put("untraced_length"), kind="length",
        field="untraced_length", help="flanges, valves and supports left without tracing"),
    Col(_SEG["pressure_rating"], _key_get("pressure_rating"), _key_put("pressure_rating"), kind="pressure",
        field="pressure_rating", help="MAWP of the pipe, hose or arm (gauge); hoses and arms need one"),
    Col(_SEG["flange_class"], _key_get("flange_class"), _key_put("flange_class"), type="select",
        options=field_choices(Segment, "flange_class"), field="flange_class", help="ASME B16.5 class; empty: none",
        format_func=lambda c: f"class {c}"),
    Col(_SEG["hazardous_area_class"], _key_get("hazardous_area_class"), _key_put("hazardous_area_class"),
        type="select", options=field_choices(Segment, "hazardous_area_class"), field="hazardous_area_class",
        help="hazardous-area temperature class (IEC 60079-0) where the segment runs; the heater and jacket "
             "temperatures are checked against it; empty: not a hazardous area", format_func=str),
    Col(_SEG["surroundings"], _location_get, _location_put, type="select",
        options=field_choices(Surroundings, "location"), field="surroundings"),
    Col(_SEG["fittings"], _fittings_text, None, type="readonly", field="fittings",
        help="edit fittings in the scenario file"),
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


