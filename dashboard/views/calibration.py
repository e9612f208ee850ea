"""The Calibration tab: fit the site's factors to a logged transfer and apply them to the working
scenario (``planner.calibration``; this module lays out and draws, it computes nothing physical).

Upload a CSV log (and a column map for a historian's headers), choose the factors, Fit: the page
shows the factors with their 95 % intervals, the warnings, measured against modelled over time and
the residuals.  "Apply to the working scenario" writes ``[calibration]`` into the working dict (an
edit like any other); "Apply and save as a revision" also saves it through the sidebar's save
(``sharing``), with a note naming the log and its SHA-256.
"""

from __future__ import annotations

import copy
from pathlib import Path

import numpy as np
import pandas as pd
import plotly.graph_objects as go
import streamlit as st
from plotly.subplots import make_subplots

from dashboard.compute.cache import cached_calibration
from dashboard.present.display import convert_array, fmt, label, to_display, words
from dashboard.present.plaintext import escaped

from .page import Page

NEEDS_RESULTS = False
DEMO_LOG = Path(__file__).resolve().parents[2] / "demo_scenarios" / "logs" / "barge_wren_2026-01-14.csv"
QUANTITY_KIND = {"discharge_pressure": ("pressure", "pressure"), "suction_pressure": ("pressure", "pressure"),
                 "pump_inlet_temperature": ("temperature", "temperature_difference"),
                 "outlet_temperature": ("temperature", "temperature_difference"), "flow": ("volume_flow", "volume_flow")}
TITLES = {"discharge_pressure": "Discharge pressure (gauge)", "suction_pressure": "Suction pressure (gauge)",
          "pump_inlet_temperature": "Pump inlet temperature", "outlet_temperature": "Outlet temperature",
          "flow": "Flow (PD pump at logged speed)"}


# ------------------------------------------------------------------------------------------ computing

def fit_key(scenario, names) -> str:
    """The scenario JSON the fit depends on: the factors being fitted (and the calibration's source
    and time) left out, so applying the result does not start the same fit again."""
    from planner.scenario.schema import scenario_to_dict, scenario_to_json
    import json

    if scenario.calibration is None:
        return scenario_to_json(scenario)
    data = scenario_to_dict(scenario)
    kept = {k: v for k, v in data["calibration"].items() if k not in set(names) | {"source", "fitted_at"}}
    if kept:
        data["calibration"] = kept
    else:
        data.pop("calibration")
    return json.dumps(data, indent=2)


# ------------------------------------------------------------------------------------------ figures

def series_figure(data: dict, system: str) -> go.Figure:
    """Measured against modelled over time (left column) and the residuals (right), one row per quantity."""
    series = data["series"]
    quantities = list(series["measured"])
    hours = np.asarray(series["time_s"]) / 3600.0
    fig = make_subplots(rows=len(quantities), cols=2, shared_xaxes=True, horizontal_spacing=0.08,
                        subplot_titles=[t for q in quantities for t in (TITLES[q], f"Residual: {TITLES[q].lower()}")])
    for row, q in enumerate(quantities, start=1):
        kind, difference_kind = QUANTITY_KIND[q]
        measured = np.array([np.nan if v is None else v for v in series["measured"][q]])
        modelled = np.array([np.nan if v is None else v for v in series["modelled"][q]])
        fig.add_trace(go.Scatter(x=hours, y=convert_array(measured, kind, system), mode="markers", name="logged",
                                 marker={"size": 4, "color": "#555"}, showlegend=row == 1), row=row, col=1)
        fig.add_trace(go.Scatter(x=hours, y=convert_array(modelled, kind, system), mode="lines", name="modelled",
                                 line={"color": "#d62728"}, showlegend=row == 1), row=row, col=1)
        residual = convert_array(measured - modelled, difference_kind, system)
        fig.add_trace(go.Scatter(x=hours, y=residual, mode="markers", name="logged − modelled",
                                 marker={"size": 4, "color": "#1f77b4"}, showlegend=row == 1), row=row, col=2)
        fig.add_hline(y=0.0, line={"color": "#999", "width": 1}, row=row, col=2)
        fig.update_yaxes(title_text=label(kind, system), row=row, col=1)
        fig.update_yaxes(title_text=label(difference_kind, system), row=row, col=2)
    fig.update_xaxes(title_text="time from the first row [h]", row=len(quantities))
    height = 260 * len(quantities)
    fig.update_layout(height=height, margin={"t": 70, "b": 40, "l": 60, "r": 20},
                      legend={"orientation": "h", "yanchor": "bottom", "y": 1.0 + 36.0 / height})
    return fig


