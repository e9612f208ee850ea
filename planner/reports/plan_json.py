"""The plan as JSON (documented keys, SI) and as a readable text summary, for the command line."""

from __future__ import annotations

from planner.checks.caution import STANDING_CAUTION
from planner.checks.findings import assess, worst_severity
from planner.plain import plain
from planner.reports.findings_text import findings_json, findings_lines, flag_words, headline, start_status
from planner.reports.key_figures import figure_text, key_figures, outlet_rating, pump_withheld
from planner.scenario.units import si_unit_text
from planner.scenario.wording import Q, Sentence, format_quantity, money_text, render
from planner.transfer.plan import Plan

# the kinds of the numbers the plan document carries (their SI units head the document)
DOCUMENT_KINDS = ("temperature", "pressure", "length", "volume", "volume_flow", "time", "power", "energy")


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
    if pump_withheld(plan):
        doc.update(message=pump_withheld(plan), flow_m3_s=None, shaft_power_w=None, pump_head_m=None)
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


def _startup_dict(plan: Plan, arrays: bool) -> dict:
    warm, after = plan.prewarm, plan.after_prewarm
    doc = {
        "mode": plan.start_mode, "time_s": plan.startup_time_s,
        "line_start_temperature_k": plan.line_start_temperature_k,
        "prewarm": {
            "possible": warm.possible, "time_s": warm.time_s, "target_k": warm.target_k, "energy_j": warm.energy_j,
            "untraced": warm.untraced, "message": warm.message, "segments": [s.__dict__ for s in warm.segments],
        },
        "push_cold": _push_dict(plan.push_cold, arrays),
        "after_prewarm": None if after is None else _push_dict(after, arrays),
    }
    return doc


def _push_dict(push, arrays: bool) -> dict:
    """A push-out's figures; its rows only with ``arrays``; its suction march (``suction_profile``, a whole
    ``MarchResult`` the dashboard draws) is not part of the document."""
    return {k: v for k, v in push.__dict__.items() if k != "suction_profile" and (k != "rows" or arrays)}


def key_figures_dict(plan: Plan) -> dict:
    """The key figures (SI): value, or null with the reason in ``why``."""
    return {k.key: {"value": k.value, "quantity": k.quantity, "possible": k.possible, "why": k.why,
                    "withheld": k.withheld} for k in key_figures(plan)}


def plan_json(plan: Plan, arrays: bool = True, findings: list | None = None) -> dict:
    """The documented plan JSON (SI).  ``findings`` defaults to ``assess(plan)``."""
    found = assess(plan) if findings is None else findings
    t = plan.timeline
    rating = outlet_rating(plan)
    doc = {
        "scenario": plan.scenario.name,
        "units": "SI: " + ", ".join(si_unit_text(k) + (" (gauge)" if k == "pressure" else "") for k in DOCUMENT_KINDS)
                 + "; costs in the scenario's currency",
        "worst_severity": worst_severity(found),
        "headline": headline(found),
        "start": start_dict(plan),
        "timeline": {
            "completed": t.completed, "stop_reason": t.stop_reason, "total_time_s": t.total_time_s,
            "moved_m3": t.moved_m3, "steps": len(t.statuses), "statuses": t.statuses, "flags": sorted(t.flags),
        },
        "startup": _startup_dict(plan, arrays),
        "hold": {k: v for k, v in plan.hold.__dict__.items() if k != "segments"},
        "peak_discharge_pressure_pa": plan.peak_discharge_pressure_pa,
        "outlet_rating_pa": rating.value, "outlet_rating_where": rating.where,
        "energy": plan.energy.as_dict(),
        "costs": plan.costs.as_dict(),
        "total_time_s": plan.total_time_s,
        "planned_window_s": plan.scenario.schedule.planned_window,
        "weather": None if plan.weather is None else {**plan.weather.as_dict(), "startup_at_s": plan.startup_at_s,
                                                      "stop_at_s": plan.stop_at_s, "coldest_at_s": plan.coldest_at_s,
                                                      "transfer_at_s": plan.transfer_at_s},
        "key_figures": key_figures_dict(plan),
        "findings": findings_json(found),
        "caution": STANDING_CAUTION,
    }
    doc["hold"]["segments"] = [s.__dict__ for s in plan.hold.segments]
    if arrays:
        doc["timeline"]["arrays"] = {k: v.tolist() for k, v in t.arrays.items()}
    _withhold_pump_figures(plan, doc)
    return plain(doc)


