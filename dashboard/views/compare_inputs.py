"""The comparison's own inputs beside the lever: the sensitivity shifts (the comparison's defaults, the
work budget's limits: the same ones ``compare --ambient-shift / --viscosity-uncertainty`` checks) and
the default values of the lever as text, at the display decimals of ``planner.scenario.wording.DECIMALS``."""

from __future__ import annotations

import streamlit as st

from planner.scenario.budget import active_budget
from planner.checks.lever_values import lever_decimals

from dashboard.compute.results import sensitivity_defaults
from dashboard.present.display import from_display, label, to_display

SMALLEST_SHIFT_K = 0.1          # a shift the page lets one type; zero is the case as given
SMALLEST_PERCENT = 1.0


def values_text(values_si, kind: str, unit_system: str) -> str:
    """The lever's values as the Values box shows them: the decimals the comparison table shows."""
    digits = lever_decimals(kind, values_si, system=unit_system)
    return ", ".join(f"{to_display(v, kind, unit_system):.{digits}f}" for v in values_si)


def sensitivity_controls(column, unit_system: str):
    """The sensitivity box and, when ticked, its two shifts (defaults: the comparison's own, limits: the
    work budget's); False or (ambient shift [K], viscosity fraction)."""
    gen = st.session_state.get("gen", 0)
    on = column.checkbox("With sensitivity", value=False, key=f"cmp_sens{gen}",
                         help="also at a colder and a warmer ambient and a thinner and a thicker product "
                              "(five times the work)")
    if not on:
        return False
    shift_k, fraction = sensitivity_defaults()
    budget = active_budget()
    kind = "temperature_difference"
    shift = column.number_input(
        f"Ambient ± [{label(kind, unit_system)}]", min_value=to_display(SMALLEST_SHIFT_K, kind, unit_system),
        max_value=to_display(budget.max_ambient_shift_k, kind, unit_system),
        value=to_display(shift_k, kind, unit_system), step=1.0, format="%.1f", key=f"cmp_shift{gen}|{unit_system}",
        help="the ambient shifted down and up by this much (command line: --ambient-shift, in K)")
    percent = column.number_input(
        "Viscosity ± [%]", min_value=SMALLEST_PERCENT, max_value=budget.max_viscosity_uncertainty * 100.0,
        value=fraction * 100.0, step=5.0, format="%.0f", key=f"cmp_visc{gen}",
        help="the viscosity scaled down and up by this share (command line: --viscosity-uncertainty)")
    return (float(from_display(shift, kind, unit_system)), float(percent) / 100.0)
