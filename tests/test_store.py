"""Saved plans: revisions never lost or overwritten, review states, locks, migrations, killed writers."""

from __future__ import annotations

import multiprocessing
import os
import signal
import sqlite3
import subprocess
import sys
import textwrap
import threading

import pytest
from sqlalchemy.exc import IntegrityError

from conftest import DEMO_FILES, ROOT
from planner.transfer.plan import with_changes
from planner.scenario.schema import load_scenario, scenario_to_dict
from planner.records.store import MIGRATIONS, PlanStore, StoreError

SCENARIO = load_scenario(DEMO_FILES[0])


@pytest.fixture
def store(tmp_path):
    return PlanStore(tmp_path / "plans.sqlite")


def test_saving_adds_revisions_and_never_overwrites(store):
    first = store.save("Barge Wren discharge", SCENARIO, "ana", "first cut", site="jetty")
    changed = with_changes(SCENARIO, steam_pressure=6e5)
    second = store.save("Barge Wren discharge", changed, "ben", "more steam", site="jetty")
    assert (first.plan_id, first.number) == (second.plan_id, 1) or second.number == 2
    assert second.number == 2 and second.plan_id == first.plan_id
    again = store.revision(first.plan_id, 1)
    assert again.scenario_json == first.scenario_json and again.author == "ana" and again.note == "first cut"
    assert scenario_to_dict(again.scenario) == scenario_to_dict(SCENARIO)
    diff = store.diff(first.plan_id, 1, 2)
    assert ("tracing.steam_pressure", SCENARIO.tracing.steam_pressure, 6e5) in diff["inputs"]


def test_review_moves_and_the_approved_lock(store):
    rev = store.save("T-31 to T-07", SCENARIO, "ana")
    with pytest.raises(StoreError, match="needs a submitted revision"):
        store.approve(rev.plan_id, rev.number, "sup")
    store.submit(rev.plan_id, rev.number, "ana", "please check")
    approved = store.approve(rev.plan_id, rev.number, "sup", "ok for Tuesday")
    assert approved.state == "approved" and approved.read_only
    assert [r.action for r in store.reviews(rev.plan_id, rev.number)] == ["submit", "approve"]
    for step in (lambda: store.submit(rev.plan_id, rev.number, "ana"),
                 lambda: store.return_for_changes(rev.plan_id, rev.number, "sup", "changed my mind")):
        with pytest.raises(StoreError):
            step()
    # no code path changes it: raw SQL against the file is refused by the database itself
    for sql in ("UPDATE revisions SET scenario_json = '{}'", "UPDATE revisions SET state = 'draft'",
                "UPDATE revisions SET note = 'x'", "DELETE FROM revisions", "DELETE FROM reviews",
                "UPDATE reviews SET comment = 'x'"):
        with pytest.raises(IntegrityError):
            with store.engine.begin() as conn:
                conn.exec_driver_sql(sql)
        raw = sqlite3.connect(store.path)
        with pytest.raises(sqlite3.IntegrityError):
            raw.execute(sql)
        raw.close()
    assert store.revision(rev.plan_id, rev.number).state == "approved"
    # changing the plan means a new revision
    newer = store.save("T-31 to T-07", SCENARIO, "ana", plan_id=rev.plan_id)
    assert newer.number == 2 and newer.state == "draft"


def test_returning_needs_a_comment(store):
    rev = store.save("p", SCENARIO, "ana")
    store.submit(rev.plan_id, 1, "ana")
    with pytest.raises(StoreError, match="needs a comment"):
        store.return_for_changes(rev.plan_id, 1, "sup", "")
    assert store.return_for_changes(rev.plan_id, 1, "sup", "lower the rate").state == "returned"


def test_listing_and_search(store):
    store.save("Syrup RC-4417", load_scenario(DEMO_FILES[2]), "ana", site="siding 3")
    store.save("Polyol farm move", load_scenario(DEMO_FILES[1]), "ben", site="tank farm")
    fuel = store.save("Barge Wren", SCENARIO, "cy", site="jetty")
    store.submit(fuel.plan_id, 1, "cy")
    assert {p.name for p in store.plans()} == {"Syrup RC-4417", "Polyol farm move", "Barge Wren"}
    assert [p.name for p in store.plans(search="syrup")] == ["Syrup RC-4417"]
    assert [p.name for p in store.plans(product="polyol")] == ["Polyol farm move"]
    assert [p.name for p in store.plans(site="jetty")] == ["Barge Wren"]
    assert [p.name for p in store.plans(state="submitted")] == ["Barge Wren"]
    assert store.plans(search="%") == []   # wildcards in the text are literal


