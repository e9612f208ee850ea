"""A throwaway PostgreSQL 15 server for the tests, started from the Debian server binaries.

``PgServer.start()`` runs ``initdb`` and ``pg_ctl start`` in a new folder under the system temp folder,
listening on a free port on 127.0.0.1 and on a unix socket in that folder, with ``trust``
authentication for the test role only on this machine.  PostgreSQL refuses to run as root, so when the
tests run as root the server runs as an unprivileged system user (``nobody``, or ``planner-pg``,
created with ``useradd`` if neither exists) through ``runuser``; the folder is handed to that user.
``stop()`` shuts it down (fast mode) and removes the folder.  ``new_database()`` gives each test a
database of its own.

Outside CI a server that cannot start makes the PostgreSQL tests skip with the reason; with CI=true it
fails them (``tests/conftest.py``).
"""

from __future__ import annotations

import os
import pwd
import shutil
import socket
import subprocess
import tempfile
import uuid
from pathlib import Path

PG_BIN = Path(os.environ.get("PLANNER_PG_BIN", "/usr/lib/postgresql/15/bin"))
ROLE = "planner_test"


class PgUnavailable(RuntimeError):
    """The server binaries are missing or the server did not start; the message says which."""


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _server_user() -> str | None:
    """None when not root (run as ourselves); else an unprivileged user, created if needed."""
    if os.geteuid() != 0:
        return None
    for name in ("nobody", "planner-pg"):
        try:
            pwd.getpwnam(name)
            return name
        except KeyError:
            continue
    subprocess.run(["useradd", "--system", "--no-create-home", "--shell", "/usr/sbin/nologin", "planner-pg"],
                   check=True, capture_output=True)
    return "planner-pg"


class PgServer:
    def __init__(self):
        self.folder: Path | None = None
        self.port = 0
        self.user: str | None = None
        self.started = False

    def _run(self, *argv: str, timeout: float = 120) -> subprocess.CompletedProcess:
        command = [str(a) for a in argv]
        if self.user:
            command = ["runuser", "-u", self.user, "--", *command]
        return subprocess.run(command, capture_output=True, text=True, timeout=timeout, cwd=self.folder)

    def start(self) -> "PgServer":
        for binary in ("initdb", "pg_ctl", "postgres"):
            if not (PG_BIN / binary).exists():
                raise PgUnavailable(f"{PG_BIN / binary} is missing (apt-get install postgresql)")
        self.user = _server_user()
        self.folder = Path(tempfile.mkdtemp(prefix="planner-pg-"))
        if self.user:
            shutil.chown(self.folder, user=self.user)
        os.chmod(self.folder, 0o700)
        data = self.folder / "data"
        done = self._run(PG_BIN / "initdb", "-D", data, "-U", ROLE, "--auth=trust", "-E", "UTF8", "--no-locale")
        if done.returncode != 0:
            raise PgUnavailable(f"initdb failed: {done.stderr.strip()[-1500:]}")
        self.port = _free_port()
        options = (f"-p {self.port} -k {self.folder} -c listen_addresses=127.0.0.1 -c fsync=off "
                   "-c synchronous_commit=off -c full_page_writes=off -c max_connections=100")
        done = self._run(PG_BIN / "pg_ctl", "-D", data, "-l", self.folder / "server.log", "-o", options, "-w",
                         "-t", "60", "start")
        if done.returncode != 0:
            log = (self.folder / "server.log").read_text(errors="replace")[-1500:] if (
                self.folder / "server.log").exists() else ""
            raise PgUnavailable(f"pg_ctl start failed: {done.stdout.strip()} {done.stderr.strip()} {log}")
        self.started = True
        return self

    def url(self, database: str = "postgres") -> str:
        return f"postgresql+psycopg://{ROLE}@127.0.0.1:{self.port}/{database}"

    def new_database(self) -> str:
        """A fresh, empty database; returns its SQLAlchemy URL."""
        import psycopg

        name = "t_" + uuid.uuid4().hex[:16]
        with psycopg.connect(host="127.0.0.1", port=self.port, user=ROLE, dbname="postgres",
                             autocommit=True) as conn:
            conn.execute(f'CREATE DATABASE "{name}"')
        return self.url(name)

    def stop(self) -> None:
        if self.folder is None:
            return
        if self.started:
            self._run(PG_BIN / "pg_ctl", "-D", self.folder / "data", "-m", "fast", "-w", "stop", timeout=60)
            self.started = False
        shutil.rmtree(self.folder, ignore_errors=True)
        self.folder = None
