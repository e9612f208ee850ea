"""Saved plans: one SQLite file, revisions that are never overwritten, and a review trail.

A plan has a name, a site/area tag and numbered revisions.  Saving always adds a revision (with
author, time and note); revisions' contents cannot be changed afterwards — the database itself
refuses it (triggers), so no code path can.  Each revision moves draft -> submitted -> approved or
returned; an approved revision is read-only in every field, and changing the plan means a new
revision.

Writes take SQLite's write lock at the start of their transaction (BEGIN IMMEDIATE) and the file is
in WAL mode, so concurrent savers in threads or processes queue instead of losing revisions, and a
writer killed mid-transaction leaves nothing half-written.

The file's location: the ``path`` argument, else the ``PLANNER_DB_PATH`` environment variable, else
``data/plans.sqlite`` under the project folder.  The schema carries a version; ``MIGRATIONS`` bring
an older file up to date when it is opened.
"""

from __future__ import annotations

import hashlib
import json
import os
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path

from sqlalchemy import create_engine, event, text
from sqlalchemy.engine import Connection, Engine

from planner.errors import PlannerError
from planner.scenario.schema import Scenario, scenario_from_dict, scenario_to_dict

SCHEMA_VERSION = 2
DEFAULT_PATH = Path(__file__).resolve().parents[1] / "data" / "plans.sqlite"
STATES = ("draft", "submitted", "approved", "returned")


class StoreError(PlannerError):
    """A save or review step that cannot be done, with the reason."""


def default_path() -> Path:
    env = os.environ.get("PLANNER_DB_PATH")
    return Path(env) if env else DEFAULT_PATH


# -- schema and migrations ---------------------------------------------------------------------------

def _v1(conn: Connection) -> None:
    statements = [
        "CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL)",
        """CREATE TABLE plans (
            id INTEGER PRIMARY KEY AUTOINCREMENT,
            name TEXT NOT NULL, site TEXT NOT NULL DEFAULT '',
            created_at TEXT NOT NULL, created_by TEXT NOT NULL,
            UNIQUE (name, site))""",
        """CREATE TABLE revisions (
            id INTEGER PRIMARY KEY AUTOINCREMENT,
            plan_id INTEGER NOT NULL REFERENCES plans(id),
            number INTEGER NOT NULL,
            scenario_json TEXT NOT NULL, results_json TEXT NOT NULL DEFAULT '{}',
            product TEXT NOT NULL DEFAULT '',
            author TEXT NOT NULL, note TEXT NOT NULL DEFAULT '', created_at TEXT NOT NULL,
            state TEXT NOT NULL DEFAULT 'draft' CHECK (state IN ('draft','submitted','approved','returned')),
            UNIQUE (plan_id, number))""",
        """CREATE TABLE reviews (
            id INTEGER PRIMARY KEY AUTOINCREMENT,
            revision_id INTEGER NOT NULL REFERENCES revisions(id),
            action TEXT NOT NULL CHECK (action IN ('submit','approve','return')),
            by TEXT NOT NULL, comment TEXT NOT NULL DEFAULT '', at TEXT NOT NULL)""",
        # Revisions are immutable; only their state moves, forward, and never away from 'approved'.
        """CREATE TRIGGER revisions_content_frozen BEFORE UPDATE OF plan_id, number, scenario_json,
            results_json, product, author, note, created_at ON revisions
            BEGIN SELECT RAISE(ABORT, 'a saved revision cannot be changed: save a new revision'); END""",
        """CREATE TRIGGER revisions_state_moves BEFORE UPDATE OF state ON revisions
            WHEN NOT ((OLD.state = 'draft' AND NEW.state = 'submitted')
                   OR (OLD.state = 'submitted' AND NEW.state IN ('approved', 'returned')))
            BEGIN SELECT RAISE(ABORT, 'this review step is not allowed from the revision''s state'); END""",
        """CREATE TRIGGER revisions_never_deleted BEFORE DELETE ON revisions
            BEGIN SELECT RAISE(ABORT, 'saved revisions are never deleted'); END""",
        """CREATE TRIGGER reviews_append_only BEFORE UPDATE ON reviews
            BEGIN SELECT RAISE(ABORT, 'the review trail is append-only'); END""",
        """CREATE TRIGGER reviews_never_deleted BEFORE DELETE ON reviews
            BEGIN SELECT RAISE(ABORT, 'the review trail is append-only'); END""",
    ]
    for statement in statements:
        conn.exec_driver_sql(statement)


