"""The suction line along its length (source outlet to pump inlet) at each moment the plan works it out
(``compute/line_extras.suction_profiles``), drawn from SI data in the chosen unit system; no Streamlit here.
"""

from __future__ import annotations

import plotly.graph_objects as go
from plotly.subplots import make_subplots

from .display import convert_array, fmt, label, to_display, with_unit
from .figures import COLOURS, _layout, _segment_marks, steady_axes

# One colour and dash per moment (compute/line_extras.SUCTION_MOMENTS)
MOMENT_STYLE = {"start": (COLOURS["temperature"], None), "push_cold": (COLOURS["source"], "dash"),
                "after_prewarm": (COLOURS["jacket"], "dot")}
SHORT_WORDS = {"start": "running at the start", "push_cold": "cold contents, first flow",
               "after_prewarm": "after the pre-warm, first flow"}


def suction_figure(profiles: dict, segments: list[dict], system: str, no_flow_k: float | None = None) -> go.Figure:
    """Bulk temperature, viscosity, gauge pressure and outer jacket temperature along the suction line,
    one line per moment; the product's no-flow temperature as a limit line."""
    fig = make_subplots(rows=4, cols=1, shared_xaxes=True, vertical_spacing=0.06,
                        subplot_titles=("Bulk temperature", "Viscosity", "Pressure (gauge)", "Outer jacket temperature"))
    for key, profile in profiles.items():
        colour, dash = MOMENT_STYLE.get(key, (COLOURS["suction"], None))
        nodes, steps = profile["nodes"], profile["steps"]
        name = f"{SHORT_WORDS.get(key, key)} ({fmt(profile['flow_m3_s'], 'volume_flow', system)})"
        x_n = convert_array(nodes["x"], "length", system)
        x_s = convert_array(steps["x"], "length", system)
        for row, x, values, kind in ((1, x_n, nodes["temperature"], "temperature"),
                                     (2, x_s, steps["viscosity"], "dynamic_viscosity"),
                                     (3, x_n, nodes["pressure"], "pressure"),
                                     (4, x_s, steps["jacket_temperature"], "temperature")):
            fig.add_trace(go.Scatter(x=x, y=convert_array(values, kind, system), name=name, legendgroup=key,
                                     showlegend=row == 1, mode="lines+markers",
                                     line=dict(color=colour, dash=dash)), row=row, col=1)
    if no_flow_k is not None:
        limit = to_display(no_flow_k, "temperature", system)
        fig.add_hline(y=limit, line=dict(color=COLOURS["limit"], dash="dash"), row=1, col=1,
                      annotation_text=f"no-flow {limit:.0f} {label('temperature', system)}",
                      annotation_position="bottom left")
    _segment_marks(fig, segments, system, 4)
    fig.update_yaxes(title_text=label("temperature", system), row=1, col=1)
    fig.update_yaxes(title_text=label("dynamic_viscosity", system), type="log", row=2, col=1)
    fig.update_yaxes(title_text=label("pressure", system), row=3, col=1)
    fig.update_yaxes(title_text=label("temperature", system), row=4, col=1)
    fig.update_xaxes(title_text=with_unit("Distance from the source outlet", "length", system), row=4, col=1)
    steady_axes(fig, {"yaxis": "temperature", "yaxis3": "pressure", "yaxis4": "temperature", "yaxis2": None}, system)
    return _layout(fig, "Along the suction line (source outlet to pump inlet)", 820)


def prewarm_rows(entries: list[dict], system: str) -> list[tuple[str, str, str]]:
    """The pre-warm's suction segments in words: (segment, what the pre-warm does there, where it ends)."""
    rows = []
    for e in entries:
        if not e["traced"]:
            what = f"untraced: stays at the line's start temperature {fmt(e['start_k'], 'temperature', system)}"
        elif e["reached"]:
            what = f"traced: reaches {fmt(e['target_k'], 'temperature', system)} after {fmt(e['time_s'], 'time', system)}"
        else:
            what = "traced: does not reach the pre-warm target"
        rows.append((e["segment"], what, fmt(e.get("settles_at_k"), "temperature", system)))
    return rows
