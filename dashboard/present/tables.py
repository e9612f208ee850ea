"""Tables (pandas) of results in display units, shared by the pages, the report and the CSV exports.

Column titles carry their units in brackets; no Streamlit here.  pandas is imported by the functions that
build a frame: the Plan view (the first page) draws its tables from the ``*_rows`` as markdown, without it.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np

from .display import convert_array, fmt, label, number_text, to_display, with_unit, words
from planner.checks.finding import MOST_SEVERE_FIRST
from planner.reports.findings_text import finding_details as _finding_details
from planner.scenario.wording import DECIMALS, money_text, render
from planner.transfer.hold_words import hours_text

if TYPE_CHECKING:
    import pandas as pd


TIMELINE_COLUMNS = [
    # key of plan_json timeline.arrays, title, kind
    ("time_s", "Time", "time"),
    ("moved_m3", "Moved", "volume"),
    ("flow_m3_s", "Flow", "volume_flow"),
    ("source_temperature_k", "Source temperature", "temperature"),
    ("pump_inlet_temperature_k", "Pump inlet temperature", "temperature"),
    ("outlet_temperature_k", "Outlet temperature", "temperature"),
    ("suction_pressure_pa", "Suction pressure", "pressure"),
    ("discharge_pressure_pa", "Discharge pressure", "pressure"),
    ("pump_differential_pa", "Pump differential", "pressure"),
    ("max_line_pressure_pa", "Highest line pressure", "pressure"),
    ("shaft_power_w", "Shaft power", "power"),
    ("npsh_available_m", "NPSH available", "head"),
    ("trace_power_w", "Trace power", "heat_rate"),
    ("source_level_m", "Source level", "length"),
    ("destination_level_m", "Destination level", "length"),
    ("ambient_temperature_k", "Ambient temperature", "temperature"),
    ("wind_speed_m_s", "Wind speed", "speed"),
]

PUSH_COLD_COLUMNS = [
    ("time_s", "Time", "time"),
    ("volume_fraction", "Line volume pushed out", None),
    ("flow_m3_s", "Flow", "volume_flow"),
    ("discharge_pressure_pa", "Discharge pressure", "pressure"),
    ("pump_differential_pa", "Pump differential", "pressure"),
    ("status", "Pump outcome", None),
]

STEP_COLUMNS = [
    ("viscosity", "Viscosity", "dynamic_viscosity"),
    ("kinematic_viscosity", "Kinematic viscosity", "kinematic_viscosity"),
    ("reynolds", "Reynolds number", None),
    ("wall_temperature", "Wall temperature", "temperature"),
    ("jacket_temperature", "Jacket temperature", "temperature"),
    ("sheath_temperature", "Heater/tracer temperature", "temperature"),
    ("heat_loss", "Heat loss", "linear_power"),
    ("trace_power", "Trace power", "linear_power"),
]


def _column(values, kind, system):
    if kind is None:
        return list(values)
    array = np.array([math.nan if v is None else v for v in values], dtype=float)
    return convert_array(array, kind, system)


# A table's number columns are shown at the display decimals of their quantity (``wording.DECIMALS``, as the text
# outputs show the same figures), kept on the frame (``frame.attrs["decimals"]``: column -> decimals) for the
# page's ``data_table`` and the report.  Positions along a line keep centimetres (the steps near a thermal
# entrance are a few centimetres long: at whole metres they would read as one place), and inside diameters
# two decimals (6.07 in, 154.08 mm: a schedule's wall is told by them).
TABLE_DECIMALS = {**DECIMALS, "length": 2, "small_length": 2, None: 1}


def with_decimals(frame: pd.DataFrame, columns: dict[str, str | None]) -> pd.DataFrame:
    """``frame`` with the decimals of its number columns (title -> quantity kind, None: a plain number) kept."""
    frame.attrs["decimals"] = {title: TABLE_DECIMALS.get(kind, 2) for title, kind in columns.items() if title in frame}
    return frame


def timeline_frame(plan: dict, system: str) -> pd.DataFrame:
    import pandas as pd

    arrays = plan["timeline"].get("arrays") or {}
    data, kinds = {}, {}
    for key, title, kind in TIMELINE_COLUMNS:
        if key in arrays:
            heading = with_unit(title, kind, system)
            data[heading], kinds[heading] = _column(arrays[key], kind, system), kind
    return with_decimals(pd.DataFrame(data), kinds)


def push_cold_frame(rows: dict, system: str) -> pd.DataFrame:
    import pandas as pd

    data, kinds = {}, {}
    for key, title, kind in PUSH_COLD_COLUMNS:
        if key in rows:
            values = rows[key]
            if key == "volume_fraction":
                data[f"{title} [%]"], kinds[f"{title} [%]"] = [100.0 * v for v in values], None
            elif key == "status":
                data[title] = [words(v) for v in values]
            else:
                heading = with_unit(title, kind, system)
                data[heading], kinds[heading] = _column(values, kind, system), kind
    return with_decimals(pd.DataFrame(data), kinds)


def _segment_names(x, segments: list[dict]) -> list[str]:
    names = []
    for xi in x:
        name = ""
        for s in segments:
            if s["x_start"] - 1e-9 <= xi <= s["x_end"] + 1e-9:
                name = s["name"]
                break
        names.append(name)
    return names


def profile_frame(profile: dict, segments: list[dict], system: str) -> pd.DataFrame:
    """Nodes (step ends: bulk temperature, pressure) and step midpoints (the rest) in one table,
    sorted by distance; a node row leaves the mid-step columns empty and the other way round."""
    import pandas as pd

    nodes, steps = profile["nodes"], profile["steps"]
    x_title = with_unit("Distance from pump", "length", system)
    node_part = pd.DataFrame({
        x_title: convert_array(nodes["x"], "length", system),
        "Point": "step end",
        "Segment": _segment_names(nodes["x"], segments),
        with_unit("Bulk temperature", "temperature", system): convert_array(nodes["temperature"], "temperature", system),
        with_unit("Pressure (gauge)", "pressure", system): convert_array(nodes["pressure"], "pressure", system),
    })
    names = [segments[int(i)]["name"] if 0 <= int(i) < len(segments) else "" for i in steps.get("segment", [])]
    step_data = {x_title: convert_array(steps["x"], "length", system), "Point": "mid-step", "Segment": names}
    kinds = {x_title: "length", with_unit("Bulk temperature", "temperature", system): "temperature",
             with_unit("Pressure (gauge)", "pressure", system): "pressure"}
    for key, title, kind in STEP_COLUMNS:
        if key in steps:
            heading = with_unit(title, kind, system)
            step_data[heading], kinds[heading] = _column(steps[key], kind, system), kind
    step_part = pd.DataFrame(step_data)
    frame = pd.concat([node_part, step_part], ignore_index=True, sort=False)
    return with_decimals(frame.sort_values([x_title, "Point"], kind="stable").reset_index(drop=True), kinds)


def segments_frame(segments: list[dict], system: str) -> pd.DataFrame:
    import pandas as pd

    frame = pd.DataFrame({
        "#": [s["index"] + 1 for s in segments],
        "Segment": [s["name"] for s in segments],
        "Kind": [words(s["kind"]) for s in segments],
        with_unit("From", "length", system): [to_display(s["x_start"], "length", system) for s in segments],
        with_unit("To", "length", system): [to_display(s["x_end"], "length", system) for s in segments],
        with_unit("Inside diameter", "small_length", system): [to_display(s["inside_diameter"], "small_length", system) for s in segments],
        "Traced": [words(bool(s["traced"])) for s in segments],
        with_unit("Rating", "pressure", system): [number_text(to_display(s["pressure_rating"], "pressure", system), 2)
                                                  if s["pressure_rating"] is not None else "none given" for s in segments],
        "Flange class": [f"class {s['flange_class']}" if s["flange_class"] else "none given" for s in segments],
        "Location": [words(s["location"]) for s in segments],
    })
    return with_decimals(frame, {with_unit("From", "length", system): "length", with_unit("To", "length", system): "length",
                                 with_unit("Inside diameter", "small_length", system): "small_length"})


def finding_details(finding: dict, system: str) -> list[str]:
    """The lines under a finding's heading in display units (``planner.reports.findings_text``): where,
    value and limit, what to do.  Shared by the page and the HTML report."""
    return _finding_details(finding, system)


ENERGY_COST_COLUMNS = ("Item", "Amount")
STARTUP_HOLD_COLUMNS = ("Item", "Value")


def energy_cost_rows(plan: dict, system: str) -> list[tuple[str, str]]:
    """The Plan view's energy and cost table (columns ``ENERGY_COST_COLUMNS``), as rows of text."""
    e, c = plan["energy"], plan["costs"]
    cur = c.get("currency", "")
    kwh = label("energy", system)
    rows = [
        ("Tracing electricity", f"{number_text(e.get('tracing_kwh'), 1)} {kwh}"),
        ("Tracing steam", fmt(e.get("tracing_steam_kg"), "mass", system)),
        ("Pump electricity", f"{number_text(e.get('pump_kwh'), 1)} {kwh}"),
        ("Vessel heating electricity", f"{number_text(e.get('vessel_heating_kwh'), 1)} {kwh}"),
        ("Vessel heating steam", fmt(e.get("vessel_heating_steam_kg"), "mass", system)),
        ("Electricity cost", money_text(c.get("electricity"), cur)),
        ("Steam cost", money_text(c.get("steam"), cur)),
        (f"Demurrage ({number_text(c.get('demurrage_hours'), 2)} h)", money_text(c.get("demurrage"), cur)),
        ("Total cost", money_text(c.get("total"), cur)),
    ]
    return rows


