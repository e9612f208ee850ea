"""Accounts, sign-in and sessions for the plans database.

Roles: ``planner`` (makes, saves and submits plans), ``supervisor`` (also approves or returns other
people's revisions), ``admin`` (manages accounts; does not plan or review).  Passwords are kept only
as Argon2id hashes (argon2-cffi's ``PasswordHasher`` with the OWASP Password Storage Cheat Sheet's
Argon2id setting: 19 MiB, 2 passes, 1 lane — light enough that sign-ins on a small shared server do
not starve it; a hash made with other parameters is redone at the next sign-in).

Failed sign-ins are throttled per name (``planner.records.throttle``): each attempt is counted before
its password is looked at, in one database step with the lock, so attempts made at once get at most
``FREE_ATTEMPTS`` passwords checked; then the name is locked, doubling.  A name that does not exist is
counted and locked the same way and gets the same answers, after the same Argon2 work (a check against
a dummy hash), so the answers do not tell which accounts exist.  New passwords keep the password rule
(``planner.records.passwords``: NIST SP 800-63B).

A session (the dashboard's sign-in) is a random token kept only as a keyed hash and sealed with the
store's session key, a file outside the database (``planner.records.sessions``), so a session row
written by raw SQL signs nobody in; it ends after ``SESSION_S`` seconds, after ``IDLE_S`` seconds
without use, on sign-out, or when the account is disabled or its password changes.  Disabling keeps
the account's row, so every revision and review record still names who made it; the database refuses
deleting or renaming an account.

Every change to an account (added, disabled, enabled, a new role, a new password or a redone hash) is
an account event in the recorded history (``planner.records.chain``).  Managing accounts, signing in
and every planner step use the account's role and state as its recorded events say, and refuse an
account whose row does not match them.  Every change but the first admin is made by a signed-in
active admin (``by``), who is recorded in the change's account event (the command line signs the admin
in first: ``--admin NAME --password-stdin``); an account may change its own password with its current
one; the last active admin cannot be disabled or given another role.
"""

from __future__ import annotations

import secrets
import time
from dataclasses import dataclass

from argon2 import PasswordHasher
from argon2.exceptions import InvalidHashError, VerificationError, VerifyMismatchError
from sqlalchemy import text

from planner.records import chain, sessions, throttle
from planner.records.passwords import PASSWORD_MAX, PASSWORD_MIN, check_password  # noqa: F401 (the rule's home)
from planner.records.store import ROLES, PlanStore, StoreError, _now, check_text, verified_account
from planner.records.throttle import FREE_ATTEMPTS  # noqa: F401

SESSION_S = 12 * 3600.0
IDLE_S = 3600.0
NAME_MAX = 60
WRONG = "the account name or the password is not right"


@dataclass(frozen=True)
class Account:
    id: int
    name: str
    role: str
    created_at: str
    created_by: str
    disabled_at: str | None

    @property
    def active(self) -> bool:
        return self.disabled_at is None

    def as_dict(self) -> dict:
        return {"name": self.name, "role": self.role, "created_at": self.created_at, "created_by": self.created_by,
                "disabled": not self.active, "disabled_at": self.disabled_at}


@dataclass(frozen=True)
class Session:
    token: str
    account: Account
    expires_at: float


ARGON2 = {"time_cost": 2, "memory_cost": 19 * 1024, "parallelism": 1}     # OWASP cheat sheet, Argon2id
_hasher = PasswordHasher(**ARGON2)          # type Argon2id is the library's default
_DUMMY_HASH = _hasher.hash("not a password of any account")


def check_name(name) -> str:
    name = check_text(name, "account name", NAME_MAX)
    if not name:
        raise StoreError("account name: empty")
    if not all(c.isalnum() or c in "._- @" for c in name):
        raise StoreError("account name: use letters, digits, spaces and . _ - @ only")
    return name


_ACCOUNT_SQL = "SELECT id, name, role, created_at, created_by, disabled_at FROM accounts "


