"""``python -m planner users ...`` and ``plans ...`` on both back ends (SQLite file, throwaway PostgreSQL).

The forms are issue 14's; the exit statuses are the README's (0 done, 2 refused with why, ``plans verify``
1 on a mismatch).  The flow runs through ``planner.cli.main`` in this process with the password on
standard input; one run goes through the real entry point (``python -m planner``) in a subprocess.
The plan figures kept with a revision are checked against ``python -m planner plan --json``'s document
(``plan_json``).
"""

from __future__ import annotations

import io
import json
import os
import sqlite3
import subprocess
import sys

import pytest

from conftest import DEMO_FILES, ROOT
from planner.cli import main
from planner.records.accounts import AccountBook
from planner.records.store import PlanStore
from planner.reports.plan_json import plan_json
from planner.scenario.schema import load_scenario
from planner.transfer.plan import make_plan

DEMO = str(DEMO_FILES[0])


def run(capsys, monkeypatch, *argv, password: str | None = None) -> tuple[int, str, str]:
    monkeypatch.setattr(sys, "stdin", io.StringIO("" if password is None else password + "\n"))
    try:
        code = main([str(a) for a in argv])
    except SystemExit as exc:          # argparse usage errors
        code = exc.code
    out = capsys.readouterr()
    return code, out.out, out.err


AS_ROOT = ("--admin", "root", "--password-stdin")


def _setup_people(capsys, monkeypatch, db):
    """The first admin on its own; the others added by it (its password first, then theirs)."""
    code, out, err = run(capsys, monkeypatch, "users", "add", "root", "--role", "admin", "--password-stdin",
                         "--db", db, password="root-password-1")
    assert code == 0 and "added account 'root' (admin) (the first admin)" in out, err
    for name, role in (("ana", "planner"), ("sam", "supervisor"), ("sue", "supervisor")):
        code, out, err = run(capsys, monkeypatch, "users", "add", name, "--role", role, *AS_ROOT,
                             "--db", db, password=f"root-password-1\n{name}-password-1")
        assert code == 0 and f"added account {name!r} ({role}) by root" in out, err


