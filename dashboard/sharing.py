"""Save / share / review: saved plans, share links and the supervisor's sign-off.

Everything lasting goes through the planner: revisions and the review trail through
``planner.records.store.PlanStore`` (an SQLite file or PostgreSQL; revisions are never overwritten and an
approved one is immutable in the database itself), links through ``planner.records.links`` (bounded, validated
decoding of untrusted query parameters).  This module only lays them out.  Saving and review steps
are done by the signed-in account (``accounts_ui``): its name goes into the revision and the trail.

Session state used here (all keys are this module's own):

- ``open_rev``: ``{"plan_id", "number"}`` of the saved revision the working scenario came from, or
  absent; ``app._set_work`` drops it whenever another scenario is loaded;
- ``rev_work``: a copy of the working dict as it was when that revision was opened or saved (what
  "unchanged" means for the lock and for share-by-id);
- ``rev_unlocked``: the operator chose to change an approved revision's inputs (they can only be
  saved as a new revision);
- ``inputs_locked``: read by ``dashboard.inputs`` to disable every input widget this run.

Call order in a run (``app.py``): ``read_link_once`` (first run of a session only, before the
default demo is loaded), ``apply_lock`` (before the working dict is validated), ``page_notices``
(under the caution), ``save_share_review`` (sidebar) and ``review_view`` (the Review tab).
"""

from __future__ import annotations

import copy
import json
import logging
from pathlib import Path
from typing import Callable

import pandas as pd
import streamlit as st

from planner.checks.finding import MOST_SEVERE_FIRST
from planner.errors import PlannerError, ScenarioError
from planner.records.links import URL_BUDGET_CHARS, LinkError, fits_in_url, link_url, parse_query, query_for
from planner.scenario.schema import Scenario, scenario_from_dict, scenario_to_dict, scenario_to_json
from planner.records.store import STATES, PlanStore, Revision, StoreError, database_url

from . import accounts_ui

from planner.transfer.plan import J_PER_KWH

from .display import fmt, number_text
from .plaintext import escaped, escaped_table
from .views import VIEW_OF_TITLE, VIEW_TITLES

log = logging.getLogger(__name__)

REVIEW_TAB = VIEW_TITLES["review"]
DEFAULT_BASE_URL = "http://localhost:8501"

SIGN_OFF_TEXT = (
    "Approval is the supervisor's judgement, made under the site's procedures: the planner gives planning "
    "estimates, not a release to start. Check the inputs, the findings and the key figures against the equipment, "
    "its ratings and the conditions on the day before signing off."
)
STATE_WORDS = {"draft": "draft", "submitted": "submitted for review", "approved": "approved",
               "returned": "returned for changes"}

# The plan's key figures kept with every saved revision (SI; the keys of the stored ``results``), with the
# label and display kind used in tables.  Same definitions as the key figures at the top of the page.
RESULT_FIELDS = (
    ("transfer_time_s", "Transfer time", "time"),
    ("total_time_s", "Start-up + transfer", "time"),
    ("planned_window_s", "Planned window", "time"),
    ("start_status", "Outcome at the start", None),
    ("start_flow_m3_s", "Starting flow", "volume_flow"),
    ("peak_discharge_pressure_pa", "Peak discharge pressure", "pressure"),
    ("outlet_rating_pa", "Rating at the pump outlet", "pressure"),
    ("npsh_margin_m", "NPSH margin", "head"),
    ("electrical_energy_kwh", "Electrical energy", "energy_kwh"),
    ("steam_kg", "Steam", "mass"),
    ("total_cost", "Total cost", "money"),
    ("findings_stop", "Findings: stop", "count"),
    ("findings_warning", "Findings: warning", "count"),
    ("findings_caution", "Findings: caution", "count"),
    ("findings_info", "Findings: info", "count"),
    ("plan_error", "No plan", None),
)


# ------------------------------------------------------------------------------------------ store

