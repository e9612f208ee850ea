"""The Plan view: the plan's state, its findings, start-up and stops, energy and cost, the pump at the start."""

from __future__ import annotations

import streamlit as st

from dashboard.present import tables

import pandas as pd

from dashboard.present.display import fmt
from dashboard.present.plaintext import escaped, escaped_table
from planner.scenario.wording import render
from dashboard.present.pump_figure import pump_caption, pump_figure

from .common import findings_block, status_line
from .page import Page


NEEDS_RESULTS = True


def draw(page: Page) -> None:
    results, unit_system = page.results, page.unit_system
    status_line(results, unit_system)
    findings_block(results, unit_system)
    st.markdown("#### Start-up and stops")
    st.table(escaped_table(tables.startup_hold_frame(results.plan, unit_system)), hide_index=True)
    left, right = st.columns(2)
    left.markdown("#### Energy and cost")
    left.table(escaped_table(tables.energy_cost_frame(results.plan, unit_system)), hide_index=True)
    start = results.plan["start"]
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
    chart = results.pump_chart
    if chart is not None and "error" in chart:
        st.info(escaped(render(chart["error"], unit_system)))
    elif chart is not None:
        st.plotly_chart(pump_figure(chart, unit_system), key="pump_chart")
        st.caption(escaped(pump_caption(chart)))
