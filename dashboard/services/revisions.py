"""The saved revision open in this session, and the steps that change saved plans (callbacks).

Everything lasting goes through the planner: revisions and the review trail through
``planner.records.store.PlanStore`` (revisions are never overwritten; an approved one is immutable in the
database itself).  Saving and review steps are done by the signed-in account (``services/accounts``): its
name goes into the revision and the trail.  The session keys used here are described in ``dashboard/state.py``
(``open_rev``, ``rev_work``, ``rev_unlocked``, ``inputs_locked``, ``open_rev_obj``, ``open_rev_trail``,
``lock_seen``, the save fields ``sv_*`` and the messages ``share_msg``, ``review_msg``, ``refused_msg``).

Call order in a run (``app.py``): ``apply_lock`` before the working dict is validated; the sidebar and the
Review view read ``open_rev_obj``; the buttons call ``do_save``, ``do_open``, ``do_review``, ``do_unlock``.
"""

from __future__ import annotations

import copy
import logging
from typing import Callable

import streamlit as st

from planner.errors import PlannerError, ScenarioError
from planner.records.revision import Revision
from planner.records.terms import StoreError
from planner.scenario.schema import Scenario, scenario_from_dict, scenario_to_dict, scenario_to_json

from dashboard.present.saved import STATE_WORDS, lock_text

from . import accounts
from .store import store

log = logging.getLogger(__name__)


def validated(work: dict) -> Scenario | None:
    try:
        return scenario_from_dict(copy.deepcopy(work))
    except (PlannerError, ValueError, TypeError, KeyError, AttributeError):
        return None


def open_ref() -> dict | None:
    ref = st.session_state.get("open_rev")
    return ref if isinstance(ref, dict) else None


def _remember_open(revision: Revision, work: dict) -> None:
    ss = st.session_state
    ss["open_rev"] = {"plan_id": revision.plan_id, "number": revision.number}
    ss["rev_work"] = copy.deepcopy(work)
    ss["rev_unlocked"] = False
    ss.pop("lock_seen", None)
    ss["sv_name"] = revision.plan_name
    ss["sv_site"] = revision.site
    ss["sv_as_new"] = False


def forget_open_revision() -> None:
    """Called whenever another scenario is loaded: no revision is open, and the save fields start afresh
    (a plan name left over from the previous scenario would add this one to that plan)."""
    for key in ("open_rev", "rev_work", "rev_unlocked", "lock_seen", "sv_name", "sv_site", "sv_as_new"):
        st.session_state.pop(key, None)


def unchanged_since_open(revision: Revision | None) -> bool:
    """The working inputs are those of the open revision (the same dict, or the same scenario)."""
    if revision is None:
        return False
    ss = st.session_state
    if ss.get("work") == ss.get("rev_work"):
        return True
    scenario = validated(ss.get("work") or {})
    return scenario is not None and scenario_to_json(scenario) == revision.scenario_json


def load_revision(set_work: Callable[[dict, str], None], plan_id: int, number: int | None) -> Revision:
    """Load a saved revision's scenario into the working dict and mark it open. Raises StoreError,
    ScenarioError."""
    revision = store().revision(int(plan_id), None if number is None else int(number))
    data = scenario_to_dict(revision.scenario)      # validated against today's schema
    set_work(data, f"saved plan “{revision.plan_name}”, revision {revision.number} ({revision.state})")
    _remember_open(revision, data)
    return revision


def apply_lock() -> None:
    """Fetch the open revision's state; while it is approved (and not unlocked for a new revision)
    the inputs are disabled and any edit that reached the working dict is refused and undone."""
    ss = st.session_state
    ss["inputs_locked"] = False
    ss["open_rev_obj"] = None
    ss["open_rev_trail"] = []
    ref = open_ref()
    if ref is None:
        return
    try:
        revision = store().revision(ref["plan_id"], ref["number"])
        trail = store().reviews(ref["plan_id"], ref["number"])
    except (StoreError, KeyError, TypeError) as exc:
        ss.pop("open_rev", None)
        ss["share_msg"] = ("error", f"The saved revision is no longer available: {exc}")
        return
    ss["open_rev_obj"] = revision
    ss["open_rev_trail"] = trail
    if revision.read_only and not ss.get("rev_unlocked"):
        if ss.get("lock_seen") != ref:
            # first run that sees it approved (opened so, or approved meanwhile in another session)
            ss["lock_seen"] = dict(ref)
            if unchanged_since_open(revision):
                ss["rev_work"] = copy.deepcopy(ss.get("work"))
            else:       # unsaved changes made before the approval are kept, as a copy for a new revision
                ss["rev_unlocked"] = True
                ss["share_msg"] = ("warning", f"Revision {revision.number} was approved meanwhile; your unsaved "
                                              "changes are kept: saving makes a new revision.")
                return
        ss["inputs_locked"] = True
        if ss.get("work") != ss.get("rev_work") and isinstance(ss.get("rev_work"), dict):
            ss["work"] = copy.deepcopy(ss["rev_work"])
            ss["gen"] = ss.get("gen", 0) + 1
            ss["table_gen"] = {}
            ss["refused_msg"] = "Edit refused: " + lock_text(revision, trail)


