"""The sidebar: the scenario (demo picker, file import), the unit system, the exports, and saving and sharing
(the account panel, the save fields, the share link)."""

from __future__ import annotations

import json
import re

import streamlit as st

from planner.errors import PlannerError
from planner.records.links import URL_BUDGET_CHARS, fits_in_url, link_url, query_for
from planner.records.revision import Revision
from planner.records.terms import LIMITS, SAVE_ROLES
from planner.scenario.schema import Scenario, scenario_from_dict, scenario_to_toml

from dashboard import header, loading, url_state
from dashboard.compute.record import Outcome, ok
from dashboard.present import tables
from dashboard.present.display import SYSTEM_NAMES
from dashboard.present.plaintext import escaped
from dashboard.present.saved import STATE_WORDS, lock_text
from dashboard.services import accounts, revisions


def _slug(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9]+", "-", text).strip("-").lower()[:60] or "plan"


def sidebar(scenario: Scenario | None, scenario_json: str | None, planned: Outcome | None, unit_system: str) -> None:
    sb = st.sidebar
    sb.header("Scenario")
    names = [p.name for p in loading.DEMO_FILES]
    sb.selectbox("Demo scenario", names, key="demo_choice", on_change=loading.on_demo_change,
                 placeholder="(not a demo: see below)",
                 help="invented scenarios of the fictional Larkspur Quay terminal")
    if sb.button("Reload the demo (drop my edits)", key="reload_demo",
                 disabled=st.session_state.get("demo_choice") is None):
        loading.on_demo_change()
        st.rerun()
    upload_key = "upload"
    sb.file_uploader("Import a scenario file", type=["toml", "json"], key=upload_key, on_change=loading.on_upload,
                     args=(upload_key,), help="the same TOML/JSON files `python -m planner` reads")
    message = st.session_state.get("load_message")
    if message:
        getattr(sb, message[0])(escaped(message[1]))
    sb.caption("Working on: " + escaped(header.source_text()))
    sb.header("Units")
    sb.radio("Unit system", list(SYSTEM_NAMES), format_func=SYSTEM_NAMES.get, key="unit_system", horizontal=True,
             help="applies to every input, result, table, chart and export")
    sb.header("Export")
    if scenario is not None:
        sb.download_button("Scenario file (TOML)", data=lambda: scenario_to_toml(scenario, unit_system), file_name=f"{_slug(scenario.name)}.toml",
                           mime="application/toml", key="dl_toml", width="stretch")
    else:
        sb.caption("The scenario file can be exported once the inputs are valid.")
    if scenario is not None and ok(planned):
        results = planned
        slug = _slug(scenario.name)
        saved_envelope = st.session_state.get("envelope") or {}
        envelope = saved_envelope.get("result") if saved_envelope.get("json") == scenario_json else None
        odds = report_odds(scenario_json)
        sb.download_button("Plan report (HTML, opens offline)" + (" with the odds" if odds else "")
                           + (" with the envelope card" if envelope else ""),
                           data=lambda: _report_html(scenario, results, unit_system, envelope, odds),
                           file_name=f"plan-{slug}.html", mime="text/html", key="dl_report", width="stretch")
        if results.profile is not None:
            sb.download_button("Profile along the line (CSV)",
                               data=lambda: tables.csv_text(tables.profile_frame(results.profile, results.segments, unit_system)),
                               file_name=f"profile-{slug}-{unit_system}.csv", mime="text/csv", key="dl_profile", width="stretch")
        sb.download_button("Timeline (CSV)", data=lambda: tables.timeline_csv(results.plan, unit_system, scenario.name),
                           file_name=f"timeline-{slug}-{unit_system}.csv", mime="text/csv", key="dl_timeline", width="stretch")
    sb.header("Save / share / review")
    save_share_review(sb, scenario_json)


