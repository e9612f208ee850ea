"""Saved plans: revisions that are never overwritten, a review trail, accounts, and a recorded history.

A plan has a name, a site/area tag and numbered revisions.  Saving always adds a revision (with the
author's account, time and note); revisions' contents cannot be changed afterwards — the database
itself refuses it (triggers, ``planner.records.migrations``), so no code path can.  Each revision moves
draft -> submitted -> approved or returned; an approved revision is read-only in every field, and
changing the plan means a new revision.  Every step is done by a signed-in account
(``planner.records.accounts``): planners and supervisors save and submit, supervisors approve or
return, and nobody approves or returns a revision they authored.  The names in revisions and in the
review trail are the accounts' names, read from the database in the same transaction.

Every revision, review record and account event is also entered in a hash chain
(``planner.records.chain``); ``verify`` recomputes it and names each record changed behind the planner's
back, and each account whose role, state or password hash is not what its events say.  The acting
account is checked against its recorded events before every step, so a role given by raw SQL is not
obeyed.

Back ends: an SQLite file (default) or PostgreSQL 15 through psycopg 3.  The database: the ``url``
argument (an SQLAlchemy URL), else ``path`` (an SQLite file), else the ``PLANNER_DB_URL`` environment
variable, else ``PLANNER_DB_PATH`` (a file), else ``data/plans.sqlite`` under the project folder.
Writes are serialised: SQLite takes its write lock at the start of the transaction (BEGIN IMMEDIATE,
WAL mode); PostgreSQL locks the history's head row (``SELECT ... FOR UPDATE``) and the revision under
review, so two supervisors acting at once on one revision leave exactly one outcome and the other gets
a message saying what happened.  A writer killed mid-transaction leaves nothing half-written.  The
schema carries a version; ``MIGRATIONS`` bring an older database up to date when it is opened.

The store also keeps the session key (``planner.records.sessions``): a file outside the database that
seals the sign-in sessions, so a session row written by raw SQL signs nobody in and ``verify`` names it.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

from sqlalchemy import create_engine, event, text
from sqlalchemy.engine import Connection, Engine, make_url
from sqlalchemy.exc import DBAPIError, OperationalError

from planner.records import chain
from planner.records.migrations import MIGRATIONS, REVIEW_MOVES
from planner.records.revision import PlanRow, Review, Revision, _now, diff_values  # noqa: F401  (re-exported)
from planner.records.terms import (  # noqa: F401  (the terms' home is records/terms.py; importers use either)
    ACTION_WORDS, DEFAULT_PATH, LIMITS, REVIEW_ROLES, ROLES, SAVE_ROLES, STATES, StoreError, check_path, check_text,
    check_url, database_url, default_path)
from planner.scenario.schema import Scenario, scenario_to_json

SCHEMA_VERSION = 5


class PlanStore:
    """The plans database. ``PlanStore(path)`` opens an SQLite file, ``PlanStore(url=...)`` any
    supported URL; with neither, the environment decides (module docstring)."""

    def __init__(self, path: str | Path | None = None, url: str | None = None,
                 session_key_file: str | Path | None = None):
        self.url = database_url(url, path)
        self._key_file = None if session_key_file is None else check_path(session_key_file, "session key file")
        self._key: bytes | None = None
        parsed = make_url(self.url)
        self.dialect = parsed.get_backend_name()
        self.path = Path(parsed.database) if self.dialect == "sqlite" else None
        self.where = str(self.path) if self.path is not None else parsed.render_as_string(hide_password=True)
        try:
            self.engine = self._engine()
            self.migrate()
        except OperationalError as exc:
            reason = str(exc.orig).strip().splitlines()[0] if exc.orig is not None else str(exc)
            raise StoreError(f"the plans database {self.where} cannot be opened: {reason}") from None

    def _engine(self) -> Engine:
        if self.dialect == "postgresql":
            return create_engine(self.url, pool_pre_ping=True, isolation_level="READ COMMITTED",
                                 connect_args={"connect_timeout": 10})
        self.path.parent.mkdir(parents=True, exist_ok=True)
        engine = create_engine(f"sqlite:///{self.path}", connect_args={"timeout": 60, "check_same_thread": False})

        @event.listens_for(engine, "connect")
        def _connect(dbapi_connection, _record):
            dbapi_connection.isolation_level = None  # we issue BEGIN ourselves
            cursor = dbapi_connection.cursor()
            cursor.execute("PRAGMA journal_mode=WAL")
            cursor.execute("PRAGMA foreign_keys=ON")
            cursor.execute("PRAGMA busy_timeout=60000")
            cursor.execute("PRAGMA synchronous=FULL")
            cursor.close()

        @event.listens_for(engine, "begin")
        def _begin(conn):
            conn.exec_driver_sql("BEGIN IMMEDIATE")

        return engine

    def close(self) -> None:
        self.engine.dispose()

    # -- the session key ----------------------------------------------------------------------------
    @property
    def session_key_file(self) -> Path:
        from planner.records import sessions

        return self._key_file if self._key_file is not None else sessions.key_path(self.path)

    def session_key(self) -> bytes:
        """The key that seals sign-in sessions (made on first use; ``planner.records.sessions``)."""
        from planner.records import sessions

        if self._key is None:
            self._key = sessions.load_key(self.session_key_file)
        return self._key

    @property
    def for_update(self) -> str:
        """Row-lock suffix for SELECT (PostgreSQL); SQLite's write lock covers the whole transaction."""
        return " FOR UPDATE" if self.dialect == "postgresql" else ""

    def lock(self, conn: Connection) -> None:
        """Serialise writers: every write transaction starts here (the history's head is one chain)."""
        if self.dialect == "postgresql":
            conn.exec_driver_sql("SELECT value FROM meta WHERE key = 'chain_lock' FOR UPDATE").first()

    # -- schema -----------------------------------------------------------------------------------
    def _version(self, conn: Connection) -> int:
        if self.dialect == "postgresql":
            exists = conn.exec_driver_sql("SELECT to_regclass('meta')").scalar()
        else:
            exists = conn.exec_driver_sql("SELECT name FROM sqlite_master WHERE type='table' AND name='meta'").first()
        if not exists:
            return 0
        row = conn.exec_driver_sql("SELECT value FROM meta WHERE key='schema_version'").first()
        return int(row[0]) if row else 0

    def schema_version(self) -> int:
        with self.engine.connect() as conn:
            return self._version(conn)

    def migrate(self, target: int = SCHEMA_VERSION) -> None:
        with self.engine.begin() as conn:
            if self.dialect == "postgresql":     # two servers starting at once migrate one after the other
                conn.exec_driver_sql("SELECT pg_advisory_xact_lock(7414000)")
            current = self._version(conn)
            if current > SCHEMA_VERSION:
                raise StoreError(f"the plans database {self.where} has schema version {current}, newer than this "
                                 f"planner reads ({SCHEMA_VERSION}): update the planner")
            for version in range(current + 1, target + 1):
                MIGRATIONS[version](conn, self.dialect)
                conn.execute(text("INSERT INTO meta (key, value) VALUES ('schema_version', :v) "
                                  "ON CONFLICT(key) DO UPDATE SET value = excluded.value"), {"v": str(version)})

    # -- who acts ---------------------------------------------------------------------------------
    def acting(self, conn: Connection, by, action: str) -> tuple[int, str, str]:
        """(id, name, role) of the account doing ``action``, read from the database now and checked
        against its recorded account events: an active account whose role allows it.  ``by`` is an
        ``accounts.Account`` (from a sign-in)."""
        account_id = getattr(by, "id", None)
        if not isinstance(account_id, int):
            raise StoreError(f"{ACTION_WORDS.get(action, action)} needs a signed-in account")
        recorded = verified_account(conn, account_id, ACTION_WORDS.get(action, action))
        name, role = recorded["name"], recorded["role"]
        if recorded["disabled_at"] is not None:
            raise StoreError(f"the account {name!r} is disabled: it cannot do anything any more")
        allowed = REVIEW_ROLES if action in ("approve", "return") else SAVE_ROLES
        if role not in allowed:
            raise StoreError(f"{name!r} is a{'n' if role[0] in 'aeiou' else ''} {role}: "
                             f"{ACTION_WORDS.get(action, action)} needs a {' or '.join(allowed)} account")
        return account_id, name, role

    # -- saving -----------------------------------------------------------------------------------
    def save(self, name: str, scenario: Scenario, by, note: str = "", site: str = "",
             results: dict | None = None, plan_id: int | None = None) -> Revision:
        """Add a revision to plan ``plan_id``, or to the plan called ``name`` at ``site`` (created on
        first save), authored by the account ``by``.  Never overwrites: the revision gets the next number."""
        name = check_text(name, "plan name", LIMITS["name"])
        site = check_text(site, "site", LIMITS["site"])
        note = check_text(note, "note", LIMITS["note"], multiline=True)
        if not name and plan_id is None:
            raise StoreError("a saved plan needs a name")
        if plan_id is not None:
            _check_ids(plan_id)
        body = scenario_to_json(scenario)
        digest = hashlib.sha256(body.encode("utf-8")).hexdigest()
        now = _now()
        with self.engine.begin() as conn:
            self.lock(conn)
            author_id, author, _ = self.acting(conn, by, "save")
            plan_id = self._plan_for_save(conn, plan_id, name, site, author, now)
            number = conn.execute(text("SELECT COALESCE(MAX(number), 0) + 1 FROM revisions WHERE plan_id = :p"),
                                  {"p": plan_id}).scalar_one()
            revision_id = conn.execute(text(
                "INSERT INTO revisions (plan_id, number, scenario_json, results_json, product, author, author_id, "
                "note, created_at, state, content_hash) VALUES (:p, :num, :body, :res, :prod, :a, :aid, :note, :t, "
                "'draft', :h) RETURNING id"),
                {"p": plan_id, "num": number, "body": body, "res": json.dumps(results or {}, default=str),
                 "prod": scenario.product.name, "a": author, "aid": author_id, "note": note, "t": now,
                 "h": digest}).scalar_one()
            chain.append(conn, "revision", revision_id)
        return self.revision(plan_id, number)

    def _plan_for_save(self, conn: Connection, plan_id: int | None, name: str, site: str, author: str,
                       now: str) -> int:
        if plan_id is not None:
            plan = conn.execute(text("SELECT id FROM plans WHERE id = :p"), {"p": plan_id}).first()
            if plan is None:
                raise StoreError(f"saved plan {plan_id} was not found")
            return plan[0]
        plan = conn.execute(text("SELECT id FROM plans WHERE name = :n AND site = :s"), {"n": name, "s": site}).first()
        if plan is not None:
            return plan[0]
        return conn.execute(text("INSERT INTO plans (name, site, created_at, created_by) VALUES (:n, :s, :t, :a) "
                                 "RETURNING id"), {"n": name, "s": site, "t": now, "a": author}).scalar_one()

    # -- reading ----------------------------------------------------------------------------------
    _REVISION_SQL = ("SELECT r.id, r.plan_id, p.name, p.site, r.number, r.scenario_json, r.results_json, r.product, "
                     "r.author, r.note, r.created_at, r.state, r.content_hash, r.author_id FROM revisions r "
                     "JOIN plans p ON p.id = r.plan_id ")

    @staticmethod
    def _revision(row) -> Revision:
        return Revision(row[0], row[1], row[2], row[3], row[4], row[5], json.loads(row[6] or "{}"), row[7],
                        row[8], row[9], row[10], row[11], row[12], row[13])

    def revision(self, plan_id: int, number: int | None = None) -> Revision:
        _check_ids(plan_id, number)
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
        _check_ids(plan_id)
        with self.engine.connect() as conn:
            rows = conn.execute(text(self._REVISION_SQL + "WHERE r.plan_id = :p ORDER BY r.number"), {"p": plan_id}).all()
        return [self._revision(r) for r in rows]

    def count_revisions(self, plan_id: int | None = None) -> int:
        with self.engine.connect() as conn:
            if plan_id is None:
                return conn.exec_driver_sql("SELECT COUNT(*) FROM revisions").scalar_one()
            return conn.execute(text("SELECT COUNT(*) FROM revisions WHERE plan_id = :p"), {"p": plan_id}).scalar_one()

    def plans(self, search: str = "", product: str = "", site: str = "", state: str = "") -> list[PlanRow]:
        """Plans whose latest revision matches; text filters match anywhere, ignoring case (wildcards and
        backslashes in the text are literal; control characters are refused)."""
        like = "ILIKE" if self.dialect == "postgresql" else "LIKE"
        sql = ("SELECT p.id, p.name, p.site, r.product, r.number, r.state, r.created_at, r.author FROM plans p "
               "JOIN revisions r ON r.plan_id = p.id AND r.number = (SELECT MAX(number) FROM revisions WHERE plan_id = p.id) "
               f"WHERE p.name {like} :q ESCAPE '\\' AND r.product {like} :prod ESCAPE '\\' "
               f"AND p.site {like} :site ESCAPE '\\'")
        params = {"q": _like(search, "search: name"), "prod": _like(product, "search: product"),
                  "site": _like(site, "search: site")}
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
            rows = conn.execute(text('SELECT action, "by", comment, at, by_id, by_role FROM reviews '
                                     "WHERE revision_id = :r ORDER BY id"), {"r": revision.id}).all()
        return [Review(*row) for row in rows]

    # -- review -----------------------------------------------------------------------------------
    def _move(self, plan_id: int, number: int, action: str, by, comment: str) -> Revision:
        _, allowed_from, new_state = next(m for m in REVIEW_MOVES if m[0] == action)
        _check_ids(plan_id, number)
        comment = check_text(comment, "comment", LIMITS["comment"], multiline=True)
        if action == "return" and not comment:
            raise StoreError("returning a revision needs a comment saying what to change")
        with self.engine.begin() as conn:
            self.lock(conn)
            by_id, by_name, by_role = self.acting(conn, by, action)
            row = conn.execute(text("SELECT id, state, author_id, author FROM revisions WHERE plan_id = :p "
                                    "AND number = :n" + self.for_update), {"p": plan_id, "n": number}).first()
            if row is None:
                raise StoreError(f"saved plan {plan_id}, revision {number}, was not found")
            revision_id, state, author_id, author = row
            if state != allowed_from:
                raise StoreError(self._state_message(conn, revision_id, number, state, action, allowed_from))
            if action in ("approve", "return") and (author_id == by_id or (author_id is None and author == by_name)):
                raise StoreError(f"{by_name!r} authored revision {number}: another supervisor must "
                                 f"{'approve' if action == 'approve' else 'return'} it")
            review_id = conn.execute(text(
                'INSERT INTO reviews (revision_id, action, "by", by_id, by_role, comment, at, from_state, to_state) '
                "VALUES (:r, :a, :b, :bid, :role, :c, :t, :f, :s) RETURNING id"),
                {"r": revision_id, "a": action, "b": by_name, "bid": by_id, "role": by_role, "c": comment,
                 "t": _now(), "f": allowed_from, "s": new_state}).scalar_one()
            conn.execute(text("UPDATE revisions SET state = :s WHERE id = :r"), {"s": new_state, "r": revision_id})
            chain.append(conn, "review", review_id)
        return self.revision(plan_id, number)

    @staticmethod
    def _state_message(conn: Connection, revision_id: int, number: int, state: str, action: str,
                       allowed_from: str) -> str:
        last = conn.execute(text('SELECT action, "by", at FROM reviews WHERE revision_id = :r ORDER BY id DESC LIMIT 1'),
                            {"r": revision_id}).first()
        if state == "draft":
            return f"revision {number} is a draft (not submitted yet); '{action}' needs a {allowed_from} revision"
        done = f" by {last[1]} at {last[2]}" if last is not None else ""
        return (f"revision {number} is already {state}{done}; '{action}' needs a {allowed_from} revision "
                "(the page may show an older state: reload it)")

    def submit(self, plan_id: int, number: int, by, comment: str = "") -> Revision:
        return self._move(plan_id, number, "submit", by, comment)

    def approve(self, plan_id: int, number: int, by, comment: str = "") -> Revision:
        return self._move(plan_id, number, "approve", by, comment)

    def return_for_changes(self, plan_id: int, number: int, by, comment: str) -> Revision:
        return self._move(plan_id, number, "return", by, comment)

    # -- the recorded history ---------------------------------------------------------------------
    def verify(self) -> chain.Verification:
        """Every revision, review record and account against the hash chain (``planner.records.chain``),
        and every sign-in session against the session key (``planner.records.sessions``; the key file is
        not made here: without it, sessions are reported as not checkable)."""
        from planner.records import sessions

        key = self._key if self._key is not None else sessions.load_key(self.session_key_file, create=False)
        with self.engine.connect() as conn:
            found = chain.verify(conn)
            found.sessions, problems = sessions.forged(conn, key, self.session_key_file)
        found.problems.extend(problems)
        return found

    def revision_problems(self, plan_id: int, number: int) -> list[str]:
        """One revision and its review records against their history entries (empty: they match)."""
        revision = self.revision(plan_id, number)
        with self.engine.connect() as conn:
            return chain.revision_problems(conn, revision.id)

    # -- comparing revisions ---------------------------------------------------------------------------
    def diff(self, plan_id: int, a: int, b: int) -> dict:
        first, second = self.revision(plan_id, a), self.revision(plan_id, b)
        return {"inputs": diff_values(json.loads(first.scenario_json), json.loads(second.scenario_json)),
                "results": diff_values(first.results, second.results)}


