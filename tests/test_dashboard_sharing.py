"""Saved plans, share links and review in the dashboard, through streamlit.testing.v1.AppTest.

References: the scenario and plan numbers come from the planner itself (``load_scenario``, ``make_plan`` +
``plan_json``: the document ``python -m planner plan --json`` prints; ``planner.checks.findings.assess`` for the
finding counts), link messages from ``planner.records.links.parse_query``, saved state from ``planner.records.store.PlanStore``
opened on the same file.  The dashboard must show and store those, not recompute them.  Every test points
``PLANNER_DB_PATH`` at a file of its own (the dashboard reads it when it first opens the store).  Saving
and reviewing need a signed-in account: the tests make accounts as ``users add`` does and sign in through
the sidebar's form (Argon2id check in ``planner.records.accounts``).
"""

from __future__ import annotations

import base64
import copy
import re
import json
import zlib

import pytest
from streamlit.testing.v1 import AppTest

from apptest_inputs import editor_with_column, number_field
from conftest import DEMO_FILES, PASSWORDS, ROOT, make_people
from planner.checks.findings import assess
from planner.records.links import (LINK_VERSION, URL_BUDGET_CHARS, LinkError, fits_in_url, link_url, pack_scenario,
                           parse_query, query_for)
from planner.transfer.plan import make_plan, with_changes
from planner.reports.plan_json import plan_json
from planner.reports.text import STANDING_CAUTION
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict
from planner.records.store import PlanStore
from test_dashboard import peak_discharge_pressure

APP = str(ROOT / "dashboard" / "app.py")
LOCK_WORDS = "read-only; save a new revision to change it"


@pytest.fixture
def db(tmp_path, monkeypatch):
    path = tmp_path / "plans.sqlite"
    monkeypatch.setenv("PLANNER_DB_PATH", str(path))
    return path


def _app(params: dict | None = None) -> AppTest:
    at = AppTest.from_file(APP, default_timeout=90)
    for key, value in (params or {}).items():
        at.query_params[key] = value
    return at.run()


def _texts(elements) -> list[str]:
    """The text of markdown elements as a reader sees it (escapes of user text removed)."""
    return [re.sub(r"\\(.)", r"\1", e.value) for e in elements]


def _title(at: AppTest) -> str:
    found = [m for m in _texts(at.markdown) if m.startswith("## Viscous Transfer Planner")]
    assert found, "no page title"
    return found[0]


def _metric_hours(at: AppTest, label: str) -> float:
    found = [m.value for m in at.metric if m.label == label]
    assert found, f"no metric {label!r}"
    return float(found[0].split()[0].replace(",", ""))


def _view(at: AppTest, name: str) -> AppTest:
    at.session_state["view"] = name
    return at.run()


def _number_input(at: AppTest, label_start: str):
    return number_field(at, label_start)


def _no_trouble(at: AppTest) -> None:
    assert not at.exception, at.exception
    assert not [e for e in _texts(at.error) if "could not be drawn" in e or "Traceback" in e]
    assert any(STANDING_CAUTION in w for w in _texts(at.warning)), "the standing caution is missing"


# ------------------------------------------------------------------------------------- share links

@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_a_share_link_opens_the_same_inputs_and_view(path, db):
    scenario = load_scenario(path)
    at = _app(query_for("line", scenario=scenario))
    _no_trouble(at)
    assert not _texts(at.error)
    assert at.session_state["view"] == "Along the line"
    assert scenario.name in _title(at)
    assert at.session_state["work"] == scenario_to_dict(scenario)
    # the plan of the linked scenario (planner: make_plan + plan_json), shown at 0.01 h
    doc = plan_json(make_plan(scenario))
    assert _metric_hours(at, "Transfer time") == pytest.approx(doc["timeline"]["total_time_s"] / 3600.0, abs=0.0051)
    # a field's value on the Inputs tab: the ambient in °C (SI display) equals the linked scenario's
    _view(at, "Inputs")
    ambient = _number_input(at, "Ambient temperature")
    assert ambient.value == pytest.approx(scenario.site.ambient_temperature - 273.15, abs=1e-9)
    lengths = editor_with_column(at, "Length [m]").value["Length [m]"]
    assert list(lengths) == pytest.approx([s.length for s in scenario.route.segments], rel=1e-12)
    assert not db.exists()          # opening and showing a packed link does not touch the plans file


