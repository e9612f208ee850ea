"""Cached planner calls for the pages, keyed by the scenario's canonical JSON text.

The JSON text is ``planner.scenario.schema.scenario_to_json`` of the validated scenario, so unchanged
inputs (in any unit system) hit the cache and do not recompute.  Planner errors come back as
``{"error": message}`` (cached too); they are never raised into the page.
"""

from __future__ import annotations

import logging

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


@st.cache_data(show_spinner=False, max_entries=16)
def cached_comparison(scenario_json: str, lever: str, values_si: tuple, sensitivity: bool, _progress=None) -> dict:
    try:
        scenario = parse_scenario_text(scenario_json, "json")
        return run_comparison(scenario, lever, list(values_si), progress=_progress, sensitivity=sensitivity)
    except (PlannerError, ValueError, ArithmeticError) as exc:
        return {"error": str(exc)}
    except Exception as exc:  # noqa: BLE001
        log.exception("comparison failed")
        return {"error": f"the comparison failed unexpectedly ({type(exc).__name__}: {exc})"}