def _secret(key: str):
    try:
        if key in st.secrets:
            return st.secrets[key]
    except Exception:  # noqa: BLE001  (no secrets file: st.secrets raises on access)
        return None
    return None


def db_url() -> str:
    """The plans database: ``st.secrets["planner_db_url"]`` (an SQLAlchemy URL) or
    ``st.secrets["planner_db_path"]`` (an SQLite file), else ``PLANNER_DB_URL``, else ``PLANNER_DB_PATH``,
    else ``data/plans.sqlite``. Raises StoreError for a URL or path that is refused."""
    url, path = _secret("planner_db_url"), _secret("planner_db_path")
    if url:
        return database_url(url=str(url))
    if path:
        return database_url(path=Path(str(path)).expanduser())
    return database_url()


@st.cache_resource(show_spinner=False)
def _open_store(url: str) -> PlanStore:
    return PlanStore(url=url)


def store() -> PlanStore:
    """The process's store for the configured database (opened on first use only). Raises StoreError."""
    url = db_url()
    try:
        return _open_store(url)
    except StoreError:
        raise
    except Exception as exc:  # noqa: BLE001  (unwritable folder, damaged file, ...)
        log.exception("plans database cannot be opened")
        raise StoreError(f"the plans database cannot be opened ({type(exc).__name__}: {exc})") from None


def store_exists() -> bool:
    """False only for an SQLite file not made yet (a fresh install: nothing saved, no accounts)."""
    url = db_url()
    if url.startswith("sqlite:///"):
        return Path(url[len("sqlite:///"):]).exists()
    return True


# ------------------------------------------------------------------------------------------ helpers

def results_summary(bundle: dict | None) -> dict:
    """The key figures of a bundle (``results.build_bundle``) as stored with a revision (SI)."""
    if not bundle or "error" in bundle:
        return {"plan_error": (bundle or {}).get("error", "no plan for these inputs")}
    plan = bundle["plan"]
    figures = {k.key: k.value for k in bundle["key_figures"]}       # the planner's key figures (SI)
    out = {
        "transfer_time_s": figures.get("transfer_time"),
        "total_time_s": figures.get("total_time"),
        "planned_window_s": plan.get("planned_window_s"),
        "start_status": plan["start"].get("status"),
        "start_flow_m3_s": figures.get("start_flow"),
        "peak_discharge_pressure_pa": figures.get("peak_pressure"),
        "outlet_rating_pa": (bundle.get("outlet_rating") or {}).get("value"),
        "npsh_margin_m": figures.get("npsh_margin"),
        "electrical_energy_kwh": plan["energy"].get("electrical_kwh"),
        "steam_kg": figures.get("steam"),
        "total_cost": figures.get("total_cost"),
        "currency": plan["costs"].get("currency", ""),
    }
    findings = bundle.get("findings")
    for severity in MOST_SEVERE_FIRST:
        out[f"findings_{severity}"] = (None if findings is None
                                       else sum(1 for f in findings if f.get("severity") == severity))
    return out


def result_text(key: str, value, unit_system: str, currency: str = "") -> str:
    kind = next((k for name, _, k in RESULT_FIELDS if name == key), None)
    if value is None:
        return "—"
    if kind == "energy_kwh":
        return fmt(float(value) * J_PER_KWH, "energy", unit_system)
    if kind == "money":
        return f"{number_text(float(value), 2)} {currency}".strip()
    if kind == "count":
        return str(value)
    if kind is None or not isinstance(value, (int, float)) or isinstance(value, bool):
        return str(value)
    return fmt(float(value), kind, unit_system)


def when_text(iso: str) -> str:
    """``2025-12-01T21:34:05+00:00`` -> ``2025-12-01 21:34 UTC``."""
    text = str(iso or "")
    if len(text) >= 16 and text[10] == "T":
        return f"{text[:10]} {text[11:16]} UTC" if text.endswith("+00:00") else f"{text[:10]} {text[11:16]}"
    return text