def _pack_raw(data: bytes) -> str:
    """A well-formed version-1 payload around arbitrary bytes (the format of planner.links)."""
    from planner.records.links import _ZDICT_V1

    packer = zlib.compressobj(9, zlib.DEFLATED, 15, 9, zlib.Z_DEFAULT_STRATEGY, _ZDICT_V1)
    packed = packer.compress(data) + packer.flush()
    return f"1.{base64.urlsafe_b64encode(packed).decode().rstrip('=')}.{zlib.crc32(data):08x}"


def _bad_links() -> dict[str, tuple[dict, str]]:
    good = pack_scenario(load_scenario(DEMO_FILES[-1]))
    version, body, check = good.split(".")
    middle = len(body) // 2
    tampered = body[:middle] + ("A" if body[middle] != "A" else "B") + body[middle + 1:]
    invalid = scenario_to_dict(load_scenario(DEMO_FILES[-1]))
    invalid["site"]["wind_speed"] = 75.0
    # case -> (query parameters, words the planner's message must contain)
    return {
        "future_version": ({"s": f"{LINK_VERSION + 1}.{body}.{check}", "view": "line"}, "newer planner"),
        "tampered": ({"s": f"{version}.{tampered}.{check}", "view": "line"}, "damaged|altered"),
        "cut_short": ({"s": f"{version}.{body[:-12]}.{check}"}, "truncated|damaged|altered"),
        "corrupt": ({"s": "1.@@@.0", "view": "time"}, "damaged"),
        "too_long": ({"s": "1." + "A" * 20_000 + ".0"}, "too long"),
        "invalid_scenario": ({"s": _pack_raw(json.dumps(invalid).encode())}, "not valid.*wind_speed"),
        "plan_id_injection": ({"plan": "1; DROP TABLE plans", "view": "review"}, "plan id is not a number"),
    }


BAD_LINKS = _bad_links()


@pytest.mark.parametrize("case", list(BAD_LINKS), ids=list(BAD_LINKS))
def test_a_bad_link_shows_its_message_and_the_default_scenario(case, db):
    import re

    params, words = BAD_LINKS[case]
    with pytest.raises(LinkError) as raised:        # the planner's own verdict and message
        parse_query(params)
    assert re.search(words, str(raised.value)), str(raised.value)
    at = _app(params)
    _no_trouble(at)
    shown = [e for e in _texts(at.error) if "This link cannot be opened" in e]
    assert shown and str(raised.value) in shown[0], _texts(at.error)
    assert "default scenario" in shown[0]
    default = load_scenario(DEMO_FILES[0])
    assert at.session_state["work"] == scenario_to_dict(default)
    assert default.name in _title(at)
    assert at.session_state["view"] in (None, "Plan")       # a bad link does not pick the view either


def test_a_link_to_a_missing_saved_plan_says_so(db):
    PlanStore(db)       # an empty plans file
    at = _app({"plan": "41", "rev": "2", "view": "review"})
    _no_trouble(at)
    shown = [e for e in _texts(at.error) if "This link cannot be opened" in e]
    assert shown and "saved plan 41, revision 2, was not found" in shown[0]
    assert at.session_state["work"] == scenario_to_dict(load_scenario(DEMO_FILES[0]))


# ------------------------------------------------------------------------------------- save and review

def _click(at: AppTest, key: str) -> AppTest:
    at.button(key=key).click().run()
    assert not at.exception, at.exception
    return at


def _people(db) -> tuple[PlanStore, dict]:
    store = PlanStore(db)
    return store, make_people(store)


def _sign_in(at: AppTest, name: str, password: str | None = None) -> AppTest:
    if any(b.key == "si_out" for b in at.button):
        _click(at, "si_out")
    at.text_input(key="si_name").set_value(name)
    at.text_input(key="si_password").set_value(PASSWORDS[name] if password is None else password)
    _click(at, "si_go")
    return at


