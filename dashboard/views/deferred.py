"""What a view draws only once the page's key figures are on screen: the page-shown signal.

Plotly's bundle holds the browser's main thread while it loads and draws, and the key figures appear only
after the first Plotly figure of the page has been drawn (DEVELOPERS.md, "Where the second browser's time
goes").  So the Plan view's pump chart waits for this signal: a tiny custom component (``page_shown/index.html``,
hand-written, no build) that, once the browser has mounted it and the key figures (``KEY_FIGURES``, a CSS
selector) are in the page and painted (two animation frames of the page later), sets its value to true,
which asks for one rerun.  Streamlit draws the key figures' element only once its own code has loaded, which
can be after the rest of the first page: mounting alone did not mean they were on screen (measured: the
signal's run came about 0.6 s before the first key figure).  On that rerun ``page_shown()`` keeps the fact in the session (``state.KEYS["page_shown"]``) and
stops drawing the component, so every later run draws the chart straight away and the signal asks for no
second rerun.  A refresh is a new session: the signal is drawn again and asks for its one rerun again.

In Streamlit's AppTest (which runs no JavaScript) the component never answers: a test stands in for it
by setting ``at.session_state["page_shown"] = True`` before the run that should draw the chart
(``tests/test_dashboard_suction_pump.py``); the real component is tested in Chromium
(``tests/test_browser_deferred.py``).
"""

from __future__ import annotations

from pathlib import Path

import streamlit as st
import streamlit.components.v1 as components

KEY_FIGURES = '[data-testid="stMetricValue"]'     # what must be on screen before a deferred figure
_signal = components.declare_component("page_shown", path=str(Path(__file__).resolve().parent / "page_shown"))


def page_shown() -> bool:
    """Whether this session's page has been on screen in the browser; while not yet known, draws the signal
    (zero height) that says so with one rerun."""
    ss = st.session_state
    if ss.get("page_shown"):
        return True
    if _signal(shown=KEY_FIGURES, key="page_shown_signal", default=False):
        ss["page_shown"] = True
        return True
    return False
