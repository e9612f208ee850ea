"""Sign-in in the dashboard (AppTest): planning needs none, saving and reviewing do; the first admin is
offered only while no account exists; wrong passwords, throttling, expired sessions and disabled
accounts are said plainly; the author cannot approve; a revision changed behind the planner's back is
flagged in the Review tab.

References: the rules are issue 14's; accounts, sessions and the history check come from
``planner.records.accounts`` / ``planner.records.store`` opened on the same file (the dashboard must show
their verdicts, not make its own).
"""

from __future__ import annotations

import sqlite3

import pytest
from streamlit.testing.v1 import AppTest

from conftest import DEMO_FILES, PASSWORDS, ROOT, make_people
from planner.records import accounts
from planner.records.accounts import AccountBook
from planner.records.store import PlanStore
from planner.scenario.schema import load_scenario
from test_dashboard_sharing import _click, _people, _sign_in, _texts, _view

APP = str(ROOT / "dashboard" / "app.py")


@pytest.fixture
def db(tmp_path, monkeypatch):
    path = tmp_path / "plans.sqlite"
    monkeypatch.setenv("PLANNER_DB_PATH", str(path))
    monkeypatch.delenv("PLANNER_DB_URL", raising=False)
    return path


def _app(params: dict | None = None) -> AppTest:
    at = AppTest.from_file(APP, default_timeout=90)
    for key, value in (params or {}).items():
        at.query_params[key] = value
    return at.run()


def _sidebar_texts(at: AppTest) -> list[str]:
    return _texts(at.sidebar.caption) + _texts(at.sidebar.error) + _texts(at.sidebar.warning) + \
        _texts(at.sidebar.success) + _texts(at.sidebar.info)


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_the_first_admin_is_offered_only_while_no_account_exists(db):
    at = _app()
    assert not at.exception
    assert not db.exists()                                    # offering it does not create the file
    assert any("No accounts yet" in c for c in _texts(at.sidebar.caption))
    assert at.button(key="sv_save").disabled
    at.text_input(key="fa_name").set_value("alice")
    at.text_input(key="fa_password").set_value("alice-password-1")
    at.text_input(key="fa_again").set_value("alice-password-2")
    _click(at, "fa_create")
    assert any("the two passwords differ" in e for e in _texts(at.sidebar.error))
    at.text_input(key="fa_password").set_value("alice-password-1")
    at.text_input(key="fa_again").set_value("alice-password-1")
    _click(at, "fa_create")
    store = PlanStore(db)
    assert [(a.name, a.role, a.created_by) for a in AccountBook(store).list()] == [("alice", "admin", "first admin")]
    assert any("Signed in as **alice** (admin)" in c for c in _texts(at.sidebar.caption))
    # the admin adds a planner from the panel; saving is refused for an admin (not a planning role)
    at.text_input(key="ad_name").set_value("ana")
    at.selectbox(key="ad_role").set_value("planner")
    at.text_input(key="ad_password").set_value(PASSWORDS["ana"])
    _click(at, "ad_add")
    assert AccountBook(store).get("ana").role == "planner"
    # the save button is not offered to an admin (issue 23: it was enabled, then refused); the store refuses too
    assert at.button(key="sv_save").disabled
    assert any("saving needs a planner or supervisor account" in c for c in _texts(at.sidebar.caption)), \
        _sidebar_texts(at)
    # a second session on the same file: no first-admin form any more, only sign-in
    other = _app()
    assert not [w for w in other.text_input if w.key == "fa_name"]
    assert [w for w in other.text_input if w.key == "si_name"]


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_wrong_passwords_are_refused_and_throttled(db, monkeypatch):
    _people(db)
    at = _app()
    _sign_in(at, "ana", "not-her-password")
    assert any("Not signed in: the account name or the password is not right" in e for e in _texts(at.sidebar.error))
    for _ in range(accounts.FREE_ATTEMPTS - 1):
        _sign_in(at, "ana", "not-her-password")
    _sign_in(at, "ana")                                        # the right one, but the account is locked now
    assert any("too many failed sign-ins for 'ana'" in e for e in _texts(at.sidebar.error)), _sidebar_texts(at)
    assert at.button(key="sv_save").disabled


def test_an_expired_or_disabled_session_signs_out(db):
    store, people = _people(db)
    at = _app()
    _sign_in(at, "ana")
    assert not at.button(key="sv_save").disabled
    with store.engine.begin() as conn:                          # the session's end passes (12 h later)
        conn.exec_driver_sql("UPDATE sessions SET expires_at = 0")
    at.run()
    assert any("Signed out: your sign-in has expired" in w for w in _texts(at.sidebar.warning)), _sidebar_texts(at)
    assert at.button(key="sv_save").disabled
    _sign_in(at, "ben")
    AccountBook(store).disable("ben", by=people["root"])        # an admin disables ben meanwhile
    at.run()
    assert any("Signed out: your sign-in has ended" in w for w in _texts(at.sidebar.warning)), _sidebar_texts(at)
    _sign_in(at, "ben")
    assert any("the account 'ben' is disabled" in e for e in _texts(at.sidebar.error))


def test_the_author_cannot_approve_and_another_supervisor_can(db):
    store, people = _people(db)
    saved = store.save("Sam's plan", load_scenario(DEMO_FILES[0]), people["sam"])
    store.submit(saved.plan_id, 1, people["sam"])
    at = _app({"plan": str(saved.plan_id), "rev": "1", "view": "review"})
    _sign_in(at, "sam")
    assert at.button(key="rv_approve").disabled and at.button(key="rv_return").disabled
    assert any("You (sam) authored revision 1: another supervisor must approve or return it" in c
               for c in _texts(at.caption))
    _sign_in(at, "sue")
    assert not at.button(key="rv_approve").disabled
    at.checkbox(key="rv_confirm").check()
    _click(at, "rv_approve")
    assert [(r.action, r.by) for r in store.reviews(saved.plan_id, 1)] == [("submit", "sam"), ("approve", "sue")]