@pytest.mark.slow
def test_save_submit_approve_lock_and_new_revision(db):
    path = DEMO_FILES[0]
    scenario = load_scenario(path)
    at = _app()
    _no_trouble(at)
    assert not db.exists()                                  # nothing saved yet: the file is made on first use
    assert at.button(key="sv_save").disabled                # and saving needs a sign-in
    store, people = _people(db)
    at.run()
    _sign_in(at, "ana")
    assert not at.button(key="sv_save").disabled
    at.text_input(key="sv_site").set_value("Jetty 2")
    at.text_area(key="sv_note").set_value("first cut")
    _click(at, "sv_save")
    assert any("Saved as revision 1" in s for s in _texts(at.success)), _texts(at.sidebar.error)
    [row] = store.plans()
    first = store.revision(row.id, 1)
    assert (first.plan_name, first.site, first.author, first.note, first.state) == \
        (scenario.name, "Jetty 2", "ana", "first cut", "draft")
    assert first.author_id == people["ana"].id
    assert scenario_to_dict(first.scenario) == scenario_to_dict(scenario)
    # the key figures kept with the revision are the plan's (planner: plan_json, findings.assess)
    plan = make_plan(scenario)
    doc = plan_json(plan)
    results = first.results
    assert results["transfer_time_s"] == pytest.approx(doc["timeline"]["total_time_s"], rel=1e-12)
    assert results["total_time_s"] == pytest.approx(doc["total_time_s"], rel=1e-12)
    assert results["start_flow_m3_s"] == pytest.approx(doc["start"]["flow_m3_s"], rel=1e-12)
    assert results["npsh_margin_m"] == pytest.approx(doc["start"]["npsh_margin_m"], rel=1e-12)
    assert results["total_cost"] == pytest.approx(doc["costs"]["total"], rel=1e-12)
    energy = doc["energy"]
    assert results["electrical_energy_kwh"] == pytest.approx(
        energy["tracing_kwh"] + energy["pump_kwh"] + energy["vessel_heating_kwh"], rel=1e-12)
    # the README's definition of the peak, as tests/test_dashboard.py reads it from the plan JSON
    assert results["peak_discharge_pressure_pa"] == pytest.approx(peak_discharge_pressure(doc), rel=1e-12)
    found = assess(plan)
    for severity in ("stop", "warning", "caution", "info"):
        assert results[f"findings_{severity}"] == sum(1 for f in found if f.severity == severity), severity
    # the share link is now the saved revision's id
    assert any(f"plan={row.id}&rev=1&view=plan" in c for c in _texts(at.sidebar.code))

    # submit, then approve, in the Review tab
    _view(at, "Review")
    _no_trouble(at)
    assert any("match the recorded history" in c for c in _texts(at.caption))
    _click(at, "rv_submit")
    assert store.revision(row.id, 1).state == "submitted"
    assert store.reviews(row.id, 1)[0].by == "ana"
    assert at.button(key="rv_approve").disabled               # ana is a planner
    assert any("needs a supervisor account" in c for c in _texts(at.caption))
    _sign_in(at, "sam")
    at.text_input(key="rv_comment").set_value("ok for the morning tide")
    _click(at, "rv_approve")                                 # not yet confirmed: refused with a message
    assert store.revision(row.id, 1).state == "submitted"
    assert any("tick the confirmation" in e for e in _texts(at.error))
    assert any("supervisor's judgement" in c and "planning" in c for c in _texts(at.caption))
    at.text_input(key="rv_comment").set_value("ok for the morning tide")
    at.checkbox(key="rv_confirm").check()
    _click(at, "rv_approve")
    approved = store.revision(row.id, 1)
    assert approved.state == "approved" and approved.read_only
    [submitted, approval] = store.reviews(row.id, 1)
    assert (approval.action, approval.by, approval.by_role, approval.comment) == \
        ("approve", "sam", "supervisor", "ok for the morning tide")
    lock = [s for s in _texts(at.info) + _texts(at.success) if LOCK_WORDS in s]
    assert lock and "approved by sam at " + approval.at[:10] in lock[0], lock

    # the inputs are disabled, and an edit that reaches the page anyway is refused
    _view(at, "Inputs")
    assert at.number_input and all(w.disabled for w in at.number_input)
    assert all(w.disabled for w in at.selectbox if w.key and w.key.startswith("in"))
    with pytest.raises(Exception, match="disabled"):         # AppTest, like a browser, cannot type into it
        _number_input(at, "Wind speed").set_value(9.0)
    # an edit that reaches the working dict anyway (a page opened before the approval, a script)
    wind_before = copy.deepcopy(at.session_state["work"]["site"])
    work = at.session_state["work"]
    work["site"]["wind_speed"] = 9.0
    at.session_state["work"] = work
    at.run()
    assert not at.exception
    assert at.session_state["work"]["site"] == wind_before
    assert any("Edit refused" in e and LOCK_WORDS in e for e in _texts(at.error)), _texts(at.error)

    # saving again makes revision 2; revision 1 stays approved and unchanged
    assert at.button(key="sv_save").label == "Save as revision 2"
    _sign_in(at, "ana")
    at.text_area(key="sv_note").set_value("same inputs, for the evening shift")
    _click(at, "sv_save")
    assert store.count_revisions(row.id) == 2
    again = store.revision(row.id, 1)
    assert again == approved                                   # every field, content hash and state included
    assert [r.action for r in store.reviews(row.id, 1)] == ["submit", "approve"]
    second = store.revision(row.id, 2)
    assert second.state == "draft" and second.content_hash == approved.content_hash and second.author == "ana"
    assert at.session_state["inputs_locked"] is False          # the open revision is now the draft
    assert not _number_input(at, "Wind speed").disabled

    # reopen the approved revision, change it as a new revision: revision 3; the comparison shows the change
    _view(at, "Review")
    at.selectbox(key=f"rv_rev|{row.id}").set_value(1).run()
    _click(at, "rv_open")
    assert at.session_state["inputs_locked"] is True
    _click(at, "rv_unlock")
    _view(at, "Inputs")
    _number_input(at, "Wind speed").set_value(7.5).run()
    assert not at.exception and not [e for e in _texts(at.error) if "Edit refused" in e]
    _click(at, "sv_save")
    third = store.revision(row.id, 3)
    assert third.scenario.site.wind_speed == pytest.approx(7.5, rel=1e-12)
    assert store.revision(row.id, 1) == approved
    _view(at, "Review")
    _no_trouble(at)
    changed = [f for f in at.dataframe if "Input" in f.value.columns]
    assert changed, "no comparison table"
    rows = changed[0].value.set_index("Input")
    assert rows.loc["site.wind_speed", "Revision 3"] in ("7.5", "7.5 m/s")
    assert float(str(rows.loc["site.wind_speed", "Revision 2"]).split()[0]) == pytest.approx(
        scenario.site.wind_speed, rel=1e-12)