def factors_frame(data: dict) -> pd.DataFrame:
    rows = [{"factor": words(name), "fitted": round(f["value"], 4), "95 % low": round(f["low"], 4),
             "95 % high": round(f["high"], 4), "identifiable from this log": "yes" if f["identifiable"] else "no",
             "at its bound": "yes" if f["at_bound"] else ""} for name, f in data["factors"].items()]
    return pd.DataFrame(rows)


def residuals_frame(data: dict, system: str) -> pd.DataFrame:
    rows = []
    for q, r in data["residuals"].items():
        kind = QUANTITY_KIND[q][1]
        unit = label(kind, system)
        rows.append({"quantity": TITLES[q], "RMS": _num(to_display(r["rms"], kind, system)),
                     "log noise": _num(to_display(r["noise"], kind, system)),
                     "bias": _num(to_display(r["bias"], kind, system)), "unit": unit,
                     "RMS / noise": round(r["ratio"], 2) if r["ratio"] is not None else None, "rows": r["count"]})
    return pd.DataFrame(rows)


def _num(value):
    return None if value is None else float(f"{value:.4g}")


def revision_note(data: dict) -> str:
    log_info = data["log"]
    factors = ", ".join(f"{n} {f['value']:.4g}" for n, f in data["factors"].items() if f["identifiable"])
    return (f"Calibration fitted to the log {log_info['file']} (SHA-256 {log_info['sha256']}): {factors}; "
            f"{log_info['rows_read']} of {log_info['rows']} rows read.")


# ------------------------------------------------------------------------------------------ actions

def _apply(data: dict) -> None:
    """Write the fitted ``[calibration]`` into the working scenario (an edit like any other)."""
    ss = st.session_state
    work = copy.deepcopy(ss.get("work") or {})
    work["calibration"] = copy.deepcopy(data["calibration"])
    ss["work"] = work
    ss["cal_msg"] = ("success", "Applied to the working scenario: every plan now uses these factors "
                                "(finding CALIBRATION-IN-USE). Save it to keep it.")


def _apply_and_save(data: dict) -> None:
    _apply(data)
    ss = st.session_state
    ss["sv_note"] = revision_note(data)
    ss.pop("share_msg", None)
    from dashboard.services.revisions import do_save

    do_save()   # the sidebar's save: same plan name, site, author and revision rules
    kind, text = ss.get("share_msg") or ("error", "Not saved.")
    ss["cal_msg"] = (kind, text if kind != "success" else f"{text} The note names the log and its SHA-256.")


def _remove() -> None:
    ss = st.session_state
    work = copy.deepcopy(ss.get("work") or {})
    work.pop("calibration", None)
    ss["work"] = work
    ss["cal_msg"] = ("info", "The calibration is removed from the working scenario: plans use the model alone.")


def _log_bytes() -> tuple[bytes | None, str]:
    ss = st.session_state
    upload = ss.get("cal_log_upload")
    if upload is not None:
        return upload.getvalue(), upload.name
    if ss.get("cal_demo_log"):
        return DEMO_LOG.read_bytes(), DEMO_LOG.name
    return None, ""


def _use_demo_log() -> None:
    st.session_state["cal_demo_log"] = True


# ------------------------------------------------------------------------------------------ the tab

def _inputs(scenario) -> tuple[list[str], str]:
    from planner.calibration.fit import DEFAULT_FIT
    from planner.calibration.replay import FACTOR_NAMES

    left, right = st.columns(2)
    left.file_uploader("Log of a past transfer (CSV)", type=["csv", "txt"], key="cal_log_upload",
                       help="header cells 'quantity [unit]': time, flow, discharge_pressure, suction_pressure, "
                            "pump_inlet_temperature, outlet_temperature, source_temperature, ambient_temperature, "
                            "speed; pressures gauge; time may be ISO 8601 timestamps")
    map_upload = right.file_uploader("Column map (TOML, optional)", type=["toml"], key="cal_map_upload",
                                     help='a [columns] table: "historian header" = "quantity [unit]"')
    if DEMO_LOG.exists():
        left.button(f"Use the demo log ({DEMO_LOG.name}, barge demo)", key="cal_use_demo", on_click=_use_demo_log)
    pd_pump = scenario.pump is not None and scenario.pump.kind == "positive_displacement"
    options = [n for n in FACTOR_NAMES if n != "slip_factor" or pd_pump]
    default = list(DEFAULT_FIT) + (["slip_factor"] if pd_pump else [])
    names = right.multiselect("Factors to fit", options, default=default, key="cal_names", format_func=words,
                              help=f"{words('slip_factor')}: positive-displacement pumps, with speed in the log")
    map_text = map_upload.getvalue().decode("utf-8", errors="replace") if map_upload is not None else ""
    return names, map_text


