"""The result views (tabs) of the dashboard: each lays out one bundle from ``results.build_bundle``."""

from __future__ import annotations

import pandas as pd
import streamlit as st

from planner.checks.finding import MOST_SEVERE_FIRST
from planner.errors import PlannerError
from planner.records.links import VIEWS as LINK_VIEWS
from planner.scenario.schema import Scenario

from . import figures, tables
from . import compute
from .plaintext import escaped, escaped_table
from planner.reports.findings_text import flag_words, headline, start_status
from planner.reports.key_figures import figure_text
from planner.scenario.wording import render

from .display import (fit_quality_text, fmt, label, law_parameters_text, to_display,
                      with_unit, words)
from .results import LEVERS, default_comparison_values

# Tab title of each view a link can name (planner.records.links.VIEWS owns the names and their order).
VIEW_TITLES = {"plan": "Plan", "inputs": "Inputs", "line": "Along the line", "time": "Over time",
               "compare": "Setpoint comparison", "product": "Product", "calibration": "Calibration",
               "review": "Review"}
TAB_TITLES = [VIEW_TITLES[view] for view in LINK_VIEWS]
VIEW_OF_TITLE = {title: view for view, title in VIEW_TITLES.items()}

SEVERITY_STYLE = {
    "stop": (st.error, ":material/dangerous:", "Stop — do not start as planned"),
    "warning": (st.warning, ":material/warning:", "Warnings"),
    "caution": (st.info, ":material/report:", "Cautions"),
    "info": (st.info, ":material/info:", "Information"),
}


def data_table(frame: pd.DataFrame, decimals: int = 3) -> None:
    """A results table: numbers at ``decimals`` with thousands separators, a missing value as "—"
    (never "None")."""
    st.dataframe(frame.style.format(precision=decimals, thousands=",", na_rep="—"), hide_index=True, width="stretch")


def key_figures_strip(bundle: dict, unit_system: str) -> None:
    """The plan's key figures as metrics; labels are stable (tests read them)."""
    figs = bundle["key_figures"]         # the planner's (SI); figure_text is the one rendering
    for row in (figs[:4], figs[4:]):
        cols = st.columns(len(row))
        for col, k in zip(cols, row):
            note = render(k.note, unit_system)
            # "not possible" / "not given" in the figure's place, the reason beneath it at reading size
            col.metric(escaped(k.label), escaped(figure_text(k, unit_system, reason=False)), delta=escaped(note) or None,
                       delta_color="off", delta_arrow="off", help=escaped(k.help) or None, border=True)
            if k.withheld or not k.possible:
                col.caption(escaped(render(k.why, unit_system)))


def status_line(bundle: dict, unit_system: str = "SI") -> None:
    """The plan's state, following its worst finding (a stop is never shown as ok), then the pump's
    outcome at the start in the user's units."""
    start = bundle["plan"]["start"]
    timeline = bundle["plan"]["timeline"]
    findings = bundle.get("findings") or []
    head = headline(findings, unit_system)
    worst = bundle["plan"].get("worst_severity", "info")
    message = (f"At the start: **{escaped(start_status(start.get('status', ''), worst))}** — "
               f"{escaped(render(start.get('message', ''), unit_system))}")
    if start.get("flags"):
        message += f" (flags: {escaped(flag_words(start['flags']))})"
    if not timeline.get("completed"):
        message += f"  \nThe transfer stops: {escaped(render(timeline.get('stop_reason', ''), unit_system))}"
    box = {"stop": st.error, "warning": st.warning, "caution": st.info}.get(worst, st.success)
    box(f"**{escaped(head)}**  \n{message}")


