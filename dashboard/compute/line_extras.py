"""What the Along the line view shows of the suction line, and the pump chart, taken from the plan's own
objects in the worker process (no Streamlit here; everything SI).

``suction_profiles(plan)``: the suction line's march at the start (``Plan.suction_profile``), at the
start of pushing the cold contents out (``Plan.push_cold.suction_profile``) and at the start of pushing
the pre-warmed contents out (``Plan.after_prewarm.suction_profile``), each as arrays along its length,
and the pre-warm's own entries for the suction segments (``Prewarm.segments``, lumped per segment).
``pump_chart_data(plan)``: ``planner.transfer.pump_chart.pump_chart`` as plain data.
"""

from __future__ import annotations

import math
from dataclasses import asdict

import numpy as np

from planner.errors import PlannerError
from planner.line.march import MarchResult
from planner.transfer.pump_chart import pump_chart

# The suction line's moments, in the order the view draws them: (key, words)
SUCTION_MOMENTS = (("start", "running, at the start"),
                   ("push_cold", "pushing the cold contents out: the pump's first flow"),
                   ("after_prewarm", "after the pre-warm: pushing the warmed contents out, first flow"))


def march_arrays(result: MarchResult | None, flow_m3_s: float, contents_k: float) -> dict | None:
    """A march along the suction line as arrays: nodes (x, bulk temperature, gauge pressure: the march
    starts at the source's pressure at the outlet) and steps (x, viscosity, jacket temperature)."""
    if result is None or not result.nodes:
        return None
    nodes = {k: np.asarray(result.nodes[k], dtype=float) for k in ("x", "temperature", "pressure")}
    steps = {k: np.asarray(result.steps[k], dtype=float) for k in ("x", "viscosity", "jacket_temperature")}
    return {"nodes": nodes, "steps": steps, "flow_m3_s": flow_m3_s, "contents_k": contents_k,
            "status": result.summary.status, "sets_at_m": result.summary.sets_at_m}


def suction_profiles(plan) -> dict:
    """{moment key: march arrays} for each moment the plan has (see ``SUCTION_MOMENTS``)."""
    out = {}
    if plan.suction_profile is not None and plan.start.moving:
        out["start"] = march_arrays(plan.suction_profile, plan.start.flow, plan.scenario.source.temperature)
    for key, push in (("push_cold", plan.push_cold), ("after_prewarm", plan.after_prewarm)):
        if push is not None and push.possible and getattr(push, "suction_profile", None) is not None:
            out[key] = march_arrays(push.suction_profile, push.initial_flow_m3_s, push.start_temperature_k)
    return {k: v for k, v in out.items() if v is not None}


def prewarm_suction(plan) -> list[dict]:
    """The pre-warm's entries for the suction line's segments (lumped: one stagnant metre per segment)."""
    warm = plan.prewarm
    return [{"segment": s.segment, "traced": s.traced, "reached": s.reached, "time_s": s.time_s,
             "settles_at_k": s.settles_at_k if math.isfinite(s.settles_at_k) else None,
             "start_k": warm.start_temperature_k, "target_k": warm.target_k}
            for s in warm.segments if s.line == "suction"]


def pump_chart_data(plan) -> dict | None:
    """The pump chart at the start (SI) as plain data, None without a system, or ``{"error": why}`` when the
    system curve cannot be worked out (the rest of the plan's results stand)."""
    try:
        chart = pump_chart(plan)
    except (PlannerError, ValueError) as exc:
        return {"error": f"the pump chart cannot be drawn: {exc}"}
    return None if chart is None else asdict(chart)
