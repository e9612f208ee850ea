"""Dashboard entry point: ``python -m streamlit run dashboard/app.py``."""

from __future__ import annotations

import sys
from pathlib import Path

import streamlit as st

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from planner.errors import PlannerError  # noqa: E402
from planner.model import evaluate  # noqa: E402
from planner.report_text import STANDING_CAUTION  # noqa: E402
from planner.scenario import load_scenario  # noqa: E402

DEMO_DIR = ROOT / "demo_scenarios"

st.set_page_config(page_title="Viscous Transfer Planner", layout="wide")
st.title("Viscous Transfer Planner")
st.warning(STANDING_CAUTION)
files = sorted(DEMO_DIR.glob("*.toml"))
choice = st.selectbox("Scenario", files, format_func=lambda p: p.stem)
try:
    scenario = load_scenario(choice)
    result = evaluate(scenario)
except PlannerError as exc:
    st.error(str(exc))
    st.stop()
s = result.summary
st.subheader(scenario.name)
cols = st.columns(4)
cols[0].metric("Outlet temperature", f"{s.outlet_temperature_k - 273.15:.1f} °C")
cols[1].metric("Pressure drop", f"{s.pressure_drop_pa / 1e5:.2f} bar")
cols[2].metric("Hottest jacket", f"{s.max_jacket_temperature_k - 273.15:.1f} °C")
cols[3].metric("Trace power", f"{s.trace_power_w / 1e3:.1f} kW")
