"""Pieces more than one view draws: a results table, the plan's status line and its findings by severity."""

from __future__ import annotations

from typing import TYPE_CHECKING

import streamlit as st

from planner.checks.finding import MOST_SEVERE_FIRST
from planner.reports.findings_text import flag_words, headline, start_status
from planner.scenario.wording import render

from dashboard.compute.record import PlanResults
from dashboard.present import tables
from dashboard.present.plaintext import escaped

if TYPE_CHECKING:
    import pandas as pd


# A message box given no icon looks for a leading emoji in its text, which loads Streamlit's emoji catalogue
# (about 0.3 s on the first page) whenever the text is not plain ASCII ("—", "m³"); an empty icon skips it.
NO_ICON = ""

SEVERITY_STYLE = {
    "stop": (st.error, ":material/dangerous:", "Stop — do not start as planned"),
    "warning": (st.warning, ":material/warning:", "Warnings"),
    "caution": (st.info, ":material/report:", "Cautions"),
    "info": (st.info, ":material/info:", "Information"),
}


def data_table(frame: pd.DataFrame, decimals: int = 3) -> None:
    """A results table: numbers at the decimals the frame keeps for each column (``tables.with_decimals``),
    else at ``decimals``, with thousands separators; a missing value as "—" (never "None")."""
    style = frame.style.format(precision=decimals, thousands=",", na_rep="—")
    for column, digits in frame.attrs.get("decimals", {}).items():
        style = style.format(precision=digits, thousands=",", na_rep="—", subset=[column])
    st.dataframe(style, hide_index=True, width="stretch")


def status_line(results: PlanResults, unit_system: str = "SI") -> None:
    """The plan's state, following its worst finding (a stop is never shown as ok), then the pump's
    outcome at the start in the user's units."""
    start = results.plan["start"]
    timeline = results.plan["timeline"]
    findings = results.findings or []
    head = headline(findings, unit_system)
    worst = results.plan.get("worst_severity", "info")
    message = (f"At the start: **{escaped(start_status(start.get('status', ''), worst))}** — "
               f"{escaped(render(start.get('message', ''), unit_system))}")
    if start.get("flags"):
        message += f" (flags: {escaped(flag_words(start['flags']))})"
    if not timeline.get("completed"):
        message += f"  \nThe transfer stops: {escaped(render(timeline.get('stop_reason', ''), unit_system))}"
    box = {"stop": st.error, "warning": st.warning, "caution": st.info}.get(worst, st.success)
    box(f"**{escaped(head)}**  \n{message}", icon=NO_ICON)


def findings_block(results: PlanResults, unit_system: str) -> None:
    findings = results.findings
    if findings is None:
        st.info(f"Findings: {escaped(results.findings_note or 'not available yet')}.", icon=NO_ICON)
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
