"""Every plotly figure of the dashboard and its report, built from SI data and a unit system.

No Streamlit here: the report draws the same figures offline.
"""

from __future__ import annotations

import math

import numpy as np
import plotly.graph_objects as go
from plotly.subplots import make_subplots

from planner.scenario.wording import format_quantity, render

from .axes import label_log_axis, limit_line

from .display import convert_array, label, to_display, with_unit, words
from .plaintext import plotly_text
from .tables import comparison_currency


def with_unit_text(title: str, unit: str) -> str:
    """An axis title with a unit given as text (a currency): ``Total cost [EUR]``."""
    return f"{title} [{plotly_text(unit)}]"

COLOURS = {
    "temperature": "#c0392b", "viscosity": "#6c3483", "pressure": "#1f618d", "rating": "#e67e22",
    "jacket": "#b9770e", "sheath": "#7b7d7d", "limit": "#cb4335", "flow": "#117a65", "source": "#2e86c1",
    "destination": "#28b463", "suction": "#5d6d7e", "fit": "#6c3483", "points": "#212f3d", "range": "#d6eaf8",
    "cost": "#7d6608", "time": "#1a5276", "ambient": "#7b7d7d", "source_level": "#884ea0",
    "pump_inlet": "#d35400",
}
SEGMENT_LINE = dict(color="#909497", width=1, dash="dot")


# Least span of a y axis, in SI, by the quantity it shows: a steadier series is drawn on this span
# around its middle, so that a constant does not look like a trend (a 0.002 bar wobble filling the panel).
STEADY_SPAN_SI = {"temperature": 2.0, "pressure": 0.2e5, "volume_flow": 1.0 / 3600.0, "length": 0.2,
                  "time": 360.0, "power": 100.0, "heat_rate": 100.0, "linear_power": 2.0, None: 1.0}
LEGEND_SPACE_PX = 120           # room under the x-axis title for a legend of up to three rows


def _layout(fig: go.Figure, title: str, height: int) -> go.Figure:
    """Title at the top left; the legend at the foot of the figure, under the x-axis title (never on it)."""
    legend_space = LEGEND_SPACE_PX if any(t.showlegend is not False for t in fig.data) else 0
    fig.update_layout(title=dict(text=title, x=0.0, xanchor="left"), height=height + legend_space,
                      margin=dict(l=70, r=30, t=70, b=60 + legend_space),
                      legend=dict(orientation="h", yref="container", y=0.0, yanchor="bottom", x=0.0, xanchor="left"),
                      hovermode="x unified", template="plotly_white")
    return fig


def _axis_values(fig: go.Figure) -> dict[str, list[float]]:
    """Finite y values per layout y axis (``yaxis``, ``yaxis2``…): traces and horizontal lines."""
    values: dict[str, list[float]] = {}
    for trace in fig.data:
        name = "yaxis" + (trace.yaxis or "y")[1:]
        ys = np.asarray([np.nan if v is None else v for v in (trace.y if trace.y is not None else [])], dtype=float)
        values.setdefault(name, []).extend(ys[np.isfinite(ys)].tolist())
    for shape in fig.layout.shapes or ():
        if shape.yref and shape.yref.startswith("y") and " " not in shape.yref and shape.y0 == shape.y1:
            values.setdefault("yaxis" + shape.yref[1:], []).append(float(shape.y0))
    return values