@pytest.mark.slow
def test_the_command_line_flow(db_url, capsys, monkeypatch):
    db = db_url
    code, out, err = run(capsys, monkeypatch, "users", "add", "ana", "--role", "planner", "--password-stdin",
                         "--db", db, password="ana-password-1")
    assert code == 2 and "the first account must be an admin" in err
    _setup_people(capsys, monkeypatch, db)
    code, out, _ = run(capsys, monkeypatch, "users", "list", "--json", "--db", db)
    listed = json.loads(out)
    assert code == 0 and [(u["name"], u["role"], u["disabled"]) for u in listed] == [
        ("ana", "planner", False), ("root", "admin", False), ("sam", "supervisor", False), ("sue", "supervisor", False)]
    # save: prints exactly {"plan_id": <int>, "revision": <int>}
    code, out, err = run(capsys, monkeypatch, "plans", "save", DEMO, "--name", "Wren discharge", "--user", "ana",
                         "--password-stdin", "--note", "first cut", "--json", "--db", db, password="ana-password-1")
    assert code == 0, err
    saved = json.loads(out)
    assert saved == {"plan_id": saved["plan_id"], "revision": 1} and isinstance(saved["plan_id"], int)
    pid = saved["plan_id"]
    store = PlanStore(url=db)
    revision = store.revision(pid, 1)
    assert (revision.author, revision.note, revision.state) == ("ana", "first cut", "draft")
    doc = plan_json(make_plan(load_scenario(DEMO)))
    assert revision.results["transfer_time_s"] == pytest.approx(doc["timeline"]["total_time_s"], rel=1e-12)
    assert revision.results["total_cost"] == pytest.approx(doc["costs"]["total"], rel=1e-12)
    # wrong password, wrong role, own revision, missing comment: refused with why, status 2
    refusals = [
        (("plans", "submit", pid, 1, "--user", "ana", "--password-stdin"), "ana-password-2", "password is not right"),
        (("plans", "approve", pid, 1, "--user", "sam", "--password-stdin"), "sam-password-1", "needs a submitted"),
    ]
    for argv, password, words in refusals:
        code, _, err = run(capsys, monkeypatch, *argv, "--db", db, password=password)
        assert code == 2 and words in err, (argv, err)
    code, out, _ = run(capsys, monkeypatch, "plans", "submit", pid, 1, "--user", "ana", "--password-stdin",
                       "--comment", "ready", "--db", db, password="ana-password-1")
    assert code == 0 and "is now submitted (ana)" in out
    for argv, words in ((("plans", "approve", pid, 1, "--user", "ana"), "'ana' is a planner"),
                        (("plans", "return", pid, 1, "--user", "sue"), "the following arguments are required: --comment")):
        code, _, err = run(capsys, monkeypatch, *argv, "--password-stdin", "--db", db, password=f"{argv[5]}-password-1")
        assert code == 2 and words in err, err
    code, out, err = run(capsys, monkeypatch, "plans", "approve", pid, 1, "--user", "sam", "--password-stdin",
                         "--comment", "ok for the tide", "--db", db, password="sam-password-1")
    assert code == 0 and "is now approved (sam)" in out, err
    code, _, err = run(capsys, monkeypatch, "plans", "return", pid, 1, "--user", "sue", "--password-stdin",
                       "--comment", "too late", "--db", db, password="sue-password-1")
    assert code == 2 and "already approved by sam" in err
    # list, show, verify
    code, out, _ = run(capsys, monkeypatch, "plans", "list", "--json", "--db", db)
    assert [(p["plan_id"], p["name"], p["state"]) for p in json.loads(out)] == [(pid, "Wren discharge", "approved")]
    code, out, _ = run(capsys, monkeypatch, "plans", "show", pid, 1, "--json", "--db", db)
    shown = json.loads(out)
    assert [(r["action"], r["by"], r["role"]) for r in shown["reviews"]] == [("submit", "ana", "planner"),
                                                                          ("approve", "sam", "supervisor")]
    assert shown["history_problems"] == []
    code, out, _ = run(capsys, monkeypatch, "plans", "show", pid, "--db", db)
    assert code == 0 and "revision 1: approved — saved by ana" in out and "approve  sam (supervisor): ok for the tide" in out
    code, out, _ = run(capsys, monkeypatch, "plans", "verify", "--db", db)
    assert code == 0 and ("checked 1 revisions, 2 review records and 4 accounts (4 account events; 7 history "
                          "entries): every record matches") in out
    # disabling keeps the history and ends the account's use
    code, out, _ = run(capsys, monkeypatch, "users", "disable", "sam", *AS_ROOT, "--db", db, password="root-password-1")
    assert code == 0 and "keep its name" in out
    code, _, err = run(capsys, monkeypatch, "plans", "save", DEMO, "--name", "x", "--user", "sam", "--password-stdin",
                       "--json", "--db", db, password="sam-password-1")
    assert code == 2 and "the account 'sam' is disabled" in err
    assert store.reviews(pid, 1)[-1].by == "sam"
    _account_commands(capsys, monkeypatch, db)
    _tamper_and_verify(capsys, monkeypatch, store, pid)
    store.close()


def _account_commands(capsys, monkeypatch, db) -> None:
    """users enable / role / password: each done, each recorded, the last admin kept, refusals with why."""
    root = "root-password-1"
    steps = [
        (("users", "enable", "sam", *AS_ROOT), root, 0, "enabled account 'sam' (supervisor)"),
        (("users", "enable", "sam", *AS_ROOT), root, 2, "the account 'sam' is active already"),
        (("users", "role", "ana", "--role", "supervisor", *AS_ROOT), root, 0, "account 'ana' is now a supervisor"),
        (("users", "role", "root", "--role", "planner", *AS_ROOT), root, 2, "'root' is the only active admin"),
        (("users", "role", "ana", "--role", "boss", *AS_ROOT), root, 2, "invalid choice: 'boss'"),
        (("users", "role", "nobody", "--role", "planner", *AS_ROOT), root, 2, "there is no account 'nobody'"),
        (("users", "password", "sue", *AS_ROOT), f"{root}\nsue-password-2", 0, "new password set for 'sue'"),
        (("users", "password", "sue", *AS_ROOT), f"{root}\nshort", 2, "password: 5 characters, at least 10"),
        (("users", "password", "sue", *AS_ROOT), root, 2, "no password on standard input"),
    ]
    for argv, password, status, words in steps:
        code, out, err = run(capsys, monkeypatch, *argv, "--db", db, password=password)
        assert code == status and words in (out if status == 0 else err), (argv, out, err)
    code, out, _ = run(capsys, monkeypatch, "users", "list", "--json", "--db", db)
    assert [(u["name"], u["role"], u["disabled"]) for u in json.loads(out)] == [
        ("ana", "supervisor", False), ("root", "admin", False), ("sam", "supervisor", False), ("sue", "supervisor", False)]
    for user, password, status in (("sue", "sue-password-1", 2), ("sue", "sue-password-2", 0), ("sam", "sam-password-1", 0)):
        code, _, err = run(capsys, monkeypatch, "plans", "save", DEMO, "--name", f"by {user}", "--user", user,
                           "--password-stdin", "--json", "--db", db, password=password)
        assert code == status, (user, err)
    code, out, _ = run(capsys, monkeypatch, "plans", "verify", "--json", "--db", db)
    found = json.loads(out)
    assert code == 0 and (found["accounts"], found["account_events"], found["revisions"]) == (4, 8, 3), found
    assert found["entries"] == 4 + 1 + 2 + 1 + 3 + 2         # added, saved, reviewed, disabled, 3 changes, 2 saves


