"""Drafts: the unsaved edits of a session, kept on the server so that a refresh or a dropped connection
does not lose them.  The address names the draft (``draft=<id>``, ``url_state``); the id is 128 random
bits, so it cannot be guessed, and it carries no secret beyond the edits themselves (like a share link).

A draft is never a saved plan: it is a JSON file of its own (``<id>.json`` in the drafts folder: beside the
SQLite plans file, or ``PLANNER_DRAFTS_DIR``), holding the working dict as edited (problems and all), where
it came from, and the saved revision it was opened from (``open_rev``, ``rev_work``).  Saving a plan still
goes through ``PlanStore.save`` and makes a new revision; a draft only ever overwrites its own file.
Drafts not written for ``DRAFT_DAYS`` days are removed when another draft is written.
"""

from __future__ import annotations

import json
import os
import re
import secrets
import time
from pathlib import Path

from planner.records.terms import StoreError

DRAFT_ID = re.compile(r"^[A-Za-z0-9_-]{22}$")
MAX_DRAFT_BYTES = 1_000_000          # a scenario's dict is a few kB; a link's is at most 256 kB
DRAFT_DAYS = 30
_last_sweep = [0.0]


def drafts_dir() -> Path:
    """``PLANNER_DRAFTS_DIR``, else ``drafts/`` beside the SQLite plans file, else ``data/drafts``."""
    if os.environ.get("PLANNER_DRAFTS_DIR"):
        return Path(os.environ["PLANNER_DRAFTS_DIR"]).expanduser()
    from .store import db_url

    try:
        url = db_url()
    except StoreError:
        url = ""
    if url.startswith("sqlite:///"):
        return Path(url[len("sqlite:///"):]).parent / "drafts"
    return Path("data") / "drafts"


def new_id() -> str:
    return secrets.token_urlsafe(16)


def _path(draft_id: str) -> Path:
    if not isinstance(draft_id, str) or not DRAFT_ID.match(draft_id):
        raise StoreError("the link's draft id is not valid (22 letters, digits, - or _)")
    return drafts_dir() / f"{draft_id}.json"


def write_draft(draft_id: str, content: dict) -> None:
    """Write (or replace) this session's draft. Raises StoreError when it is too large or cannot be written."""
    text = json.dumps(content, ensure_ascii=False, separators=(",", ":"))
    if len(text.encode()) > MAX_DRAFT_BYTES:
        raise StoreError(f"the unsaved edits are too large to keep as a draft (at most {MAX_DRAFT_BYTES:,} bytes)")
    path = _path(draft_id)
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        temporary = path.with_suffix(".tmp")
        temporary.write_text(text, encoding="utf-8")
        os.replace(temporary, path)          # whole or not at all
    except OSError as exc:
        raise StoreError(f"the draft cannot be written ({type(exc).__name__})") from None
    _sweep(path.parent)


def read_draft(draft_id: str) -> dict:
    """The draft named by an address (untrusted id). Raises StoreError when there is none or it is unreadable."""
    path = _path(draft_id)
    try:
        if path.stat().st_size > MAX_DRAFT_BYTES:
            raise StoreError("the draft is too large")
        content = json.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise StoreError("this draft is no longer kept (drafts are kept for "
                         f"{DRAFT_DAYS} days after their last edit, on the server that made them)") from None
    except (OSError, ValueError) as exc:
        raise StoreError(f"the draft cannot be read ({type(exc).__name__})") from None
    if not isinstance(content, dict) or not isinstance(content.get("work"), dict):
        raise StoreError("the draft cannot be read (not a draft)")
    return content


def _sweep(folder: Path) -> None:
    """Remove drafts older than DRAFT_DAYS (at most once an hour per process)."""
    now = time.time()
    if now - _last_sweep[0] < 3600:
        return
    _last_sweep[0] = now
    for path in folder.glob("*.json"):
        try:
            if now - path.stat().st_mtime > DRAFT_DAYS * 86400:
                path.unlink()
        except OSError:
            continue
