"""Accounts on both back ends: Argon2id hashes, first admin, roles, throttled sign-ins, session expiry,
disabling that keeps history.

References: the hash format and check come from argon2-cffi itself (``argon2.PasswordHasher().verify``,
``argon2.extract_parameters``: the PHC string format of the Argon2 reference implementation); the
parameters are the OWASP Password Storage Cheat Sheet's Argon2id setting (m = 19 MiB, t = 2, p = 1)
[trade]; the rules (roles, first admin, throttling, expiry, disabling keeps history) are issue 14's.
"""

from __future__ import annotations

import hashlib
import time

import argon2
import pytest
from sqlalchemy import text

from conftest import DEMO_FILES
from planner.records import accounts, sessions, throttle
from planner.records.accounts import AccountBook
from planner.records.store import PlanStore, StoreError
from planner.scenario.schema import load_scenario


@pytest.fixture
def store(db_url):
    opened = PlanStore(url=db_url)
    yield opened
    opened.close()


@pytest.fixture
def book(store):
    return AccountBook(store)


def _hash_of(store, name: str) -> str:
    with store.engine.connect() as conn:
        return conn.execute(text("SELECT password_hash FROM accounts WHERE name = :n"), {"n": name}).scalar_one()


def test_passwords_are_kept_as_argon2id_hashes(store, book):
    book.add("root", "admin", "root-password-1")
    stored = _hash_of(store, "root")
    assert stored.startswith("$argon2id$v=19$")
    params = argon2.extract_parameters(stored)
    assert (params.type, params.memory_cost, params.time_cost, params.parallelism) == \
        (argon2.Type.ID, 19 * 1024, 2, 1)
    assert "root-password-1" not in stored
    assert argon2.PasswordHasher().verify(stored, "root-password-1")       # the library's own check
    with pytest.raises(argon2.exceptions.VerifyMismatchError):
        argon2.PasswordHasher().verify(stored, "root-password-2")
    assert book.authenticate("root", "root-password-1").name == "root"


def test_the_first_account_is_an_admin_and_later_ones_need_one(book):
    with pytest.raises(StoreError, match="the first account must be an admin"):
        book.add("ana", "planner", "ana-password-1")
    root = book.add("root", "admin", "root-password-1")
    assert root.created_by == "first admin"
    with pytest.raises(StoreError, match="adding an account needs an admin's sign-in"):
        book.add("ana", "planner", "ana-password-1")
    ana = book.add("ana", "planner", "ana-password-1", by=root)
    assert ana.created_by == "root"
    with pytest.raises(StoreError, match="needs an active admin account"):
        book.add("ben", "planner", "ben-password-1", by=ana)
    assert book.add("ben", "planner", "ben-password-1", by=root).created_by == "root"
    with pytest.raises(StoreError, match="an account 'ana' exists already"):
        book.add("ana", "supervisor", "another-password", by=root)
    assert [(a.name, a.role) for a in book.list()] == [("ana", "planner"), ("ben", "planner"), ("root", "admin")]


@pytest.mark.parametrize("name, role, password, words", [
    ("", "planner", "long-enough-1", "account name: empty"),
    ("a\x00b", "planner", "long-enough-1", "account name: contains a control character"),
    ("x" * 61, "planner", "long-enough-1", "account name: 61 characters, at most 60"),
    ("ana;drop", "planner", "long-enough-1", "letters, digits"),
    ("ana", "boss", "long-enough-1", "role: 'boss' is not one of planner, supervisor, admin"),
    ("ana", "planner", "short", "password: 5 characters, at least 10"),
    ("ana", "planner", "x" * 257, "password: longer than 256"),
    ("ana", "planner", "long-enough\x00", "password: contains a NUL"),
])
def test_bad_account_fields_are_refused_with_the_field(book, name, role, password, words):
    root = book.add("root", "admin", "root-password-1")
    with pytest.raises(StoreError, match=words):
        book.add(name, role, password, by=root)


