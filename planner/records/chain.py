"""The recorded history: a hash chain over every revision and review record.

Each entry of the ``chain`` table holds the SHA-256 of one record (its fields as canonical JSON)
together with the previous entry's hash, so a record changed, added or removed behind the planner's
back no longer matches: ``verify`` recomputes the chain from the records as they are now and names
each one that differs.  A revision's state is not part of its record (it moves by review steps); it
is checked against its review trail instead.

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


def record_hash(prev_hash: str, kind: str, record: dict) -> str:
    """SHA-256 of the previous hash, the kind and the record's fields as canonical JSON."""
    body = json.dumps({"kind": kind, **record}, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    return hashlib.sha256(f"{prev_hash}\n{body}".encode("utf-8")).hexdigest()


def _records(conn: Connection, kind: str, where: str = "", params: dict | None = None) -> dict[int, dict]:
    sql, names = (_REVISION_SQL, _REVISION_FIELDS) if kind == "revision" else (_REVIEW_SQL, _REVIEW_FIELDS)
    prefix = "r." if kind == "revision" else ""
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
    head: str = GENESIS
    problems: list[str] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return not self.problems

    def as_dict(self) -> dict:
        return {"ok": self.ok, "revisions": self.revisions, "reviews": self.reviews, "entries": self.entries,
                "head": self.head, "problems": list(self.problems)}


def _name(kind: str, record: dict | None, revisions: dict[int, dict], record_id: int) -> str:
    if record is None:
        return f"{kind} record {record_id}"
    if kind == "revision":
        return f"plan {record['plan_id']} revision {record['number']} (“{record['plan_name']}”)"
    rev = revisions.get(record["revision_id"])
    where = f"plan {rev['plan_id']} revision {rev['number']}" if rev else f"revision record {record['revision_id']}"
    return f"review record {record_id} ({record['action']} of {where})"


def verify(conn: Connection) -> Verification:
    """Recompute the chain from the records as they are now; name each mismatch."""
    revisions, reviews = _records(conn, "revision"), _records(conn, "review")
    found = Verification(revisions=len(revisions), reviews=len(reviews))
    entries = conn.exec_driver_sql("SELECT seq, kind, record_id, prev_hash, hash FROM chain ORDER BY seq").all()
    found.entries = len(entries)
    running, expected_seq, seen = GENESIS, 1, set()
    for seq, kind, record_id, prev_hash, digest in entries:
        records = revisions if kind == "revision" else reviews
        record = records.get(record_id)
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
    for kind, records in (("revision", revisions), ("review", reviews)):
        for record_id, record in records.items():
            if (kind, record_id) not in seen:
                found.problems.append(f"{_name(kind, record, revisions, record_id)}: not in the recorded history "
                                      "(added behind the planner's back)")
    found.problems.extend(_state_problems(conn, revisions))
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
