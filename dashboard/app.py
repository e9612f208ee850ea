"""Dashboard entry point: ``python3 -m streamlit run dashboard/app.py``.

Layout: the sidebar holds the scenario (demo picker, file import), the unit system, the exports and
the place for saving and sharing; the page shows the caution, the plan's key figures and the views
as tabs (Plan, Inputs, Along the line, Over time, Setpoint comparison, Product, Review). Only the open
tab runs, so an edit recomputes the plan (cached by the scenario's JSON text) and redraws one tab.
Saved plans, share links and review are in ``sharing.py``; a link in the address opens on the first run.
"""

from __future__ import annotations

import copy
import logging
import re
import sys
from pathlib import Path

import streamlit as st

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

# first: importing compute starts the first worker, which loads the planner while the imports below run
from dashboard.compute import cached_bundle  # noqa: E402
from dashboard import inputs, tables, views  # noqa: E402
from dashboard.plaintext import escaped  # noqa: E402
from dashboard.display import SYSTEM_NAMES, caution_text  # noqa: E402
from dashboard.report import build_report_html  # noqa: E402
from dashboard import sharing  # noqa: E402
from dashboard import calibration_view  # noqa: E402
from dashboard.sharing import save_share_review  # noqa: E402
from planner.errors import ScenarioError  # noqa: E402
from planner.scenario.schema import (  # noqa: E402
    Scenario, load_scenario, read_scenario_data, scenario_from_dict, scenario_to_dict, scenario_to_json,
    scenario_to_toml)

DEMO_DIR = ROOT / "demo_scenarios"
DEMO_FILES = sorted(DEMO_DIR.glob("*.toml"))
VIEWS = views.TAB_TITLES            # one tab per view a link can name (planner.records.links.VIEWS)
DEMO_PREFIX = "demo file "
log = logging.getLogger("dashboard")


# ------------------------------------------------------------------------------------------ loading

def _set_work(data: dict, source: str) -> None:
    st.session_state["work"] = data
    st.session_state["source"] = source
    if not source.startswith(DEMO_PREFIX):
        st.session_state["demo_choice"] = None      # the picker no longer names a demo that is not shown
    st.session_state["gen"] = st.session_state.get("gen", 0) + 1
    st.session_state["loaded"] = st.session_state.get("loaded", 0) + 1     # counts scenarios loaded
    st.session_state["table_gen"] = {}
    st.session_state.pop("comparison", None)
    sharing.forget_open_revision()              # another scenario: no saved revision is open any more


def load_demo(path: Path) -> None:
    try:
        _set_work(scenario_to_dict(load_scenario(path)), f"{DEMO_PREFIX}{path.name}")
        st.session_state["load_message"] = None
    except ScenarioError as exc:
        st.session_state["load_message"] = ("error", f"{path.name}: {exc}")
        st.session_state["demo_choice"] = None


def _on_demo_change() -> None:
    name = st.session_state.get("demo_choice")
    for path in DEMO_FILES:
        if path.name == name:
            load_demo(path)


def _on_upload(key: str) -> None:
    upload = st.session_state.get(key)
    if upload is None:
        return
    name = upload.name
    try:   # read_scenario_data: bounded size, nesting refused with a message (planner.scenario.schema)
        text = upload.getvalue().decode("utf-8")
        data = read_scenario_data(text, "json" if name.lower().endswith(".json") else "toml")
    except UnicodeDecodeError as exc:
        st.session_state["load_message"] = ("error", f"{name} cannot be read: {exc}")
        return
    except ScenarioError as exc:
        st.session_state["load_message"] = ("error", f"{name}: {exc.problems[0][1]}")
        return
    if not isinstance(data, dict):
        st.session_state["load_message"] = ("error", f"{name}: a scenario must be a table/object at the top level")
        return
    try:
        data = scenario_to_dict(scenario_from_dict(data))
        st.session_state["load_message"] = ("success", f"loaded {name}")
    except ScenarioError as exc:
        st.session_state["load_message"] = ("warning", f"loaded {name} with {len(exc.problems)} problem(s): "
                                                       "see the messages beside the inputs")
    _set_work(data, f"imported file {name}")


def init_state() -> None:
    if "work" not in st.session_state:
        st.session_state["unit_system"] = st.session_state.get("unit_system", "SI")
        if DEMO_FILES:
            st.session_state["demo_choice"] = DEMO_FILES[0].name
        # a share link (query parameters) opens its scenario or saved revision; else the first demo
        sharing.read_link_once(_set_work, lambda: load_demo(DEMO_FILES[0]) if DEMO_FILES else None)
        if "work" not in st.session_state:
            st.session_state["work"] = {}
            st.session_state["source"] = "no scenario"


# ------------------------------------------------------------------------------------------ validation