@pytest.mark.slow
def test_failed_sign_ins_are_throttled(book, monkeypatch):
    monkeypatch.setattr(throttle, "LOCK_BASE_S", 1.0)
    root = book.add("root", "admin", "root-password-1")
    book.add("ana", "planner", "ana-password-1", by=root)
    for _ in range(accounts.FREE_ATTEMPTS):
        with pytest.raises(StoreError, match="the account name or the password is not right"):
            book.authenticate("ana", "guess-guess-guess")
    # locked: even the right password is refused, without being looked at
    with pytest.raises(StoreError, match=r"too many failed sign-ins for 'ana': try again in \d+ s"):
        book.authenticate("ana", "ana-password-1")
    time.sleep(1.2)
    with pytest.raises(StoreError, match="not right"):          # the 6th failure locks for twice as long
        book.authenticate("ana", "guess-guess-guess")
    with pytest.raises(StoreError, match="try again in [12] s"):
        book.authenticate("ana", "ana-password-1")
    time.sleep(2.2)
    assert book.authenticate("ana", "ana-password-1").name == "ana"     # success resets the count
    with pytest.raises(StoreError, match="not right"):
        book.authenticate("ana", "guess-guess-guess")
    assert book.authenticate("ana", "ana-password-1").name == "ana"
    # an unknown name gets the same answer as a wrong password
    with pytest.raises(StoreError) as unknown:
        book.authenticate("nobody-here", "ana-password-1")
    assert str(unknown.value) == accounts.WRONG


@pytest.mark.slow
def test_sessions_expire_end_on_sign_out_and_on_disabling(store):
    book = AccountBook(store, session_s=1.5, idle_s=3600)
    root = book.add("root", "admin", "root-password-1")
    book.add("ana", "planner", "ana-password-1", by=root)
    session = book.sign_in("ana", "ana-password-1")
    assert book.session(session.token).name == "ana"
    time.sleep(1.7)
    with pytest.raises(StoreError, match="your sign-in has expired"):
        book.session(session.token)
    idle = AccountBook(store, session_s=3600, idle_s=1.0)
    session = idle.sign_in("ana", "ana-password-1")
    assert idle.session(session.token).name == "ana"
    time.sleep(1.2)
    with pytest.raises(StoreError, match="expired"):
        idle.session(session.token)
    session = book.sign_in("ana", "ana-password-1")
    book.sign_out(session.token)
    with pytest.raises(StoreError, match="ended"):
        book.session(session.token)
    with pytest.raises(StoreError, match="ended"):
        book.session("made-up-token")
    session = AccountBook(store).sign_in("ana", "ana-password-1")
    book.disable("ana", by=root)
    with pytest.raises(StoreError, match="ended"):
        AccountBook(store).session(session.token)
    # the token itself is not kept, only its keyed hash
    with store.engine.connect() as conn:
        kept = [r[0] for r in conn.exec_driver_sql("SELECT token_hash FROM sessions").all()]
    assert session.token not in kept and len(kept) == 4


def test_disabling_keeps_history_and_refuses_sign_in(store, book):
    root = book.add("root", "admin", "root-password-1")
    ana = book.add("ana", "planner", "ana-password-1", by=root)
    sam = book.add("sam", "supervisor", "sam-password-1", by=root)
    rev = store.save("Wren", load_scenario(DEMO_FILES[0]), ana)
    store.submit(rev.plan_id, 1, ana)
    store.approve(rev.plan_id, 1, sam, "ok")
    disabled = book.disable("sam", by=root)
    assert disabled.disabled_at is not None and not disabled.active
    with pytest.raises(StoreError, match="the account 'sam' is disabled"):
        book.authenticate("sam", "sam-password-1")
    with pytest.raises(StoreError, match="disabled already"):
        book.disable("sam", by=root)
    assert store.reviews(rev.plan_id, 1)[-1].by == "sam"          # the history still names who approved
    assert store.verify().ok
    with pytest.raises(StoreError, match="only active admin"):
        book.disable("root", by=root)
    with pytest.raises(StoreError, match="needs an active admin"):
        book.disable("ana", by=ana)
    with pytest.raises(Exception, match="accounts are disabled, never deleted"):
        with store.engine.begin() as conn:
            conn.exec_driver_sql("UPDATE accounts SET disabled_at = NULL WHERE name = 'sam'")