def lock_text(revision: Revision, trail: list) -> str:
    approval = next((r for r in reversed(trail) if r.action == "approve"), None)
    who = f"approved by {approval.by} at {when_text(approval.at)}" if approval else "approved"
    return (f"Revision {revision.number} of “{revision.plan_name}” is {who} — read-only; "
            "save a new revision to change it.")


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


def _validated(work: dict) -> Scenario | None:
    try:
        return scenario_from_dict(copy.deepcopy(work))
    except (PlannerError, ValueError, TypeError, KeyError, AttributeError):
        return None


def _open_ref() -> dict | None:
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
    scenario = _validated(ss.get("work") or {})
    return scenario is not None and scenario_to_json(scenario) == revision.scenario_json


# ------------------------------------------------------------------------------------------ opening

def load_revision(set_work: Callable[[dict, str], None], plan_id: int, number: int | None) -> Revision:
    """Load a saved revision's scenario into the working dict and mark it open. Raises StoreError,
    ScenarioError."""
    revision = store().revision(int(plan_id), None if number is None else int(number))
    data = scenario_to_dict(revision.scenario)      # validated against today's schema
    set_work(data, f"saved plan “{revision.plan_name}”, revision {revision.number} ({revision.state})")
    _remember_open(revision, data)
    return revision


def read_link_once(set_work: Callable[[dict, str], None], load_default: Callable[[], None]) -> None:
    """Open what ``st.query_params`` asks for, once per session; on a bad link show its message and
    the default scenario.  The link data is untrusted: only ``planner.records.links.parse_query`` reads it."""
    ss = st.session_state
    if ss.get("link_read"):
        return
    ss["link_read"] = True
    message = None
    loaded = False
    view = None
    try:
        params = st.query_params.to_dict()
        if params:
            shared = parse_query(params)
            view = VIEW_TITLES.get(shared.view)
            if shared.plan_id is not None:
                load_revision(set_work, shared.plan_id, shared.revision)
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


def apply_lock() -> None:
    """Fetch the open revision's state; while it is approved (and not unlocked for a new revision)
    the inputs are disabled and any edit that reached the working dict is refused and undone."""
    ss = st.session_state
    ss["inputs_locked"] = False
    ss["open_rev_obj"] = None
    ss["open_rev_trail"] = []
    ref = _open_ref()
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


def page_notices() -> None:
    """Messages for the whole page: a bad link, a refused edit, the approved lock."""
    ss = st.session_state
    link_message = ss.get("link_message")
    if link_message and link_message[0] == ss.get("gen", 0):
        st.error(escaped(link_message[1]), icon="🔗")
    refused = ss.pop("refused_msg", None)
    if refused:
        st.error(escaped(refused), icon="🔒")
    revision = ss.get("open_rev_obj")
    if revision is not None and revision.read_only:
        text = escaped(lock_text(revision, ss.get("open_rev_trail") or []))
        if ss.get("rev_unlocked"):
            st.info(f"{text} You are changing a copy of its inputs: saving makes revision "
                    f"{_next_number(revision)}; revision {revision.number} stays approved.", icon="🔓")
        else:
            st.info(text, icon="🔒")


def _next_number(revision: Revision) -> int:
    try:
        return store().count_revisions(revision.plan_id) + 1
    except StoreError:
        return revision.number + 1


# ------------------------------------------------------------------------------------------ actions

def _set_msg(key: str, kind: str, text: str) -> None:
    st.session_state[key] = (kind, text)


def _do_save() -> None:
    """Save the working scenario as a new revision (never overwrites)."""
    ss = st.session_state
    scenario = _validated(ss.get("work") or {})
    if scenario is None:
        _set_msg("share_msg", "error", "The inputs have problems: fix them before saving.")
        return
    author = accounts_ui.acting_account("save")
    if author is None:
        _set_msg("share_msg", "error", "Not saved: sign in to save (sidebar, “Account”).")
        return
    from .compute import cached_bundle

    bundle = cached_bundle(scenario_to_json(scenario))
    ref = _open_ref()
    as_new = bool(ss.get("sv_as_new")) or ref is None
    try:
        revision = store().save(ss.get("sv_name") or "", scenario, author,
                                note=ss.get("sv_note") or "", site=ss.get("sv_site") or "",
                                results=results_summary(bundle), plan_id=None if as_new else ref["plan_id"])
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