def report_odds(scenario_json: str | None) -> tuple[dict, str] | None:
    """The odds for the report: worked out in this session for these inputs, else those kept with the open
    saved revision while the inputs are unchanged since it was opened; None when there are none."""
    odds = revisions.session_odds(scenario_json)
    if odds is not None:
        return odds, "worked out in this session for these inputs"
    revision = st.session_state.get("open_rev_obj")
    if revision is not None and revision.results.get("uncertainty") and revisions.unchanged_since_open(revision):
        return revision.results["uncertainty"], f"as kept with saved revision {revision.number}"
    return None


# ------------------------------------------------------------------------------------------ save and share

def _report_html(scenario: Scenario, results, unit_system: str, envelope, odds=None) -> str:
    """The plan report; its module (the figures, plotly's script) loads when the report is downloaded."""
    from dashboard.present.report import build_report_html

    return build_report_html(scenario, results, unit_system, envelope=envelope, odds=odds)


def _show_msg(container, key: str) -> None:
    message = st.session_state.pop(key, None)
    if message:
        getattr(container, message[0])(escaped(message[1]))


def save_share_review(container, scenario_json: str | None) -> None:
    """The sidebar's Save / share / review section: what is open, saving, and the share link."""
    ss = st.session_state
    account = accounts.account_panel(container)
    revision: Revision | None = ss.get("open_rev_obj")
    unchanged = revisions.unchanged_since_open(revision)
    _show_msg(container, "share_msg")
    if revision is not None:
        container.markdown(f"**Open:** “{escaped(revision.plan_name)}”" + (f" ({escaped(revision.site)})" if revision.site else "")
                           + f", revision {revision.number} — **{STATE_WORDS.get(revision.state, revision.state)}**"
                           + ("" if unchanged else "  \n*with unsaved changes*"))
        if revision.read_only:
            container.caption("🔒 " + escaped(lock_text(revision, ss.get("open_rev_trail") or [])))
            if not ss.get("rev_unlocked"):
                container.button("Change the inputs (as a new revision)", key="sv_unlock", on_click=revisions.do_unlock,
                                 width="stretch", help="unlocks the inputs; saving then adds a revision and the "
                                                       "approved one stays as it is")
    else:
        container.caption("Not saved yet: save the plan to keep it, share it by id and have it reviewed.")

    # -- saving
    if scenario_json is not None and not ss.get("sv_name"):
        try:
            ss["sv_name"] = json.loads(scenario_json).get("name", "")[:LIMITS["name"]]
        except (ValueError, AttributeError):
            pass
    as_new = revision is None or bool(ss.get("sv_as_new"))
    container.text_input("Plan name", key="sv_name", disabled=not as_new, max_chars=LIMITS["name"],
                         help="a name and site already saved add a revision to that plan")
    container.text_input("Site / area", key="sv_site", disabled=not as_new, max_chars=LIMITS["site"],
                         help="a tag to find the plan by: jetty, tank farm, siding …")
    container.text_area("Note", key="sv_note", max_chars=LIMITS["note"], height=68, placeholder="what changed and why")
    if revision is not None:
        container.checkbox("Save as a separate new plan", key="sv_as_new")
    if revision is not None and not as_new:
        label = f"Save as revision {revisions.next_number(revision)}"
    else:
        label = "Save plan"
    may_save = account is not None and account.role in SAVE_ROLES
    container.button(label, key="sv_save", on_click=revisions.do_save, disabled=scenario_json is None or not may_save,
                     width="stretch", help="saving never overwrites: every save is a new revision")
    if scenario_json is None:
        container.caption("The plan can be saved once the inputs are valid.")
    elif account is None:
        container.caption("Sign in (above) to save: the revision records who saved it.")
    elif not may_save:
        container.caption(f"An {account.role} account manages accounts; saving needs a planner or supervisor account.")
    else:
        container.caption(f"Saved as {account.name}.")

    # -- share link
    container.markdown("**Share link** (opens this view)")
    view = url_state.current_link_view()
    base = url_state.base_url()
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
        container.button("Save and share the id", key="sv_save_share", on_click=revisions.do_save, width="stretch",
                         disabled=not may_save)