def test_hostile_sign_in_names_get_the_ordinary_answer(book):
    root = book.add("root", "admin", "root-password-1")
    for name in ("ro\x00ot", "root\x00", "x" * 10_000, "", None, "root' OR '1'='1"):
        with pytest.raises(StoreError) as refused:
            book.authenticate(name, "root-password-1")
        assert str(refused.value) == accounts.WRONG, name
    with pytest.raises(StoreError, match="account name: contains a control character"):
        book.disable("ro\x00ot", by=root)
    assert book.authenticate("root", "root-password-1").name == "root"


def test_sessions_over_for_a_day_are_cleared_at_the_next_sign_in(store, book):
    book.add("root", "admin", "root-password-1")
    old = book.sign_in("root", "root-password-1")
    recent = book.sign_in("root", "root-password-1")
    with store.engine.begin() as conn:                  # the first one ended two days ago
        conn.execute(text("UPDATE sessions SET expires_at = :t, last_seen = :t WHERE token_hash = :h"),
                     {"t": time.time() - 2 * 86400, "h": sessions.token_hash(store.session_key(), old.token)})
    newest = book.sign_in("root", "root-password-1")
    with store.engine.connect() as conn:
        kept = {r[0] for r in conn.exec_driver_sql("SELECT token_hash FROM sessions").all()}
    assert kept == {sessions.token_hash(store.session_key(), recent.token),
                    sessions.token_hash(store.session_key(), newest.token)}


def _events(store) -> list[tuple]:
    with store.engine.connect() as conn:
        return [tuple(r) for r in conn.exec_driver_sql('SELECT name, action, role, disabled_at IS NOT NULL, "by" '
                                                       "FROM account_events ORDER BY id").all()]


def test_enabling_roles_and_passwords_are_recorded_and_checked(store, book):
    root = book.add("root", "admin", "root-password-1")
    ana = book.add("ana", "planner", "ana-password-1", by=root)
    book.disable("ana", by=root)
    with pytest.raises(StoreError, match="enabling an account needs an admin's sign-in"):
        book.enable("ana")
    assert book.enable("ana", by=root).active
    with pytest.raises(StoreError, match="the account 'ana' is active already"):
        book.enable("ana", by=root)
    with pytest.raises(StoreError, match="changing a role needs an active admin account"):
        book.set_role("ana", "supervisor", by=ana)                  # nobody raises their own role
    assert book.set_role("ana", "supervisor", by=root).role == "supervisor"
    with pytest.raises(StoreError, match="'ana' is a supervisor already"):
        book.set_role("ana", "supervisor", by=root)
    with pytest.raises(StoreError, match="role: 'boss' is not one of"):
        book.set_role("ana", "boss", by=root)
    # the last active admin stays one; with a second admin the first may step down
    with pytest.raises(StoreError, match="'root' is the only active admin: add another admin first"):
        book.set_role("root", "planner", by=root)
    book.set_role("ana", "admin", by=root)
    assert book.set_role("root", "supervisor", by=book.get("ana")).role == "supervisor"
    with pytest.raises(StoreError, match="'ana' is the only active admin"):
        book.disable("ana", by=book.get("ana"))
    assert _events(store) == [
        ("root", "add", "admin", False, "first admin"), ("ana", "add", "planner", False, "root"),
        ("ana", "disable", "planner", True, "root"), ("ana", "enable", "planner", False, "root"),
        ("ana", "role", "supervisor", False, "root"), ("ana", "role", "admin", False, "root"),
        ("root", "role", "supervisor", False, "ana")]
    assert store.verify().ok