def _do_open(set_work, plan_id: int, number: int) -> None:
    try:
        revision = load_revision(set_work, plan_id, number)
        _set_msg("review_msg", "success", f"Opened revision {revision.number} of “{revision.plan_name}”.")
    except StoreError as exc:
        _set_msg("review_msg", "error", str(exc))
    except ScenarioError as exc:
        _set_msg("review_msg", "error", "This revision cannot be read by this planner: " + "; ".join(
            f"{p}: {m}" if p else m for p, m in exc.problems[:5]))


def _do_review(action: str, plan_id: int, number: int) -> None:
    ss = st.session_state
    who = accounts_ui.acting_account({"submit": "submit", "approve": "approve"}.get(action, "return plans"))
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


def _do_unlock() -> None:
    st.session_state["rev_unlocked"] = True


def _do_reopen(set_work, plan_id: int, number: int) -> None:
    _do_open(set_work, plan_id, number)


def _show_msg(container, key: str) -> None:
    message = st.session_state.pop(key, None)
    if message:
        getattr(container, message[0])(escaped(message[1]))


# ------------------------------------------------------------------------------------------ sidebar

def save_share_review(container, scenario_json: str | None, bundle: dict | None) -> None:
    """The sidebar's Save / share / review section: what is open, saving, and the share link."""
    ss = st.session_state
    account = accounts_ui.account_panel(container)
    revision: Revision | None = ss.get("open_rev_obj")
    unchanged = unchanged_since_open(revision)
    _show_msg(container, "share_msg")
    if revision is not None:
        container.markdown(f"**Open:** “{escaped(revision.plan_name)}”" + (f" ({escaped(revision.site)})" if revision.site else "")
                           + f", revision {revision.number} — **{STATE_WORDS.get(revision.state, revision.state)}**"
                           + ("" if unchanged else "  \n*with unsaved changes*"))
        if revision.read_only:
            container.caption("🔒 " + escaped(lock_text(revision, ss.get("open_rev_trail") or [])))
            if not ss.get("rev_unlocked"):
                container.button("Change the inputs (as a new revision)", key="sv_unlock", on_click=_do_unlock,
                                 width="stretch", help="unlocks the inputs; saving then adds a revision and the "
                                                       "approved one stays as it is")
    else:
        container.caption("Not saved yet: save the plan to keep it, share it by id and have it reviewed.")

    # -- saving
    if scenario_json is not None and not ss.get("sv_name"):
        try:
            ss["sv_name"] = json.loads(scenario_json).get("name", "")[:160]
        except (ValueError, AttributeError):
            pass
    as_new = revision is None or bool(ss.get("sv_as_new"))
    container.text_input("Plan name", key="sv_name", disabled=not as_new, max_chars=160,
                         help="a name and site already saved add a revision to that plan")
    container.text_input("Site / area", key="sv_site", disabled=not as_new, max_chars=120,
                         help="a tag to find the plan by: jetty, tank farm, siding …")
    container.text_area("Note", key="sv_note", max_chars=4000, height=68, placeholder="what changed and why")
    if revision is not None:
        container.checkbox("Save as a separate new plan", key="sv_as_new")
    if revision is not None and not as_new:
        label = f"Save as revision {_next_number(revision)}"
    else:
        label = "Save plan"
    container.button(label, key="sv_save", on_click=_do_save, disabled=scenario_json is None or account is None,
                     width="stretch", help="saving never overwrites: every save is a new revision")
    if scenario_json is None:
        container.caption("The plan can be saved once the inputs are valid.")
    elif account is None:
        container.caption("Sign in (above) to save: the revision records who saved it.")
    else:
        container.caption(f"Saved as {account.name}.")

    # -- share link
    container.markdown("**Share link** (opens this view)")
    view = current_link_view()
    base = base_url()
    if revision is not None and unchanged:
        params = query_for(view, plan_id=revision.plan_id, revision=revision.number)
        container.code(link_url(base, params), language=None, wrap_lines=True)
        container.caption(f"Saved revision {revision.number} by id: the receiver sees it as saved"
                          + (", approved." if revision.read_only else f" (now {revision.state})."))
        return
    if scenario_json is None:
        container.caption("A link can be made once the inputs are valid.")
        return
    try:
        scenario = scenario_from_dict(json.loads(scenario_json))
        params = query_for(view, scenario=scenario)
    except (PlannerError, ValueError) as exc:
        container.caption(f"No link for these inputs: {escaped(exc)}")
        return
    url = link_url(base, params)
    if fits_in_url(params, base):
        container.code(url, language=None, wrap_lines=True, height=120)
        container.caption("Carries the inputs on screen (not saved; no review status)."
                          + (" They differ from the open revision." if revision is not None else ""))
    else:
        container.warning(f"These inputs are too long for a link ({len(url):,} characters; at most "
                          f"{URL_BUDGET_CHARS:,}). Save the plan and share its id instead.")
        container.button("Save and share the id", key="sv_save_share", on_click=_do_save, width="stretch",
                         disabled=account is None)


