"""The Along the line view: temperature, pressure and jackets along the discharge line at the start."""

from __future__ import annotations

import streamlit as st

from dashboard.present import figures, tables

from .common import data_table
from .page import Page
from .suction import draw_suction


NEEDS_RESULTS = True


def draw(page: Page) -> None:
    results, unit_system = page.results, page.unit_system
    profile = results.profile
    if profile is None:
        st.info("No profile along the line: the pump does not move the product at the start.")
        return
    st.plotly_chart(figures.line_figure(profile, results.segments, unit_system,
                                        touch_limit_k=results.touch_limit_k), key="line_chart")
    st.caption("At the starting operating point. Dotted lines: segment boundaries. The rating line is each "
               "segment's own rating or its ASME B16.5 flange rating at the product temperature, whichever is lower.")
    st.markdown("#### Segments of the discharge route")
    data_table(tables.segments_frame(results.segments, unit_system), 2)
    with st.expander("Profile table (step ends and mid-steps)"):
        data_table(tables.profile_frame(profile, results.segments, unit_system))
    draw_suction(page)
