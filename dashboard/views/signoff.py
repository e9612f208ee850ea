"""The sign-off sheet's download in the Review view (``present/signoff``): the plan on screen, and the open
revision's review trail and the recorded history's chain head when the inputs on screen are that
revision's.  The sheet is made when the button is pressed (Streamlit calls ``sheet_maker``'s function
then, on its own thread: it reads nothing of the session, and checks the whole history only then)."""

from __future__ import annotations

import re
from typing import Callable

import streamlit as st

from planner.records.terms import StoreError

from dashboard.present.signoff import SavedPart, build_signoff_html
from dashboard.services import revisions
from dashboard.services.store import store

from .page import Page


def sheet_maker(scenario, results, unit_system: str, revision=None, trail=(), plans=None) -> Callable[[], str]:
    """A function of no arguments that makes the sheet: with ``revision`` (and the ``PlanStore`` ``plans``
    it is in) the trail, the chain head (``PlanStore.verify``) and the revision's history check."""
    def make() -> str:
        saved = None
        if revision is not None and plans is not None:
            try:
                head = plans.verify().head
                problems = tuple(plans.revision_problems(revision.plan_id, revision.number))
            except StoreError as exc:
                head, problems = None, (f"the history could not be read: {exc}",)
            saved = SavedPart(revision, list(trail), head, problems)
        return build_signoff_html(scenario, results, unit_system, saved)
    return make


def signoff_section(page: Page) -> None:
    """A download button for the sheet (opens in the browser, prints on one page)."""
    if page.results is None or page.scenario is None or page.stale:
        st.caption("The sign-off sheet is made from a plan of the inputs on screen: fix the inputs first.")
        return
    revision = st.session_state.get("open_rev_obj")
    plans = None
    if revision is not None and revisions.unchanged_since_open(revision):
        try:
            plans = store()
        except StoreError:
            revision = None
    else:
        revision = None
    make = sheet_maker(page.scenario, page.results, page.unit_system, revision,
                       tuple(st.session_state.get("open_rev_trail") or ()), plans)
    stem = re.sub(r"[^A-Za-z0-9]+", "-", page.scenario.name).strip("-")[:60] or "plan"
    suffix = f"-rev{revision.number}" if revision is not None else "-unsaved"
    st.download_button("Sign-off sheet (HTML, print from the browser)", make, file_name=f"signoff-{stem}{suffix}.html",
                       mime="text/html", key="rv_signoff", on_click="ignore",
                       help="one page: key figures, worst findings, inputs, range, review trail, chain head, caution")