def test_migration_from_version_1(tmp_path):
    path = tmp_path / "old.sqlite"
    # a file as version 1 of the schema wrote it
    from sqlalchemy import create_engine, text
    engine = create_engine(f"sqlite:///{path}")
    with engine.begin() as conn:
        MIGRATIONS[1](conn)
        conn.execute(text("INSERT INTO meta VALUES ('schema_version', '1')"))
        conn.execute(text("INSERT INTO plans (name, site, created_at, created_by) VALUES ('old', '', 't', 'a')"))
        conn.execute(text("INSERT INTO revisions (plan_id, number, scenario_json, author, created_at) "
                          "VALUES (1, 1, :s, 'a', 't')"), {"s": '{"x": 1}'})
    engine.dispose()
    store = PlanStore(path)
    assert store.schema_version() == 2
    assert store.count_revisions() == 1
    rev = store.save("old", SCENARIO, "b")
    assert rev.number == 2 and len(rev.content_hash) == 64


def test_a_newer_file_is_refused(tmp_path):
    store = PlanStore(tmp_path / "p.sqlite")
    with store.engine.begin() as conn:
        conn.exec_driver_sql("UPDATE meta SET value = '99' WHERE key = 'schema_version'")
    with pytest.raises(StoreError, match="newer than this planner"):
        PlanStore(tmp_path / "p.sqlite")


# --- concurrency -----------------------------------------------------------------------------------
THREADS, SAVES_PER_THREAD = 8, 25
PROCESSES, SAVES_PER_PROCESS = 4, 25


def _process_saver(path: str, worker: int, saves: int) -> None:
    store = PlanStore(path)
    scenario = load_scenario(DEMO_FILES[0])
    for i in range(saves):
        store.save("shared plan", scenario, f"process-{worker}", f"save {i}")


def test_threads_and_processes_saving_at_once_lose_nothing(tmp_path):
    path = tmp_path / "shared.sqlite"
    store = PlanStore(path)
    first = store.save("shared plan", SCENARIO, "setup")
    before = store.count_revisions(first.plan_id)
    errors = []

    def saver(worker):
        try:
            mine = PlanStore(path)
            for i in range(SAVES_PER_THREAD):
                mine.save("shared plan", SCENARIO, f"thread-{worker}", f"save {i}")
        except Exception as exc:  # noqa: BLE001 - counted below
            errors.append(exc)

    threads = [threading.Thread(target=saver, args=(w,)) for w in range(THREADS)]
    ctx = multiprocessing.get_context("spawn")
    processes = [ctx.Process(target=_process_saver, args=(str(path), w, SAVES_PER_PROCESS)) for w in range(PROCESSES)]
    for worker in threads + processes:
        worker.start()
    for worker in threads + processes:
        worker.join(timeout=240)
    assert not errors
    assert all(p.exitcode == 0 for p in processes)
    after = store.count_revisions(first.plan_id)
    expected = THREADS * SAVES_PER_THREAD + PROCESSES * SAVES_PER_PROCESS
    assert after - before == expected
    numbers = [r.number for r in store.revisions(first.plan_id)]
    assert numbers == list(range(1, after + 1))      # no gaps, no duplicates
    print(f"\nconcurrent saves: {expected} by {THREADS} threads + {PROCESSES} processes; "
          f"revisions {before} -> {after}; lost {before + expected - after}")


def test_a_killed_writer_leaves_no_half_revision(tmp_path):
    path = tmp_path / "killed.sqlite"
    store = PlanStore(path)
    rev = store.save("kept", SCENARIO, "ana")
    writer = textwrap.dedent(f"""
        import sys, time
        sys.path.insert(0, {str(ROOT)!r})
        from sqlalchemy import text
        from planner.records.store import PlanStore
        store = PlanStore({str(path)!r})
        conn = store.engine.connect()
        trans = conn.begin()
        conn.execute(text("INSERT INTO revisions (plan_id, number, scenario_json, author, created_at, content_hash) "
                          "VALUES ({rev.plan_id}, 2, '{{\\"half\\": true}}', 'doomed', 't', '')"))
        print("inserted", flush=True)
        time.sleep(60)
    """)
    proc = subprocess.Popen([sys.executable, "-c", writer], stdout=subprocess.PIPE, text=True)
    try:
        assert proc.stdout.readline().strip() == "inserted"
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait(timeout=30)
    finally:
        if proc.poll() is None:
            proc.kill()
    fresh = PlanStore(path)
    assert fresh.count_revisions() == 1
    assert [r.author for r in fresh.revisions(rev.plan_id)] == ["ana"]
    with fresh.engine.connect() as conn:
        assert conn.exec_driver_sql("PRAGMA integrity_check").scalar_one() == "ok"
    # and the next save takes the number the killed writer never committed
    assert fresh.save("kept", SCENARIO, "ben").number == 2


def test_default_path_from_environment(tmp_path, monkeypatch):
    monkeypatch.setenv("PLANNER_DB_PATH", str(tmp_path / "env" / "plans.sqlite"))
    store = PlanStore()
    assert store.path == tmp_path / "env" / "plans.sqlite" and store.path.exists()