def findings_block(bundle: dict, unit_system: str) -> None:
    findings = bundle.get("findings")
    if findings is None:
        st.info(f"Findings: {escaped(bundle.get('findings_note') or 'not available yet')}.")
        return
    counts = {s: sum(1 for f in findings if f.get("severity") == s) for s in MOST_SEVERE_FIRST}
    st.markdown("#### Findings  \n" + " · ".join(f"{counts[s]} {s}" for s in MOST_SEVERE_FIRST))
    for severity in MOST_SEVERE_FIRST:
        items = [f for f in findings if f.get("severity") == severity]
        if not items:
            continue
        box, icon, heading = SEVERITY_STYLE[severity]
        with st.expander(f"{heading} ({len(items)})", icon=icon, expanded=severity in ("stop", "warning")):
            for f in items:
                lines = [f"**{escaped(f.get('title', ''))}** — {escaped(render(f.get('message', ''), unit_system))}"]
                lines += [escaped(line) for line in tables.finding_details(f, unit_system)]
                lines.append(escaped(f.get("code", "")))
                box("  \n".join(lines), icon=icon)


def plan_view(bundle: dict, unit_system: str) -> None:
    status_line(bundle, unit_system)
    findings_block(bundle, unit_system)
    st.markdown("#### Start-up and stops")
    st.table(escaped_table(tables.startup_hold_frame(bundle["plan"], unit_system)), hide_index=True)
    left, right = st.columns(2)
    left.markdown("#### Energy and cost")
    left.table(escaped_table(tables.energy_cost_frame(bundle["plan"], unit_system)), hide_index=True)
    start = bundle["plan"]["start"]
    right.markdown("#### Pump at the start")
    rows = [
        ("Flow", fmt(start.get("flow_m3_s"), "volume_flow", unit_system)),
        ("Speed", f"{start['speed_rpm']:.0f} rpm" if start.get("speed_rpm") else "—"),
        ("Discharge pressure (gauge)", fmt(start.get("discharge_pressure_pa"), "pressure", unit_system)),
        ("Suction pressure (gauge)", fmt(start.get("suction_pressure_pa"), "pressure", unit_system)),
        ("Pump differential", fmt(start.get("pump_differential_pa"), "pressure", unit_system)),
        ("Shaft power", fmt(start.get("shaft_power_w"), "power", unit_system)),
        ("NPSH available / required", f"{fmt(start.get('npsh_available_m'), 'head', unit_system)} / "
                                      f"{fmt(start.get('npsh_required_m'), 'head', unit_system)}"),
        ("Relief recirculation", fmt(start.get("relief_flow_m3_s"), "volume_flow", unit_system)),
    ]
    right.table(escaped_table(pd.DataFrame(rows, columns=["Item", "Value"])), hide_index=True)


def line_view(bundle: dict, unit_system: str) -> None:
    profile = bundle.get("profile")
    if profile is None:
        st.info("No profile along the line: the pump does not move the product at the start.")
        return
    st.plotly_chart(figures.line_figure(profile, bundle["segments"], unit_system,
                                        touch_limit_k=bundle.get("touch_limit_k")), key="line_chart")
    st.caption("At the starting operating point. Dotted lines: segment boundaries. The rating line is each "
               "segment's own rating or its ASME B16.5 flange rating at the product temperature, whichever is lower.")
    st.markdown("#### Segments of the discharge route")
    data_table(tables.segments_frame(bundle["segments"], unit_system), 2)
    with st.expander("Profile table (step ends and mid-steps)"):
        data_table(tables.profile_frame(profile, bundle["segments"], unit_system))


def time_view(bundle: dict, unit_system: str) -> None:
    plan = bundle["plan"]
    st.plotly_chart(figures.timeline_figure(plan, unit_system, bundle.get("destination_max_level")), key="time_chart")
    cold = plan["startup"].get("push_cold") or {}
    if plan["startup"].get("mode") == "push_cold":
        st.markdown("#### Push-cold start-up (the plan starts this way)")
    else:
        st.markdown("#### Push-cold start-up (the alternative to pre-warming)")
    st.caption(escaped(render(cold.get("message", ""), unit_system)))
    rows = bundle.get("push_cold_rows") or {}
    if rows.get("time_s"):
        data_table(tables.push_cold_frame(rows, unit_system))
        st.plotly_chart(figures.push_cold_figure(rows, unit_system), key="push_cold_chart")
    with st.expander("Timeline table"):
        data_table(tables.timeline_frame(plan, unit_system))