@pytest.mark.slow
def test_a_saved_plan_link_opens_that_revision(db):
    path = DEMO_FILES[-1]
    scenario = load_scenario(path)
    changed = with_changes(scenario, setpoint=scenario.tracing.setpoint + 5.0)
    store, people = _people(db)
    first = store.save("RC-4417 unload", scenario, people["ana"], site="siding 3", results={"transfer_time_s": 1.0})
    second = store.save("RC-4417 unload", changed, people["ben"], site="siding 3", plan_id=first.plan_id)
    at = _app({"plan": str(first.plan_id), "rev": "1", "view": "review"})
    _no_trouble(at)
    assert not _texts(at.error)
    assert at.session_state["view"] == "Review"
    assert at.session_state["work"] == scenario_to_dict(first.scenario)
    assert scenario_from_dict(at.session_state["work"]).tracing.setpoint == pytest.approx(scenario.tracing.setpoint)
    assert any("revision 1" in m and "RC-4417 unload" in m for m in _texts(at.sidebar.markdown))
    assert any(f"plan={first.plan_id}&rev=1&view=review" in c for c in _texts(at.sidebar.code))
    doc = plan_json(make_plan(first.scenario))
    assert _metric_hours(at, "Transfer time") == pytest.approx(doc["timeline"]["total_time_s"] / 3600.0, abs=0.0051)
    # without a revision number: the latest
    at = _app({"plan": str(first.plan_id), "view": "inputs"})
    _no_trouble(at)
    assert at.session_state["view"] == "Inputs"
    assert scenario_from_dict(at.session_state["work"]).tracing.setpoint == pytest.approx(second.scenario.tracing.setpoint)
    assert _number_input(at, "Setpoint").value == pytest.approx(second.scenario.tracing.setpoint - 273.15, abs=1e-9)
    # an approved revision opens locked
    store.submit(first.plan_id, 1, people["ana"])
    store.approve(first.plan_id, 1, people["sam"], "fine")
    at = _app({"plan": str(first.plan_id), "rev": "1", "view": "inputs"})
    _no_trouble(at)
    assert any(LOCK_WORDS in i and "approved by sam" in i for i in _texts(at.info))
    assert at.number_input and all(w.disabled for w in at.number_input)