def _v2(conn: Connection) -> None:
    """Content hash (to see identical revisions) and indexes for listing and search."""
    conn.exec_driver_sql("ALTER TABLE revisions ADD COLUMN content_hash TEXT NOT NULL DEFAULT ''")
    conn.exec_driver_sql("CREATE INDEX IF NOT EXISTS revisions_by_plan ON revisions (plan_id, number)")
    conn.exec_driver_sql("CREATE INDEX IF NOT EXISTS revisions_by_product ON revisions (product)")
    # the content trigger must cover the new column too
    conn.exec_driver_sql("DROP TRIGGER revisions_content_frozen")
    conn.exec_driver_sql(
        """CREATE TRIGGER revisions_content_frozen BEFORE UPDATE OF plan_id, number, scenario_json,
            results_json, product, author, note, created_at, content_hash ON revisions
            BEGIN SELECT RAISE(ABORT, 'a saved revision cannot be changed: save a new revision'); END""")


MIGRATIONS = {1: _v1, 2: _v2}


# -- records -------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Revision:
    id: int
    plan_id: int
    plan_name: str
    site: str
    number: int
    scenario_json: str
    results: dict
    product: str
    author: str
    note: str
    created_at: str
    state: str
    content_hash: str

    @property
    def scenario(self) -> Scenario:
        return scenario_from_dict(json.loads(self.scenario_json))

    @property
    def read_only(self) -> bool:
        return self.state == "approved"


@dataclass(frozen=True)
class PlanRow:
    id: int
    name: str
    site: str
    product: str
    latest: int
    state: str
    updated_at: str
    author: str


@dataclass(frozen=True)
class Review:
    action: str
    by: str
    comment: str
    at: str


def _now() -> str:
    return datetime.now(timezone.utc).isoformat(timespec="seconds")


def canonical_json(scenario: Scenario) -> str:
    return json.dumps(scenario_to_dict(scenario), sort_keys=True, separators=(",", ":"), ensure_ascii=False)


