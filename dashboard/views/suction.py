"""The suction line in the Along the line view: its profile along its length at each moment the plan
works it out (running at the start, pushing the cold contents out, after the pre-warm) and what the
pre-warm does there.  Drawn from ``PlanResults.suction_profiles`` and ``prewarm_suction`` (SI)."""

from __future__ import annotations

import pandas as pd
import streamlit as st

from dashboard.compute.line_extras import SUCTION_MOMENTS
from dashboard.present.display import fmt
from dashboard.present.plaintext import escaped, escaped_table
from dashboard.present.suction_figure import prewarm_rows, suction_figure

from .common import data_table
from .page import Page
from dashboard.present import tables


def draw_suction(page: Page) -> None:
    results, unit_system = page.results, page.unit_system
    if not results.suction_segments:
        return
    st.markdown("#### The suction line")
    profiles = results.suction_profiles or {}
    if profiles:
        st.plotly_chart(suction_figure(profiles, results.suction_segments, unit_system,
                                       no_flow_k=results.product.get("no_flow_temperature")), key="suction_chart")
        words = dict(SUCTION_MOMENTS)
        lines = []
        for key, profile in profiles.items():
            line = (f"{words.get(key, key)}: contents {fmt(profile['contents_k'], 'temperature', unit_system)}, "
                    f"{fmt(profile['flow_m3_s'], 'volume_flow', unit_system)}")
            if profile.get("status") != "ok" and profile.get("sets_at_m") is not None:
                line += f" — the product sets at {fmt(profile['sets_at_m'], 'length', unit_system)}"
            lines.append("- " + escaped(line))
        st.markdown("\n".join(lines))
        st.caption("From the source outlet to the pump inlet. Pressures are gauge, from the source's own head at "
                   "the outlet; at the push-out starts the suction holds the line's contents at their temperature.")
    else:
        st.info("No profile along the suction line: the pump does not move the product.")
    if results.prewarm_suction:
        st.markdown("During the pre-warm (one stagnant metre per segment, no flow):")
        frame = pd.DataFrame(prewarm_rows(results.prewarm_suction, unit_system),
                             columns=["Segment", "During the pre-warm", "Heading for"])
        st.table(escaped_table(frame), hide_index=True)
    data_table(tables.segments_frame(results.suction_segments, unit_system), 2)