def steady_axes(fig: go.Figure, kinds: dict[str, str | None], system: str) -> go.Figure:
    """Give each linear y axis named in ``kinds`` (``{"yaxis": "temperature"}``) at least the span of
    ``STEADY_SPAN_SI`` for its quantity (and 2 % of its largest value); log axes at least a factor 1.25."""
    for name, values in _axis_values(fig).items():
        if name not in kinds or not values:
            continue
        low, high = min(values), max(values)
        axis = fig.layout[name]
        if axis.type == "log":
            if low > 0 and high / low < 1.25:
                mid = 0.5 * (math.log10(low) + math.log10(high))
                axis.range = [mid - 0.05, mid + 0.05]
            continue
        kind = kinds[name]
        unit_span = STEADY_SPAN_SI.get(kind, 1.0)
        span = abs(to_display(unit_span, kind, system) - to_display(0.0, kind, system)) if kind else unit_span
        span = max(span, 0.02 * max(abs(low), abs(high)))
        if high - low < span:
            mid = 0.5 * (low + high)
            axis.range = [mid - 0.5 * span, mid + 0.5 * span]
    return fig


def _segment_marks(fig: go.Figure, segments: list[dict], system: str, rows: int) -> None:
    """Dotted vertical lines at segment boundaries; names inside the top panel where they fit
    (every segment is listed in the table under the chart)."""
    total = max((s["x_end"] for s in segments), default=0.0) or 1.0
    for n, s in enumerate(segments):
        x0 = to_display(s["x_start"], "length", system)
        if s["index"] > 0:
            for r in range(1, rows + 1):
                fig.add_vline(x=x0, line=SEGMENT_LINE, row=r, col=1)
        share = (s["x_end"] - s["x_start"]) / total
        text = s["name"] if share >= 0.15 else (f"{n + 1}" if share >= 0.015 else "")
        if text:
            mid = to_display(0.5 * (s["x_start"] + s["x_end"]), "length", system)
            fig.add_annotation(x=mid, y=1.0, yref="y domain", xref="x", text=plotly_text(text[:28]), showarrow=False,
                               yanchor="top", font=dict(size=10, color="#566573"), row=1, col=1)


def line_figure(profile: dict, segments: list[dict], system: str, product_name: str = "",
                touch_limit_k: float | None = None) -> go.Figure:
    """Along the discharge line at the start: bulk temperature, viscosity, gauge pressure against the
    segment ratings, and jacket (and heater) temperature against the touch limit."""
    nodes, steps = profile["nodes"], profile["steps"]
    x_n = convert_array(nodes["x"], "length", system)
    x_s = convert_array(steps["x"], "length", system)
    fig = make_subplots(rows=4, cols=1, shared_xaxes=True, vertical_spacing=0.05,
                        subplot_titles=("Bulk temperature", "Viscosity", "Pressure (gauge)",
                                        "Outer jacket and heater temperature"))
    fig.add_trace(go.Scatter(x=x_n, y=convert_array(nodes["temperature"], "temperature", system), name="bulk temperature",
                             line=dict(color=COLOURS["temperature"])), row=1, col=1)
    fig.add_trace(go.Scatter(x=x_s, y=convert_array(steps["viscosity"], "dynamic_viscosity", system), name="viscosity",
                             line=dict(color=COLOURS["viscosity"])), row=2, col=1)
    fig.add_trace(go.Scatter(x=x_n, y=convert_array(nodes["pressure"], "pressure", system), name="pressure",
                             line=dict(color=COLOURS["pressure"])), row=3, col=1)
    rating = profile.get("rating")
    if rating is not None and np.isfinite(np.asarray(rating, dtype=float)).any():
        fig.add_trace(go.Scatter(x=x_n, y=convert_array(rating, "pressure", system), mode="lines",
                                 name="rating (own or B16.5 flange)",
                                 line=dict(color=COLOURS["rating"], width=3, dash="dash", shape="hv")), row=3, col=1)
    fig.add_trace(go.Scatter(x=x_s, y=convert_array(steps["jacket_temperature"], "temperature", system),
                             name="jacket temperature", line=dict(color=COLOURS["jacket"])), row=4, col=1)
    entrances = profile.get("entrance_jackets") or []
    if entrances:
        fig.add_trace(go.Scatter(x=convert_array([e[0] for e in entrances], "length", system),
                                 y=convert_array([e[1] for e in entrances], "temperature", system), mode="markers",
                                 name="jacket where a thermal entrance starts (thin film: wall near the product)",
                                 marker=dict(color=COLOURS["jacket"], symbol="diamond", size=8)), row=4, col=1)
    if "sheath_temperature" in steps:
        fig.add_trace(go.Scatter(x=x_s, y=convert_array(steps["sheath_temperature"], "temperature", system),
                                 name="heater/tracer temperature", line=dict(color=COLOURS["sheath"], dash="dot")),
                      row=4, col=1)
    if touch_limit_k is not None and len(x_s):     # the scenario's limits.touch_temperature
        limit_line(fig, (float(min(x_s)), float(max(x_s))), to_display(touch_limit_k, "temperature", system),
                   f"touch limit {format_quantity(touch_limit_k, 'temperature', system)}", COLOURS["limit"], 4, 1)
    if profile.get("status") == "product_sets" and profile.get("sets_at_m") is not None:
        where = to_display(profile["sets_at_m"], "length", system)
        for r in range(1, 5):
            fig.add_vline(x=where, line=dict(color=COLOURS["limit"], width=2), row=r, col=1)
        fig.add_annotation(x=where, y=0.5, yref="y domain", text="product sets here", showarrow=True, row=1, col=1)
    _segment_marks(fig, segments, system, 4)
    fig.update_yaxes(title_text=label("temperature", system), row=1, col=1)
    fig.update_yaxes(title_text=label("dynamic_viscosity", system), type="log", row=2, col=1)
    label_log_axis(fig, "yaxis2", list(convert_array(steps["viscosity"], "dynamic_viscosity", system)))
    fig.update_yaxes(title_text=label("pressure", system), row=3, col=1)
    fig.update_yaxes(title_text=label("temperature", system), row=4, col=1)
    fig.update_xaxes(title_text=with_unit("Distance from the pump", "length", system), row=4, col=1)
    steady_axes(fig, {"yaxis": "temperature", "yaxis3": "pressure", "yaxis4": "temperature", "yaxis2": None}, system)
    return _layout(fig, "Along the discharge line at the start"
                   + (f" — {plotly_text(product_name)}" if product_name else ""), 980)