class PlanStore:
    def __init__(self, path: str | Path | None = None):
        self.path = Path(path) if path is not None else default_path()
        self.path.parent.mkdir(parents=True, exist_ok=True)
        self.engine: Engine = create_engine(f"sqlite:///{self.path}",
                                            connect_args={"timeout": 60, "check_same_thread": False})

        @event.listens_for(self.engine, "connect")
        def _connect(dbapi_connection, _record):
            dbapi_connection.isolation_level = None  # we issue BEGIN ourselves
            cursor = dbapi_connection.cursor()
            cursor.execute("PRAGMA journal_mode=WAL")
            cursor.execute("PRAGMA foreign_keys=ON")
            cursor.execute("PRAGMA busy_timeout=60000")
            cursor.execute("PRAGMA synchronous=FULL")
            cursor.close()

        @event.listens_for(self.engine, "begin")
        def _begin(conn):
            conn.exec_driver_sql("BEGIN IMMEDIATE")

        self.migrate()

    # -- schema -----------------------------------------------------------------------------------
    def schema_version(self) -> int:
        with self.engine.connect() as conn:
            exists = conn.exec_driver_sql("SELECT name FROM sqlite_master WHERE type='table' AND name='meta'").first()
            if not exists:
                return 0
            row = conn.exec_driver_sql("SELECT value FROM meta WHERE key='schema_version'").first()
            return int(row[0]) if row else 0

    def migrate(self, target: int = SCHEMA_VERSION) -> None:
        with self.engine.begin() as conn:
            exists = conn.exec_driver_sql("SELECT name FROM sqlite_master WHERE type='table' AND name='meta'").first()
            current = 0
            if exists:
                row = conn.exec_driver_sql("SELECT value FROM meta WHERE key='schema_version'").first()
                current = int(row[0]) if row else 0
            if current > SCHEMA_VERSION:
                raise StoreError(f"the plans file {self.path} has schema version {current}, newer than this planner "
                                 f"reads ({SCHEMA_VERSION}): update the planner")
            for version in range(current + 1, target + 1):
                MIGRATIONS[version](conn)
                conn.execute(text("INSERT INTO meta (key, value) VALUES ('schema_version', :v) "
                                  "ON CONFLICT(key) DO UPDATE SET value = excluded.value"), {"v": str(version)})

    # -- saving -----------------------------------------------------------------------------------
    def save(self, name: str, scenario: Scenario, author: str, note: str = "", site: str = "",
             results: dict | None = None, plan_id: int | None = None) -> Revision:
        """Add a revision to plan ``plan_id``, or to the plan called ``name`` at ``site`` (created on
        first save).  Never overwrites: the revision gets the next number."""
        name, site, author = (name or "").strip(), (site or "").strip(), (author or "").strip()
        if not name:
            raise StoreError("a saved plan needs a name")
        if not author:
            raise StoreError("saving needs the author's name")
        if len(name) > 160 or len(site) > 120 or len(author) > 120 or len(note) > 4000:
            raise StoreError("name (160), site (120), author (120) or note (4000 characters) is too long")
        body = canonical_json(scenario)
        digest = hashlib.sha256(body.encode("utf-8")).hexdigest()
        now = _now()
        with self.engine.begin() as conn:
            if plan_id is not None:
                plan = conn.execute(text("SELECT id FROM plans WHERE id = :p"), {"p": plan_id}).first()
                if plan is None:
                    raise StoreError(f"saved plan {plan_id} was not found")
            else:
                plan = conn.execute(text("SELECT id FROM plans WHERE name = :n AND site = :s"),
                                    {"n": name, "s": site}).first()
            if plan is None:
                plan_id = conn.execute(text("INSERT INTO plans (name, site, created_at, created_by) "
                                            "VALUES (:n, :s, :t, :a) RETURNING id"),
                                       {"n": name, "s": site, "t": now, "a": author}).scalar_one()
            else:
                plan_id = plan[0]
            number = conn.execute(text("SELECT COALESCE(MAX(number), 0) + 1 FROM revisions WHERE plan_id = :p"),
                                  {"p": plan_id}).scalar_one()
            revision_id = conn.execute(text(
                "INSERT INTO revisions (plan_id, number, scenario_json, results_json, product, author, note, "
                "created_at, state, content_hash) VALUES (:p, :num, :body, :res, :prod, :a, :note, :t, 'draft', :h) "
                "RETURNING id"),
                {"p": plan_id, "num": number, "body": body, "res": json.dumps(results or {}, default=str),
                 "prod": scenario.product.name, "a": author, "note": note, "t": now, "h": digest}).scalar_one()
        return self.revision(plan_id, number) if revision_id else None

    # -- reading ----------------------------------------------------------------------------------
    _REVISION_SQL = ("SELECT r.id, r.plan_id, p.name, p.site, r.number, r.scenario_json, r.results_json, r.product, "
                     "r.author, r.note, r.created_at, r.state, r.content_hash FROM revisions r "
                     "JOIN plans p ON p.id = r.plan_id ")

    @staticmethod
    def _revision(row) -> Revision:
        return Revision(row[0], row[1], row[2], row[3], row[4], row[5], json.loads(row[6] or "{}"), row[7],
                        row[8], row[9], row[10], row[11], row[12])

    def revision(self, plan_id: int, number: int | None = None) -> Revision:
        with self.engine.connect() as conn:
            if number is None:
                row = conn.execute(text(self._REVISION_SQL + "WHERE r.plan_id = :p ORDER BY r.number DESC LIMIT 1"),
                                   {"p": plan_id}).first()
            else:
                row = conn.execute(text(self._REVISION_SQL + "WHERE r.plan_id = :p AND r.number = :n"),
                                   {"p": plan_id, "n": number}).first()
        if row is None:
            which = "its latest revision" if number is None else f"revision {number}"
            raise StoreError(f"saved plan {plan_id}, {which}, was not found")
        return self._revision(row)

    def revisions(self, plan_id: int) -> list[Revision]:
        with self.engine.connect() as conn:
            rows = conn.execute(text(self._REVISION_SQL + "WHERE r.plan_id = :p ORDER BY r.number"), {"p": plan_id}).all()
        return [self._revision(r) for r in rows]

    def count_revisions(self, plan_id: int | None = None) -> int:
        with self.engine.connect() as conn:
            if plan_id is None:
                return conn.exec_driver_sql("SELECT COUNT(*) FROM revisions").scalar_one()
            return conn.execute(text("SELECT COUNT(*) FROM revisions WHERE plan_id = :p"), {"p": plan_id}).scalar_one()

    def plans(self, search: str = "", product: str = "", site: str = "", state: str = "") -> list[PlanRow]:
        """Plans whose latest revision matches; text filters match anywhere, ignoring case."""
        sql = ("SELECT p.id, p.name, p.site, r.product, r.number, r.state, r.created_at, r.author FROM plans p "
               "JOIN revisions r ON r.plan_id = p.id AND r.number = (SELECT MAX(number) FROM revisions WHERE plan_id = p.id) "
               "WHERE p.name LIKE :q ESCAPE '\\' AND r.product LIKE :prod ESCAPE '\\' AND p.site LIKE :site ESCAPE '\\'")
        params = {"q": _like(search), "prod": _like(product), "site": _like(site)}
        if state:
            if state not in STATES:
                raise StoreError(f"unknown state {state!r}; states are {', '.join(STATES)}")
            sql += " AND r.state = :state"
            params["state"] = state
        sql += " ORDER BY r.created_at DESC, p.id DESC"
        with self.engine.connect() as conn:
            return [PlanRow(*row) for row in conn.execute(text(sql), params).all()]

    def reviews(self, plan_id: int, number: int) -> list[Review]:
        revision = self.revision(plan_id, number)
        with self.engine.connect() as conn:
            rows = conn.execute(text("SELECT action, by, comment, at FROM reviews WHERE revision_id = :r ORDER BY id"),
                                {"r": revision.id}).all()
        return [Review(*row) for row in rows]

    # -- review -----------------------------------------------------------------------------------
    def _move(self, plan_id: int, number: int, action: str, new_state: str, allowed_from: str, by: str,
              comment: str) -> Revision:
        by = (by or "").strip()
        if not by:
            raise StoreError(f"'{action}' needs the name of who does it")
        if action == "return" and not (comment or "").strip():
            raise StoreError("returning a revision needs a comment saying what to change")
        with self.engine.begin() as conn:
            row = conn.execute(text("SELECT r.id, r.state FROM revisions r WHERE r.plan_id = :p AND r.number = :n"),
                               {"p": plan_id, "n": number}).first()
            if row is None:
                raise StoreError(f"saved plan {plan_id}, revision {number}, was not found")
            revision_id, state = row
            if state != allowed_from:
                raise StoreError(f"revision {number} is {state}; '{action}' needs a {allowed_from} revision")
            conn.execute(text("UPDATE revisions SET state = :s WHERE id = :r"), {"s": new_state, "r": revision_id})
            conn.execute(text("INSERT INTO reviews (revision_id, action, by, comment, at) VALUES (:r, :a, :b, :c, :t)"),
                         {"r": revision_id, "a": action, "b": by, "c": comment or "", "t": _now()})
        return self.revision(plan_id, number)

    def submit(self, plan_id: int, number: int, by: str, comment: str = "") -> Revision:
        return self._move(plan_id, number, "submit", "submitted", "draft", by, comment)

    def approve(self, plan_id: int, number: int, reviewer: str, comment: str = "") -> Revision:
        return self._move(plan_id, number, "approve", "approved", "submitted", reviewer, comment)

    def return_for_changes(self, plan_id: int, number: int, reviewer: str, comment: str) -> Revision:
        return self._move(plan_id, number, "return", "returned", "submitted", reviewer, comment)

    # -- comparing revisions ---------------------------------------------------------------------------
    def diff(self, plan_id: int, a: int, b: int) -> dict:
        first, second = self.revision(plan_id, a), self.revision(plan_id, b)
        return {"inputs": diff_values(json.loads(first.scenario_json), json.loads(second.scenario_json)),
                "results": diff_values(first.results, second.results)}


def _like(value: str) -> str:
    value = (value or "").replace("\\", "\\\\").replace("%", "\\%").replace("_", "\\_")
    return f"%{value}%"


def diff_values(old, new, path: str = "") -> list[tuple[str, object, object]]:
    """(path, old, new) for every leaf that differs between two JSON-like values."""
    if isinstance(old, dict) and isinstance(new, dict):
        out = []
        for key in sorted(set(old) | set(new)):
            out.extend(diff_values(old.get(key), new.get(key), f"{path}.{key}" if path else str(key)))
        return out
    if isinstance(old, list) and isinstance(new, list) and len(old) == len(new):
        out = []
        for i, (x, y) in enumerate(zip(old, new)):
            out.extend(diff_values(x, y, f"{path}[{i}]"))
        return out
    return [] if old == new else [(path, old, new)]