# ------------------------------------------------------------------------------------------ Review tab

def _trail_frame(trail: list) -> pd.DataFrame:
    words = {"submit": "submitted", "approve": "approved", "return": "returned for changes"}
    return pd.DataFrame([(when_text(r.at), words.get(r.action, r.action), r.by, r.comment) for r in trail],
                        columns=["When", "Step", "By", "Comment"])


def _results_frame(results: dict, unit_system: str) -> pd.DataFrame:
    currency = results.get("currency", "")
    rows = [(label, result_text(key, results.get(key), unit_system, currency))
            for key, label, _ in RESULT_FIELDS if key in results]
    return pd.DataFrame(rows, columns=["Figure", "Value"])


def _value_text(value) -> str:
    if value is None:
        return "—"
    if isinstance(value, str):
        return value
    return json.dumps(value, ensure_ascii=False)


def diff_frames(diff: dict, a: int, b: int, unit_system: str, currency_a: str = "", currency_b: str = "")\
        -> tuple[pd.DataFrame, pd.DataFrame]:
    """``PlanStore.diff`` as two tables: the inputs that changed, the figures that changed as shown (a figure
    whose stored value differs below the shown precision is not listed)."""
    inputs = pd.DataFrame([(path, _value_text(old), _value_text(new)) for path, old, new in diff.get("inputs", [])],
                          columns=["Input", f"Revision {a}", f"Revision {b}"])
    labels = {key: label for key, label, _ in RESULT_FIELDS}
    rows = []
    for key, old, new in diff.get("results", []):
        if key == "currency":
            if _value_text(old) != _value_text(new):
                rows.append(("Currency", _value_text(old), _value_text(new)))
            continue
        before, after = result_text(key, old, unit_system, currency_a), result_text(key, new, unit_system, currency_b)
        if before != after:         # compared at the precision shown: 4.331 m and 4.329 m are both "4.33 m"
            rows.append((labels.get(key, key), before, after))
    results = pd.DataFrame(rows, columns=["Figure", f"Revision {a}", f"Revision {b}"])
    return inputs, results


