"""The Plan view: the plan's state, its findings, start-up and stops, energy and cost, the pump at the start.

The first page of a session: its tables are markdown (``markdown_table``), so the server needs neither pandas
nor pyarrow to draw it (``st.table`` converts through both)."""

from __future__ import annotations

import streamlit as st

from dashboard.present import tables
from dashboard.present.display import fmt
from dashboard.present.plaintext import escaped, markdown_table
from planner.scenario.wording import render

from .common import NO_ICON, findings_block, status_line
from .deferred import page_shown
from .page import Page


NEEDS_RESULTS = True


def draw(page: Page) -> None:
    results, unit_system = page.results, page.unit_system
    status_line(results, unit_system)
    findings_block(results, unit_system)
    st.markdown("#### Start-up and stops")
    st.markdown(markdown_table(tables.STARTUP_HOLD_COLUMNS, tables.startup_hold_rows(results.plan, unit_system)))
    left, right = st.columns(2)
    left.markdown("#### Energy and cost")
    left.markdown(markdown_table(tables.ENERGY_COST_COLUMNS, tables.energy_cost_rows(results.plan, unit_system)))
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
    right.markdown(markdown_table(("Item", "Value"), rows))
    _pump_chart(results.pump_chart, unit_system)


def _pump_chart(chart: dict | None, unit_system: str) -> None:
    """The pump chart, drawn once the key figures are on screen (``deferred``: Plotly would hold them back);
    until then a line saying it is on its way.  Its slot comes before the signal, so the chart keeps its
    place on the page from the run that first draws it on."""
    if chart is not None and "error" in chart:
        st.info(escaped(render(chart["error"], unit_system)), icon=NO_ICON)
        return
    if chart is None:
        return
    slot = st.container()
    if not page_shown():
        slot.caption("Pump chart loading…")
        return
    from dashboard.present.pump_figure import pump_caption, pump_figure   # the figures module: when drawn

    with slot:
        st.plotly_chart(pump_figure(chart, unit_system), key="pump_chart")
        st.caption(escaped(pump_caption(chart)))
