"""Cached planner calls for the pages, keyed by the scenario's canonical JSON text.

The JSON text is ``planner.scenario.schema.scenario_to_json`` of the validated scenario, so unchanged
inputs (in any unit system) hit the cache and do not recompute.  A miss runs in the bounded worker
pool of ``dashboard.compute.workers`` (one computation per session, a time limit per request, never in the
server process).  A plan comes back as the typed record (``compute/record``: ``PlanResults`` or ``PlanFailure``); the other
jobs as plain data or ``{"error": message}``. Failures of the planner are cached too; a computation
stopped at its time limit, or refused while every worker is busy, is ``transient`` and not cached, so
pressing the button again tries again.
"""

from __future__ import annotations

import copy
import threading
from collections import OrderedDict

import streamlit as st

from .record import Outcome, outcome
from .workers import pool

pool(warm=True)     # the first worker loads the planner while the server imports the page's modules
                    # (app.py imports this module first); the others start when first needed


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
def _plan(scenario_json: str) -> Outcome:
    return outcome(_run("plan", (scenario_json,)))


def cached_results(scenario_json: str) -> Outcome:
    """The plan of this scenario (``compute/results.plan_results``), or the failure in its place."""
    try:
        return _plan(scenario_json)
    except _NotCached as exc:
        return outcome(exc.result)


class _Memo:
    """A small process-wide store of finished comparisons (least recently used dropped first).

    The comparison is not an ``st.cache_data`` function on purpose: its progress bar is drawn while
    it runs, and elements drawn inside a cached function are recorded and replayed on the next hit,
    which fails for a bar created outside it (``CacheReplayClosureError``).  Here the computation
    draws nothing; the caller's ``progress`` callback is called only while a new comparison runs."""

    def __init__(self, max_entries: int = 16):
        self.max_entries = max_entries
        self.items: OrderedDict = OrderedDict()
        self.lock = threading.Lock()

    def get(self, key):
        with self.lock:
            if key not in self.items:
                return None
            self.items.move_to_end(key)
            return copy.deepcopy(self.items[key])

    def put(self, key, value) -> None:
        with self.lock:
            self.items[key] = copy.deepcopy(value)
            self.items.move_to_end(key)
            while len(self.items) > self.max_entries:
                self.items.popitem(last=False)


@st.cache_resource(show_spinner=False)
def _comparison_memo() -> _Memo:
    return _Memo()


def comparison_key(scenario_json: str, lever: str, values_si, sensitivity) -> tuple:
    """Values equal to 9 significant digits are the same comparison (SI and US entries of one value);
    ``sensitivity``: False or (ambient shift [K], viscosity fraction)."""
    shifts = tuple(float(f"{float(v):.9g}") for v in sensitivity) if isinstance(sensitivity, (list, tuple)) \
        else bool(sensitivity)
    return scenario_json, lever, tuple(float(f"{float(v):.9g}") for v in values_si), shifts


def cached_comparison_result(scenario_json: str, lever: str, values_si, sensitivity) -> dict | None:
    """The finished comparison for these inputs if this process has run it, else None."""
    return _comparison_memo().get(comparison_key(scenario_json, lever, values_si, sensitivity))


def comparison(scenario_json: str, lever: str, values_si, sensitivity, progress=None) -> dict:
    """``dashboard.compute.results.run_comparison`` as plain data, or ``{"error": ...}``; run once per process
    for the same inputs (a transient error, a time limit or a full pool, is not kept).

    ``progress(done, total)`` is called while a new comparison runs (never on a repeat)."""
    key = comparison_key(scenario_json, lever, values_si, sensitivity)
    found = _comparison_memo().get(key)
    if found is not None:
        return found
    result = pool().run("comparison", (scenario_json, lever, list(key[2]), key[3]), session=_session_id(),
                        progress=progress)
    if not result.get("transient"):
        _comparison_memo().put(key, result)
    return result


def remembered(kind: str, args: tuple) -> dict | None:
    """The finished result of the worker job ``kind`` (the odds: ``odds``, ``comparison_odds``) for these
    hashable ``args`` if this process has run it, else None."""
    return _comparison_memo().get((kind,) + tuple(args))


def run_remembered(kind: str, args: tuple, progress=None) -> dict:
    """The worker job ``kind`` (``compute/odds``) as plain data or ``{"error": ...}``, run once per process
    for the same ``args`` (kept as the comparisons are; a transient error is not kept).  ``progress(done,
    total)`` is called while it runs."""
    found = remembered(kind, args)
    if found is not None:
        return found
    result = pool().run(kind, tuple(args), session=_session_id(), progress=progress)
    if not result.get("transient"):
        _comparison_memo().put((kind,) + tuple(args), result)
    return result


@st.cache_data(show_spinner=False, max_entries=8)
def _calibration(fit_key: str, log_bytes: bytes, log_name: str, map_text: str, names: tuple) -> dict:
    return _run("calibration", (fit_key, log_bytes, log_name, map_text, list(names)))


def cached_calibration(fit_key: str, log_bytes: bytes, log_name: str, map_text: str, names: tuple) -> dict:
    """``dashboard.compute.calibration_data.fit_document`` (the Calibration tab's fit), or ``{"error": ...}``."""
    try:
        return _calibration(fit_key, log_bytes, log_name, map_text, names)
    except _NotCached as exc:
        return exc.result


@st.cache_data(show_spinner=False, max_entries=8)
def _envelope(scenario_json: str, lever: str, values_si: tuple, ambients_k: tuple) -> dict:
    return _run("envelope", (scenario_json, lever, list(values_si), list(ambients_k)))


def cached_envelope(scenario_json: str, lever: str, values_si: tuple, ambients_k: tuple) -> dict:
    """``planner.sweeps.envelope.envelope_json`` of the grid (SI), or ``{"error": ...}``."""
    try:
        return _envelope(scenario_json, lever, tuple(values_si), tuple(ambients_k))
    except _NotCached as exc:
        return exc.result
