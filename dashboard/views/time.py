"""The Over time view: the transfer's timeline and the push-cold start-up."""

from __future__ import annotations

import streamlit as st

from planner.scenario.wording import render

from dashboard.present import figures, tables
from dashboard.present.plaintext import escaped

from .common import data_table
from .page import Page


NEEDS_RESULTS = True


def draw(page: Page) -> None:
    results, unit_system = page.results, page.unit_system
    plan = results.plan
    st.plotly_chart(figures.timeline_figure(plan, unit_system, results.destination_max_level), key="time_chart")
    cold = plan["startup"].get("push_cold") or {}
    if plan["startup"].get("mode") == "push_cold":
        st.markdown("#### Push-cold start-up (the plan starts this way)")
    else:
        st.markdown("#### Push-cold start-up (the alternative to pre-warming)")
    st.caption(escaped(render(cold.get("message", ""), unit_system)))
    rows = results.push_cold_rows or {}
    if rows.get("time_s"):
        data_table(tables.push_cold_frame(rows, unit_system))
        st.plotly_chart(figures.push_cold_figure(rows, unit_system), key="push_cold_chart")
    with st.expander("Timeline table"):
        data_table(tables.timeline_frame(plan, unit_system))