def _show_result(data: dict, unit_system: str) -> None:
    log_info = data["log"]
    st.markdown(f"**Log** {escaped(log_info['file'])} — SHA-256 `{log_info['sha256'][:16]}…` — {log_info['rows_read']} of "
                f"{log_info['rows']} rows read, {fmt(log_info['duration_s'], 'time', unit_system)}"
                + (f" from {escaped(log_info['start'])}" if log_info.get("start") else ""))
    if log_info["unreadable"]:
        st.warning(f"{log_info['rows_unreadable']} rows could not be read (not used):")
        st.dataframe(pd.DataFrame([{"reason": g["reason"], "rows": g["count"],
                                    "file lines": ", ".join(str(n) for n in g["lines"])} for g in log_info["unreadable"]]),
                     hide_index=True)
    if log_info.get("rows_pump_stopped"):
        st.caption(f"{log_info['rows_pump_stopped']} rows with flow 0 (pump stopped): counted for the volumes moved, "
                   "not replayed.")
    st.dataframe(factors_frame(data), hide_index=True)
    for pair, r in data["correlation"].items():
        st.caption(f"correlation {pair}: {r:+.2f}")
    for note in data.get("notes", []):
        st.caption(f"Note: {note}")
    for text in data.get("warnings_by_system", {}).get(unit_system, data["warnings"]):
        st.warning(escaped(text))
    st.dataframe(residuals_frame(data, unit_system), hide_index=True)
    st.plotly_chart(series_figure(data, unit_system), key="cal_series")


def _current(scenario) -> None:
    calibration = scenario.calibration
    if calibration is None:
        st.caption("In use now: no calibration (all factors 1).")
        return
    origin = f" — fitted to {calibration.source.file}" if calibration.source is not None else ""
    st.caption(f"In use now: {words('viscosity_factor')} {calibration.viscosity_factor:.4g}, {words('heat_loss_factor')} "
               f"{calibration.heat_loss_factor:.4g}, {words('slip_factor')} {calibration.slip_factor:.4g}{origin}")
    st.button("Remove the calibration", key="cal_remove", on_click=_remove)


def draw(page: Page) -> None:
    calibration_view(page.scenario, page.scenario_json, page.unit_system)


def calibration_view(scenario, scenario_json: str | None, unit_system: str) -> None:
    """The Calibration tab."""
    st.markdown("#### Calibrate the plan to a past transfer")
    st.caption("Replays a logged transfer of this product through this line and fits the factors that make the "
               "model agree with it. The factors are estimates from one log: check them against the site's "
               "experience before planning with them.")
    if scenario is None or scenario_json is None:
        st.info("Fix the inputs first: the log is replayed through the working scenario.")
        return
    missing = [s for s in ("pump", "source", "destination") if getattr(scenario, s) is None]
    if missing:
        st.info(f"Replaying a log needs the scenario's {', '.join(missing)}.")
        return
    names, map_text = _inputs(scenario)
    message = st.session_state.pop("cal_msg", None)
    if message:
        getattr(st, message[0])(message[1])
    _current(scenario)
    log_bytes, log_name = _log_bytes()
    if log_bytes is None:
        st.info("Upload a log (or use the demo log) to fit the factors.")
        return
    if not names:
        st.info("Choose at least one factor to fit.")
        return
    with st.spinner("Replaying the log and fitting…"):
        data = cached_calibration(fit_key(scenario, names), log_bytes, log_name, map_text, tuple(names))
    if "error" in data:
        st.error(f"**No fit:** {escaped(data['error'])}")
        return
    _show_result(data, unit_system)
    usable = any(f["identifiable"] for f in data["factors"].values())
    blocked = data["mismatch"] or any(f["at_bound"] for f in data["factors"].values())
    if blocked:
        st.error("The model does not reproduce this log (see the warnings): the factors are not offered for use.")
    left, right = st.columns(2)
    left.button("Apply to the working scenario", key="cal_apply", on_click=_apply, args=(data,),
                disabled=blocked or not usable)
    right.button("Apply and save as a revision", key="cal_save", on_click=_apply_and_save, args=(data,),
                 disabled=blocked or not usable, help="uses the plan name, site and author in the sidebar; "
                                                      "the note names the log and its SHA-256")