def timeline_figure(plan: dict, system: str, max_level: float | None = None) -> go.Figure:
    """Flow, temperatures, levels and pressures against time during the transfer."""
    arrays = plan["timeline"].get("arrays") or {}
    fig = make_subplots(rows=4, cols=1, shared_xaxes=True, vertical_spacing=0.06,
                        subplot_titles=("Flow", "Temperatures", "Levels", "Pressures (gauge)"))
    if not arrays or not arrays.get("time_s"):
        return _layout(fig, "Over time: no transfer (the pump does not move the product)", 400)
    t = convert_array(arrays["time_s"], "time", system)

    def add(key, name, kind, row, colour, dash=None):
        if key in arrays:
            values = np.array([math.nan if v is None else v for v in arrays[key]], dtype=float)
            fig.add_trace(go.Scatter(x=t, y=convert_array(values, kind, system), name=name,
                                     line=dict(color=colour, dash=dash)), row=row, col=1)

    add("flow_m3_s", "flow", "volume_flow", 1, COLOURS["flow"])
    add("source_temperature_k", "source", "temperature", 2, COLOURS["source"])
    add("pump_inlet_temperature_k", "pump inlet", "temperature", 2, COLOURS["pump_inlet"], "dot")
    add("outlet_temperature_k", "line outlet", "temperature", 2, COLOURS["temperature"])
    add("ambient_temperature_k", "ambient", "temperature", 2, COLOURS["ambient"], "dash")
    add("source_level_m", "source level", "length", 3, COLOURS["source_level"])
    add("destination_level_m", "destination level", "length", 3, COLOURS["destination"])
    if max_level:
        fig.add_hline(y=to_display(max_level, "length", system), line=dict(color=COLOURS["limit"], dash="dash"),
                      row=3, col=1, annotation_text="destination max level", annotation_position="top left")
    add("discharge_pressure_pa", "discharge", "pressure", 4, COLOURS["pressure"])
    add("suction_pressure_pa", "suction", "pressure", 4, COLOURS["suction"], "dot")
    fig.update_yaxes(title_text=label("volume_flow", system), row=1, col=1)
    fig.update_yaxes(title_text=label("temperature", system), row=2, col=1)
    fig.update_yaxes(title_text=label("length", system), row=3, col=1)
    fig.update_yaxes(title_text=label("pressure", system), row=4, col=1)
    fig.update_xaxes(title_text=with_unit("Time from the start of pumping", "time", system), row=4, col=1)
    steady_axes(fig, {"yaxis": "volume_flow", "yaxis2": "temperature", "yaxis3": "length", "yaxis4": "pressure"}, system)
    return _layout(fig, "Over time during the transfer", 900)