def energy_cost_frame(plan: dict, system: str) -> pd.DataFrame:
    import pandas as pd

    return pd.DataFrame(energy_cost_rows(plan, system), columns=list(ENERGY_COST_COLUMNS))


def startup_hold_rows(plan: dict, system: str) -> list[tuple[str, str]]:
    """The Plan view's start-up and stops table (columns ``STARTUP_HOLD_COLUMNS``), as rows of text."""
    s, h = plan["startup"], plan["hold"]
    warm, cold = s.get("prewarm") or {}, s.get("push_cold") or {}
    rows = [
        ("Start-up chosen", f"{words(s.get('mode'))}: {fmt(s.get('time_s'), 'time', system)}"),
        ("Line contents at the start", fmt(s.get("line_start_temperature_k"), "temperature", system)),
        ("Pre-warm", render(warm.get("message", ""), system)),
        ("Push cold: first flow", fmt(cold.get("initial_flow_m3_s"), "volume_flow", system)),
        ("Push cold: peak discharge pressure", fmt(cold.get("peak_discharge_pressure_pa"), "pressure", system)),
        ("Push cold: relief lifts", "yes" if cold.get("relief_lifts") else "no"),
        ("Stop limit", f"{fmt(h.get('limit_temperature_k'), 'temperature', system)} ({h.get('limit_reason', '')})"),
        ("Time to limit, tracing on", f"{hours_text(h.get('time_to_limit_traced_s'), system)} ({h.get('first_to_set_traced', '')})"),
        ("Time to limit, tracing failed", f"{hours_text(h.get('time_to_limit_failed_s'), system)} ({h.get('first_to_set_failed', '')})"),
        ("Restart after the planned stop, tracing on", "yes" if h.get("restart_after_stop_traced") else "NO"),
        ("Restart after the planned stop, tracing failed", "yes" if h.get("restart_after_stop_failed") else "NO"),
    ]
    if (h.get("gelled_restart_pressure_pa") or 0) > 0:
        rows.append(("Gelled restart pressure", fmt(h["gelled_restart_pressure_pa"], "pressure", system)))
    return rows


