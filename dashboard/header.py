"""The top of the page: title, where the scenario came from, the caution (with the scenario's touch limit),
page-wide notices, the inputs' problems and the plan's key figures."""

from __future__ import annotations

import streamlit as st

from planner.errors import shortened
from planner.reports.key_figures import figure_text
from planner.scenario.labels import field_label
from planner.scenario.schema import Limits, Scenario
from planner.scenario.wording import render

from dashboard.compute.record import Outcome, PlanFailure, PlanResults
from dashboard.present.display import SYSTEM_NAMES, caution_text
from dashboard.present.plaintext import escaped
from dashboard.present.saved import lock_text
from dashboard.services import revisions

DEFAULT_TOUCH_K = Limits.model_fields["touch_temperature"].default


def touch_limit(scenario: Scenario | None, shown: PlanResults | None) -> float:
    """The touch limit the caution names: the scenario's ``limits.touch_temperature`` (the results' while the
    inputs have problems; the schema's default when there is neither)."""
    if scenario is not None:
        return scenario.limits.touch_temperature
    return shown.touch_limit_k if shown is not None else DEFAULT_TOUCH_K


PAGE_CSS = """<style>
div[class*="st-key-stale_"] { opacity: 0.45; filter: grayscale(100%); }
/* key figures: a smaller value font on narrow screens, wrapped rather than cut off */
[data-testid="stMetricValue"] { font-size: clamp(1.3rem, 1.85vw, 2.1rem); }
[data-testid="stMetricValue"] *, [data-testid="stMetricDelta"] *, [data-testid="stMetricLabel"] * {
    white-space: normal !important; overflow: visible !important; text-overflow: clip !important; }
[data-testid="stMetricDelta"] { max-width: 100%; height: auto; }
</style>"""


def source_text() -> str:
    """What the page shows: the open saved revision with its state now (it may have been approved
    since it was opened), else where the working scenario came from."""
    return revisions.open_revision_text() or st.session_state.get("source", "")


@st.cache_resource(show_spinner=False)
def page_icon():
    """A small drawn icon (a drum): served by this server, unlike an emoji icon, which the browser
    would fetch as an image from elsewhere."""
    from PIL import Image, ImageDraw

    image = Image.new("RGBA", (32, 32), (0, 0, 0, 0))
    draw = ImageDraw.Draw(image)
    draw.rounded_rectangle((6, 3, 26, 29), radius=4, fill=(31, 97, 141, 255))
    for y in (11, 21):
        draw.line((6, y, 26, y), fill=(214, 234, 248, 255), width=2)
    return image


def stale_note() -> str:
    """Says whose results the greyed figures are: this scenario's last good inputs, or another scenario's."""
    last = st.session_state.get("last_good") or {}
    if last.get("loaded") == st.session_state.get("loaded", 0):
        return f"the last good inputs of this scenario ({escaped(shortened(last.get('name', '')))})"
    return (f"**another scenario**, “{escaped(shortened(last.get('name', '')))}” ({escaped(last.get('source', ''))}), "
            f"not {escaped(source_text())}")


def page_header(scenario: Scenario | None, unit_system: str, problem_list: list, planned: Outcome | None,
                stale: bool, shown: PlanResults | None) -> None:
    name = scenario.name if scenario is not None else (st.session_state["work"].get("name") or "scenario with problems")
    st.markdown(f"## Viscous Transfer Planner  \n**{escaped(shortened(str(name)))}**")
    st.caption(f"{escaped(source_text())} — units: {SYSTEM_NAMES[unit_system]}")
    st.warning(caution_text(unit_system, touch_limit(scenario, shown)), icon=":material/warning:")
    page_notices()
    if problem_list:
        st.error(f"**The inputs have {len(problem_list)} problem(s)** — each message is shown beside its field "
                 "under Inputs:  \n" + "  \n".join(f"• {escaped(field_label(p) or p or '(file)')}: {escaped(m)}" for p, m in problem_list[:8])
                 + ("  \n• …" if len(problem_list) > 8 else ""))
    if isinstance(planned, PlanFailure) and not planned.problems:
        st.error(f"**No plan for these inputs:** {escaped(planned.error)}")
    if stale and shown is not None:
        st.info(f"The figures and views below are greyed: they are from {stale_note()}, until the problems are fixed.")


def page_notices() -> None:
    """Messages for the whole page: a bad link, a refused edit, the approved lock."""
    ss = st.session_state
    link_message = ss.get("link_message")
    if link_message and link_message[0] == ss.get("gen", 0):
        st.error(escaped(link_message[1]), icon=":material/link_off:")
    refused = ss.pop("refused_msg", None)
    if refused:
        st.error(escaped(refused), icon=":material/lock:")
    revision = ss.get("open_rev_obj")
    if revision is not None and revision.read_only:
        text = escaped(lock_text(revision, ss.get("open_rev_trail") or []))
        if ss.get("rev_unlocked"):
            st.info(f"{text} You are changing a copy of its inputs: saving makes revision "
                    f"{revisions.next_number(revision)}; revision {revision.number} stays approved.", icon=":material/lock_open:")
        else:
            st.info(text, icon=":material/lock:")


def key_figures_strip(results: PlanResults, unit_system: str) -> None:
    """The plan's key figures as metrics; labels are stable (tests read them)."""
    figs = results.key_figures         # the planner's (SI); figure_text is the one rendering
    for row in (figs[:4], figs[4:]):
        cols = st.columns(len(row))
        for col, k in zip(cols, row):
            note = render(k.note, unit_system)
            # "not possible" / "not given" in the figure's place, the reason beneath it at reading size
            col.metric(escaped(k.label), escaped(figure_text(k, unit_system, reason=False)), delta=escaped(note) or None,
                       delta_color="off", delta_arrow="off", help=escaped(k.help) or None, border=True)
            if k.withheld or not k.possible:
                col.caption(escaped(render(k.why, unit_system)))
