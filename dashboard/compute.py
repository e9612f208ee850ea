"""Cached planner calls for the pages, keyed by the scenario's canonical JSON text.

The JSON text is ``planner.scenario.schema.scenario_to_json`` of the validated scenario, so unchanged
inputs (in any unit system) hit the cache and do not recompute.  A miss runs in the bounded worker
pool of ``dashboard.workers`` (one computation per session, a time limit per request, never in the
server process).  Planner errors come back as ``{"error": message}`` (cached too); a computation
stopped at its time limit, or refused while every worker is busy, comes back as an error with
``"transient": True`` and is not cached, so pressing the button again tries again.
"""

from __future__ import annotations

import streamlit as st

from .workers import pool

pool(warm=True)     # the fork server and workers start while the first page is laid out


class _NotCached(Exception):
    """Carries a transient result out of a cached function, so that Streamlit does not keep it."""

    def __init__(self, result: dict):
        super().__init__(result.get("error", ""))
        self.result = result


def _session_id() -> str:
    try:
        from streamlit.runtime.scriptrunner import get_script_run_ctx

        ctx = get_script_run_ctx()
        return ctx.session_id if ctx is not None else ""
    except Exception:  # noqa: BLE001  (outside a Streamlit run: one anonymous session)
        return ""


def _run(kind: str, args: tuple, progress=None) -> dict:
    result = pool().run(kind, args, session=_session_id(), progress=progress)
    if result.get("transient"):
        raise _NotCached(result)
    return result


@st.cache_data(show_spinner=False, max_entries=48)
def _bundle(scenario_json: str) -> dict:
    return _run("plan", (scenario_json,))


@st.cache_data(show_spinner=False, max_entries=16)
def _comparison(scenario_json: str, lever: str, values_si: tuple, sensitivity: bool, _progress=None) -> dict:
    return _run("comparison", (scenario_json, lever, list(values_si), sensitivity), progress=_progress)


def cached_bundle(scenario_json: str) -> dict:
    """The plan bundle of ``dashboard.results.build_bundle``, or ``{"error": ...}``."""
    try:
        return _bundle(scenario_json)
    except _NotCached as exc:
        return exc.result


def cached_comparison(scenario_json: str, lever: str, values_si: tuple, sensitivity: bool, _progress=None) -> dict:
    """``dashboard.results.run_comparison`` as plain data, or ``{"error": ...}``."""
    try:
        return _comparison(scenario_json, lever, values_si, sensitivity, _progress=_progress)
    except _NotCached as exc:
        return exc.result


@st.cache_data(show_spinner=False, max_entries=8)
def _calibration(fit_key: str, log_bytes: bytes, log_name: str, map_text: str, names: tuple) -> dict:
    return _run("calibration", (fit_key, log_bytes, log_name, map_text, list(names)))


def cached_calibration(fit_key: str, log_bytes: bytes, log_name: str, map_text: str, names: tuple) -> dict:
    """``dashboard.calibration_data.fit_document`` (the Calibration tab's fit), or ``{"error": ...}``."""
    try:
        return _calibration(fit_key, log_bytes, log_name, map_text, names)
    except _NotCached as exc:
        return exc.result