# what a centrifugal pump's curve makes, by place in the plan JSON (withheld beyond ANSI/HI 9.6.7)
# (the times it makes set every energy drawn over the transfer too)
_PUMP_MADE = {"timeline": ("total_time_s",),
              "energy": ("tracing_j", "tracing_kwh", "tracing_steam_kg", "pump_j", "pump_kwh", "vessel_heating_j",
                         "vessel_heating_kwh", "vessel_heating_steam_kg", "electrical_j", "electrical_kwh", "steam_kg"),
              "costs": ("electricity", "steam", "energy", "demurrage", "demurrage_hours", "total")}
_PUMP_MADE_ARRAYS = ("time_s", "flow_m3_s", "shaft_power_w")


def _withhold_pump_figures(plan: Plan, doc: dict) -> None:
    """Beyond ANSI/HI 9.6.7 the figures the pump's curve makes are null (and the timeline's columns of
    them left out), and ``withheld`` says why; the line's own figures (pressures, temperatures) stay."""
    why = pump_withheld(plan)
    doc["withheld"] = None
    if not why:
        return
    for section, keys in _PUMP_MADE.items():
        doc[section].update({key: None for key in keys})
    doc["costs"]["complete"] = False
    doc["total_time_s"] = None
    for key in _PUMP_MADE_ARRAYS:
        doc["timeline"].get("arrays", {}).pop(key, None)
    for line in ("discharge_line", "suction_line"):
        if doc["start"].get(line):
            doc["start"][line].update(flow_m3_s=None, mass_flow_kg_s=None)
    doc["withheld"] = {"why": why, "figures": [f"{section}.{key}" for section, keys in _PUMP_MADE.items()
                                               for key in keys] + ["start.flow_m3_s", "start.shaft_power_w"]}


def _q(value, kind, system, decimals=None) -> str:
    return format_quantity(value, kind, system, decimals)


def _start_lines(plan: Plan, system: str, found: list) -> list[str]:
    op = plan.start
    withheld = pump_withheld(plan)
    lines = [f"  start: {start_status(op.status, worst_severity(found))} — {render(withheld or op.message, system)}"]
    if op.flags:
        lines.append(f"  flags: {flag_words(op.flags)}")
    if withheld and op.point is not None:
        p = op.point
        lines.append(f"  flow, shaft power and pump energy not given; line at the start: discharge "
                     f"{_q(p.discharge_pressure, 'pressure', system)} (gauge), suction "
                     f"{_q(p.suction_pressure, 'pressure', system)} (gauge)")
    elif op.point is not None and op.moving:
        p = op.point
        lines.append(f"  flow {_q(op.flow, 'volume_flow', system, 2)}, pump differential "
                     f"{_q(p.pump_differential, 'pressure', system)}, discharge {_q(p.discharge_pressure, 'pressure', system)} "
                     f"(gauge), suction {_q(p.suction_pressure, 'pressure', system)} (gauge)")
        lines.append(f"  NPSH available {_q(p.npsh_available, 'head', system)}, required "
                     f"{_q(op.npsh_required, 'head', system)}, margin {_q(p.npsh_available - op.npsh_required, 'head', system)}")
        lines.append(f"  shaft power {_q(op.shaft_power, 'power', system)}; outlet "
                     f"{_q(p.outlet_temperature, 'temperature', system)}")
    return lines


def _transfer_lines(plan: Plan, system: str) -> list[str]:
    t = plan.timeline
    figures = {k.key: k for k in key_figures(plan)}
    lines = [f"  transfer: {_q(t.moved_m3, 'volume', system)} — {figure_text(figures['transfer_time'], system)}"]
    if len(t.arrays["flow_m3_s"]) and not pump_withheld(plan):
        q, src = t.arrays["flow_m3_s"], t.arrays["source_temperature_k"]
        lines.append(f"  flow from {_q(q[0], 'volume_flow', system)} to {_q(q[-1], 'volume_flow', system)}; source from "
                     f"{_q(src[0], 'temperature', system)} to {_q(src[-1], 'temperature', system)}")
    push = plan.chosen_push
    startup = ("not given" if push is not None and not push.hi_in_range else
               "not possible" if plan.startup_time_s is None else _q(plan.startup_time_s, "time", system, 2))
    lines.append(f"  start-up ({plan.start_mode}): {startup}; line starts at "
                 f"{_q(plan.line_start_temperature_k, 'temperature', system)}")
    lines.append(f"    pre-warm: {render(plan.prewarm.message, system)}")
    lines.append(f"    push cold: {render(plan.push_cold.message, system)}")
    if plan.after_prewarm is not None:
        lines.append(f"    after pre-warm: {render(plan.after_prewarm.message, system)}")
    peak = plan.peak_discharge_pressure_pa
    if peak is not None:
        lines.append(f"  peak discharge pressure {_q(peak, 'pressure', system)} (gauge; running or at the start)")
    total = figures["total_time"]
    lines.append(f"  total time: {figure_text(total, system, reason=not total.withheld)} against a planned window of "
                 f"{_q(plan.scenario.schedule.planned_window, 'time', system, 2)}")
    return lines + _weather_lines(plan, system)


