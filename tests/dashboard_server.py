"""Start and stop a real dashboard server (``streamlit run dashboard/app.py``) for the browser tests.

One definition for tests/test_browser.py and tests/test_multi_server.py: the server runs in its own
process group (so the comparison workers it forks stop with it), listens on 127.0.0.1, and is ready when
``/_stcore/health`` answers "ok".
"""

from __future__ import annotations

import os
import signal
import socket
import subprocess
import sys
import time
import urllib.request
from contextlib import contextmanager
from pathlib import Path

from conftest import ROOT


def start_dashboard(port: int, log_path: Path, env: dict[str, str]):
    """A server on ``port`` with ``env`` (the whole environment); returns (process, open log file)."""
    log = open(log_path, "w")
    proc = subprocess.Popen(
        [sys.executable, "-m", "streamlit", "run", "dashboard/app.py", "--server.headless", "true",
         "--server.port", str(port), "--server.address", "127.0.0.1"],
        cwd=ROOT, stdout=log, stderr=subprocess.STDOUT, start_new_session=True, env=env)
    return proc, log


def wait_healthy(base: str, proc, log_path: Path, timeout_s: float = 120.0) -> None:
    deadline = time.monotonic() + timeout_s
    while True:
        try:
            with urllib.request.urlopen(base + "/_stcore/health", timeout=2) as response:
                if response.read().decode().strip() == "ok":
                    return
        except OSError:
            pass
        if proc.poll() is not None or time.monotonic() > deadline:
            raise RuntimeError(f"a dashboard server did not start:\n{log_path.read_text()[-3000:]}")
        time.sleep(0.3)


def stop_dashboard(proc, log) -> None:
    """The server's own process group: the server and any comparison workers it forked."""
    try:
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait(timeout=15)
    except ProcessLookupError:
        pass
    except subprocess.TimeoutExpired:
        os.killpg(proc.pid, signal.SIGKILL)
        proc.wait(timeout=15)
    log.close()


def free_port() -> int:
    """A TCP port free on 127.0.0.1 now (the system's choice)."""
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@contextmanager
def running_dashboard(db_path: Path, **env: str):
    """A server on a free port whose plans file is ``db_path`` (its log beside it), with ``env`` added to the
    environment; yields its address and stops it (and its workers) on exit."""
    port = free_port()
    log_path = db_path.parent / f"server-{port}.log"
    proc, log = start_dashboard(port, log_path, dict(os.environ, PLANNER_DB_PATH=str(db_path), **env))
    url = f"http://127.0.0.1:{port}"
    try:
        wait_healthy(url, proc, log_path)
        yield url
    finally:
        stop_dashboard(proc, log)


@contextmanager
def chromium_browser(executable: Path, args: list[str]):
    """Debian's Chromium driven by Playwright, closed on exit."""
    from playwright.sync_api import sync_playwright

    playwright = sync_playwright().start()
    chromium = None
    try:
        chromium = playwright.chromium.launch(executable_path=str(executable), args=args)
        yield chromium
    finally:
        if chromium is not None:
            chromium.close()
        playwright.stop()
