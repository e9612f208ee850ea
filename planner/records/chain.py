"""The recorded history: a hash chain over every revision, review record and account event.

Each entry of the ``chain`` table holds the SHA-256 of one record (its fields as canonical JSON)
together with the previous entry's hash, so a record changed, added or removed behind the planner's
back no longer matches: ``verify`` recomputes the chain from the records as they are now and names
each one that differs.  A revision's state is not part of its record (it moves by review steps); it
is checked against its review trail instead.

Accounts change (disabled, enabled, a new role, a new password), so an account's row is not chained
itself: each change is an account event (``account_events``) holding the account's whole state after
it (name, role, created, disabled, and the SHA-256 of its password hash, so old hashes are not kept),
and ``verify`` checks each account's row against its latest event in the chain.  The store and the
account book check the acting account the same way (``recorded_account``) before anything it does,
so a role given or a password hash swapped by raw SQL is refused, not obeyed.

What this does not do: someone able to write the database and recompute every later hash could
rewrite the chain consistently.  Keep the chain head that ``verify`` prints (or a backup) somewhere
else and compare it (README, "Deployment").
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import dataclass, field

from sqlalchemy import text
from sqlalchemy.engine import Connection

GENESIS = "0" * 64

_REVISION_FIELDS = ("id", "plan_id", "plan_name", "site", "number", "scenario_json", "results_json", "product",
                    "author", "author_id", "note", "created_at", "content_hash")
_REVISION_SQL = ("SELECT r.id, r.plan_id, p.name, p.site, r.number, r.scenario_json, r.results_json, r.product, "
                 "r.author, r.author_id, r.note, r.created_at, r.content_hash FROM revisions r "
                 "JOIN plans p ON p.id = r.plan_id")
_REVIEW_FIELDS = ("id", "revision_id", "action", "by", "by_id", "by_role", "comment", "at", "from_state", "to_state")
_REVIEW_SQL = ('SELECT id, revision_id, action, "by", by_id, by_role, comment, at, from_state, to_state '
               "FROM reviews")
_ACCOUNT_FIELDS = ("id", "account_id", "action", "name", "role", "password_digest", "created_at", "created_by",
                   "disabled_at", "by", "by_id", "at")
_ACCOUNT_SQL = ('SELECT id, account_id, action, name, role, password_digest, created_at, created_by, disabled_at, '
                '"by", by_id, at FROM account_events')
_KINDS = {"revision": (_REVISION_SQL, _REVISION_FIELDS, "r."), "review": (_REVIEW_SQL, _REVIEW_FIELDS, ""),
          "account": (_ACCOUNT_SQL, _ACCOUNT_FIELDS, "")}
ACCOUNT_ACTIONS = ("recorded", "add", "disable", "enable", "role", "password", "rehash")
# the account's state an event holds, compared with the account's row
_STATE = ("name", "role", "password_digest", "created_at", "created_by", "disabled_at")


def record_hash(prev_hash: str, kind: str, record: dict) -> str:
    """SHA-256 of the previous hash, the kind and the record's fields as canonical JSON."""
    body = json.dumps({"kind": kind, **record}, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    return hashlib.sha256(f"{prev_hash}\n{body}".encode("utf-8")).hexdigest()


def _records(conn: Connection, kind: str, where: str = "", params: dict | None = None) -> dict[int, dict]:
    sql, names, prefix = _KINDS[kind]
    rows = conn.execute(text(sql + (f" WHERE {prefix}{where}" if where else "")), params or {}).all()
    return {row[0]: dict(zip(names, row)) for row in rows}


def _head(conn: Connection) -> tuple[int, str]:
    row = conn.exec_driver_sql("SELECT seq, hash FROM chain ORDER BY seq DESC LIMIT 1").first()
    return (0, GENESIS) if row is None else (int(row[0]), row[1])


def append(conn: Connection, kind: str, record_id: int) -> str:
    """Add the record to the chain; the caller holds the write lock. Returns the new head hash."""
    record = _records(conn, kind, "id = :i", {"i": record_id})[record_id]
    seq, prev = _head(conn)
    digest = record_hash(prev, kind, record)
    conn.execute(text("INSERT INTO chain (seq, kind, record_id, prev_hash, hash) VALUES (:s, :k, :r, :p, :h)"),
                 {"s": seq + 1, "k": kind, "r": record_id, "p": prev, "h": digest})
    return digest


def chain_existing(conn: Connection) -> None:
    """Chain the records of a database made before the chain existed, in the order they were made."""
    revisions = _records(conn, "revision")
    reviews = _records(conn, "review")
    order = sorted([(r["created_at"], 0, i, "revision") for i, r in revisions.items()]
                   + [(r["at"], 1, i, "review") for i, r in reviews.items()])
    for _, _, record_id, kind in order:
        append(conn, kind, record_id)


@dataclass
class Verification:
    """What ``verify`` found: counts, the chain head, and one line per record that does not match."""
    revisions: int = 0
    reviews: int = 0
    entries: int = 0
    account_events: int = 0
    accounts: int = 0
    sessions: int = 0
    head: str = GENESIS
    problems: list[str] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return not self.problems

    def as_dict(self) -> dict:
        return {"ok": self.ok, "revisions": self.revisions, "reviews": self.reviews,
                "account_events": self.account_events, "accounts": self.accounts, "sessions": self.sessions,
                "entries": self.entries,
                "head": self.head, "problems": list(self.problems)}


_EVENT_WORDS = {"recorded": "recorded as found", "add": "added", "disable": "disabled", "enable": "enabled",
                "role": "role set", "password": "password changed", "rehash": "password rehashed"}


def _name(kind: str, record: dict | None, revisions: dict[int, dict], record_id: int) -> str:
    if record is None:
        return f"{'account event' if kind == 'account' else kind + ' record'} {record_id}"
    if kind == "account":
        words = _EVENT_WORDS.get(record["action"], record["action"])
        if record["action"] == "role":
            words += f" to {record['role']}"
        return f"account event {record_id} ({record['name']!r} {words})"
    if kind == "revision":
        return f"plan {record['plan_id']} revision {record['number']} (“{record['plan_name']}”)"
    rev = revisions.get(record["revision_id"])
    where = f"plan {rev['plan_id']} revision {rev['number']}" if rev else f"revision record {record['revision_id']}"
    return f"review record {record_id} ({record['action']} of {where})"


def verify(conn: Connection) -> Verification:
    """Recompute the chain from the records as they are now; name each mismatch, and each account whose
    row is not what its latest recorded event says."""
    every = {kind: _records(conn, kind) for kind in _KINDS}
    revisions = every["revision"]
    found = Verification(revisions=len(revisions), reviews=len(every["review"]), account_events=len(every["account"]))
    entries = conn.exec_driver_sql("SELECT seq, kind, record_id, prev_hash, hash FROM chain ORDER BY seq").all()
    found.entries = len(entries)
    running, expected_seq, seen, latest = GENESIS, 1, set(), {}
    for seq, kind, record_id, prev_hash, digest in entries:
        record = every.get(kind, {}).get(record_id)
        if kind == "account" and record is not None:
            latest[record["account_id"]] = record
        label = _name(kind, record, revisions, record_id)
        seen.add((kind, record_id))
        if seq != expected_seq:
            found.problems.append(f"history entries {expected_seq} to {seq - 1} are missing (before {label})")
        if prev_hash != running:
            found.problems.append(f"{label}: its history entry {seq} does not follow the one before it")
        if record is None:
            found.problems.append(f"{label}: recorded in the history (entry {seq}) but missing from the database")
        elif record_hash(prev_hash, kind, record) != digest:
            found.problems.append(f"{label}: differs from the recorded history (entry {seq})")
        running, expected_seq = digest, seq + 1
    found.head = running
    for kind, records in every.items():
        for record_id, record in records.items():
            if (kind, record_id) not in seen:
                found.problems.append(f"{_name(kind, record, revisions, record_id)}: not in the recorded history "
                                      "(added behind the planner's back)")
    found.problems.extend(_state_problems(conn, revisions))
    accounts = _account_rows(conn)
    found.accounts = len(accounts)
    for account_id, row in accounts.items():
        found.problems.extend(f"account {row['name']!r}: {detail}"
                              for detail in _account_differences(row, latest.get(account_id)))
    return found


def _state_problems(conn: Connection, revisions: dict[int, dict]) -> list[str]:
    """Each revision's state must be where its review trail (in history order) leads."""
    states = dict(conn.exec_driver_sql("SELECT id, state FROM revisions").all())
    trail = conn.exec_driver_sql(
        "SELECT v.revision_id, v.to_state FROM reviews v JOIN chain c ON c.kind = 'review' AND c.record_id = v.id "
        "ORDER BY c.seq").all()
    expected = {rid: "draft" for rid in states}
    for revision_id, to_state in trail:
        expected[revision_id] = to_state
    out = []
    for revision_id, state in states.items():
        if state != expected.get(revision_id, "draft"):
            out.append(f"{_name('revision', revisions.get(revision_id), revisions, revision_id)}: shows "
                       f"'{state}' but its review trail leads to '{expected.get(revision_id, 'draft')}'")
    return out


def revision_problems(conn: Connection, revision_id: int) -> list[str]:
    """The quick check the dashboard shows for one revision: its record and its review records against
    their history entries, and its state against its trail (the whole chain: ``verify``)."""
    revisions = _records(conn, "revision", "id = :i", {"i": revision_id})
    reviews = _records(conn, "review", "revision_id = :i", {"i": revision_id})
    out = []
    for kind, records in (("revision", revisions), ("review", reviews)):
        for record_id, record in records.items():
            row = conn.execute(text("SELECT prev_hash, hash FROM chain WHERE kind = :k AND record_id = :r"),
                               {"k": kind, "r": record_id}).first()
            label = _name(kind, record, revisions, record_id)
            if row is None:
                out.append(f"{label}: not in the recorded history (added behind the planner's back)")
            elif record_hash(row[0], kind, record) != row[1]:
                out.append(f"{label}: differs from the recorded history")
    state = conn.execute(text("SELECT state FROM revisions WHERE id = :i"), {"i": revision_id}).scalar_one_or_none()
    ordered = sorted(reviews.values(), key=lambda r: r["id"])
    expected = ordered[-1]["to_state"] if ordered else "draft"
    if state is not None and state != expected:
        out.append(f"{_name('revision', revisions.get(revision_id), revisions, revision_id)}: shows '{state}' "
                   f"but its review trail leads to '{expected}'")
    return out


# -- accounts ----------------------------------------------------------------------------------------

def password_digest(password_hash: str) -> str:
    """What an account event keeps of a password hash: its SHA-256 (old hashes are not kept)."""
    return hashlib.sha256(str(password_hash).encode("utf-8")).hexdigest()


def _account_rows(conn: Connection, account_id: int | None = None) -> dict[int, dict]:
    sql = "SELECT id, name, role, password_hash, created_at, created_by, disabled_at FROM accounts"
    rows = (conn.exec_driver_sql(sql + " ORDER BY id") if account_id is None else
            conn.execute(text(sql + " WHERE id = :i"), {"i": account_id})).all()
    return {row[0]: {"name": row[1], "role": row[2], "password_digest": password_digest(row[3]),
                     "created_at": row[4], "created_by": row[5], "disabled_at": row[6]} for row in rows}


def _account_differences(row: dict, event: dict | None) -> list[str]:
    """How an account's row differs from the state its latest recorded event says (empty: it matches)."""
    if event is None:
        return ["not in the recorded history (added behind the planner's back)"]
    out = []
    if row["role"] != event["role"]:
        out.append(f"its role is '{row['role']}' but its recorded events say '{event['role']}'")
    if (row["disabled_at"] is None) != (event["disabled_at"] is None):
        def state(value):
            return "active" if value is None else f"disabled (since {value})"
        out.append(f"it is {state(row['disabled_at'])} but its recorded events say {state(event['disabled_at'])}")
    elif row["disabled_at"] != event["disabled_at"]:
        out.append(f"disabled since {row['disabled_at']} but its recorded events say since {event['disabled_at']}")
    if row["password_digest"] != event["password_digest"]:
        out.append("its password hash is not the one its recorded events say (changed behind the planner's back)")
    for key in ("name", "created_at", "created_by"):
        if row[key] != event[key]:
            out.append(f"its {key.replace('_', ' ')} is {row[key]!r} but its recorded events say {event[key]!r}")
    return out


def recorded_account(conn: Connection, account_id: int) -> tuple[dict | None, list[str]]:
    """The account's state as its latest recorded event says (name, role, disabled_at, ...), and how the
    account's row or that event differ from the recorded history (empty: it matches; act on it)."""
    rows = _account_rows(conn, account_id)
    if account_id not in rows:
        return None, [f"account {account_id} does not exist"]
    entry = conn.execute(text(
        "SELECT c.record_id, c.prev_hash, c.hash FROM chain c JOIN account_events e ON c.kind = 'account' "
        "AND c.record_id = e.id WHERE e.account_id = :i ORDER BY c.seq DESC LIMIT 1"), {"i": account_id}).first()
    if entry is None:
        return None, _account_differences(rows[account_id], None)
    event = _records(conn, "account", "id = :e", {"e": entry[0]})[entry[0]]
    problems = [] if record_hash(entry[1], "account", event) == entry[2] else \
        [f"{_name('account', event, {}, entry[0])} differs from the recorded history"]
    problems += _account_differences(rows[account_id], event)
    return {key: event[key] for key in _STATE}, problems


def account_event(conn: Connection, account_id: int, action: str, by: str, by_id: int | None, at: str,
                  **changes) -> int:
    """Record an account event and make the change: the event (the account's state after it) is
    inserted first, then the row is updated with ``changes`` (``role``, ``disabled_at``,
    ``password_hash``; the database refuses a role or disabled change without its event), then the event
    is chained.  The caller holds the write lock.  Returns the event's id."""
    if action not in ACCOUNT_ACTIONS or not set(changes) <= {"role", "disabled_at", "password_hash"}:
        raise ValueError(f"unknown account event {action!r} or change {sorted(changes)}")
    row = conn.execute(text("SELECT name, role, password_hash, created_at, created_by, disabled_at FROM accounts "
                            "WHERE id = :i"), {"i": account_id}).one()
    state = dict(zip(("name", "role", "password_hash", "created_at", "created_by", "disabled_at"), row))
    state.update(changes)
    event_id = conn.execute(text(
        'INSERT INTO account_events (account_id, action, name, role, password_digest, created_at, created_by, '
        'disabled_at, "by", by_id, at) VALUES (:a, :act, :n, :r, :d, :c, :cb, :dis, :b, :bid, :t) RETURNING id'),
        {"a": account_id, "act": action, "n": state["name"], "r": state["role"],
         "d": password_digest(state["password_hash"]), "c": state["created_at"], "cb": state["created_by"],
         "dis": state["disabled_at"], "b": by, "bid": by_id, "t": at}).scalar_one()
    if changes:
        sets = ", ".join(f"{column} = :{column}" for column in changes)
        conn.execute(text(f"UPDATE accounts SET {sets} WHERE id = :account_id"), {**changes, "account_id": account_id})
    append(conn, "account", event_id)
    return event_id