def push_cold_figure(rows: dict, system: str) -> go.Figure:
    """The push-cold start-up: flow and discharge pressure while the cold contents leave the line."""
    fig = make_subplots(rows=1, cols=2, subplot_titles=("Flow", "Discharge pressure (gauge)"))
    if not rows or not rows.get("time_s"):
        return _layout(fig, "Push-cold start-up: not possible", 320)
    t = convert_array(rows["time_s"], "time", system)
    fig.add_trace(go.Scatter(x=t, y=convert_array(rows["flow_m3_s"], "volume_flow", system), mode="lines+markers",
                             name="flow", line=dict(color=COLOURS["flow"])), row=1, col=1)
    fig.add_trace(go.Scatter(x=t, y=convert_array(rows["discharge_pressure_pa"], "pressure", system),
                             mode="lines+markers", name="discharge pressure", line=dict(color=COLOURS["pressure"])),
                  row=1, col=2)
    fig.update_yaxes(title_text=label("volume_flow", system), row=1, col=1)
    fig.update_yaxes(title_text=label("pressure", system), row=1, col=2)
    fig.update_xaxes(title_text=with_unit("Time", "time", system))
    steady_axes(fig, {"yaxis": "volume_flow", "yaxis2": "pressure"}, system)
    return _layout(fig, "Push-cold start-up: the cold contents leave the line", 380)


def viscosity_figure(curve: dict, system: str, height: int = 460, compact: bool = False) -> go.Figure:
    """Viscosity (consistency for non-Newtonian products) against temperature: the fitted law, the
    lab points, the fitted range shaded, and the no-flow and maximum temperatures."""
    fig = go.Figure()
    t = convert_array(curve["temperature"], "temperature", system)
    factor = curve.get("viscosity_factor", 1.0)
    if curve.get("viscosity_as_fitted") is not None:
        fig.add_trace(go.Scatter(x=t, y=convert_array(curve["viscosity_as_fitted"], "dynamic_viscosity", system),
                                 name=f"fitted {words(curve['law'])} law (lab points)",
                                 line=dict(color=COLOURS["fit"], dash="dot")))
        name = f"in the plan: calibrated × {factor:.3g}"
    else:
        name = f"fitted {words(curve['law'])} law"
    fig.add_trace(go.Scatter(x=t, y=convert_array(curve["viscosity"], "dynamic_viscosity", system),
                             name=name, line=dict(color=COLOURS["fit"])))
    if curve["lab_temperature"]:
        fig.add_trace(go.Scatter(x=convert_array(curve["lab_temperature"], "temperature", system),
                                 y=convert_array(curve["lab_viscosity"], "dynamic_viscosity", system),
                                 mode="markers", name="lab points",
                                 marker=dict(size=10, color=COLOURS["points"], symbol="circle")))
    if curve.get("t_min") is not None and curve.get("t_max") is not None:
        fig.add_vrect(x0=to_display(curve["t_min"], "temperature", system),
                      x1=to_display(curve["t_max"], "temperature", system), fillcolor=COLOURS["range"],
                      opacity=0.5, line_width=0, layer="below", annotation_text="fitted range",
                      annotation_position="top left")
    fig.add_vline(x=to_display(curve["no_flow_temperature"], "temperature", system),
                  line=dict(color=COLOURS["limit"], dash="dash"), annotation_text="no-flow", annotation_position="bottom right")
    fig.add_vline(x=to_display(curve["max_temperature"], "temperature", system),
                  line=dict(color=COLOURS["rating"], dash="dash"), annotation_text="max", annotation_position="bottom left")
    what = "Viscosity" if curve.get("newtonian", True) else "Consistency K"
    fig.update_yaxes(type="log", title_text=with_unit(what, "dynamic_viscosity", system)
                     + ("" if curve.get("newtonian", True) else " (×sⁿ⁻¹)"))
    fig.update_xaxes(title_text=with_unit("Temperature", "temperature", system))
    title = f"{what} against temperature" + ("" if compact else f" — {plotly_text(curve['name'])}")
    label_log_axis(fig, "yaxis", [v for trace in fig.data for v in trace.y])
    fig = _layout(fig, title, height)          # the legend at the foot, clear of the title
    fig.update_layout(hovermode="closest")
    return fig