class AccountBook:
    """Accounts of one ``PlanStore``. ``session_s``/``idle_s`` override the session limits."""

    def __init__(self, store: PlanStore, session_s: float = SESSION_S, idle_s: float = IDLE_S):
        self.store = store
        self.session_s = session_s
        self.idle_s = idle_s

    # -- listing ----------------------------------------------------------------------------------
    def count(self) -> int:
        with self.store.engine.connect() as conn:
            return conn.exec_driver_sql("SELECT COUNT(*) FROM accounts").scalar_one()

    def list(self) -> list[Account]:
        with self.store.engine.connect() as conn:
            return [Account(*row) for row in conn.exec_driver_sql(_ACCOUNT_SQL + "ORDER BY name").all()]

    def get(self, name: str) -> Account:
        name = check_text(name, "account name", NAME_MAX)
        with self.store.engine.connect() as conn:
            row = conn.execute(text(_ACCOUNT_SQL + "WHERE name = :n"), {"n": name}).first()
        if row is None:
            raise StoreError(f"there is no account {name!r}")
        return Account(*row)

    # -- managing ---------------------------------------------------------------------------------
    @staticmethod
    def _admin(conn, by: Account | None, what: str) -> tuple[str, int]:
        """Who manages accounts (name, id): an active admin, role and state as the account's recorded
        events say.  The caller has signed the admin in (the dashboard's session, the command line's
        ``--admin NAME --password-stdin``)."""
        if by is None or not isinstance(getattr(by, "id", None), int):
            raise StoreError(f"{what} needs an admin's sign-in")
        recorded = verified_account(conn, by.id, what)
        if recorded["disabled_at"] is not None or recorded["role"] != "admin":
            raise StoreError(f"{what} needs an active admin account")
        return recorded["name"], by.id

    def _target(self, conn, name: str) -> tuple[int, str, str | None]:
        """(id, role, disabled_at) of the account called ``name``, row-locked on PostgreSQL."""
        row = conn.execute(text("SELECT id, role, disabled_at FROM accounts WHERE name = :n" + self.store.for_update),
                           {"n": name}).first()
        if row is None:
            raise StoreError(f"there is no account {name!r}")
        return row[0], row[1], row[2]

    @staticmethod
    def _keep_an_admin(conn, name: str, what: str) -> None:
        admins = conn.exec_driver_sql("SELECT COUNT(*) FROM accounts WHERE role = 'admin' "
                                      "AND disabled_at IS NULL").scalar_one()
        if admins <= 1:
            raise StoreError(f"{name!r} is the only active admin: add another admin first ({what} refused)")

    def add(self, name: str, role: str, password: str, by: Account | None = None) -> Account:
        """A new account. The first account must be an admin and may be made by anyone; later ones by
        an admin (``by``)."""
        name = check_name(name)
        if role not in ROLES:
            raise StoreError(f"role: {role!r} is not one of {', '.join(ROLES)}")
        digest = _hasher.hash(check_password(password, name))
        with self.store.engine.begin() as conn:
            self.store.lock(conn)
            first = conn.exec_driver_sql("SELECT COUNT(*) FROM accounts").scalar_one() == 0
            if first and role != "admin":
                raise StoreError("the first account must be an admin (--role admin): it manages the others")
            creator, creator_id = ("first admin", None) if first and by is None else \
                self._admin(conn, by, "adding an account")
            if conn.execute(text("SELECT 1 FROM accounts WHERE name = :n"), {"n": name}).first():
                raise StoreError(f"an account {name!r} exists already (disabled accounts keep their names)")
            now = _now()
            account_id = conn.execute(text("INSERT INTO accounts (name, role, password_hash, created_at, created_by) "
                                           "VALUES (:n, :r, :h, :t, :b) RETURNING id"),
                                      {"n": name, "r": role, "h": digest, "t": now, "b": creator}).scalar_one()
            chain.account_event(conn, account_id, "add", creator, creator_id, now)
        return self.get(name)

    def disable(self, name: str, by: Account | None = None) -> Account:
        """Disable an account: it can no longer sign in and its sessions end; its history stays."""
        name = check_text(name, "account name", NAME_MAX)
        with self.store.engine.begin() as conn:
            self.store.lock(conn)
            who, who_id = self._admin(conn, by, "disabling an account")
            account_id, role, disabled_at = self._target(conn, name)
            if disabled_at is not None:
                raise StoreError(f"the account {name!r} is disabled already (since {disabled_at})")
            if role == "admin":
                self._keep_an_admin(conn, name, "disabling it")
            now = _now()
            chain.account_event(conn, account_id, "disable", who, who_id, now, disabled_at=now)
            conn.execute(text("UPDATE sessions SET ended = 1 WHERE account_id = :i"), {"i": account_id})
        return self.get(name)

    def enable(self, name: str, by: Account | None = None) -> Account:
        """Enable a disabled account again (its failed sign-ins are forgotten)."""
        name = check_text(name, "account name", NAME_MAX)
        with self.store.engine.begin() as conn:
            self.store.lock(conn)
            who, who_id = self._admin(conn, by, "enabling an account")
            account_id, _, disabled_at = self._target(conn, name)
            if disabled_at is None:
                raise StoreError(f"the account {name!r} is active already")
            chain.account_event(conn, account_id, "enable", who, who_id, _now(), disabled_at=None)
            throttle.clear(conn, name)
        return self.get(name)

    def set_role(self, name: str, role: str, by: Account | None = None) -> Account:
        """Give an account another role; the last active admin keeps being one."""
        name = check_text(name, "account name", NAME_MAX)
        if role not in ROLES:
            raise StoreError(f"role: {role!r} is not one of {', '.join(ROLES)}")
        with self.store.engine.begin() as conn:
            self.store.lock(conn)
            who, who_id = self._admin(conn, by, "changing a role")
            account_id, old_role, disabled_at = self._target(conn, name)
            if old_role == role:
                raise StoreError(f"the account {name!r} is a{'n' if role[0] in 'aeiou' else ''} {role} already")
            if old_role == "admin" and disabled_at is None:
                self._keep_an_admin(conn, name, f"making it a {role}")
            chain.account_event(conn, account_id, "role", who, who_id, _now(), role=role)
        return self.get(name)

    def set_password(self, name: str, password: str, by: Account | None = None,
                     current_password: str | None = None) -> Account:
        """A new password: set by an admin, or by the account itself with its current password.  The
        account's sign-ins end."""
        name = check_text(name, "account name", NAME_MAX)
        digest = _hasher.hash(check_password(password, name))
        with self.store.engine.begin() as conn:
            self.store.lock(conn)
            account_id, _, _ = self._target(conn, name)
            if by is not None and getattr(by, "id", None) == account_id:
                recorded = verified_account(conn, account_id, "changing a password")
                stored = conn.execute(text("SELECT password_hash FROM accounts WHERE id = :i"),
                                      {"i": account_id}).scalar_one()
                if recorded["disabled_at"] is not None or not _verify(stored, current_password or ""):
                    raise StoreError("changing your password needs your current password (and an active account)")
                who, who_id = recorded["name"], account_id
            else:
                who, who_id = self._admin(conn, by, "setting another account's password")
            chain.account_event(conn, account_id, "password", who, who_id, _now(), password_hash=digest)
            conn.execute(text("UPDATE sessions SET ended = 1 WHERE account_id = :i"), {"i": account_id})
        return self.get(name)

    # -- signing in -------------------------------------------------------------------------------
    def authenticate(self, name: str, password: str) -> Account:
        """The account, if the password is right.  Every name, an account's or not, is counted and
        locked alike (``throttle.claim``, before the password is looked at) and gets the same answers
        after the same Argon2 work, so the answers do not tell which accounts exist."""
        name = (name or "").strip() if isinstance(name, str) else ""
        password = password if isinstance(password, str) else ""
        now = time.time()
        locked_until = throttle.claim(self.store, name, now) if name else None
        if locked_until is not None:
            shown = name[:NAME_MAX] + ("…" if len(name) > NAME_MAX else "")
            raise StoreError(f"too many failed sign-ins for {shown!r}: try again in {int(locked_until - now) + 1} s")
        row = None
        if name and len(name) <= NAME_MAX and not any(ord(c) < 32 for c in name):
            with self.store.engine.connect() as conn:
                row = conn.execute(text("SELECT id, password_hash, disabled_at FROM accounts WHERE name = :n"),
                                   {"n": name}).first()
        if row is None:
            _verify(_DUMMY_HASH, password)     # the same work as for a real account
            raise StoreError(WRONG)
        account_id, digest, disabled_at = row
        if not _verify(digest, password):
            raise StoreError(WRONG)
        if disabled_at is not None:
            raise StoreError(f"the account {name!r} is disabled (since {disabled_at})")
        with self.store.engine.begin() as conn:
            verified_account(conn, account_id, "signing in")      # a hash swapped by raw SQL lets nobody in
            throttle.clear(conn, name)
        if _hasher.check_needs_rehash(digest):
            self._rehash(account_id, digest, _hasher.hash(password))
        return self.get(name)

    def _rehash(self, account_id: int, old_hash: str, new_hash: str) -> None:
        """A hash made with other Argon2 parameters is redone (an account event, like any new hash)."""
        with self.store.engine.begin() as conn:
            self.store.lock(conn)
            row = conn.execute(text("SELECT name, password_hash FROM accounts WHERE id = :i"), {"i": account_id}).one()
            if row[1] == old_hash:          # not changed meanwhile
                chain.account_event(conn, account_id, "rehash", row[0], account_id, _now(), password_hash=new_hash)

    def sign_in(self, name: str, password: str) -> Session:
        account = self.authenticate(name, password)
        key = self.store.session_key()
        token = secrets.token_urlsafe(32)
        digest = sessions.token_hash(key, token)
        now = time.time()
        expires = now + self.session_s
        with self.store.engine.begin() as conn:
            # sessions over for a day, and names whose failures are a day old, are of no further use
            conn.execute(text("DELETE FROM sessions WHERE expires_at < :old OR (ended = 1 AND last_seen < :old)"),
                         {"old": now - 86400.0})
            throttle.forget_old(conn, now, skip_locked=self.store.dialect == "postgresql")
            conn.execute(text("INSERT INTO sessions (token_hash, account_id, created_at, expires_at, last_seen, seal) "
                              "VALUES (:h, :a, :c, :e, :c, :s)"),
                         {"h": digest, "a": account.id, "c": now, "e": expires,
                          "s": sessions.seal(key, digest, account.id, now, expires)})
        return Session(token, account, expires)

    def session(self, token: str) -> Account:
        """The account of a live session; raises StoreError saying why a session is over.  A session
        row without the store's seal (written behind the planner's back) signs nobody in."""
        if not isinstance(token, str) or not token:
            raise StoreError("not signed in")
        key = self.store.session_key()
        digest = sessions.token_hash(key, token)
        with self.store.engine.connect() as conn:
            row = conn.execute(text("SELECT token_hash, account_id, created_at, expires_at, seal, last_seen, ended "
                                    "FROM sessions WHERE token_hash = :h"), {"h": digest}).first()
        now = time.time()
        if row is None or row[6]:
            raise StoreError("your sign-in has ended: sign in again")
        _, account_id, _, expires_at, _, last_seen, _ = row
        if now >= expires_at or now - last_seen >= self.idle_s:        # refusing needs no seal
            self.sign_out(token)
            raise StoreError("your sign-in has expired: sign in again")
        if not sessions.sealed(key, row[:5]):
            raise StoreError("your sign-in does not carry this server's seal (a session record written behind the "
                             "planner's back, or made with another session key): sign in again")
        with self.store.engine.connect() as conn:
            account = Account(*conn.execute(text(_ACCOUNT_SQL + "WHERE id = :i"), {"i": account_id}).first())
            verified_account(conn, account_id, "your sign-in")
        if not account.active:
            raise StoreError(f"the account {account.name!r} is disabled")
        if now - last_seen > 30:
            with self.store.engine.begin() as conn:
                conn.execute(text("UPDATE sessions SET last_seen = :t WHERE token_hash = :h"), {"t": now, "h": digest})
        return account

    def sign_out(self, token: str) -> None:
        if not token:
            return
        digest = sessions.token_hash(self.store.session_key(), token)
        with self.store.engine.begin() as conn:
            conn.execute(text("UPDATE sessions SET ended = 1 WHERE token_hash = :h"), {"h": digest})


def _verify(digest: str, password: str) -> bool:
    try:
        return _hasher.verify(digest, password)
    except (VerifyMismatchError, VerificationError, InvalidHashError):
        return False