def _tamper_and_verify(capsys, monkeypatch, store, pid: int) -> None:
    """Behind the planner's back: refusals off, an approved revision's note and its approver edited."""
    import argon2

    if store.dialect == "sqlite":
        raw = sqlite3.connect(store.path, isolation_level=None)
        for trigger in ("revisions_content_frozen", "reviews_append_only", "accounts_follow_events"):
            raw.execute(f"DROP TRIGGER {trigger}")
    else:
        import psycopg

        raw = psycopg.connect(store.url.replace("postgresql+psycopg://", "postgresql://"), autocommit=True)
        for table in ("revisions", "reviews", "accounts"):
            raw.execute(f"ALTER TABLE {table} DISABLE TRIGGER USER")
    raw.execute(f"UPDATE revisions SET note = 'approved as is' WHERE plan_id = {pid}")
    raw.execute("UPDATE reviews SET comment = 'fine' WHERE action = 'approve'")
    raw.close()
    code, out, _ = run(capsys, monkeypatch, "plans", "verify", "--db", store.url)
    assert code == 1
    assert f"MISMATCH: plan {pid} revision 1 (“Wren discharge”): differs from the recorded history (entry 5)" in out
    assert f"MISMATCH: review record 2 (approve of plan {pid} revision 1): differs from the recorded history (entry 7)" in out
    assert "2 record(s) do not match" in out
    # an account's role and another's password hash changed with raw SQL: named by verify, refused in use
    known = argon2.PasswordHasher().hash("mallory-password-1")
    raw = sqlite3.connect(store.path, isolation_level=None) if store.dialect == "sqlite" else \
        psycopg.connect(store.url.replace("postgresql+psycopg://", "postgresql://"), autocommit=True)
    raw.execute("UPDATE accounts SET role = 'admin' WHERE name = 'sam'")
    raw.execute(f"UPDATE accounts SET password_hash = '{known}' WHERE name = 'sue'")
    raw.close()
    code, out, _ = run(capsys, monkeypatch, "plans", "verify", "--db", store.url)
    assert code == 1 and "4 record(s) do not match" in out, out
    assert "MISMATCH: account 'sam': its role is 'admin' but its recorded events say 'supervisor'" in out
    assert ("MISMATCH: account 'sue': its password hash is not the one its recorded events say (changed behind "
            "the planner's back)") in out
    code, _, err = run(capsys, monkeypatch, "plans", "save", DEMO, "--name", "x", "--user", "sue", "--password-stdin",
                       "--json", "--db", store.url, password="mallory-password-1")
    assert code == 2 and "the account 'sue' does not match the recorded history" in err, err
    code, out, _ = run(capsys, monkeypatch, "plans", "verify", "--json", "--db", store.url)
    assert code == 1 and len(json.loads(out)["problems"]) == 4


@pytest.mark.slow
def test_the_real_entry_point_reads_the_environment_and_stdin(tmp_path):
    env = {**os.environ, "PLANNER_DB_URL": f"sqlite:///{tmp_path / 'cli.sqlite'}", "PYTHONPATH": str(ROOT)}
    env.pop("PLANNER_DB_PATH", None)

    def planner(*argv, stdin=""):
        return subprocess.run([sys.executable, "-m", "planner", *argv], input=stdin, capture_output=True, text=True,
                              env=env, cwd=ROOT, timeout=300)

    done = planner("users", "add", "root", "--role", "admin", "--password-stdin", stdin="root-password-1\n")
    assert done.returncode == 0, done.stderr
    done = planner("users", "add", "ana", "--role", "planner", "--admin", "root", "--password-stdin",
                   stdin="root-password-1\nana-password-1\n")
    assert done.returncode == 0, done.stderr
    done = planner("plans", "save", DEMO, "--name", "Env plan", "--user", "ana", "--password-stdin", "--json",
                   stdin="ana-password-1\n")
    assert done.returncode == 0 and json.loads(done.stdout) == {"plan_id": 1, "revision": 1}, done.stderr
    done = planner("plans", "save", DEMO, "--name", "Env plan", "--user", "ana", "--password-stdin", "--json")
    assert done.returncode == 2 and "no password on standard input" in done.stderr and "Traceback" not in done.stderr
    done = planner("plans", "verify")
    assert done.returncode == 0 and "every record matches" in done.stdout
    for url, words in ((":memory:", "is not a database URL"), ("sqlite:///:memory:", "is not a file")):
        done = planner("plans", "list", "--db", url)
        assert done.returncode == 2 and words in done.stderr and "Traceback" not in done.stderr


