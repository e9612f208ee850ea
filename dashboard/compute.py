"""Cached planner calls for the pages, keyed by the scenario's canonical JSON text.

The JSON text is ``planner.scenario.schema.scenario_to_json`` of the validated scenario, so unchanged
inputs (in any unit system) hit the cache and do not recompute.  Planner errors come back as
``{"error": message}`` (cached too); they are never raised into the page.
"""

from __future__ import annotations

import copy
import logging
import threading
from collections import OrderedDict

import streamlit as st

from planner.errors import PlannerError, ScenarioError
from planner.scenario.schema import parse_scenario_text

from .results import build_bundle, run_comparison

log = logging.getLogger(__name__)


@st.cache_data(show_spinner=False, max_entries=48)
def cached_bundle(scenario_json: str) -> dict:
    try:
        scenario = parse_scenario_text(scenario_json, "json")
        return build_bundle(scenario)
    except ScenarioError as exc:      # e.g. a plan needs [pump], [source] and [destination]
        return {"error": str(exc), "problems": list(exc.problems)}
    except (PlannerError, ValueError, ArithmeticError) as exc:
        return {"error": str(exc)}
    except Exception as exc:  # noqa: BLE001  (a bug must not put a traceback on the page)
        log.exception("plan failed")
        return {"error": f"the planner failed unexpectedly ({type(exc).__name__}: {exc}); "
                         "please report this scenario to the maintainers"}


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


def comparison_key(scenario_json: str, lever: str, values_si, sensitivity: bool) -> tuple:
    """Values equal to 9 significant digits are the same comparison (SI and US entries of one value)."""
    return scenario_json, lever, tuple(float(f"{float(v):.9g}") for v in values_si), bool(sensitivity)


def cached_comparison_result(scenario_json: str, lever: str, values_si, sensitivity: bool) -> dict | None:
    """The finished comparison for these inputs if this process has run it, else None."""
    return _comparison_memo().get(comparison_key(scenario_json, lever, values_si, sensitivity))


def comparison(scenario_json: str, lever: str, values_si, sensitivity: bool, progress=None) -> dict:
    """The comparison (``results.run_comparison``), run once per process for the same inputs.

    ``progress(done, total)`` is called while a new comparison runs (never on a repeat)."""
    key = comparison_key(scenario_json, lever, values_si, sensitivity)
    found = _comparison_memo().get(key)
    if found is not None:
        return found
    result = _run_comparison(scenario_json, lever, list(key[2]), sensitivity, progress)
    _comparison_memo().put(key, result)
    return result


def _run_comparison(scenario_json: str, lever: str, values_si: list, sensitivity: bool, progress) -> dict:
    try:
        scenario = parse_scenario_text(scenario_json, "json")
        return run_comparison(scenario, lever, values_si, progress=progress, sensitivity=sensitivity)
    except (PlannerError, ValueError, ArithmeticError) as exc:
        return {"error": str(exc)}
    except Exception as exc:  # noqa: BLE001
        log.exception("comparison failed")
        return {"error": f"the comparison failed unexpectedly ({type(exc).__name__}: {exc})"}