def test_a_revision_changed_behind_the_planners_back_is_flagged(db):
    store, people = _people(db)
    saved = store.save("Wren", load_scenario(DEMO_FILES[0]), people["ana"], "as planned")
    raw = sqlite3.connect(db, isolation_level=None)
    raw.execute("DROP TRIGGER revisions_content_frozen")
    raw.execute("UPDATE revisions SET note = 'quietly changed'")
    raw.close()
    at = _app({"plan": str(saved.plan_id), "rev": "1", "view": "review"})
    assert not at.exception
    flagged = [e for e in _texts(at.error) if "does not match the recorded history" in e]
    assert flagged and f"plan {saved.plan_id} revision 1 (“Wren”): differs from the recorded history" in flagged[0]
    assert store.revision_problems(saved.plan_id, 1) == [
        f"plan {saved.plan_id} revision 1 (“Wren”): differs from the recorded history"]


def test_planning_and_links_need_no_sign_in(db):
    make_people(PlanStore(db))
    at = _app()
    assert not at.exception
    assert [m for m in at.metric if m.label == "Transfer time"]      # the plan is on the page
    _view(at, "Review")
    assert not at.exception
    assert any("No saved revision is open" in i for i in _texts(at.info))


def test_a_search_with_a_nul_character_is_refused_not_matched(db):
    store, people = _people(db)
    store.save("Wren discharge", load_scenario(DEMO_FILES[0]), people["ana"])
    store.save("T-31 to T-07", load_scenario(DEMO_FILES[1]), people["ben"])
    at = _view(_app(), "Review")
    at.text_input(key="rv_q").set_value("\x00").run()
    assert not at.exception
    assert any("Search refused: search: name: contains a control character" in e for e in _texts(at.error))
    assert not [f for f in at.dataframe if "Plan" in f.value.columns and "State" in f.value.columns]


@pytest.mark.slow
def test_the_admin_panel_enables_changes_roles_and_sets_passwords(db):
    store, people = _people(db)
    book = AccountBook(store)
    at = _app()
    _sign_in(at, "root")
    _click(at, "ad_disable|ben")
    assert book.get("ben").disabled_at is not None
    assert not [b for b in at.button if b.key == "ad_disable|root"]          # not oneself
    _click(at, "ad_enable|ben")
    assert book.get("ben").active and any("Account 'ben' enabled again" in m for m in _texts(at.sidebar.success))
    at.selectbox(key="ad_target").set_value("ana")
    at.selectbox(key="ad_new_role").set_value("supervisor")
    _click(at, "ad_set_role")
    assert book.get("ana").role == "supervisor"
    at.selectbox(key="ad_target").set_value("root")
    at.selectbox(key="ad_new_role").set_value("planner")
    _click(at, "ad_set_role")
    assert any("'root' is the only active admin" in e for e in _texts(at.sidebar.error)), _sidebar_texts(at)
    at.selectbox(key="ad_target").set_value("ben")
    at.text_input(key="ad_new_password").set_value("ben-password-2")
    _click(at, "ad_set_password")
    assert book.authenticate("ben", "ben-password-2").name == "ben"
    # ben changes his own password with the current one and stays signed in
    _sign_in(at, "ben", "ben-password-2")
    at.text_input(key="pw_current").set_value("ben-password-2")
    at.text_input(key="pw_new").set_value("ben-password-3")
    at.text_input(key="pw_again").set_value("ben-password-3")
    _click(at, "pw_change")
    assert any("Your password is changed" in m for m in _texts(at.sidebar.success)), _sidebar_texts(at)
    assert any("Signed in as **ben**" in c for c in _texts(at.sidebar.caption))
    assert book.authenticate("ben", "ben-password-3").name == "ben"
    with store.engine.connect() as conn:
        actions = [r[0] for r in conn.exec_driver_sql("SELECT action FROM account_events ORDER BY id").all()]
    assert actions[5:] == ["disable", "enable", "role", "password", "password"]
    assert store.verify().ok


def test_a_session_row_written_by_raw_sql_does_not_act(db):
    """Issue 20: a session inserted by raw SQL for a supervisor (its token hashed with plain SHA-256, as
    anyone could) must not sign the page in, so it cannot approve."""
    import hashlib
    import secrets
    import time

    store, people = _people(db)
    saved = store.save("Ana's plan", load_scenario(DEMO_FILES[0]), people["ana"])
    store.submit(saved.plan_id, 1, people["ana"])
    token, now = secrets.token_urlsafe(32), time.time()
    raw = sqlite3.connect(db, isolation_level=None)
    raw.execute("INSERT INTO sessions (token_hash, account_id, created_at, expires_at, last_seen) VALUES (?, ?, ?, ?, ?)",
                (hashlib.sha256(token.encode()).hexdigest(), people["sue"].id, now, now + 3600, now))
    raw.close()
    at = AppTest.from_file(APP, default_timeout=90)
    for key, value in {"plan": str(saved.plan_id), "rev": "1", "view": "review"}.items():
        at.query_params[key] = value
    at.session_state["auth_token"] = token
    at.run()
    assert not at.exception
    assert any("Signed out: your sign-in has ended" in w for w in _texts(at.sidebar.warning)), _sidebar_texts(at)
    assert not any("Signed in as" in c for c in _texts(at.sidebar.caption))
    assert at.button(key="rv_approve").disabled
    assert [(r.action, r.by) for r in store.reviews(saved.plan_id, 1)] == [("submit", "ana")]
    assert not store.verify().ok
