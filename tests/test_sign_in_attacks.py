"""Sign-in under attack, on both back ends (issue 20, part 5): parallel guesses, account enumeration,
and the version 4 -> 5 migration that brings the per-name throttle.

The limits are the planner's own (``planner.records.throttle``: 5 free attempts, then a lock); the
Argon2 work is measured against argon2-cffi's own ``verify`` with the planner's parameters.
"""

from __future__ import annotations

import statistics
import threading
import time

import argon2
import pytest
from sqlalchemy import create_engine, text

from conftest import PASSWORDS, make_people
from planner.records import accounts, chain, throttle
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


def test_migration_from_version_4_keeps_locks(db_url):
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
    engine.dispose()
    store = PlanStore(url=db_url)
    try:
        assert store.schema_version() == 5
        with pytest.raises(StoreError, match=r"too many failed sign-ins for 'root': try again in (59\d|600) s"):
            AccountBook(store).authenticate("root", PASSWORDS["root"])
        assert store.verify().ok
    finally:
        store.close()
