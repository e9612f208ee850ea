"""The address of the page: what it opens on the first run of a session, and what it says after every run.

After every run the address names the view (``view=``), the unit system (``units=``) and either the open
saved revision while the inputs on screen are its own (``plan=``, ``rev=``) or this session's draft of
unsaved edits (``draft=``, ``services/drafts``), so a refresh (F5), a dropped connection or a copied
address comes back to the same place with the same inputs.  Signing in is not carried over: the session
token stays in the server's session state, never in the address, and Streamlit cannot set an HttpOnly
cookie, so after a refresh the account signs in again and finds its place as it was.

On the first run the address is read once (``read_address_once``); its parameters are untrusted: share
links only through ``planner.records.links.parse_query``, drafts only through ``services/drafts``.
"""

from __future__ import annotations

import copy
import json
import logging
from typing import Callable

import streamlit as st

from planner.errors import ScenarioError
from planner.records.links import LinkError, parse_query
from planner.records.terms import StoreError
from planner.scenario.schema import scenario_to_dict

from dashboard.present.display import SYSTEM_NAMES
from dashboard.services import drafts, revisions
from dashboard.views import VIEW_OF_TITLE, VIEW_TITLES

log = logging.getLogger(__name__)

DEFAULT_BASE_URL = "http://localhost:8501"


def base_url() -> str:
    """The page's address without query: ``st.context.url``, else the Host header, else localhost."""
    try:
        url = st.context.url
    except Exception:  # noqa: BLE001
        url = None
    if url:
        return str(url).split("?")[0].split("#")[0].rstrip("/")
    try:
        host = st.context.headers.get("host")
    except Exception:  # noqa: BLE001
        host = None
    if host and all(c.isalnum() or c in ".-:[]" for c in host):
        return f"http://{host}"
    return DEFAULT_BASE_URL


def current_link_view() -> str:
    return VIEW_OF_TITLE.get(st.session_state.get("view") or VIEW_TITLES["plan"], "plan")


def _one(params: dict, key: str):
    value = params.get(key)
    if isinstance(value, (list, tuple)):
        value = value[0] if value else None
    return value


def _open_draft(set_work: Callable[[dict, str], None], draft_id: str) -> None:
    """Put a draft back: the working dict as edited, and the revision it was opened from. Raises StoreError."""
    content = drafts.read_draft(draft_id)
    set_work(copy.deepcopy(content["work"]), str(content.get("source") or "draft")[:300])
    ss = st.session_state
    ref = content.get("open_rev")
    if isinstance(ref, dict) and isinstance(ref.get("plan_id"), int) and isinstance(ref.get("number"), int):
        ss["open_rev"] = {"plan_id": ref["plan_id"], "number": ref["number"]}
        ss["rev_work"] = content.get("rev_work") if isinstance(content.get("rev_work"), dict) else {}
        ss["rev_unlocked"] = bool(content.get("rev_unlocked"))
    ss["draft_id"] = draft_id
    ss["draft_saved"] = _draft_text(content)


def read_address_once(set_work: Callable[[dict, str], None], load_default: Callable[[], None]) -> None:
    """Open what ``st.query_params`` asks for, once per session; on a bad address show its message and the
    default scenario."""
    ss = st.session_state
    if ss.get("link_read"):
        return
    ss["link_read"] = True
    message, loaded, view = None, False, None
    try:
        params = st.query_params.to_dict()
        units = _one(params, "units")
        if units in SYSTEM_NAMES:
            ss["unit_system"] = units
        if params:
            shared = parse_query(params)
            view = VIEW_TITLES.get(shared.view)
            draft_id = _one(params, "draft")
            if draft_id is not None:
                _open_draft(set_work, draft_id)
                loaded = True
            elif shared.plan_id is not None:
                revisions.load_revision(set_work, shared.plan_id, shared.revision)
                loaded = True
            elif shared.scenario is not None:
                set_work(scenario_to_dict(shared.scenario), "shared link")
                loaded = True
    except (LinkError, StoreError) as exc:
        message = f"This link cannot be opened: {exc}"
    except ScenarioError as exc:
        message = "The saved plan in this link cannot be read by this planner: " + "; ".join(
            f"{p}: {m}" if p else m for p, m in exc.problems[:5])
    except Exception as exc:  # noqa: BLE001  (never a traceback for a link)
        log.exception("link could not be opened")
        message = f"This link cannot be opened ({type(exc).__name__})."
    if not loaded:
        view = view if message is None else None
        load_default()
    if message:
        ss["link_message"] = (ss.get("gen", 0), message + " Showing the default scenario instead.")
    if view:
        ss["view"] = view


def _draft_text(content: dict) -> str:
    return json.dumps([content.get("work"), content.get("open_rev"), bool(content.get("rev_unlocked"))],
                      sort_keys=True, default=str)


def address() -> dict[str, str]:
    """The parameters that bring this session back: the open revision while unchanged, else its draft
    (written now when the edits changed since the last write)."""
    ss = st.session_state
    tail = {"view": current_link_view(), "units": ss.get("unit_system", "SI")}
    revision = ss.get("open_rev_obj")
    if revision is not None and revisions.unchanged_since_open(revision) and not ss.get("rev_unlocked"):
        return {"plan": str(revision.plan_id), "rev": str(revision.number), **tail}
    if "work" not in ss:
        return tail
    draft_id = ss.get("draft_id") or drafts.new_id()
    ss["draft_id"] = draft_id
    content = {"work": ss.get("work"), "source": ss.get("source", ""), "open_rev": ss.get("open_rev"),
               "rev_work": ss.get("rev_work"), "rev_unlocked": bool(ss.get("rev_unlocked"))}
    text = _draft_text(content)
    if ss.get("draft_saved") != text:
        drafts.write_draft(draft_id, content)
        ss["draft_saved"] = text
    return {"draft": draft_id, **tail}


def sync_address() -> None:
    """Make the address say where the session is (after every run); a draft that cannot be written is logged
    and the address keeps the view and units."""
    try:
        wanted = address()
    except StoreError as exc:
        log.warning("draft not written: %s", exc)
        wanted = {"view": current_link_view(), "units": st.session_state.get("unit_system", "SI")}
    if st.query_params.to_dict() != wanted:
        st.query_params.from_dict(wanted)