def product_view(bundle: dict, unit_system: str) -> None:
    curve = bundle["product"]
    st.plotly_chart(figures.viscosity_figure(curve, unit_system), key="product_chart")
    rows = [
        ("Product", curve["name"] + (" — illustrative preset" if curve.get("illustrative")
                                     and "illustrative" not in curve["name"].lower() else "")),
        ("Law", f"{words(curve['law'])} ({law_parameters_text(curve)})"),
        ("Fit", fit_quality_text(curve)),
        ("Calibration", "none: the law as fitted" if curve.get("viscosity_factor", 1.0) == 1.0 else
         f"viscosity × {curve['viscosity_factor']:.4g} (the scenario's [calibration]) at every temperature"),
        ("Fitted range", f"{fmt(curve.get('t_min'), 'temperature', unit_system)} to "
                         f"{fmt(curve.get('t_max'), 'temperature', unit_system)}"),
        ("No-flow temperature", fmt(curve["no_flow_temperature"], "temperature", unit_system)),
        ("Highest allowed temperature", fmt(curve["max_temperature"], "temperature", unit_system)),
        ("Density at 20 °C", fmt(curve["density_at_20c"], "density", unit_system)),
        ("Specific heat at 20 °C", fmt(curve["specific_heat_at_20c"], "specific_heat", unit_system)),
        ("Thermal conductivity at 20 °C", fmt(curve["conductivity_at_20c"], "conductivity", unit_system)),
        ("Rheology", words(curve["rheology"])),
    ]
    st.table(escaped_table(pd.DataFrame(rows, columns=["Item", "Value"])), hide_index=True)
    points = pd.DataFrame({
        with_unit("Temperature", "temperature", unit_system):
            [to_display(t, "temperature", unit_system) for t in curve["lab_temperature"]],
        with_unit("Viscosity", "dynamic_viscosity", unit_system):
            [to_display(v, "dynamic_viscosity", unit_system) for v in curve["lab_viscosity"]],
    })
    st.markdown("#### Lab points (edit them under Inputs → Product)")
    data_table(points, 2)


# ---------------------------------------------------------------------------------------- comparison

def _lever_options(scenario: Scenario) -> list[str]:
    kind = scenario.tracing.kind
    levers = []
    if kind == "steam":
        levers.append("steam_pressure")
    if kind != "none":
        levers.append("setpoint")
    levers += ["pump_speed", "flow_limit"]
    return levers


def _comparison_controls(scenario: Scenario, unit_system: str) -> tuple[str, str, str, bool, bool]:
    """The lever, its display kind, the values as typed, the sensitivity box and the Compare button."""
    levers = _lever_options(scenario)
    gen = st.session_state.get("gen", 0)
    a, b, c = st.columns([1, 2, 1])
    lever = a.selectbox("Compare", levers, format_func=lambda k: LEVERS[k][0], key=f"cmp_lever{gen}")
    kind = LEVERS[lever][1]
    defaults = default_comparison_values(scenario, lever)
    digits = 0 if kind in ("temperature", "rotational_speed") else 1
    default_text = ", ".join(f"{to_display(v, kind, unit_system):.{digits}f}" for v in defaults)
    text = b.text_input(f"Values [{label(kind, unit_system)}]", value=default_text,
                        key=f"cmp_values{gen}|{unit_system}|{lever}",
                        help="a list (40, 45, 50) or START:STOP:STEP (40:70:5)")
    sensitivity = c.checkbox("With sensitivity", value=False, key=f"cmp_sens{gen}",
                             help="also with the ambient ±10 K and the viscosity ±20 % (five times the work)")
    run = st.button("Compare", type="primary", key=f"cmp_run{gen}")
    return lever, kind, text, sensitivity, run


