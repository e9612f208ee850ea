"""The operating envelope on the comparison tab: the comparison's lever values at a range of ambients, as a
heat-map of total times with the envelope line (the lowest value finishing within the window with no stop)."""

from __future__ import annotations

import pandas as pd
import streamlit as st

from planner.checks.lever_values import lever_decimals
from planner.errors import PlannerError

from dashboard.compute import cache as compute
from dashboard.present import figures
from dashboard.present.display import fmt, label
from dashboard.present.plaintext import escaped

DEFAULT_AMBIENTS = {"SI": "-20:30:10", "US": "-4:86:18"}     # the same six ambients in °C and °F


def _grid_inputs(scenario, lever: str, values_text: str, ambient_text: str, unit_system: str):
    """SI values and ambients, each checked as its field takes it (ValueError/PlannerError naming the box)."""
    from planner.checks.lever_values import typed_values
    from planner.sweeps.compare import parse_range
    from planner.sweeps.envelope import typed_ambients

    values = tuple(typed_values(scenario, lever, parse_range(values_text), unit_system, "Values"))
    try:
        numbers = parse_range(ambient_text)
    except ValueError as exc:
        raise ValueError(f"Ambients: {exc}") from None
    return values, tuple(typed_ambients(scenario, numbers, unit_system, "Ambients"))


def envelope_section(scenario, scenario_json: str, unit_system: str, lever: str, kind: str, values_text: str) -> None:
    st.markdown("#### Operating envelope")
    gen = st.session_state.get("gen", 0)
    ambient_text = st.text_input(f"Ambients [{label('temperature', unit_system)}]", value=DEFAULT_AMBIENTS[unit_system],
                                 key=f"env_ambients{gen}|{unit_system}",
                                 help="a list (-20, 0, 20) or START:STOP:STEP; each ambient with every value above "
                                      "is one plan")
    if st.button("Envelope", key=f"env_run{gen}"):
        try:
            values, ambients = _grid_inputs(scenario, lever, values_text, ambient_text, unit_system)
        except (ValueError, PlannerError) as exc:
            st.error(escaped(str(exc)))
            return
        with st.spinner(f"Working out {len(values) * len(ambients)} plans…"):
            result = compute.cached_envelope(scenario_json, lever, values, ambients)
        st.session_state["envelope"] = {"json": scenario_json, "result": result}
    saved = st.session_state.get("envelope")
    if not saved:
        st.caption("Press Envelope for the lowest value above that finishes within the planned window with no stop, "
                   "at each ambient.")
        return
    if saved["json"] != scenario_json:
        st.warning("The inputs have changed since this envelope: press Envelope to work it out again.")
    result = saved["result"]
    if "error" in result:
        st.error(escaped(result["error"]))
        return
    st.plotly_chart(figures.envelope_figure(result, kind, unit_system), key="envelope_chart")
    decimals = lever_decimals(kind, result["values"], system=unit_system)
    ambient_decimals = lever_decimals("temperature", result["ambients_k"], least=0, system=unit_system)
    rows = [(fmt(e["ambient_k"], "temperature", unit_system, ambient_decimals),
             "none of the values" if e["value"] is None else fmt(e["value"], kind, unit_system, decimals))
            for e in result["envelope"]]
    st.dataframe(pd.DataFrame(rows, columns=["Ambient", "Lowest that finishes in the window, no stop"]),
                 hide_index=True, width="stretch")