def _weather_lines(plan: Plan, system: str) -> list[str]:
    """The weather the plan took, when it has a ``[weather]`` section."""
    weather = plan.weather
    if weather is None:
        return []
    kind = "design day (ASHRAE fraction of the daily range)" if weather.source == "design_day" else \
        f"table of {len(weather.times_s)} rows"
    moments = (("start-up taken", plan.startup_at_s), ("coldest", plan.coldest_at_s), ("stop checked", plan.stop_at_s))
    parts = [render(Sentence("{what} {when}: {amb}, wind {w}", what=what, when=plan.when(at),
                             amb=Q(weather.state(at)[0], "temperature"), w=Q(weather.state(at)[1], "speed")), system)
             for what, at in moments]
    start = f" from {weather.start.isoformat(timespec='minutes')}" if weather.start else ""
    return [f"  weather: {kind}{start}; " + "; ".join(parts)]


def _hold_lines(plan: Plan, system: str) -> list[str]:
    h = plan.hold
    held = lambda v: "holds 14 days" if v is None else _q(v, "time", system)  # noqa: E731
    lines = [render(Sentence("  stop: limit {t} ({why}); first to reach it with tracing on {a} ({sa}), tracing failed "
                             "{b} ({sb})", t=Q(h.limit_temperature_k, "temperature"), why=h.limit_reason,
                             a=held(h.time_to_limit_traced_s), sa=h.first_to_set_traced,
                             b=held(h.time_to_limit_failed_s), sb=h.first_to_set_failed), system)]
    if h.gelled_restart_pressure_pa > 0:
        lines.append(f"  gelled restart needs about {_q(h.gelled_restart_pressure_pa, 'pressure', system)} (4 τy L / D)")
    return lines


def _energy_lines(plan: Plan, system: str) -> list[str]:
    e, c = plan.energy, plan.costs
    figures = {k.key: k for k in key_figures(plan)}
    if pump_withheld(plan):
        return [f"  energy and cost: {figure_text(figures['total_cost'], system)}"]
    lines = [f"  energy: tracing {_q(e.tracing_electric_j, 'energy', system)} / {_q(e.tracing_steam_kg, 'mass', system)} "
             f"steam, pump {_q(e.pump_j, 'energy', system)}, vessel heating {_q(e.vessel_heating_electric_j, 'energy', system)}"
             f" / {_q(e.vessel_heating_steam_kg, 'mass', system)} steam"]
    if c.complete:
        lines.append(f"  cost: energy {money_text(c.energy)} + demurrage {money_text(c.demurrage)} = {money_text(c.total, c.currency)}")
    else:
        lines.append(f"  cost: {figure_text(figures['total_cost'], system)}")
    return lines


def plan_text(plan: Plan, system: str = "SI", findings: list | None = None, odds: dict | None = None) -> str:
    """The plan in words: first line the worst finding (STOP and why), then the findings by severity,
    then the figures, all in ``system`` ("SI" or "US"); with ``odds`` (``sweeps.uncertainty.plan_odds``)
    their block after the figures."""
    found = assess(plan) if findings is None else findings
    lines = [headline(found, system), "", plan.scenario.name, ""]
    lines += findings_lines(found, system)
    lines.append("")
    lines += _start_lines(plan, system, found)
    lines.append("")
    lines += _transfer_lines(plan, system) + _hold_lines(plan, system)
    lines.append("")
    lines += _energy_lines(plan, system)
    lines.append("")
    if odds is not None:
        from planner.reports.uncertainty_text import odds_lines, plain_outside_words

        outside = plain_outside_words(odds, plan.total_time_s, system)
        lines += odds_lines(odds, system) + (["    note: " + outside] if outside else []) + [""]
    lines.append("  " + STANDING_CAUTION)
    return "\n".join(lines)
