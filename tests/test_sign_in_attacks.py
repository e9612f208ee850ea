"""Sign-in under attack, on both back ends (issue 20, part 5): parallel guesses, account enumeration,
forged sessions, and the version 4 -> 5 migration that brings the per-name throttle and sealed sessions.

The limits are the planner's own (``planner.records.throttle``: 5 free attempts, then a lock); the
Argon2 work is measured against argon2-cffi's own ``verify`` with the planner's parameters.
"""

from __future__ import annotations

import hashlib
import secrets
import statistics
import threading
import time

import argon2
import pytest
from sqlalchemy import create_engine, text

from conftest import PASSWORDS, make_people
from planner.records import accounts, chain, sessions, throttle
from planner.records.accounts import AccountBook
from planner.records.migrations import MIGRATIONS
from planner.records.store import PlanStore, StoreError

GUESSES = 24


@pytest.fixture
def store(db_url):
    opened = PlanStore(url=db_url)
    yield opened
    opened.close()


def test_parallel_guesses_check_at_most_five_passwords(store):
    """24 threads guess one account's password at the same moment: the count and the lock are one
    step in the database, so at most FREE_ATTEMPTS passwords are looked at; the others are refused
    as locked, and so is the right password afterwards."""
    make_people(store, ("root", "ana"))
    book = AccountBook(store)
    start = threading.Barrier(GUESSES)
    answers: list[str] = []

    def guess(i: int) -> None:
        start.wait()
        try:
            book.authenticate("ana", f"guess-number-{i:02d}")
        except StoreError as exc:
            answers.append(str(exc))

    threads = [threading.Thread(target=guess, args=(i,)) for i in range(GUESSES)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(timeout=120)
    assert len(answers) == GUESSES
    checked = [a for a in answers if a == accounts.WRONG]
    locked = [a for a in answers if a.startswith("too many failed sign-ins for 'ana': try again in")]
    assert len(checked) == throttle.FREE_ATTEMPTS and len(locked) == GUESSES - throttle.FREE_ATTEMPTS, answers
    with pytest.raises(StoreError, match="too many failed sign-ins for 'ana'"):
        book.authenticate("ana", PASSWORDS["ana"])


def _sixth_answer(book, name: str) -> str:
    for i in range(throttle.FREE_ATTEMPTS):
        with pytest.raises(StoreError) as refused:
            book.authenticate(name, f"wrong-guess-{i}")
        assert str(refused.value) == accounts.WRONG
    with pytest.raises(StoreError) as refused:
        book.authenticate(name, PASSWORDS.get(name, "any-password-1"))
    return str(refused.value)


def test_every_name_gets_the_same_answers_after_five_wrong_passwords(store):
    make_people(store, ("root", "ana"))
    book = AccountBook(store)
    real, unknown = _sixth_answer(book, "ana"), _sixth_answer(book, "nobody-here")
    assert real.startswith("too many failed sign-ins for 'ana': try again in 1")
    assert unknown.replace("'nobody-here'", "'ana'") == real        # the same words, the same lock (15 s)


def test_an_unknown_name_costs_the_same_argon2_work(store):
    """The wrong-password answer for an unknown name takes about as long as for an account (a dummy
    hash is checked), and both take at least most of one Argon2 verification."""
    make_people(store, ("root", "ana"))
    book = AccountBook(store)
    hasher = argon2.PasswordHasher(**accounts.ARGON2)
    digest = hasher.hash("a password to time")

    def seconds(call) -> float:
        started = time.perf_counter()
        call()
        return time.perf_counter() - started

    def refused(name):
        def call():
            with pytest.raises(StoreError):
                book.authenticate(name, "wrong-guess-timed")
        return call

    argon = statistics.median(seconds(lambda: hasher.verify(digest, "a password to time")) for _ in range(4))
    real = statistics.median(seconds(refused("ana")) for _ in range(4))
    unknown = statistics.median(seconds(refused(f"nobody-{i}")) for i in range(4))
    assert unknown > 0.6 * argon and real > 0.6 * argon, (argon, real, unknown)
    assert 0.5 < unknown / real < 2.0, (real, unknown)


def _raw(store, sql: str, params: dict | None = None) -> None:
    with store.engine.begin() as conn:
        conn.execute(text(sql), params or {})


def test_a_session_row_written_by_raw_sql_signs_nobody_in_and_verify_names_it(store):
    people = make_people(store, ("root", "ana", "sam"))
    book = AccountBook(store)
    assert store.verify().ok
    # 1. a session for the supervisor inserted by raw SQL, token hashed as anyone could (SHA-256)
    forged_token = secrets.token_urlsafe(32)
    now = time.time()
    _raw(store, "INSERT INTO sessions (token_hash, account_id, created_at, expires_at, last_seen) "
                "VALUES (:h, :a, :t, :e, :t)",
         {"h": hashlib.sha256(forged_token.encode()).hexdigest(), "a": people["sam"].id, "t": now, "e": now + 3600})
    with pytest.raises(StoreError, match="your sign-in has ended"):
        book.session(forged_token)
    # 2. the planner's own session of ana moved to the supervisor
    session = book.sign_in("ana", PASSWORDS["ana"])
    assert book.session(session.token).name == "ana"
    _raw(store, "UPDATE sessions SET account_id = :s WHERE account_id = :a", {"s": people["sam"].id, "a": people["ana"].id})
    with pytest.raises(StoreError, match="does not carry this server's seal"):
        book.session(session.token)
    found = store.verify()
    assert not found.ok and found.sessions == 2
    assert len(found.problems) == 2 and all("of account 'sam': its seal does not match the session key" in p
                                            for p in found.problems), found.problems
    # an honest session still works beside them
    assert book.session(book.sign_in("sam", PASSWORDS["sam"]).token).name == "sam"


def test_verify_without_the_key_file_names_every_session(store, tmp_path):
    make_people(store, ("root",))
    session = AccountBook(store).sign_in("root", PASSWORDS["root"])
    elsewhere = PlanStore(url=store.url, session_key_file=tmp_path / "missing" / "session.key")
    try:
        found = elsewhere.verify()
        digest = sessions.token_hash(store.session_key(), session.token)
        assert found.problems == [f"session {digest[:12]}… (live) of account 'root': there is no session key file "
                                  f"{tmp_path / 'missing' / 'session.key'}, so no server made it: written behind the "
                                  "planner's back (or the servers use another key file: set PLANNER_SESSION_KEY_FILE "
                                  "to it)"]
        assert not (tmp_path / "missing").exists()                     # verify makes no key
    finally:
        elsewhere.close()


def test_the_session_key_is_a_private_file_made_once(tmp_path):
    path = tmp_path / "keys" / "session.key"
    keys = []
    start = threading.Barrier(8)

    def make():
        start.wait()
        keys.append(sessions.load_key(path))

    threads = [threading.Thread(target=make) for _ in range(8)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join()
    assert len(set(keys)) == 1 and len(keys[0]) == 32
    assert path.stat().st_mode & 0o777 == 0o600
    assert sorted(p.name for p in path.parent.iterdir()) == ["session.key"]
    path.write_text("not a key\n")
    with pytest.raises(StoreError, match=r"session key file .*: not a key this planner wrote \(64 hex digits\)"):
        sessions.load_key(path)


def test_migration_from_version_4_ends_old_sessions_and_keeps_locks(db_url):
    dialect = "postgresql" if db_url.startswith("postgresql") else "sqlite"
    engine = create_engine(db_url)
    hashed = argon2.PasswordHasher(**accounts.ARGON2).hash(PASSWORDS["root"])
    now = time.time()
    with engine.begin() as conn:
        for version in (1, 2, 3, 4):
            MIGRATIONS[version](conn, dialect)
        conn.execute(text("INSERT INTO meta (key, value) VALUES ('schema_version', '4')"))
        account_id = conn.execute(text("INSERT INTO accounts (name, role, password_hash, created_at, created_by) "
                                       "VALUES ('root', 'admin', :h, '2026-01-01T00:00:00+00:00', 'first admin') "
                                       "RETURNING id"), {"h": hashed}).scalar_one()
        chain.account_event(conn, account_id, "add", "first admin", None, "2026-01-01T00:00:00+00:00")
        conn.execute(text("UPDATE accounts SET failed_count = 6, locked_until = :l"), {"l": now + 600})
        conn.execute(text("INSERT INTO sessions (token_hash, account_id, created_at, expires_at, last_seen) "
                          "VALUES ('old', :a, :t, :e, :t)"), {"a": account_id, "t": now, "e": now + 3600})
    engine.dispose()
    store = PlanStore(url=db_url)
    try:
        assert store.schema_version() == 5
        with store.engine.connect() as conn:
            assert conn.exec_driver_sql("SELECT COUNT(*) FROM sessions").scalar_one() == 0
        with pytest.raises(StoreError, match=r"too many failed sign-ins for 'root': try again in (59\d|600) s"):
            AccountBook(store).authenticate("root", PASSWORDS["root"])
        assert store.verify().ok
    finally:
        store.close()