def validate(work: dict) -> tuple[Scenario | None, str | None, list[tuple[str, str]]]:
    """The validated scenario and its canonical JSON (the cache key), or the problems."""
    try:
        scenario = scenario_from_dict(copy.deepcopy(work))
    except ScenarioError as exc:
        return None, None, list(exc.problems)
    except (ValueError, TypeError, KeyError, AttributeError) as exc:
        return None, None, [("", f"the scenario cannot be read: {exc}")]
    return scenario, scenario_to_json(scenario), []


# ------------------------------------------------------------------------------------------ sidebar

def _slug(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9]+", "-", text).strip("-").lower()[:60] or "plan"


def sidebar(scenario: Scenario | None, scenario_json: str | None, bundle: dict | None, unit_system: str) -> None:
    sb = st.sidebar
    sb.header("Scenario")
    names = [p.name for p in DEMO_FILES]
    sb.selectbox("Demo scenario", names, key="demo_choice", on_change=_on_demo_change,
                 placeholder="(not a demo: see below)",
                 help="invented scenarios of the fictional Larkspur Quay terminal")
    if sb.button("Reload the demo (drop my edits)", key="reload_demo",
                 disabled=st.session_state.get("demo_choice") is None):
        _on_demo_change()
        st.rerun()
    upload_key = "upload"
    sb.file_uploader("Import a scenario file", type=["toml", "json"], key=upload_key, on_change=_on_upload,
                     args=(upload_key,), help="the same TOML/JSON files `python -m planner` reads")
    message = st.session_state.get("load_message")
    if message:
        getattr(sb, message[0])(escaped(message[1]))
    sb.caption("Working on: " + escaped(source_text()))
    sb.header("Units")
    sb.radio("Unit system", list(SYSTEM_NAMES), format_func=SYSTEM_NAMES.get, key="unit_system", horizontal=True,
             help="applies to every input, result, table, chart and export")
    sb.header("Export")
    if scenario is not None:
        sb.download_button("Scenario file (TOML)", data=lambda: scenario_to_toml(scenario, unit_system), file_name=f"{_slug(scenario.name)}.toml",
                           mime="application/toml", key="dl_toml", width="stretch")
    else:
        sb.caption("The scenario file can be exported once the inputs are valid.")
    if scenario is not None and bundle is not None and "error" not in bundle:
        slug = _slug(scenario.name)
        saved_envelope = st.session_state.get("envelope") or {}
        envelope = saved_envelope.get("result") if saved_envelope.get("json") == scenario_json else None
        sb.download_button("Plan report (HTML, opens offline)" + (" with the envelope card" if envelope else ""),
                           data=lambda: build_report_html(scenario, bundle, unit_system, envelope=envelope),
                           file_name=f"plan-{slug}.html", mime="text/html", key="dl_report", width="stretch")
        if bundle.get("profile") is not None:
            sb.download_button("Profile along the line (CSV)",
                               data=lambda: tables.csv_text(tables.profile_frame(bundle["profile"], bundle["segments"], unit_system)),
                               file_name=f"profile-{slug}-{unit_system}.csv", mime="text/csv", key="dl_profile", width="stretch")
        sb.download_button("Timeline (CSV)", data=lambda: tables.csv_text(tables.timeline_frame(bundle["plan"], unit_system)),
                           file_name=f"timeline-{slug}-{unit_system}.csv", mime="text/csv", key="dl_timeline", width="stretch")
    sb.header("Save / share / review")
    save_share_review(sb, scenario_json, bundle)


# ------------------------------------------------------------------------------------------ page

PAGE_CSS = """<style>
div[class*="st-key-stale_"] { opacity: 0.45; filter: grayscale(100%); }
/* key figures: a smaller value font on narrow screens, wrapped rather than cut off */
[data-testid="stMetricValue"] { font-size: clamp(1.3rem, 1.85vw, 2.1rem); }
[data-testid="stMetricValue"] *, [data-testid="stMetricDelta"] *, [data-testid="stMetricLabel"] * {
    white-space: normal !important; overflow: visible !important; text-overflow: clip !important; }
[data-testid="stMetricDelta"] { max-width: 100%; height: auto; }
</style>"""


def source_text() -> str:
    """What the page shows: the open saved revision with its state now (it may have been approved
    since it was opened), else where the working scenario came from."""
    return sharing.open_revision_text() or st.session_state.get("source", "")


@st.cache_resource(show_spinner=False)
def page_icon():
    """A small drawn icon (a drum): served by this server, unlike an emoji icon, which the browser
    would fetch as an image from elsewhere."""
    from PIL import Image, ImageDraw

    image = Image.new("RGBA", (32, 32), (0, 0, 0, 0))
    draw = ImageDraw.Draw(image)
    draw.rounded_rectangle((6, 3, 26, 29), radius=4, fill=(31, 97, 141, 255))
    for y in (11, 21):
        draw.line((6, y, 26, y), fill=(214, 234, 248, 255), width=2)
    return image