def _run_comparison(scenario_json: str, lever: str, values_si: tuple, sensitivity: bool) -> dict:
    """The comparison for these inputs: from this process's memory when it has run before, else worked
    out now with a progress bar (drawn here, outside any cached function, so every repeat works)."""
    found = compute.cached_comparison_result(scenario_json, lever, values_si, sensitivity)
    if found is not None:
        return found
    total = len(values_si) * (5 if sensitivity else 1)
    with st.status(f"Working out {total} plans…", expanded=True) as status:
        bar = st.progress(0.0, text=f"0/{total} plans")

        def progress(done, n):
            bar.progress(min(1.0, done / max(n, 1)), text=f"{done}/{n} plans")

        result = compute.comparison(scenario_json, lever, values_si, sensitivity, progress=progress)
        bar.progress(1.0, text=f"{total}/{total} plans")
        failed = "error" in result
        status.update(label="Comparison failed" if failed else "Comparison done",
                      state="error" if failed else "complete", expanded=False)
    return result


def comparison_view(scenario: Scenario | None, scenario_json: str | None, unit_system: str) -> None:
    """Plans at several values of a lever (tracing setpoint first); the recommended row is starred."""
    if scenario is None or scenario_json is None:
        st.info("Fix the inputs first: the comparison runs on a valid scenario.")
        return
    lever, kind, text, sensitivity, run = _comparison_controls(scenario, unit_system)
    if run:
        from planner.sweeps.compare import parse_range
        from planner.checks.lever_values import typed_values

        try:   # each value checked against the lever's field in the unit typed, none twice
            values_si = tuple(typed_values(scenario, lever, parse_range(text), unit_system, "Values"))
        except (ValueError, PlannerError) as exc:
            st.error(escaped(str(exc)))
            return
        result = _run_comparison(scenario_json, lever, values_si, sensitivity)
        st.session_state["comparison"] = {"json": scenario_json, "result": result}
    saved = st.session_state.get("comparison")
    if not saved:
        st.caption("Choose the values and press Compare: each value is a whole plan.")
    else:
        if saved["json"] != scenario_json:
            st.warning("The inputs have changed since this comparison: press Compare to run it again.")
        comparison_result(saved["result"], unit_system)
    from .envelope_view import envelope_section

    envelope_section(scenario, scenario_json, unit_system, lever, kind, text)


def comparison_result(result: dict, unit_system: str) -> None:
    """A finished comparison: the recommendation, the table, the charts and the sensitivity."""
    if "error" in result:
        st.error(escaped(result["error"]))
        return
    kind = result["kind"]
    if result.get("recommended") is not None:
        # the reason starts with the recommended value ("45 °C: lowest total cost ...")
        st.success(f"Recommended: {escaped(render(result['reason'], unit_system))}")
    else:
        st.error(escaped(render(result["reason"], unit_system) or "no value can be recommended"))
    if result.get("end_of_range"):
        st.info(escaped(render(result["end_of_range"], unit_system)))
    frame = tables.comparison_frame(result, kind, unit_system)
    errors = [r.get("error", "") for r in result["rows"]]
    if any(errors):
        frame["Note"] = errors
    recommended = result.get("recommended")

    def highlight(row):
        colour = "background-color: #fcf3cf" if row.name == recommended else ""
        return [colour] * len(row)

    st.dataframe(frame.style.apply(highlight, axis=1).format(precision=2, thousands=",", na_rep="—"),
                 hide_index=True, width="stretch")
    st.plotly_chart(figures.comparison_figure(result, kind, unit_system), key="comparison_chart")
    if result.get("sensitivity"):
        st.markdown("#### Sensitivity")
        rows = [(render(case["case"], unit_system), fmt(case.get("recommended_value"), kind, unit_system),
                 render(case.get("reason", ""), unit_system))
                for case in result["sensitivity"]]
        st.dataframe(pd.DataFrame(rows, columns=["Case", "Recommended", "Why"]), hide_index=True, width="stretch")
        fig = figures.sensitivity_figure(result, kind, unit_system)
        if fig is not None:
            st.plotly_chart(fig, key="sensitivity_chart")