def comparison_figure(comparison: dict, kind: str, system: str) -> go.Figure:
    """Time, cost, peak pressure and hottest jacket against the lever value; recommended row starred."""
    rows = comparison["rows"]
    currency = comparison_currency(comparison)
    x = [to_display(r.get("value"), kind, system) for r in rows]
    fig = make_subplots(rows=2, cols=2, shared_xaxes=True, vertical_spacing=0.14,
                        subplot_titles=("Start-up + transfer time", "Total cost", "Peak pressure", "Hottest jacket"))

    def series(key, conv_kind):
        values = [r.get(key) for r in rows]
        return [None if v is None else (to_display(v, conv_kind, system) if conv_kind else v) for v in values]

    panels = [("total_time_s", "time", 1, 1, COLOURS["time"]), ("total_cost", None, 1, 2, COLOURS["cost"]),
              ("peak_pressure_pa", "pressure", 2, 1, COLOURS["pressure"]),
              ("hottest_jacket_k", "temperature", 2, 2, COLOURS["jacket"])]
    rec = comparison.get("recommended")
    for key, conv_kind, r, c, colour in panels:
        y = series(key, conv_kind)
        symbols = ["x" if row.get("has_stop") else "circle" for row in rows]
        fig.add_trace(go.Scatter(x=x, y=y, mode="lines+markers", name=key, showlegend=False,
                                 line=dict(color=colour), marker=dict(symbol=symbols, size=9)), row=r, col=c)
        if rec is not None and 0 <= rec < len(rows):
            fig.add_trace(go.Scatter(x=[x[rec]], y=[y[rec]], mode="markers", name="recommended",
                                     showlegend=(r, c) == (1, 1),
                                     marker=dict(symbol="star", size=18, color="#f1c40f", line=dict(color="#000", width=1))),
                          row=r, col=c)
        fig.update_yaxes(title_text=label(conv_kind, system) if conv_kind else plotly_text(currency), row=r, col=c)
    shown = [v for v in x if v is not None]
    if comparison.get("touch_limit_k") is not None and shown:       # the scenario's limits.touch_temperature
        touch_k = comparison["touch_limit_k"]
        limit_line(fig, (min(shown), max(shown)), to_display(touch_k, "temperature", system),
                   f"touch limit {format_quantity(touch_k, 'temperature', system)}", COLOURS["limit"], 2, 2)
    steady_axes(fig, {"yaxis": "time", "yaxis2": None, "yaxis3": "pressure", "yaxis4": "temperature"}, system)
    title = comparison.get("lever_label", "lever")
    fig.update_xaxes(title_text=with_unit(title, kind, system), row=2)
    fig = _layout(fig, f"Comparison over {title.lower()} (✕: a stop finding)", 640)
    fig.update_layout(hovermode="closest")
    return fig


