"""The sign-off sheet's download in the Review view (``present/signoff``): the plan on screen, and the open
revision's review trail and the recorded history's chain head when the inputs on screen are that
revision's."""

from __future__ import annotations

import re

import streamlit as st

from planner.records.terms import StoreError

from dashboard.present.signoff import SavedPart, build_signoff_html
from dashboard.services import revisions
from dashboard.services.store import store

from .page import Page


def saved_part() -> SavedPart | None:
    """The open revision, its trail, the chain head and its history check, while the inputs on screen are
    the revision's (None: no revision open, or the inputs differ)."""
    revision = st.session_state.get("open_rev_obj")
    if revision is None or not revisions.unchanged_since_open(revision):
        return None
    trail = st.session_state.get("open_rev_trail") or []
    try:
        head = store().verify().head
        problems = tuple(store().revision_problems(revision.plan_id, revision.number))
    except StoreError as exc:
        head, problems = None, (f"the history could not be read: {exc}",)
    return SavedPart(revision, list(trail), head, problems)


def signoff_section(page: Page) -> None:
    """A download button for the sheet (opens in the browser, prints on one page)."""
    if page.results is None or page.scenario is None or page.stale:
        st.caption("The sign-off sheet is made from a plan of the inputs on screen: fix the inputs first.")
        return
    saved = saved_part()
    sheet = build_signoff_html(page.scenario, page.results, page.unit_system, saved)
    stem = re.sub(r"[^A-Za-z0-9]+", "-", page.scenario.name).strip("-")[:60] or "plan"
    suffix = f"-rev{saved.revision.number}" if saved is not None else "-unsaved"
    st.download_button("Sign-off sheet (HTML, print from the browser)", sheet, file_name=f"signoff-{stem}{suffix}.html",
                       mime="text/html", key="rv_signoff",
                       help="one page: key figures, worst findings, inputs, range, review trail, chain head, caution")