def test_search_lists_saved_plans_by_name_product_site_and_state(db):
    store, people = _people(db)
    fuel, polyol, syrup = (load_scenario(p) for p in DEMO_FILES)
    store.save("Wren discharge", fuel, people["ana"], site="jetty")
    kept = store.save("T-31 to T-07", polyol, people["ben"], site="tank farm")
    store.save("RC-4417 unload", syrup, people["sam"], site="siding 3")
    store.submit(kept.plan_id, 1, people["ben"])
    at = _view(_app(), "Review")
    _no_trouble(at)

    def listed() -> list[str]:
        tables = [f.value for f in at.dataframe if "Plan" in f.value.columns and "State" in f.value.columns]
        return sorted(tables[0]["Plan"]) if tables else []

    assert listed() == ["RC-4417 unload", "T-31 to T-07", "Wren discharge"]
    at.text_input(key="rv_q").set_value("wren").run()
    assert listed() == ["Wren discharge"]
    at.text_input(key="rv_q").set_value("").run()
    at.text_input(key="rv_product").set_value(polyol.product.name[:12]).run()
    assert listed() == ["T-31 to T-07"]
    at.text_input(key="rv_product").set_value("").run()
    at.text_input(key="rv_site").set_value("siding").run()
    assert listed() == ["RC-4417 unload"]
    at.text_input(key="rv_site").set_value("").run()
    at.selectbox(key="rv_state").set_value("submitted").run()
    assert listed() == ["T-31 to T-07"]
    assert not at.exception


def test_the_plans_file_can_come_from_the_secrets(db, tmp_path):
    other = tmp_path / "from-secrets.sqlite"
    _people(other)
    at = AppTest.from_file(APP, default_timeout=90)
    at.secrets["planner_db_path"] = str(other)
    at.run()
    _sign_in(at, "ana")
    _click(at, "sv_save")
    assert [p.name for p in PlanStore(other).plans()] == [load_scenario(DEMO_FILES[0]).name]
    assert not db.exists()


@pytest.mark.slow
def test_a_scenario_too_long_for_a_link_offers_to_share_the_saved_id(db):
    data = scenario_to_dict(load_scenario(DEMO_FILES[1]))
    template = data["route"]["segments"][-1]
    for i in range(40):       # many segments with their own names: the packed scenario outgrows a URL
        segment = copy.deepcopy(template)
        segment.update(name=f"Rack bay {i:02d} to {i + 1:02d}, north run {i * 37 % 101}", length=5.0 + i,
                       fittings=[], elevation_change=0.0)
        data["route"]["segments"].append(segment)
    long_one = scenario_from_dict(data)
    params = query_for("plan", scenario=long_one)
    assert not fits_in_url(params)                          # planner.links: the 2000-character budget
    at = _app()
    at.session_state["work"] = scenario_to_dict(long_one)
    at.run()
    _no_trouble(at)
    warned = [w for w in _texts(at.sidebar.warning) if "too long for a link" in w]
    assert warned and f"at most {URL_BUDGET_CHARS:,}" in warned[0]
    assert f"{len(link_url('http://localhost:8501', params)):,} characters" in warned[0]
    _people(db)
    at.run()
    _sign_in(at, "ana")
    _click(at, "sv_save_share")
    [row] = PlanStore(db).plans()
    assert any(f"?plan={row.id}&rev=1&view=plan" in c for c in _texts(at.sidebar.code))


def test_return_for_changes_needs_a_comment_and_is_kept_in_the_trail(db):
    scenario = load_scenario(DEMO_FILES[1])
    store, people = _people(db)
    saved = store.save("T-31 to T-07", scenario, people["ben"], site="tank farm")
    store.submit(saved.plan_id, 1, people["ben"], "ready")
    at = _app({"plan": str(saved.plan_id), "rev": "1", "view": "review"})
    _no_trouble(at)
    assert any("supervisor's judgement" in c and "site's procedures" in c for c in _texts(at.caption))
    assert at.button(key="rv_return").disabled                      # nobody signed in yet
    _sign_in(at, "sam")
    _click(at, "rv_return")                                  # no comment: the store refuses, the page says why
    assert store.revision(saved.plan_id, 1).state == "submitted"
    assert any("needs a comment" in e for e in _texts(at.error)), _texts(at.error)
    at.text_input(key="rv_comment").set_value("pre-warm longer: the farm line is exposed")
    _click(at, "rv_return")
    assert store.revision(saved.plan_id, 1).state == "returned"
    assert [(r.action, r.by, r.comment) for r in store.reviews(saved.plan_id, 1)] == [
        ("submit", "ben", "ready"), ("return", "sam", "pre-warm longer: the farm line is exposed")]
    assert any("returned for changes by sam" in e and "pre-warm longer" in e for e in _texts(at.error))
    assert not at.session_state["inputs_locked"]             # returned: change it and save a new revision