def startup_hold_frame(plan: dict, system: str) -> pd.DataFrame:
    import pandas as pd

    return pd.DataFrame(startup_hold_rows(plan, system), columns=list(STARTUP_HOLD_COLUMNS))


def comparison_currency(comparison: dict) -> str:
    """The scenario's currency (``costs.currency``) of a comparison, for column and axis titles."""
    return comparison.get("currency") or next((r["currency"] for r in comparison.get("rows", []) if r.get("currency")),
                                              "") or "cost"


def comparison_frame(comparison: dict, kind: str, system: str) -> pd.DataFrame:
    import pandas as pd

    currency = comparison_currency(comparison)
    rows = []
    for i, r in enumerate(comparison["rows"]):
        counts = r.get("counts") or {}
        mark = ""
        if i == comparison.get("recommended"):
            mark = "★"
        elif i == comparison.get("runner_up"):
            mark = "2nd"
        if i != comparison.get("recommended") and i in comparison.get("tied", []):
            mark = "≈ " + mark if mark else "≈"     # no clear difference in cost from the recommended row
        rows.append({
            "": mark,
            with_unit(comparison.get("lever_label", "Value"), kind, system): to_display(r.get("value"), kind, system),
            with_unit("Start-up + transfer", "time", system): to_display(r.get("total_time_s"), "time", system),
            with_unit("Transfer", "time", system): to_display(r.get("transfer_time_s"), "time", system),
            f"Energy cost [{currency}]": r.get("energy_cost"),
            f"Total cost [{currency}]": r.get("total_cost"),
            with_unit("Peak pressure", "pressure", system): to_display(r.get("peak_pressure_pa"), "pressure", system),
            with_unit("Hottest jacket", "temperature", system): to_display(r.get("hottest_jacket_k"), "temperature", system),
            "Findings": ", ".join(f"{counts[s]} {s}" for s in MOST_SEVERE_FIRST if counts.get(s)) or "none",
            "Stop": "STOP" if r.get("has_stop") else "no",
        })
    return pd.DataFrame(rows)


def csv_text(frame: pd.DataFrame) -> str:
    return frame.to_csv(index=False)


def timeline_csv(plan: dict, system: str, scenario_name: str, now: str | None = None) -> str:
    """The timeline as a CSV file: a header block of ``#`` lines (scenario, unit system, date, planner
    version; ``pandas.read_csv(..., comment="#")`` skips it), then the columns rounded to the display
    decimals of their quantity (``planner.scenario.wording.DECIMALS``)."""
    import datetime

    import planner
    from planner.errors import shortened

    frame = timeline_frame(plan, system)
    for key, title, kind in TIMELINE_COLUMNS:
        heading = with_unit(title, kind, system)
        if heading in frame:
            frame[heading] = frame[heading].round(DECIMALS.get(kind, 2))
    now = now or datetime.datetime.now(datetime.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    header = [("scenario", shortened(" ".join(scenario_name.split()))), ("unit system", system),
              ("date", now), ("planner version", planner.__version__)]
    return "".join(f"# {name}: {value}\n" for name, value in header) + frame.to_csv(index=False)
