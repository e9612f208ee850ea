"""Dashboard entry point: ``python3 -m streamlit run dashboard/app.py``.

One run of the page, top to bottom (every widget change is a new run): the session's state
(``state.py``; on its first run the address is read, ``url_state``), the lock of an approved revision
(``services/revisions``), the inputs validated by the planner, the plan (``compute/cache``: cached by the
scenario's canonical JSON, worked out in a worker process, ``compute/workers``), the sidebar
(``sidebar.py``), the top of the page (``header.py``), then the open tab only (``views/``, one module per
view), and last the address written back (``url_state.sync_address``).
"""

from __future__ import annotations

import copy
import logging
import sys
from pathlib import Path

import streamlit as st

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

# first: importing the cache starts the first worker, which loads the planner while the imports below run
from dashboard.compute.cache import cached_results  # noqa: E402
from dashboard import header, loading, sidebar, state, url_state  # noqa: E402
from dashboard.compute.record import ok  # noqa: E402
from dashboard.present.display import caution_text  # noqa: E402
from dashboard.present.plaintext import escaped  # noqa: E402
from dashboard.services import revisions  # noqa: E402
from dashboard.views import TAB_TITLES, VIEW_NAMES, view_module  # noqa: E402
from dashboard.views.inputs import Problems  # noqa: E402
from dashboard.views.page import Page  # noqa: E402
from planner.errors import ScenarioError  # noqa: E402
from planner.scenario.derived_units import derived_values_in  # noqa: E402
from planner.scenario.schema import Scenario, scenario_from_dict, scenario_to_json  # noqa: E402

log = logging.getLogger("dashboard")


def validate(work: dict) -> tuple[Scenario | None, str | None, list[tuple[str, str]]]:
    """The validated scenario and its canonical JSON (the cache key), or the problems."""
    try:
        scenario = scenario_from_dict(copy.deepcopy(work))
    except ScenarioError as exc:
        return None, None, list(exc.problems)
    except (ValueError, TypeError, KeyError, AttributeError) as exc:
        return None, None, [("", f"the scenario cannot be read: {exc}")]
    return scenario, scenario_to_json(scenario), []


def plan_results(problem_list: list, scenario_json: str | None):
    """The plan of the inputs (or its failure), the results to show (the last good ones while the inputs
    have problems) and the problems with the planner's own added."""
    ss = st.session_state
    planned = None
    if scenario_json is not None:
        with st.spinner("Working out the plan…"):
            planned = cached_results(scenario_json)
        if ok(planned):
            ss["last_good"] = {"json": scenario_json, "loaded": ss.get("loaded", 0), "source": header.source_text(),
                               "name": planned.scenario_name}
        elif planned.problems:
            problem_list = problem_list + [tuple(p) for p in planned.problems]
    shown = planned if ok(planned) else None
    if shown is None and ss.get("last_good"):
        last = cached_results(ss["last_good"]["json"])
        shown = last if ok(last) else None
    return planned, shown, problem_list


def draw_view(name: str, page: Page) -> None:
    """One tab: its module draws it; a result view greyed while its results are not of the inputs on screen."""
    module = view_module(name)
    if not module.NEEDS_RESULTS:
        module.draw(page)
        return
    if page.results is None:
        st.info("No results to show.")
        return
    box = st.container(key=f"stale_{name}" if page.stale else f"view_{name}")
    if page.stale:
        box.caption(f"(greyed: from {header.stale_note()})")
    with box:
        module.draw(page)


def main() -> None:
    st.set_page_config(page_title="Viscous Transfer Planner", layout="wide", page_icon=header.page_icon())
    st.markdown(header.PAGE_CSS, unsafe_allow_html=True)
    loading.init_state()
    revisions.apply_lock()
    unit_system = state.unit_system()
    with derived_values_in(unit_system):   # a value a change derived (a picked row), refused: the user's units
        _draw(unit_system)


def _draw(unit_system: str) -> None:
    scenario, scenario_json, problem_list = validate(state.work())
    planned, shown, problem_list = plan_results(problem_list, scenario_json)
    stale = not ok(planned)
    page = Page(scenario, scenario_json, shown, stale, Problems(problem_list), unit_system, loading.set_work)

    sidebar.sidebar(scenario, scenario_json, planned, unit_system)
    header.page_header(scenario, unit_system, problem_list, planned, stale, shown)
    with st.container(key="stale_results" if stale else "results"):
        if shown is not None:
            header.key_figures_strip(shown, unit_system)
        else:
            st.info("No results yet: fix the inputs to see the plan.")

    tabs = st.tabs(TAB_TITLES, key="view", on_change="rerun")
    for tab, name in zip(tabs, VIEW_NAMES):
        if tab.open is False:
            continue
        with tab:
            try:
                draw_view(name, page)
            except Exception as exc:  # noqa: BLE001  (never a traceback on the page)
                log.exception("view %s failed", name)
                st.error(f"This view could not be drawn ({type(exc).__name__}: {escaped(exc)}). "
                         "The other views still work.")
    st.caption(caution_text(unit_system, header.touch_limit(scenario, shown)))
    url_state.sync_address()


main()