def open_revision_text() -> str | None:
    """The open saved revision as the page names it, with its state as of this run; None if none is open."""
    revision = st.session_state.get("open_rev_obj")
    if revision is None:
        return None
    text = (f"saved plan “{revision.plan_name}”, revision {revision.number} "
            f"({STATE_WORDS.get(revision.state, revision.state)})")
    return text if unchanged_since_open(revision) else text + ", with unsaved changes"


def next_number(revision: Revision) -> int:
    try:
        return store().count_revisions(revision.plan_id) + 1
    except StoreError:
        return revision.number + 1


def _set_msg(key: str, kind: str, text: str) -> None:
    st.session_state[key] = (kind, text)


def session_odds(scenario_json: str | None) -> dict | None:
    """The odds worked out in this session (Odds view) for exactly these inputs, else None."""
    kept = st.session_state.get("odds") or {}
    result = kept.get("result") or {}
    return result.get("odds") if scenario_json is not None and kept.get("json") == scenario_json else None


def do_save() -> None:
    """Save the working scenario as a new revision (never overwrites)."""
    ss = st.session_state
    scenario = validated(ss.get("work") or {})
    if scenario is None:
        _set_msg("share_msg", "error", "The inputs have problems: fix them before saving.")
        return
    author = accounts.acting_account("save")
    if author is None:
        _set_msg("share_msg", "error", "Not saved: sign in to save (sidebar, “Account”).")
        return
    from dashboard.compute.cache import cached_results
    from dashboard.compute.record import ok
    from planner.reports.saved_figures import no_plan

    results = cached_results(scenario_to_json(scenario))
    saved = results.saved if ok(results) else no_plan(results.error)
    odds = session_odds(scenario_to_json(scenario))
    if ok(results) and odds is not None:       # as `plans save --uncertainty`: the range the supervisor signs
        from planner.reports.uncertainty_text import odds_summary

        saved = {**saved, "uncertainty": odds_summary(odds)}
    ref = open_ref()
    as_new = bool(ss.get("sv_as_new")) or ref is None
    try:
        revision = store().save(ss.get("sv_name") or "", scenario, author,
                                note=ss.get("sv_note") or "", site=ss.get("sv_site") or "",
                                results=saved, plan_id=None if as_new else ref["plan_id"])
    except StoreError as exc:
        _set_msg("share_msg", "error", f"Not saved: {exc}")
        return
    except Exception as exc:  # noqa: BLE001
        log.exception("save failed")
        _set_msg("share_msg", "error", f"Not saved ({type(exc).__name__}: {exc})")
        return
    _remember_open(revision, ss.get("work") or {})
    ss["source"] = f"saved plan “{revision.plan_name}”, revision {revision.number}"
    ss["sv_note"] = ""
    _set_msg("share_msg", "success", f"Saved as revision {revision.number} of “{revision.plan_name}”"
                                     + (f" ({revision.site})" if revision.site else "") + ".")


def do_open(set_work, plan_id: int, number: int) -> None:
    try:
        revision = load_revision(set_work, plan_id, number)
        _set_msg("review_msg", "success", f"Opened revision {revision.number} of “{revision.plan_name}”.")
    except StoreError as exc:
        _set_msg("review_msg", "error", str(exc))
    except ScenarioError as exc:
        _set_msg("review_msg", "error", "This revision cannot be read by this planner: " + "; ".join(
            f"{p}: {m}" if p else m for p, m in exc.problems[:5]))


def do_review(action: str, plan_id: int, number: int) -> None:
    ss = st.session_state
    who = accounts.acting_account({"submit": "submit", "approve": "approve"}.get(action, "return plans"))
    if who is None:
        _set_msg("review_msg", "error", "Not done: sign in first (sidebar, “Account”).")
        return
    try:
        if action == "submit":
            store().submit(plan_id, number, who, ss.get("rv_submit_comment") or "")
            text = f"Revision {number} submitted for review by {who.name}."
        elif action == "approve":
            if not ss.get("rv_confirm"):
                raise StoreError("tick the confirmation that you reviewed the plan under the site's procedures")
            store().approve(plan_id, number, who, ss.get("rv_comment") or "")
            text = f"Revision {number} approved by {who.name}: it is now read-only."
        else:
            store().return_for_changes(plan_id, number, who, ss.get("rv_comment") or "")
            text = f"Revision {number} returned for changes by {who.name}."
    except StoreError as exc:
        _set_msg("review_msg", "error", f"Not done: {exc}")
        return
    for key in ("rv_comment", "rv_submit_comment", "rv_confirm"):
        ss.pop(key, None)
    _set_msg("review_msg", "success", text)


def do_unlock() -> None:
    st.session_state["rev_unlocked"] = True


def do_reopen(set_work, plan_id: int, number: int) -> None:
    do_open(set_work, plan_id, number)
