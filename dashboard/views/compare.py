"""The Setpoint comparison view: whole plans at several values of one lever, the recommendation, the
sensitivity, and the operating envelope under it (``views/envelope``)."""

from __future__ import annotations

import pandas as pd
import streamlit as st

from planner.errors import PlannerError
from planner.scenario.schema import Scenario
from planner.scenario.wording import render

from dashboard.compute import cache as compute
from planner.checks.lever_values import LEVERS

from dashboard.compute.results import default_comparison_values, lever_label
from dashboard.present import figures, tables
from dashboard.present.display import fmt, label
from dashboard.present.plaintext import escaped

from .compare_inputs import sensitivity_controls, values_text
from .compare_pick import mark_current, use_value_controls, used_message
from .page import Page

NEEDS_RESULTS = False


def draw(page: Page) -> None:
    comparison_view(page.scenario, page.scenario_json if not page.stale else None, page.unit_system)


def _lever_options(scenario: Scenario) -> list[str]:
    """The levers this scenario has (``compare.check_lever`` refuses the others)."""
    from planner.sweeps.compare import check_lever

    levers = []
    for lever in LEVERS:
        try:
            check_lever(scenario, lever)
        except ValueError:
            continue
        levers.append(lever)
    return levers


def _comparison_controls(scenario: Scenario, unit_system: str) -> tuple:
    """The lever, its display kind, the values as typed, the sensitivity box and the Compare button."""
    levers = _lever_options(scenario)
    gen = st.session_state.get("gen", 0)
    a, b, c = st.columns([1, 2, 1])
    lever = a.selectbox("Compare", levers, format_func=lever_label, key=f"cmp_lever{gen}")
    kind = LEVERS[lever].kind
    defaults = default_comparison_values(scenario, lever)
    default_text = values_text(defaults, kind, unit_system)
    gauge = " (gauge)" if kind == "pressure" else ""
    text = b.text_input(f"Values [{label(kind, unit_system)}]{gauge}", value=default_text,
                        key=f"cmp_values{gen}|{unit_system}|{lever}",
                        help="a list (40, 45, 50) or START:STOP:STEP (40:70:5)")
    sensitivity = sensitivity_controls(c, unit_system)
    run = st.button("Compare", type="primary", key=f"cmp_run{gen}")
    return lever, kind, text, sensitivity, run


def _run_comparison(scenario_json: str, lever: str, values_si: tuple, sensitivity) -> dict:
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
        comparison_result(saved["result"], unit_system, scenario)
    from .compare_odds import odds_section
    from .envelope import envelope_section

    odds_section(scenario, scenario_json, unit_system, lever, text)

    envelope_section(scenario, scenario_json, unit_system, lever, kind, text)


def comparison_result(result: dict, unit_system: str, scenario: Scenario | None = None) -> None:
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
    used_message()
    frame = mark_current(tables.comparison_frame(result, kind, unit_system), result, scenario)
    errors = [r.get("error", "") for r in result["rows"]]
    if any(errors):
        frame["Note"] = errors
    recommended = result.get("recommended")

    def highlight(row):
        colour = "background-color: #fcf3cf" if row.name == recommended else ""
        return [colour] * len(row)

    st.dataframe(frame.style.apply(highlight, axis=1).format(precision=2, thousands=",", na_rep="—"),
                 hide_index=True, width="stretch")
    use_value_controls(result, scenario, unit_system)
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
