"""Loading a scenario into the session: the first run (the address, else the first demo), the demo
picker, a file import.  ``set_work`` is the one way a whole scenario replaces the working one: it closes
the open saved revision and starts the input widgets afresh."""

from __future__ import annotations

from pathlib import Path

import streamlit as st

from planner.errors import ScenarioError
from planner.scenario.schema import load_scenario, read_scenario_data, scenario_from_dict, scenario_to_dict

from dashboard import state, url_state
from dashboard.compute.demos import DEMO_DIR, DEMO_FILES  # noqa: F401  (the one list of demos)
from dashboard.services import revisions

ROOT = Path(__file__).resolve().parents[1]


DEMO_PREFIX = "demo file "


def set_work(data: dict, source: str) -> None:
    st.session_state["work"] = data
    st.session_state["source"] = source
    # the picker names the demo shown, and no demo when the scenario is not one
    st.session_state["demo_choice"] = source[len(DEMO_PREFIX):] if source.startswith(DEMO_PREFIX) else None
    state.new_generation()
    st.session_state["loaded"] = st.session_state.get("loaded", 0) + 1     # counts scenarios loaded
    st.session_state.pop("comparison", None)
    revisions.forget_open_revision()              # another scenario: no saved revision is open any more


def load_demo(path: Path) -> None:
    try:
        set_work(scenario_to_dict(load_scenario(path)), f"{DEMO_PREFIX}{path.name}")
        st.session_state["load_message"] = None
    except ScenarioError as exc:
        st.session_state["load_message"] = ("error", f"{path.name}: {exc}")
        st.session_state["demo_choice"] = None


def on_demo_change() -> None:
    name = st.session_state.get("demo_choice")
    for path in DEMO_FILES:
        if path.name == name:
            load_demo(path)


def on_upload(key: str) -> None:
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
    set_work(data, f"imported file {name}")


def init_state() -> None:
    if "work" not in st.session_state:
        st.session_state["unit_system"] = st.session_state.get("unit_system", "SI")
        if DEMO_FILES:
            st.session_state["demo_choice"] = DEMO_FILES[0].name
        # a share link (query parameters) opens its scenario or saved revision; else the first demo
        url_state.read_address_once(set_work, lambda: load_demo(DEMO_FILES[0]) if DEMO_FILES else None)
        if "work" not in st.session_state:
            st.session_state["work"] = {}
            st.session_state["source"] = "no scenario"
