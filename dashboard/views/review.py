"""The Review view: the open revision with its state, key figures as saved, findings and trail, the review
steps, the saved plans and the comparison of two revisions.  The steps themselves are
``services/revisions`` callbacks; the tables are ``present/saved``."""

from __future__ import annotations

import pandas as pd
import streamlit as st

from planner.records.revision import Revision
from planner.records.terms import LIMITS, STATES, StoreError

from dashboard.present.plaintext import escaped, escaped_table
from dashboard.present.saved import STATE_WORDS, diff_frames, lock_text, results_frame, trail_frame, when_text
from dashboard.services import accounts, revisions
from dashboard.services.store import store

from .common import findings_block
from .page import Page
from .signoff import signoff_section

NEEDS_RESULTS = False


def draw(page: Page) -> None:
    review_view(page.set_work, page.unit_system, page)


SIGN_OFF_TEXT = (
    "Approval is the supervisor's judgement, made under the site's procedures: the planner gives planning "
    "estimates, not a release to start. Check the inputs, the findings and the key figures against the equipment, "
    "its ratings and the conditions on the day before signing off."
)


def show_msg(container, key: str) -> None:
    message = st.session_state.pop(key, None)
    if message:
        getattr(container, message[0])(escaped(message[1]))


def _open_panel(set_work, unit_system: str, page: Page | None = None) -> None:
    ss = st.session_state
    revision: Revision | None = ss.get("open_rev_obj")
    st.markdown("#### Open revision")
    if revision is None:
        st.info("No saved revision is open. Save the plan (sidebar, “Save / share / review”) or open one below.")
        return
    trail = ss.get("open_rev_trail") or []
    st.markdown(f"**“{escaped(revision.plan_name)}”**" + (f" — {escaped(revision.site)}" if revision.site else "")
                + f", revision {revision.number} · product: {escaped(revision.product)}")
    st.caption(f"Saved by {escaped(revision.author)} at {when_text(revision.created_at)}"
               + (f" — note: {escaped(revision.note)}" if revision.note else "")
               + f" · content hash {revision.content_hash[:12]}")
    state = revision.state
    if state == "approved":
        st.success("🔒 " + escaped(lock_text(revision, trail)))
    elif state == "submitted":
        st.warning(f"Revision {revision.number} is submitted and awaits the supervisor's review.")
    elif state == "returned":
        last = next((r for r in reversed(trail) if r.action == "return"), None)
        st.error(f"Revision {revision.number} was returned for changes"
                 + (f" by {escaped(last.by)} at {when_text(last.at)}: {escaped(last.comment)}" if last else "")
                 + ". Change the inputs and save a new revision.")
    else:
        st.info(f"Revision {revision.number} is a draft: submit it for review when it is ready.")
    left, right = st.columns(2)
    left.markdown("**Key figures as saved**")
    left.table(escaped_table(results_frame(revision.results, unit_system)), hide_index=True)
    right.markdown("**Review trail**")
    if trail:
        right.table(escaped_table(trail_frame(trail)), hide_index=True)
    else:
        right.caption("No review steps yet.")
    from .odds import saved_odds

    saved_odds(revision.results, unit_system)
    _findings(revision, page)
    _history_check(revision)
    _review_steps(set_work, revision)


def _findings(revision: Revision, page: Page | None) -> None:
    """The findings of the open revision's plan, as the Plan view lists them (the plan on screen is the
    revision's while its inputs are unchanged)."""
    if page is None or page.results is None or page.stale or not revisions.unchanged_since_open(revision):
        st.caption("Findings: shown here while the inputs on screen are those of the saved revision.")
        return
    findings_block(page.results, page.unit_system)


def _history_check(revision: Revision) -> None:
    """The open revision and its review records against the recorded history (``plans verify``)."""
    try:
        problems = store().revision_problems(revision.plan_id, revision.number)
    except StoreError as exc:
        st.error(f"The history check could not run: {exc}")
        return
    if problems:
        st.error("This revision does not match the recorded history — it was changed behind the planner's back; "
                 "do not rely on it and tell the administrator:\n\n" + "\n".join(f"- {p}" for p in problems))
    else:
        st.caption("History check: this revision and its review trail match the recorded history.")


def _reviewer_note(revision: Revision, who) -> str | None:
    """Why the signed-in account cannot approve or return this revision (None: it can)."""
    if who is None:
        return "Sign in as a supervisor (sidebar, “Account”) to approve or return this revision."
    if who.role != "supervisor":
        return f"Signed in as {who.name} ({who.role}): approving or returning needs a supervisor account."
    if revision.author_id == who.id:
        return f"You ({who.name}) authored revision {revision.number}: another supervisor must approve or return it."
    return None


