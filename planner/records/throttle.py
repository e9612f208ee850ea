"""Failed sign-ins, counted per name (``sign_in_throttle``), whether or not an account has that name.

Each sign-in attempt is counted as a failure *before* its password is looked at, in one transaction
that holds the name's row (an upsert with ``RETURNING``: a row lock on PostgreSQL, the write lock on
SQLite); a right password then clears the count.  So the count and the lock move in one step: of any
number of attempts made at once, at most ``FREE_ATTEMPTS`` get their password checked before the name
is locked.  After ``FREE_ATTEMPTS`` failures in a row the name is locked for ``LOCK_BASE_S`` seconds,
doubling with each further failure up to ``LOCK_MAX_S``; while locked, an attempt is refused without
its password being looked at.

Names are counted whether an account exists or not, so a name nobody has gets the same answers (and
the same Argon2 work, ``planner.records.accounts``) as an account: the answers do not tell which names
exist.  A name is kept only as a SHA-256, and forgotten a day after its last failure
(``FORGET_S``) once its lock is over.
"""

from __future__ import annotations

import hashlib

from sqlalchemy import text

FREE_ATTEMPTS = 5
LOCK_BASE_S = 15.0
LOCK_MAX_S = 900.0
FORGET_S = 86400.0


def name_digest(name: str) -> str:
    return hashlib.sha256(f"planner sign-in name\n{name}".encode("utf-8", "surrogatepass")).hexdigest()


def lock_seconds(failed: int) -> float:
    """How long the ``failed``-th failure in a row locks the name (0 before ``FREE_ATTEMPTS``)."""
    if failed < FREE_ATTEMPTS:
        return 0.0
    return min(LOCK_MAX_S, LOCK_BASE_S * 2.0 ** min(failed - FREE_ATTEMPTS, 30))


def claim(store, name: str, now: float) -> float | None:
    """Count an attempt on ``name`` as a failure before its password is looked at.  Returns the time
    the name is locked until when it is locked (the attempt is not counted and its password must not
    be looked at), else None."""
    with store.engine.begin() as conn:
        failed, locked_until = conn.execute(text(
            "INSERT INTO sign_in_throttle (name_digest, failed_count, last_failed_at) VALUES (:d, 0, :t) "
            "ON CONFLICT (name_digest) DO UPDATE SET failed_count = sign_in_throttle.failed_count "
            "RETURNING failed_count, locked_until"), {"d": name_digest(name), "t": now}).one()
        if locked_until is not None and locked_until > now:
            return locked_until
        failed += 1
        lock = now + lock_seconds(failed) if failed >= FREE_ATTEMPTS else None
        conn.execute(text("UPDATE sign_in_throttle SET failed_count = :f, locked_until = :l, last_failed_at = :t "
                          "WHERE name_digest = :d"), {"f": failed, "l": lock, "t": now, "d": name_digest(name)})
    return None


def clear(conn, name: str) -> None:
    """The right password (or an admin enabling the account): the name's failures are forgotten."""
    conn.execute(text("DELETE FROM sign_in_throttle WHERE name_digest = :d"), {"d": name_digest(name)})


def forget_old(conn, now: float, skip_locked: bool) -> None:
    """Forget names whose last failure is over a day old and whose lock is over (rows another
    transaction holds are skipped on PostgreSQL)."""
    conn.execute(text(
        "DELETE FROM sign_in_throttle WHERE name_digest IN (SELECT name_digest FROM sign_in_throttle "
        "WHERE last_failed_at < :old AND (locked_until IS NULL OR locked_until < :now) LIMIT 200"
        + (" FOR UPDATE SKIP LOCKED" if skip_locked else "") + ")"), {"old": now - FORGET_S, "now": now})