def verified_account(conn: Connection, account_id: int, what: str) -> dict:
    """The account's state (name, role, disabled_at ...) as its recorded events say, refused when its
    row or its latest event does not match the recorded history (a role given or a password hash
    swapped behind the planner's back)."""
    recorded, problems = chain.recorded_account(conn, account_id)
    if recorded is None and problems == [f"account {account_id} does not exist"]:
        raise StoreError(f"{what}: account {account_id} does not exist")
    if problems:
        name = conn.execute(text("SELECT name FROM accounts WHERE id = :i"), {"i": account_id}).scalar_one()
        raise StoreError(f"the account {name!r} does not match the recorded history ({'; '.join(problems)}): "
                         f"{what} is refused; an admin should run  python -m planner plans verify")
    return recorded


MAX_ID = 2 ** 31 - 1      # ids are INTEGER on both back ends


def _check_ids(plan_id, number=None) -> None:
    """A plan id or revision number outside the databases' integer range cannot exist."""
    for value in (plan_id, number):
        if value is not None and (not isinstance(value, int) or isinstance(value, bool) or not 1 <= value <= MAX_ID):
            which = "its latest revision" if number is None else f"revision {number}"
            raise StoreError(f"saved plan {plan_id}, {which}, was not found")


def _like(value: str, field: str) -> str:
    value = check_text(value, field, LIMITS["search"])
    value = value.replace("\\", "\\\\").replace("%", "\\%").replace("_", "\\_")
    return f"%{value}%"