def _open_panel(set_work, unit_system: str) -> None:
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
    left.table(escaped_table(_results_frame(revision.results, unit_system)), hide_index=True)
    right.markdown("**Review trail**")
    if trail:
        right.table(escaped_table(_trail_frame(trail)), hide_index=True)
    else:
        right.caption("No review steps yet.")

    _history_check(revision)
    _review_steps(set_work, revision)


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
    who = accounts_ui.current_account()
    unchanged = unchanged_since_open(revision)
    if not unchanged and state in ("draft", "submitted"):
        st.warning(f"The inputs on screen differ from saved revision {revision.number}: a review step applies to the "
                   "saved revision. Save the changes as a new revision, or reopen the saved one.")
        st.button(f"Reopen revision {revision.number} (drop my changes)", key="rv_reopen", on_click=_do_reopen,
                  args=(set_work, revision.plan_id, revision.number))
    if state == "draft":
        st.markdown("**Submit for review**")
        can = who is not None and who.role in ("planner", "supervisor")
        st.caption(f"Submitted by {who.name} (signed in)." if can else
                   "Sign in as a planner or supervisor (sidebar, “Account”) to submit this revision.")
        st.text_input("Comment for the reviewer", key="rv_submit_comment", max_chars=2000)
        st.button("Submit for review", key="rv_submit", type="primary", disabled=not (unchanged and can),
                  on_click=_do_review, args=("submit", revision.plan_id, revision.number))
    elif state == "submitted":
        st.markdown("**Supervisor's review**")
        st.caption(SIGN_OFF_TEXT)
        note = _reviewer_note(revision, who)
        st.caption(note or f"Reviewing as {who.name} (supervisor, signed in).")
        st.text_input("Comment", key="rv_comment", max_chars=2000, help="needed to return the plan: say what to change")
        st.checkbox("I reviewed the inputs, the findings and the key figures of this revision under the site's "
                    "procedures; approval is my judgement, the plan is an estimate.", key="rv_confirm")
        x, y, _ = st.columns([1, 1, 3])
        x.button("Approve", key="rv_approve", type="primary", disabled=not unchanged or note is not None,
                 on_click=_do_review, args=("approve", revision.plan_id, revision.number))
        y.button("Return for changes", key="rv_return", disabled=not unchanged or note is not None,
                 on_click=_do_review, args=("return", revision.plan_id, revision.number))
    elif state == "approved":
        if ss.get("rev_unlocked"):
            st.caption(f"You are changing a copy of the inputs; saving makes a new revision and revision "
                       f"{revision.number} stays approved.")
        else:
            st.button("Change the inputs (as a new revision)", key="rv_unlock", on_click=_do_unlock,
                      help="unlocks the inputs; saving then adds a revision and the approved one stays as it is")


def _browse_panel(set_work, unit_system: str) -> None:
    st.markdown("#### Saved plans")
    a, b, c, d = st.columns(4)
    search = a.text_input("Name contains", key="rv_q")
    product = b.text_input("Product contains", key="rv_product")
    site = c.text_input("Site / area contains", key="rv_site")
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
    ref = _open_ref()
    default = ids.index(ref["plan_id"]) if ref and ref["plan_id"] in ids else 0
    plan_id = st.selectbox("Plan", ids, index=default, format_func=names.get, key=f"rv_plan|{','.join(map(str, ids))}")
    revisions = store().revisions(plan_id)
    numbers = [r.number for r in revisions]
    by_number = {r.number: r for r in revisions}

    def label(n):
        r = by_number[n]
        return f"revision {n} — {STATE_WORDS.get(r.state, r.state)} — {r.author}, {when_text(r.created_at)}"

    e, f = st.columns([3, 1])
    number = e.selectbox("Revision", numbers, index=len(numbers) - 1, format_func=label, key=f"rv_rev|{plan_id}")
    f.button(f"Open revision {number}", key="rv_open", on_click=_do_open, args=(set_work, plan_id, number),
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


def review_view(set_work: Callable[[dict, str], None], unit_system: str) -> None:
    """The Review tab: the open revision with its state, trail and review steps; saved plans; compare."""
    st.caption("Saved plans and the supervisor's sign-off. Approval is the supervisor's judgement under the "
               "site's procedures; the planner gives planning estimates.")
    _show_msg(st, "review_msg")
    try:
        _open_panel(set_work, unit_system)
        _browse_panel(set_work, unit_system)
    except StoreError as exc:
        st.error(f"Saved plans are not available: {escaped(exc)}")
