"""Axis and reference-line helpers shared by the figures (no Streamlit here): decade-labelled log axes
and limit lines named in the legend (a label on the plot area collides with the curves near it)."""

from __future__ import annotations

import math

import plotly.graph_objects as go

LOG_STEPS = (1.0, 2.0, 5.0)         # ticks of a log axis inside each decade


def log_tick_values(low: float, high: float) -> list[float]:
    """Ticks 1-2-5 of each decade from ``low`` to ``high`` (positive), decades included, so a log axis
    reads 10, 20, 50, 100 ... rather than 2, 5, 2, 5 without its decades.

    >>> log_tick_values(3.0, 120.0)
    [5.0, 10.0, 20.0, 50.0, 100.0]
    """
    if not (low > 0 and high > 0 and math.isfinite(low) and math.isfinite(high)):
        return []
    ticks = []
    for decade in range(math.floor(math.log10(low)), math.floor(math.log10(high)) + 1):
        ticks += [step * 10.0 ** decade for step in LOG_STEPS]
    return [round(t, 12) for t in ticks if low <= t <= high]


def tick_text(value: float) -> str:
    """A tick as a plain number: ``0.05``, ``20``, ``5,000`` (no exponent, no SI prefix)."""
    return f"{value:,.0f}" if value >= 1 else f"{value:g}"


def label_log_axis(fig: go.Figure, axis_name: str, values: list[float]) -> None:
    """Give the log axis ``axis_name`` (``"yaxis2"``) ticks with their decades written out; with fewer than
    two such ticks in the data's span plotly's own stay (they then read as full numbers too)."""
    finite = [v for v in values if v is not None and math.isfinite(v) and v > 0]
    if not finite:
        return
    axis = fig.layout[axis_name]
    ticks = log_tick_values(min(finite), max(finite))
    if len(ticks) >= 2:
        axis.update(tickmode="array", tickvals=ticks, ticktext=[tick_text(t) for t in ticks])
    else:
        axis.update(exponentformat="none", minor=dict(showgrid=False))


def limit_line(fig: go.Figure, x_span: tuple[float, float], y: float, name: str, colour: str, row=None, col=None):
    """A horizontal limit across ``x_span`` as a dashed line named in the legend (not an annotation on the
    plot, which the curves near the limit would cross)."""
    trace = go.Scatter(x=list(x_span), y=[y, y], mode="lines", name=name, hoverinfo="name+y",
                       line=dict(color=colour, dash="dash", width=2))
    if row is None:
        fig.add_trace(trace)
    else:
        fig.add_trace(trace, row=row, col=col)
