"""The plans database of this server: opened on first use, once per process and database URL.

``db_url()``: ``st.secrets["planner_db_url"]`` or ``["planner_db_path"]``, else ``PLANNER_DB_URL``, else
``PLANNER_DB_PATH``, else ``data/plans.sqlite`` (``planner.records.store.database_url`` checks it);
``store()`` the ``PlanStore``; ``store_exists()`` lets the account panel say "no accounts yet" without
creating the SQLite file.  The records layer (SQLAlchemy) is imported only when a store is opened.
"""

from __future__ import annotations

import logging
from pathlib import Path

import streamlit as st

from planner.records.terms import StoreError, database_url

log = logging.getLogger(__name__)


def _secret(key: str):
    try:
        if key in st.secrets:
            return st.secrets[key]
    except Exception:  # noqa: BLE001  (no secrets file: st.secrets raises on access)
        return None
    return None


def db_url() -> str:
    """The plans database: ``st.secrets["planner_db_url"]`` (an SQLAlchemy URL) or
    ``st.secrets["planner_db_path"]`` (an SQLite file), else ``PLANNER_DB_URL``, else ``PLANNER_DB_PATH``,
    else ``data/plans.sqlite``. Raises StoreError for a URL or path that is refused."""
    url, path = _secret("planner_db_url"), _secret("planner_db_path")
    if url:
        return database_url(url=str(url))
    if path:
        return database_url(path=Path(str(path)).expanduser())
    return database_url()


@st.cache_resource(show_spinner=False)
def _open_store(url: str):
    from planner.records.store import PlanStore      # SQLAlchemy: only once a page needs the database

    return PlanStore(url=url)


def store():
    """The process's store for the configured database (opened on first use only). Raises StoreError."""
    url = db_url()
    try:
        return _open_store(url)
    except StoreError:
        raise
    except Exception as exc:  # noqa: BLE001  (unwritable folder, damaged file, ...)
        log.exception("plans database cannot be opened")
        raise StoreError(f"the plans database cannot be opened ({type(exc).__name__}: {exc})") from None


def store_exists() -> bool:
    """False only for an SQLite file not made yet (a fresh install: nothing saved, no accounts)."""
    url = db_url()
    if url.startswith("sqlite:///"):
        return Path(url[len("sqlite:///"):]).exists()
    return True