def _review_steps(set_work, revision: Revision) -> None:
    ss = st.session_state
    state = revision.state
    who = accounts.current_account()
    unchanged = revisions.unchanged_since_open(revision)
    if not unchanged and state in ("draft", "submitted"):
        st.warning(f"The inputs on screen differ from saved revision {revision.number}: a review step applies to the "
                   "saved revision. Save the changes as a new revision, or reopen the saved one.")
        st.button(f"Reopen revision {revision.number} (drop my changes)", key="rv_reopen", on_click=revisions.do_reopen,
                  args=(set_work, revision.plan_id, revision.number))
    if state == "draft":
        st.markdown("**Submit for review**")
        can = who is not None and who.role in ("planner", "supervisor")
        st.caption(f"Submitted by {who.name} (signed in)." if can else
                   "Sign in as a planner or supervisor (sidebar, “Account”) to submit this revision.")
        st.text_input("Comment for the reviewer", key="rv_submit_comment", max_chars=LIMITS["comment"])
        st.button("Submit for review", key="rv_submit", type="primary", disabled=not (unchanged and can),
                  on_click=revisions.do_review, args=("submit", revision.plan_id, revision.number))
    elif state == "submitted":
        st.markdown("**Supervisor's review**")
        st.caption(SIGN_OFF_TEXT)
        note = _reviewer_note(revision, who)
        st.caption(note or f"Reviewing as {who.name} (supervisor, signed in).")
        st.text_input("Comment", key="rv_comment", max_chars=LIMITS["comment"], help="needed to return the plan: say what to change")
        st.checkbox("I reviewed the inputs, the findings and the key figures of this revision under the site's "
                    "procedures; approval is my judgement, the plan is an estimate.", key="rv_confirm")
        x, y, _ = st.columns([1, 1, 3])
        x.button("Approve", key="rv_approve", type="primary", disabled=not unchanged or note is not None,
                 on_click=revisions.do_review, args=("approve", revision.plan_id, revision.number))
        y.button("Return for changes", key="rv_return", disabled=not unchanged or note is not None,
                 on_click=revisions.do_review, args=("return", revision.plan_id, revision.number))
    elif state == "approved":
        if ss.get("rev_unlocked"):
            st.caption(f"You are changing a copy of the inputs; saving makes a new revision and revision "
                       f"{revision.number} stays approved.")
        else:
            st.button("Change the inputs (as a new revision)", key="rv_unlock", on_click=revisions.do_unlock,
                      help="unlocks the inputs; saving then adds a revision and the approved one stays as it is")


def _browse_panel(set_work, unit_system: str) -> None:
    st.markdown("#### Saved plans")
    a, b, c, d = st.columns(4)
    search = a.text_input("Name contains", key="rv_q", max_chars=LIMITS["search"])
    product = b.text_input("Product contains", key="rv_product", max_chars=LIMITS["search"])
    site = c.text_input("Site / area contains", key="rv_site", max_chars=LIMITS["search"])
    state = d.selectbox("State", ["any", *STATES], key="rv_state")
    try:
        rows = store().plans(search=search, product=product, site=site, state="" if state == "any" else state)
    except StoreError as exc:
        st.error(f"Search refused: {exc}")
        return
    if not rows:
        st.caption("No saved plan matches." if (search or product or site or state != "any") else "No saved plans yet.")
        return
    st.dataframe(pd.DataFrame([(r.id, r.name, r.site, r.product, r.latest, STATE_WORDS.get(r.state, r.state),
                                when_text(r.updated_at), r.author) for r in rows],
                              columns=["Id", "Plan", "Site / area", "Product", "Latest revision", "State",
                                       "Updated", "By"]),
                 hide_index=True, width="stretch")
    ids = [r.id for r in rows]
    names = {r.id: f"{r.name}" + (f" ({r.site})" if r.site else "") + f" — id {r.id}" for r in rows}
    ref = revisions.open_ref()
    default = ids.index(ref["plan_id"]) if ref and ref["plan_id"] in ids else 0
    plan_id = st.selectbox("Plan", ids, index=default, format_func=names.get, key=f"rv_plan|{','.join(map(str, ids))}")
    saved_revisions = store().revisions(plan_id)
    numbers = [r.number for r in saved_revisions]
    by_number = {r.number: r for r in saved_revisions}

    def label(n):
        r = by_number[n]
        return f"revision {n} — {STATE_WORDS.get(r.state, r.state)} — {r.author}, {when_text(r.created_at)}"

    e, f = st.columns([3, 1])
    number = e.selectbox("Revision", numbers, index=len(numbers) - 1, format_func=label, key=f"rv_rev|{plan_id}")
    f.button(f"Open revision {number}", key="rv_open", on_click=revisions.do_open, args=(set_work, plan_id, number),
             width="stretch", help="loads its inputs (your unsaved edits are dropped)")
    if len(numbers) < 2:
        st.caption("Compare revisions once the plan has two or more.")
        return
    st.markdown("#### Compare two revisions")
    g, h = st.columns(2)
    first = g.selectbox("From", numbers, index=len(numbers) - 2, format_func=lambda n: f"revision {n}",
                        key=f"rv_cmp_a|{plan_id}")
    second = h.selectbox("To", numbers, index=len(numbers) - 1, format_func=lambda n: f"revision {n}",
                         key=f"rv_cmp_b|{plan_id}")
    diff = store().diff(plan_id, first, second)
    inputs, results = diff_frames(diff, first, second, unit_system, by_number[first].results.get("currency", ""),
                                  by_number[second].results.get("currency", ""))
    st.markdown(f"**What changed in the inputs** ({len(inputs)})")
    if len(inputs):
        st.dataframe(inputs, hide_index=True, width="stretch")
        st.caption("Values as saved: plain numbers are in the scenario file's default units (SI; temperatures in °C, "
                   "insulation thickness in mm).")
    else:
        st.caption("No input changed.")
    st.markdown(f"**What changed in the results** ({len(results)})")
    if len(results):
        st.dataframe(results, hide_index=True, width="stretch")
    else:
        st.caption("No key figure changed.")


def review_view(set_work, unit_system: str, page: Page | None = None) -> None:
    """The Review tab: the open revision with its state, trail and review steps; saved plans; compare."""
    st.caption("Saved plans and the supervisor's sign-off. Approval is the supervisor's judgement under the "
               "site's procedures; the planner gives planning estimates.")
    show_msg(st, "review_msg")
    if page is not None:
        signoff_section(page)
    try:
        _open_panel(set_work, unit_system, page)
        _browse_panel(set_work, unit_system)
    except StoreError as exc:
        st.error(f"Saved plans are not available: {escaped(exc)}")
