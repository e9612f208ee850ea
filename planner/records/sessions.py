"""Session tokens, kept only as keyed hashes sealed with a key that the database does not hold.

A session (the dashboard's sign-in) is a random token held by the browser's session.  The database
keeps HMAC-SHA-256(key, token) as ``token_hash`` and a ``seal``: HMAC-SHA-256(key, the row's token
hash, account, start and expiry).  A row written without the key (raw SQL inserting a session for a
supervisor, or moving someone's session to another account) has no valid seal: it signs nobody in,
and ``plans verify`` names it.

The key: 32 random bytes (hex) in a file outside the database, made on first use, readable by its
owner only: ``PLANNER_SESSION_KEY_FILE``, else beside an SQLite database (``plans.sqlite.session-key``),
else ``planner/data/session.key`` for PostgreSQL.  Not a table: whoever can write the sessions table
can read every other table too, so a key kept in the database would be no secret from them.  Every
dashboard server of one database, and the machine that runs ``plans verify``, must use the same key
file; a server with another key cannot use (and verify names) the others' sessions.  Losing the file
only ends every sign-in.
"""

from __future__ import annotations

import hashlib
import hmac
import json
import os
import secrets
from pathlib import Path

from sqlalchemy import text

from planner.records.terms import DEFAULT_PATH, StoreError, check_path

KEY_ENV = "PLANNER_SESSION_KEY_FILE"
KEY_SUFFIX = ".session-key"


def key_path(db_path: Path | None) -> Path:
    """Where the session key of a database lives (module docstring)."""
    env = os.environ.get(KEY_ENV)
    if env is not None and env.strip():
        return check_path(env, KEY_ENV)
    if db_path is not None:
        return db_path.with_name(db_path.name + KEY_SUFFIX)
    return DEFAULT_PATH.parent / "session.key"


def load_key(path: Path, create: bool = True) -> bytes | None:
    """The key in ``path``; made (atomically: racing servers agree on one key) when missing and
    ``create``, else None when missing."""
    if not path.exists():
        if not create:
            return None
        path.parent.mkdir(parents=True, exist_ok=True)
        draft = path.with_name(f"{path.name}.{secrets.token_hex(6)}.new")
        fd = os.open(draft, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
        try:
            with os.fdopen(fd, "w") as out:
                out.write(secrets.token_hex(32) + "\n")
            try:
                os.link(draft, path)            # fails when another process made the key first
            except FileExistsError:
                pass
        finally:
            draft.unlink(missing_ok=True)
    try:
        raw = path.read_text(encoding="ascii").strip()
    except (OSError, UnicodeDecodeError) as exc:
        raise StoreError(f"session key file {path}: cannot be read ({exc.__class__.__name__}); "
                         f"set {KEY_ENV} to a file this program may read and write") from None
    if len(raw) != 64 or any(c not in "0123456789abcdef" for c in raw):
        raise StoreError(f"session key file {path}: not a key this planner wrote (64 hex digits); remove it to "
                         "make a new one (every sign-in then ends)")
    return bytes.fromhex(raw)


def token_hash(key: bytes, token: str) -> str:
    return hmac.new(key, f"planner session token\n{token}".encode("utf-8", "surrogatepass"), hashlib.sha256).hexdigest()


def seal(key: bytes, digest: str, account_id: int, created_at: float, expires_at: float) -> str:
    body = json.dumps(["planner session", digest, int(account_id), float(created_at), float(expires_at)])
    return hmac.new(key, body.encode("utf-8"), hashlib.sha256).hexdigest()


def sealed(key: bytes, row) -> bool:
    """Whether a sessions row (token_hash, account_id, created_at, expires_at, seal) carries our seal."""
    digest, account_id, created_at, expires_at, kept = row
    return hmac.compare_digest(seal(key, digest, account_id, created_at, expires_at), kept or "")


def forged(conn, key: bytes | None, where: Path) -> tuple[int, list[str]]:
    """(number of sessions, a line for each session row not sealed with ``key``), for ``plans verify``."""
    rows = conn.exec_driver_sql(
        "SELECT s.token_hash, s.account_id, s.created_at, s.expires_at, s.seal, a.name, s.ended FROM sessions s "
        "LEFT JOIN accounts a ON a.id = s.account_id ORDER BY s.created_at").all()
    out = []
    for row in rows:
        state = "ended" if row[6] else "live"
        label = f"session {row[0][:12]}… ({state}) of account {row[5]!r}"
        if key is None:
            out.append(f"{label}: there is no session key file {where}, so no server made it: written behind the "
                       f"planner's back (or the servers use another key file: set {KEY_ENV} to it)")
        elif not sealed(key, row[:5]):
            out.append(f"{label}: its seal does not match the session key {where}: written behind the planner's "
                       "back (or by a server with another key file); it signs nobody in")
    return len(rows), out
