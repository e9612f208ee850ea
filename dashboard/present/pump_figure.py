"""The pump chart (``planner.transfer.pump_chart``, computed in the planner) drawn in the chosen unit
system: the pump's curves, the system curve and the operating point at the start; no Streamlit here.
"""

from __future__ import annotations

import plotly.graph_objects as go

from .display import convert_array, fmt, general_number, to_display, with_unit
from .figures import COLOURS, _layout

PUMP_COLOURS = {"water": "#5dade2", "corrected": COLOURS["viscosity"], "system": COLOURS["pressure"],
                "point": COLOURS["limit"], "relief": COLOURS["rating"]}


def _trace(fig: go.Figure, curve: dict, quantity: str, system: str, name: str, colour: str, dash=None) -> None:
    fig.add_trace(go.Scatter(x=convert_array(curve["flow_m3_s"], "volume_flow", system),
                             y=convert_array(curve["value"], quantity, system), name=name, mode="lines",
                             line=dict(color=colour, dash=dash, width=2)))


def pump_figure(chart: dict, system: str) -> go.Figure:
    """Flow across, head (centrifugal) or differential pressure (positive displacement) up."""
    quantity = chart["quantity"]
    fig = go.Figure()
    nu = chart.get("kinematic_viscosity_m2_s")
    at = f" at {fmt(nu, 'kinematic_viscosity', system)}" if nu else ""
    if chart["kind"] == "centrifugal":
        _trace(fig, chart["water"], quantity, system, "pump on water (as given)", PUMP_COLOURS["water"], "dash")
        if chart["corrected"] is not None:
            b = f", B = {general_number(chart['hi_b'], 3)}" if chart.get("hi_b") else ""
            _trace(fig, chart["corrected"], quantity, system, f"pump on the product{at} (ANSI/HI 9.6.7{b})",
                   PUMP_COLOURS["corrected"])
    else:
        _trace(fig, chart["water"], quantity, system, "displacement × speed (no slip)", PUMP_COLOURS["water"], "dash")
        _trace(fig, chart["corrected"], quantity, system, f"delivered on the product{at} (slip)", PUMP_COLOURS["corrected"])
        if chart.get("relief_pa"):
            relief = to_display(chart["relief_pa"], "pressure", system)
            fig.add_hline(y=relief, line=dict(color=PUMP_COLOURS["relief"], dash="dot"),
                          annotation_text=f"relief setting {fmt(chart['relief_pa'], 'pressure', system)}",
                          annotation_position="top left")
    _trace(fig, chart["system"], quantity, system, "system at the start", PUMP_COLOURS["system"])
    if chart.get("operating_flow_m3_s") is not None and chart.get("operating_value") is not None:
        q = to_display(chart["operating_flow_m3_s"], "volume_flow", system)
        v = to_display(chart["operating_value"], quantity, system)
        fig.add_trace(go.Scatter(x=[q], y=[v], mode="markers", name="operating point at the start",
                                 marker=dict(color=PUMP_COLOURS["point"], size=12, symbol="x")))
    title = "Pump head" if quantity == "head" else "Pump differential pressure"
    fig.update_xaxes(title_text=with_unit("Flow", "volume_flow", system), rangemode="tozero")
    fig.update_yaxes(title_text=with_unit(title, quantity, system), rangemode="tozero")
    return _layout(fig, "Pump and system at the start", 460)


def pump_caption(chart: dict) -> str:
    """What the chart shows, in words (and why a curve is missing)."""
    if chart["kind"] == "centrifugal":
        text = ("The water curve as given; the product's curve is the water curve moved point by point by the "
                "ANSI/HI 9.6.7 factors for the product's kinematic viscosity at the pump inlet (the curve the "
                "planner solves the start on). The system curve is the head the lines and vessels need at each flow "
                "at the start (gaps: the product sets).")
        if chart["corrected"] is None:
            text += (" Neither the product's curve nor the operating point is drawn: "
                     + (chart.get("note") or "beyond ANSI/HI 9.6.7") + ".")
        return text
    return ("A rotary positive-displacement pump: displacement × speed, less the slip that grows with the "
            "differential pressure and falls with the product's viscosity at the pump inlet. The system curve is "
            "the differential the lines and vessels need at each flow at the start (gaps: the product sets).")