def sensitivity_figure(comparison: dict, kind: str, system: str) -> go.Figure | None:
    """Total cost against the lever value for each sensitivity case (ambient shifted, viscosity
    scaled) beside the case as given, with each case's recommended value marked."""
    cases = comparison.get("sensitivity") or []
    if not cases:
        return None
    x = [to_display(r.get("value"), kind, system) for r in comparison["rows"]]
    fig = go.Figure()
    fig.add_trace(go.Scatter(x=x, y=[r.get("total_cost") for r in comparison["rows"]], mode="lines+markers",
                             name="as given", line=dict(color="#000", width=3)))
    palette = ["#2e86c1", "#cb4335", "#28b463", "#af7ac5", "#f39c12", "#5d6d7e"]
    for i, case in enumerate(cases):
        colour = palette[i % len(palette)]
        costs = case.get("total_costs") or []
        fig.add_trace(go.Scatter(x=x[:len(costs)], y=costs, mode="lines+markers", name=plotly_text(render(case["case"], system)),
                                 line=dict(color=colour, dash="dot")))
        value = case.get("recommended_value")
        if value is not None:
            fig.add_vline(x=to_display(value, kind, system), line=dict(color=colour, width=1, dash="dash"))
    fig.update_xaxes(title_text=with_unit(comparison.get("lever_label", "value"), kind, system))
    fig.update_yaxes(title_text=with_unit_text("Total cost", comparison_currency(comparison)))
    steady_axes(fig, {"yaxis": None}, system)
    fig = _layout(fig, "Sensitivity: total cost with the ambient shifted and the viscosity scaled "
                  "(dashed: each case's recommended value)", 460)
    fig.update_layout(hovermode="closest")
    return fig


def envelope_figure(envelope: dict, kind: str, system: str) -> go.Figure:
    """Heat-map of the envelope's cells (total time; blank where no plan) over ambient x lever value, stop
    cells marked ✕, and the envelope line: the lowest value finishing within the window with no stop."""
    values = [to_display(v, kind, system) for v in envelope["values"]]
    ambients = [to_display(a, "temperature", system) for a in envelope["ambients_k"]]
    n = len(values)
    cells = [envelope["cells"][i * n:(i + 1) * n] for i in range(len(ambients))]
    hours = [[None if c["total_time_s"] is None else c["total_time_s"] / 3600.0 for c in row] for row in cells]
    text = [[c["worst_severity"] for c in row] for row in cells]
    fig = go.Figure(go.Heatmap(x=values, y=ambients, z=hours, text=text, colorscale="YlOrRd",
                               colorbar=dict(title="total h"),
                               hovertemplate="%{y}, %{x}: %{z:.1f} h, worst %{text}<extra></extra>"))
    stops = [(values[j], ambients[i]) for i, row in enumerate(cells) for j, c in enumerate(row) if c["has_stop"]]
    if stops:
        fig.add_trace(go.Scatter(x=[p[0] for p in stops], y=[p[1] for p in stops], mode="markers", name="stop",
                                 marker=dict(symbol="x", size=11, color="#000")))
    line = [(to_display(e["value"], kind, system), to_display(e["ambient_k"], "temperature", system))
            for e in envelope["envelope"] if e["value"] is not None]
    fig.add_trace(go.Scatter(x=[p[0] for p in line], y=[p[1] for p in line], mode="lines+markers",
                             name="envelope (lowest that fits)", line=dict(color="#1f4e79", width=3)))
    fig.update_xaxes(title_text=with_unit(words(envelope["lever"]), kind, system))
    fig.update_yaxes(title_text=with_unit("Ambient", "temperature", system))
    window = format_quantity(envelope["planned_window_s"], "time", system)
    return _layout(fig, f"Operating envelope (window {window})", 480)
