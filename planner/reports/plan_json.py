"""The plan as JSON (documented keys, SI) and as a readable text summary, for the command line."""

from __future__ import annotations

import math

from planner.transfer.hold import hours
from planner.transfer.plan import Plan
from planner.reports.text import STANDING_CAUTION


def _clean(value):
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, dict):
        return {k: _clean(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_clean(v) for v in value]
    if hasattr(value, "tolist"):
        return _clean(value.tolist())
    if isinstance(value, set):
        return sorted(value)
    return value


def peak_discharge_pressure(plan: Plan) -> float | None:
    """Highest gauge pressure at the pump outlet: running (timeline) or pushing the contents out at the start."""
    values = list(plan.timeline.arrays["discharge_pressure_pa"])
    if plan.startup_push is not None:
        values.append(plan.startup_push.peak_discharge_pressure_pa)
    return float(max(values)) if values else None


def start_dict(plan: Plan) -> dict:
    op = plan.start
    point = op.point
    doc = {
        "status": op.status, "message": op.message, "flags": list(op.flags), "flow_m3_s": op.flow,
        "speed_rpm": op.speed * 60.0 if op.speed else None, "shaft_power_w": op.shaft_power,
        "npsh_required_m": op.npsh_required, "npsh_limited_flow_m3_s": op.npsh_limited_flow,
        "relief_flow_m3_s": op.relief_flow, "hi_parameter_b": op.hi_b, "hi_in_range": op.hi_in_range,
        "pump_head_m": op.pump_head,
    }
    if point is not None:
        doc.update({
            "suction_pressure_pa": point.suction_pressure, "discharge_pressure_pa": point.discharge_pressure,
            "pump_differential_pa": point.pump_differential, "npsh_available_m": point.npsh_available,
            "npsh_margin_m": point.npsh_available - op.npsh_required,
            "pump_inlet_temperature_k": point.pump_inlet_temperature, "outlet_temperature_k": point.outlet_temperature,
            "discharge_line": point.discharge.as_dict(),
            "suction_line": point.suction.as_dict() if point.suction else None,
        })
    return doc


def plan_json(plan: Plan, arrays: bool = True) -> dict:
    t = plan.timeline
    doc = {
        "scenario": plan.scenario.name,
        "units": "SI: K, Pa (gauge), m, m3, m3/s, s, W, J; costs in the scenario's currency",
        "start": start_dict(plan),
        "timeline": {
            "completed": t.completed, "stop_reason": t.stop_reason, "total_time_s": t.total_time_s,
            "moved_m3": t.moved_m3, "steps": len(t.statuses), "statuses": t.statuses, "flags": sorted(t.flags),
        },
        "startup": {
            "mode": plan.start_mode, "time_s": plan.startup_time_s,
            "line_start_temperature_k": plan.line_start_temperature_k,
            "prewarm": {
                "possible": plan.prewarm.possible, "time_s": plan.prewarm.time_s, "target_k": plan.prewarm.target_k,
                "energy_j": plan.prewarm.energy_j, "untraced": plan.prewarm.untraced, "message": plan.prewarm.message,
                "segments": [s.__dict__ for s in plan.prewarm.segments],
            },
            "push_cold": {k: v for k, v in plan.push_cold.__dict__.items() if k != "rows"},
        },
        "hold": {k: v for k, v in plan.hold.__dict__.items() if k != "segments"},
        "peak_discharge_pressure_pa": peak_discharge_pressure(plan),
        "energy": plan.energy,
        "costs": plan.costs,
        "total_time_s": plan.total_time_s,
        "planned_window_s": plan.scenario.schedule.planned_window,
        "caution": STANDING_CAUTION,
    }
    doc["hold"]["segments"] = [s.__dict__ for s in plan.hold.segments]
    after = plan.after_prewarm
    doc["startup"]["after_prewarm"] = None if after is None else {k: v for k, v in after.__dict__.items() if k != "rows"}
    if arrays:
        doc["timeline"]["arrays"] = {k: v.tolist() for k, v in t.arrays.items()}
        doc["startup"]["push_cold"]["rows"] = plan.push_cold.rows
        if after is not None:
            doc["startup"]["after_prewarm"]["rows"] = after.rows
    return _clean(doc)


def _h(seconds) -> str:
    return "—" if seconds is None else f"{seconds / 3600:.2f} h"


def plan_text(plan: Plan) -> str:
    s = plan.scenario
    op = plan.start
    lines = [s.name, ""]
    lines.append(f"  start: {op.status} — {op.message}")
    if op.flags:
        lines.append(f"  flags: {', '.join(op.flags)}")
    if op.point is not None and op.moving:
        p = op.point
        lines.append(f"  flow {op.flow * 3600:.2f} m³/h, pump differential {p.pump_differential / 1e5:.2f} bar, "
                     f"discharge {p.discharge_pressure / 1e5:.2f} bar(g), suction {p.suction_pressure / 1e5:.2f} bar(g)")
        lines.append(f"  NPSH available {p.npsh_available:.2f} m, required {op.npsh_required:.2f} m, "
                     f"margin {p.npsh_available - op.npsh_required:.2f} m")
        lines.append(f"  shaft power {op.shaft_power / 1e3:.2f} kW; outlet {p.outlet_temperature - 273.15:.1f} °C")
    t = plan.timeline
    lines.append("")
    lines.append(f"  transfer: {t.moved_m3:.1f} m³ in {_h(t.total_time_s)}" + ("" if t.completed else f" — STOPPED: {t.stop_reason}"))
    if len(t.arrays["flow_m3_s"]):
        q = t.arrays["flow_m3_s"] * 3600
        lines.append(f"  flow from {q[0]:.1f} to {q[-1]:.1f} m³/h; source from "
                     f"{t.arrays['source_temperature_k'][0] - 273.15:.1f} to {t.arrays['source_temperature_k'][-1] - 273.15:.1f} °C")
    lines.append(f"  start-up ({plan.start_mode}): {_h(plan.startup_time_s)}; line starts at {plan.line_start_temperature_k - 273.15:.1f} °C")
    lines.append(f"    pre-warm: {plan.prewarm.message}")
    lines.append(f"    push cold: {plan.push_cold.message}")
    if plan.after_prewarm is not None:
        lines.append(f"    after pre-warm: {plan.after_prewarm.message}")
    peak = peak_discharge_pressure(plan)
    if peak is not None:
        lines.append(f"  peak discharge pressure {peak / 1e5:.2f} bar(g) (running or at the start)")
    h = plan.hold
    lines.append(f"  stop: limit {h.limit_temperature_k - 273.15:.1f} °C ({h.limit_reason}); first to reach it with tracing on "
                 f"{hours(h.time_to_limit_traced_s)} ({h.first_to_set_traced}), tracing failed {hours(h.time_to_limit_failed_s)} "
                 f"({h.first_to_set_failed})")
    if h.gelled_restart_pressure_pa > 0:
        lines.append(f"  gelled restart needs about {h.gelled_restart_pressure_pa / 1e5:.2f} bar (4 τy L / D)")
    e, c = plan.energy, plan.costs
    lines.append("")
    lines.append(f"  energy: tracing {e['tracing_kwh']:.1f} kWh / {e['tracing_steam_kg']:.0f} kg steam, pump {e['pump_kwh']:.1f} kWh, "
                 f"vessel heating {e['vessel_heating_kwh']:.1f} kWh / {e['vessel_heating_steam_kg']:.0f} kg steam")
    lines.append(f"  cost: energy {c['energy']:.2f} + demurrage {c['demurrage']:.2f} = {c['total']:.2f} {c['currency']}")
    lines.append(f"  total time {_h(plan.total_time_s)} against a planned window of {_h(s.schedule.planned_window)}")
    lines.append("")
    lines.append("  " + STANDING_CAUTION)
    return "\n".join(lines)
