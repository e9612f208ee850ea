"""The session's state: every key of ``st.session_state`` the dashboard uses, what it means and who writes it.

Streamlit keeps one ``st.session_state`` per browser tab; it is lost on a refresh.  What must survive a
refresh is in the address (``url_state``: the view, the unit system, the open plan and revision, the
draft of unsaved edits), never only here.  ``tests/test_dashboard_structure.py`` checks that every key the
code reads or writes is listed below (a widget key by its prefix).
"""

from __future__ import annotations

import streamlit as st

# key -> meaning (writer)
KEYS = {
    # the working scenario
    "work": "the working scenario as a plain dict, as edited (loading.set_work, the input widgets)",
    "source": "where the working scenario came from, in words (loading.set_work)",
    "gen": "generation of the input widgets: bumped when another scenario is loaded, so widgets start afresh",
    "loaded": "how many scenarios this session has loaded (last_good names the one its results are from)",
    "table_gen": "per-table generation of the editable tables (views/inputs/table_editor)",
    "last_good": "{json, loaded, source, name} of the last inputs that gave a plan: shown greyed meanwhile",
    "load_message": "(kind, text) of the last demo load or file import, shown in the sidebar",
    "demo_choice": "the demo picked in the sidebar (widget); None when the working scenario is not a demo",
    "upload": "the scenario file uploader (widget)",
    "unit_system": "'SI' or 'US' (widget, in the address as units=)",
    "view": "the open tab's title (widget of st.tabs, in the address as view=)",
    "input_section": "the open sub-tab of the Inputs view (widget)",
    # the address
    "link_read": "the address was read once this session (url_state.read_address_once)",
    "link_message": "(gen, text): a link that could not be opened, shown until another scenario is loaded",
    "draft_id": "the id of this session's draft of unsaved edits (services/drafts), in the address as draft=",
    "draft_saved": "the canonical text of the working dict as last written to the draft",
    # saved plans (services/revisions)
    "open_rev": "{plan_id, number} of the saved revision the working scenario came from",
    "open_rev_obj": "that revision as read from the store this run (its state may have changed meanwhile)",
    "open_rev_trail": "its review trail as read this run",
    "rev_work": "the working dict as the revision was opened or saved: what 'unchanged' compares with",
    "rev_unlocked": "the operator chose to change an approved revision's inputs (saved as a new revision)",
    "lock_seen": "the open revision whose approval this session has seen (an approval made meanwhile is said once)",
    "inputs_locked": "an approved revision is open and not unlocked: every input is disabled this run",
    "refused_msg": "an edit refused by the approved lock, shown once",
    "share_msg": "(kind, text) of the last save, shown in the sidebar",
    "review_msg": "(kind, text) of the last review step, shown in the Review view",
    # accounts (services/accounts)
    "auth_token": "the session token of the signed-in account (checked against the database on every use)",
    "auth_msg": "(kind, text) of the last sign-in or account step",
    # results kept for the session
    "comparison": "{json, result} of the last comparison run",
    "cmp_used_msg": "what the last 'Use this value' set, said once (views/compare_pick)",
    "envelope": "{json, result} of the last operating envelope",
    "odds": "{json, result} of the last odds of the plan (views/odds; the report and a saved revision take it)",
    "cmp_odds": "{json, result} of the last comparison with odds (views/compare_odds)",
    "cal_msg": "(kind, text) of the last calibration step",
    "cal_demo_log": "the demo log chosen in the Calibration view instead of an upload",
    # the browser
    "page_shown": "the page has been on screen in this session's browser (views/deferred.page_shown, from the "
                  "signal's value): the Plan view's pump chart is drawn from then on; tests set it to stand in",
    "page_shown_signal": "the page-shown signal (a custom component, views/deferred): true once mounted",
}

# widget keys by prefix: prefix -> the widgets
WIDGET_PREFIXES = {
    "in": "input fields: in<gen>|<units>|<path> (views/inputs/fields)",
    "tbl": "editable tables (views/inputs/table_editor)",
    "sv_": "the sidebar's save fields and buttons",
    "rv_": "the Review view's fields and buttons",
    "si_": "sign-in", "fa_": "the first admin", "ad_": "the admin panel", "pw_": "own password change",
    "cmp_": "the comparison's controls", "env_": "the envelope's controls", "odds_": "the Odds view's controls", "cal_": "the Calibration view",
    "dl_": "the sidebar's downloads", "stale_": "containers greyed while the results are stale",
    "view_": "containers of the views", "reload_demo": "the sidebar's reload button",
    "results": "the key figures' container",
}


CHART_SUFFIX = "_chart"          # element keys of charts (they keep a chart's zoom across runs)


def declared(key: str) -> bool:
    """A key listed in ``KEYS``, starting with a widget prefix or naming a chart."""
    return key in KEYS or key.endswith(CHART_SUFFIX) or any(key.startswith(prefix) for prefix in WIDGET_PREFIXES)


# ------------------------------------------------------------------------------------------ accessors

def work() -> dict:
    return st.session_state["work"]


def unit_system() -> str:
    return st.session_state.get("unit_system", "SI")


def new_generation() -> None:
    """Another scenario (or a refused edit put back): the input widgets start afresh."""
    st.session_state["gen"] = st.session_state.get("gen", 0) + 1
    st.session_state["table_gen"] = {}