def plan_results(problem_list: list, scenario_json: str | None) -> tuple[dict | None, dict | None, list]:
    """The plan of the inputs (or its error), the results to show (the last good ones while the inputs
    have problems) and the problems with the planner's own added."""
    ss = st.session_state
    bundle = None
    if scenario_json is not None:
        with st.spinner("Working out the plan…"):
            bundle = cached_bundle(scenario_json)
        if "error" not in bundle:
            ss["last_good"] = {"json": scenario_json, "loaded": ss.get("loaded", 0), "source": source_text(),
                               "name": bundle.get("scenario_name", "")}
        elif bundle.get("problems"):
            problem_list = problem_list + [tuple(p) for p in bundle["problems"]]
    shown = bundle
    if (bundle is None or "error" in bundle) and ss.get("last_good"):
        shown = cached_bundle(ss["last_good"]["json"])
    return bundle, shown, problem_list


def stale_note() -> str:
    """Says whose results the greyed figures are: this scenario's last good inputs, or another scenario's."""
    last = st.session_state.get("last_good") or {}
    if last.get("loaded") == st.session_state.get("loaded", 0):
        return f"the last good inputs of this scenario ({escaped(last.get('name', ''))})"
    return (f"**another scenario**, “{escaped(last.get('name', ''))}” ({escaped(last.get('source', ''))}), "
            f"not {escaped(source_text())}")


def page_header(scenario: Scenario | None, unit_system: str, problem_list: list, bundle: dict | None,
                stale: bool, shown: dict | None) -> None:
    name = scenario.name if scenario is not None else (st.session_state["work"].get("name") or "scenario with problems")
    st.markdown(f"## Viscous Transfer Planner  \n**{escaped(name)}**")
    st.caption(f"{escaped(source_text())} — units: {SYSTEM_NAMES[unit_system]}")
    st.warning(caution_text(unit_system), icon="⚠️")
    sharing.page_notices()
    if problem_list:
        st.error(f"**The inputs have {len(problem_list)} problem(s)** — each message is shown beside its field "
                 "under Inputs:  \n" + "  \n".join(f"• {escaped(p or '(file)')}: {escaped(m)}" for p, m in problem_list[:8])
                 + ("  \n• …" if len(problem_list) > 8 else ""))
    if bundle is not None and "error" in bundle and not bundle.get("problems"):
        st.error(f"**No plan for these inputs:** {escaped(bundle['error'])}")
    if stale and shown is not None and "error" not in shown:
        st.info(f"The figures and views below are greyed: they are from {stale_note()}, until the problems are fixed.")


def draw_tab(title: str, scenario: Scenario | None, scenario_json: str | None, shown: dict | None,
             stale: bool, problems, unit_system: str) -> None:
    have_results = shown is not None and "error" not in shown
    if title == sharing.REVIEW_TAB:
        sharing.review_view(_set_work, unit_system)
    elif title == views.VIEW_TITLES["inputs"]:
        inputs.render_inputs(st.container(), problems)
    elif title == calibration_view.TAB:
        calibration_view.calibration_view(scenario, scenario_json, unit_system)
    elif title == views.VIEW_TITLES["compare"]:
        views.comparison_view(scenario, scenario_json if not stale else None, unit_system)
    elif not have_results:
        st.info("No results to show.")
    else:
        box = st.container(key=f"stale_{_slug(title)}" if stale else f"view_{_slug(title)}")
        if stale:
            box.caption(f"(greyed: from {stale_note()})")
        with box:
            {"Plan": views.plan_view, "Along the line": views.line_view, "Over time": views.time_view,
             "Product": views.product_view}[title](shown, unit_system)


def main() -> None:
    st.set_page_config(page_title="Viscous Transfer Planner", layout="wide", page_icon=page_icon())
    st.markdown(PAGE_CSS, unsafe_allow_html=True)
    init_state()
    sharing.apply_lock()
    unit_system = st.session_state.get("unit_system", "SI")
    scenario, scenario_json, problem_list = validate(st.session_state["work"])
    bundle, shown, problem_list = plan_results(problem_list, scenario_json)
    problems = inputs.Problems(problem_list)
    stale = bundle is None or "error" in bundle

    sidebar(scenario, scenario_json, bundle, unit_system)
    page_header(scenario, unit_system, problem_list, bundle, stale, shown)
    with st.container(key="stale_results" if stale else "results"):
        if shown is not None and "error" not in shown:
            views.key_figures_strip(shown, unit_system)
        else:
            st.info("No results yet: fix the inputs to see the plan.")

    tabs = st.tabs(VIEWS, key="view", on_change="rerun")
    for tab, title in zip(tabs, VIEWS):
        if tab.open is False:
            continue
        with tab:
            try:
                draw_tab(title, scenario, scenario_json, shown, stale, problems, unit_system)
            except Exception as exc:  # noqa: BLE001  (never a traceback on the page)
                log.exception("view %s failed", title)
                st.error(f"This view could not be drawn ({type(exc).__name__}: {escaped(exc)}). "
                         "The other views still work.")
    st.caption(caution_text(unit_system))


main()