def test_loading_another_scenario_closes_the_open_revision(db):
    _people(db)
    at = _app()
    _sign_in(at, "ana")
    _click(at, "sv_save")
    at.selectbox(key="demo_choice").set_value(DEMO_FILES[1].name).run()
    assert not at.exception
    assert at.session_state["work"] == scenario_to_dict(load_scenario(DEMO_FILES[1]))
    assert any("Not saved yet" in c for c in _texts(at.sidebar.caption))
    assert at.text_input(key="sv_name").value == load_scenario(DEMO_FILES[1]).name
    _click(at, "sv_save")
    plans = PlanStore(db).plans()
    assert sorted((p.name, p.latest) for p in plans) == sorted(
        (load_scenario(path).name, 1) for path in DEMO_FILES[:2])


@pytest.mark.slow
def test_unsaved_changes_survive_an_approval_made_in_another_session(db):
    store, people = _people(db)
    at = _app()
    _sign_in(at, "ana")
    _click(at, "sv_save")
    [row] = store.plans()
    store.submit(row.id, 1, people["ana"])
    _view(at, "Inputs")
    _number_input(at, "Wind speed").set_value(6.5).run()           # edited, not saved
    store.approve(row.id, 1, people["sam"], "ok")                    # meanwhile, the supervisor's session
    at.run()
    assert not at.exception
    assert scenario_from_dict(at.session_state["work"]).site.wind_speed == pytest.approx(6.5, rel=1e-12)
    assert any("approved meanwhile" in w for w in _texts(at.sidebar.warning)), _texts(at.sidebar.warning)
    assert not _number_input(at, "Wind speed").disabled
    _click(at, "sv_save")
    assert store.revision(row.id, 2).scenario.site.wind_speed == pytest.approx(6.5, rel=1e-12)
    first = store.revision(row.id, 1)
    assert first.state == "approved"
    assert first.scenario.site.wind_speed == pytest.approx(load_scenario(DEMO_FILES[0]).site.wind_speed, rel=1e-12)


# ------------------------------------------------------------------------------------- labels follow the state

def _caption_and_working_on(at: AppTest) -> tuple[str, str]:
    caption = [c for c in _texts(at.caption) if "— units:" in c]
    working = [c for c in _texts(at.sidebar.caption) if c.startswith("Working on:")]
    assert caption and working
    return caption[0], working[0]


def test_labels_follow_the_revision_state_and_the_loaded_scenario(db):
    """Issue 12.3: approved in another session, the caption and the sidebar say "approved" on the next run
    (not the "draft" of the time it was opened); a share link clears the demo picker."""
    store, people = _people(db)
    scenario = load_scenario(DEMO_FILES[0])
    saved = store.save("Wren discharge", scenario, people["ana"], site="jetty 2")
    at = _app({"plan": str(saved.plan_id), "rev": "1", "view": "plan"})
    _no_trouble(at)
    caption, working = _caption_and_working_on(at)
    assert "revision 1 (draft)" in caption and "revision 1 (draft)" in working
    assert at.selectbox(key="demo_choice").value is None           # not a demo any more
    store.submit(saved.plan_id, 1, people["ana"])
    store.approve(saved.plan_id, 1, people["sam"], "fine")         # another session signs it off
    at.run()
    caption, working = _caption_and_working_on(at)
    assert "revision 1 (approved)" in caption and "revision 1 (approved)" in working, (caption, working)
    assert not [c for c in (caption, working) if "draft" in c]
    linked = _app(query_for("plan", scenario=load_scenario(DEMO_FILES[1])))
    assert linked.selectbox(key="demo_choice").value is None
    assert "shared link" in _caption_and_working_on(linked)[0]
    plain_demo = _app()
    assert plain_demo.selectbox(key="demo_choice").value == DEMO_FILES[0].name
