"""The odds of a plan as figures (no Streamlit here): the fan of flow and product temperature against time,
the distribution of the total time with the planned window, and the first-order shares of its spread.

Input: the summary of ``planner.sweeps.uncertainty.summarise`` (SI) and, for the histogram, each sample's
total time (+inf for a sample that did not finish).  Every number is the sampled plans' own; units by
``present/display``.
"""

from __future__ import annotations

import math

import numpy as np
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from planner.reports.uncertainty_text import INPUT_LABELS

from .display import convert_array, label, to_display, with_unit
from .figures import COLOURS, _layout, steady_axes

BAND = {"flow": "rgba(17, 122, 101, 0.18)", "temperature": "rgba(192, 57, 43, 0.18)"}


def _band(fig: go.Figure, t, levels: dict, kind: str, system: str, colour: str, band: str, row: int, name: str) -> None:
    """The P10-P90 band (filled) and the P50 line of one quantity."""
    def values(key):
        return convert_array([math.nan if v is None else v for v in levels[key]], kind, system)

    fig.add_trace(go.Scatter(x=t, y=values("p90"), line=dict(width=0), showlegend=False, hoverinfo="skip",
                             name=f"{name} P90"), row=row, col=1)
    fig.add_trace(go.Scatter(x=t, y=values("p10"), line=dict(width=0), fill="tonexty", fillcolor=band,
                             name=f"{name} P10–P90"), row=row, col=1)
    fig.add_trace(go.Scatter(x=t, y=values("p50"), line=dict(color=colour), name=f"{name} P50"), row=row, col=1)


def fan_figure(odds: dict, system: str) -> go.Figure:
    """Flow and product temperature at the line's outlet against the time from the start of pumping: the
    P10-P90 band and the P50 line of the sampled plans (after a sample's end its flow is 0 and its
    temperature no longer counts)."""
    fan = odds.get("fan") or {}
    fig = make_subplots(rows=2, cols=1, shared_xaxes=True, vertical_spacing=0.1,
                        subplot_titles=("Flow", "Product at the line's outlet"))
    if len(fan.get("time_s") or []) < 2:
        return _layout(fig, "The odds over time: no sample moved the product", 400)
    t = convert_array(fan["time_s"], "time", system)
    _band(fig, t, fan["flow_m3_s"], "volume_flow", system, COLOURS["flow"], BAND["flow"], 1, "flow")
    _band(fig, t, fan["outlet_temperature_k"], "temperature", system, COLOURS["temperature"], BAND["temperature"], 2,
          "outlet temperature")
    fig.update_yaxes(title_text=label("volume_flow", system), row=1, col=1)
    fig.update_yaxes(title_text=label("temperature", system), row=2, col=1)
    fig.update_xaxes(title_text=with_unit("Time from the start of pumping", "time", system), row=2, col=1)
    steady_axes(fig, {"yaxis": "volume_flow", "yaxis2": "temperature"}, system)
    return _layout(fig, f"The odds over time: P10–P90 band and P50 of {odds['samples']} sampled plans", 620)


def total_time_figure(totals: list, odds: dict, system: str, plain_total_s: float | None = None) -> go.Figure:
    """The total time (start-up + transfer) of each sample that finished as a histogram, with the planned
    window and the P50 and P90 marked; the samples that did not finish are counted in the title."""
    finite = np.asarray([v for v in totals if v is not None and math.isfinite(v)], dtype=float)
    missing = len(totals) - len(finite)
    fig = go.Figure()
    if len(finite):
        fig.add_trace(go.Histogram(x=convert_array(finite, "time", system), nbinsx=min(40, max(8, len(finite) // 4)),
                                   marker_color=COLOURS["time"], name="samples", showlegend=False))
    marks = [("planned window", odds["planned_window_s"], COLOURS["limit"], "dash")]
    if plain_total_s is not None and math.isfinite(plain_total_s):
        marks.append(("this plan", plain_total_s, COLOURS["fit"], "dashdot"))
    levels = odds["percentiles"]["total_time_s"]
    marks += [(key.upper(), levels[key], COLOURS["points"], "dot") for key in ("p50", "p90")
              if levels.get(key) is not None and math.isfinite(levels[key])]
    for text, value, colour, dash in marks:
        fig.add_vline(x=to_display(value, "time", system), line=dict(color=colour, dash=dash),
                      annotation_text=text, annotation_position="top")
    fig.update_xaxes(title_text=with_unit("Start-up + transfer", "time", system))
    fig.update_yaxes(title_text="samples")
    title = f"Total time of {len(finite)} of {len(totals)} sampled plans"
    if missing:
        title += f" ({missing} did not finish: not drawn, counted past the window)"
    fig = _layout(fig, title, 380)
    fig.update_layout(hovermode="closest", bargap=0.05)
    return fig


def sensitivity_figure(odds: dict) -> go.Figure:
    """The first-order share of each input in the spread of the total time (largest on top)."""
    rows = sorted(odds.get("sensitivity") or [], key=lambda r: r["share"])
    fig = go.Figure(go.Bar(x=[r["share"] for r in rows], y=[INPUT_LABELS.get(r["input"], r["input"]) for r in rows],
                           orientation="h", marker_color=COLOURS["source"],
                           text=[f"{r['share']:.2f}" for r in rows], textposition="auto", showlegend=False))
    ranks = "ranks of " if "ranks" in (odds.get("sensitivity_of") or "") else ""
    fig.update_xaxes(title_text=f"first-order share of the spread of the {ranks}total time", range=[0, 1])
    fig = _layout(fig, "What drives the spread of the total time", 80 + 40 * max(1, len(rows)))
    fig.update_layout(hovermode="closest")
    return fig