def test_account_changes_need_an_admins_sign_in(db_url, capsys, monkeypatch):
    """After the first admin, every ``users`` change signs an admin in and records that admin."""
    db = db_url
    code, out, err = run(capsys, monkeypatch, "users", "add", "root", "--role", "admin", *AS_ROOT, "--db", db,
                         password="root-password-1\nroot-password-1")
    assert code == 2 and "--admin: there is no account yet" in err
    code, out, err = run(capsys, monkeypatch, "users", "add", "root", "--role", "admin", "--password-stdin", "--db", db,
                         password="root-password-1")
    assert code == 0, err
    refusals = [
        (("users", "add", "eve", "--role", "supervisor", "--password-stdin"), "eve-password-1",
         "--admin: the database has accounts already, so adding one needs an admin's sign-in"),
        (("users", "add", "eve", "--role", "supervisor", *AS_ROOT), "wrong-password-1\neve-password-1",
         "--admin root: the account name or the password is not right"),
        (("users", "add", "eve", "--role", "supervisor", *AS_ROOT), "root-password-1\npassword12",
         "password: a common password"),
        (("users", "add", "eve", "--role", "supervisor", *AS_ROOT), "root-password-1\neve-password-1",
         None),
        (("users", "add", "mal", "--role", "supervisor", "--admin", "eve", "--password-stdin"),
         "eve-password-1\nmal-password-1", "adding an account needs an active admin account"),
    ]
    for argv, password, words in refusals:
        code, out, err = run(capsys, monkeypatch, *argv, "--db", db, password=password)
        if words is None:
            assert code == 0 and "added account 'eve' (supervisor) by root" in out, err
        else:
            assert code == 2 and words in err, (argv, err)
    for argv in (("disable", "eve"), ("enable", "eve"), ("role", "eve", "--role", "planner"), ("password", "eve")):
        code, _, err = run(capsys, monkeypatch, "users", *argv, "--db", db, password="eve-password-2")
        assert code == 2 and "the following arguments are required: --admin, --password-stdin" in err, (argv, err)
    code, out, err = run(capsys, monkeypatch, "users", "disable", "eve", *AS_ROOT, "--db", db, password="root-password-1")
    assert code == 0, err
    store = PlanStore(url=db)
    root_id = AccountBook(store).get("root").id
    with store.engine.connect() as conn:
        events = [tuple(r) for r in conn.exec_driver_sql('SELECT name, action, "by", by_id FROM account_events '
                                                         "ORDER BY id").all()]
    assert events == [("root", "add", "first admin", None), ("eve", "add", "root", root_id),
                      ("eve", "disable", "root", root_id)]
    store.close()
    code, out, _ = run(capsys, monkeypatch, "plans", "verify", "--db", db)
    assert code == 0 and "every record matches" in out


def test_plans_verify_names_a_forged_session(db_url, capsys, monkeypatch):
    import hashlib
    import time

    _setup_people(capsys, monkeypatch, db_url)
    store = PlanStore(url=db_url)
    book = AccountBook(store)
    sam = book.get("sam")
    book.sign_in("ana", "ana-password-1")               # a dashboard sign-in: the session key exists
    with store.engine.begin() as conn:
        conn.exec_driver_sql("INSERT INTO sessions (token_hash, account_id, created_at, expires_at, last_seen) "
                             f"VALUES ('{hashlib.sha256(b'forged').hexdigest()}', {sam.id}, {time.time()}, "
                             f"{time.time() + 3600}, {time.time()})")
    store.close()
    code, out, _ = run(capsys, monkeypatch, "plans", "verify", "--db", db_url)
    assert code == 1 and "1 record(s) do not match" in out, out
    assert f"MISMATCH: session {hashlib.sha256(b'forged').hexdigest()[:12]}… (live) of account 'sam': its seal does " \
           "not match the session key" in out