def test_passwords_are_set_by_an_admin_or_by_the_account_with_its_current_one(store, book):
    root = book.add("root", "admin", "root-password-1")
    book.add("ana", "planner", "ana-password-1", by=root)
    ben = book.add("ben", "planner", "ben-password-1", by=root)
    ana = book.authenticate("ana", "ana-password-1")
    session = book.sign_in("ana", "ana-password-1")
    with pytest.raises(StoreError, match="changing your password needs your current password"):
        book.set_password("ana", "ana-password-2", by=ana, current_password="wrong-password")
    book.set_password("ana", "ana-password-2", by=ana, current_password="ana-password-1")
    with pytest.raises(StoreError, match="not right"):
        book.authenticate("ana", "ana-password-1")
    assert book.authenticate("ana", "ana-password-2").name == "ana"
    with pytest.raises(StoreError, match="ended"):                # a new password ends the sign-ins
        book.session(session.token)
    with pytest.raises(StoreError, match="setting another account's password needs an active admin account"):
        book.set_password("ana", "ben-chose-this-1", by=ben)
    book.set_password("ana", "root-chose-this-1", by=root)
    assert argon2.PasswordHasher().verify(_hash_of(store, "ana"), "root-chose-this-1")
    book.set_password("ana", "cli-chose-this-1", by=root)
    assert book.authenticate("ana", "cli-chose-this-1").name == "ana"
    with pytest.raises(StoreError, match="password: 5 characters, at least 10"):
        book.set_password("ana", "short", by=root)
    assert [e[:2] + (e[4],) for e in _events(store)][3:] == [("ana", "password", "ana"), ("ana", "password", "root"),
                                                           ("ana", "password", "root")]
    # each event keeps the SHA-256 of the hash then set (hashlib), not the hash itself
    with store.engine.connect() as conn:
        digest = conn.exec_driver_sql("SELECT password_digest FROM account_events ORDER BY id DESC").first()[0]
        kept = [r[0] for r in conn.exec_driver_sql("SELECT password_digest FROM account_events").all()]
    assert digest == hashlib.sha256(_hash_of(store, "ana").encode()).hexdigest()
    assert _hash_of(store, "ana") not in kept
    assert store.verify().ok


def test_a_raw_sql_role_change_is_refused_and_named(store, book):
    """Raw SQL with the refusals on: refused. With them off (owner rights): named by verify, and the
    account's sign-in and admin rights are refused until it matches again."""
    root = book.add("root", "admin", "root-password-1")
    book.add("ana", "planner", "ana-password-1", by=root)
    session = book.sign_in("ana", "ana-password-1")
    with pytest.raises(Exception, match="their role and state change only with their account event"):
        with store.engine.begin() as conn:
            conn.exec_driver_sql("UPDATE accounts SET role = 'admin' WHERE name = 'ana'")
    with store.engine.begin() as conn:
        if store.dialect == "sqlite":
            conn.exec_driver_sql("DROP TRIGGER accounts_follow_events")
        else:
            conn.exec_driver_sql("ALTER TABLE accounts DISABLE TRIGGER USER")
        conn.exec_driver_sql("UPDATE accounts SET role = 'admin' WHERE name = 'ana'")
    assert store.verify().problems == ["account 'ana': its role is 'admin' but its recorded events say 'planner'"]
    with pytest.raises(StoreError, match="the account 'ana' does not match the recorded history"):
        book.session(session.token)
    with pytest.raises(StoreError, match="the account 'ana' does not match the recorded history"):
        book.authenticate("ana", "ana-password-1")
    with pytest.raises(StoreError, match="the account 'ana' does not match"):
        book.add("eve", "admin", "eve-password-1", by=book.get("ana"))
    # an admin puts it back through the planner: recorded, and it matches again
    book.set_role("ana", "planner", by=root)
    assert store.verify().ok
    assert book.authenticate("ana", "ana-password-1").role == "planner"
