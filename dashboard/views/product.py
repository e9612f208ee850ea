"""The Product view: the viscosity law against its lab points, and the product's figures."""

from __future__ import annotations

import streamlit as st

from dashboard.present import figures

from .common import data_table
import pandas as pd

from planner.scenario.wording import format_quantity

from dashboard.present.display import fit_quality_text, fmt, law_parameters_text, to_display, with_unit, words
from dashboard.present.plaintext import escaped_table
from .page import Page


NEEDS_RESULTS = True


def draw(page: Page) -> None:
    results, unit_system = page.results, page.unit_system
    curve = results.product
    at_20c = format_quantity(293.15, "temperature", unit_system, 0)     # where the product's figures are given
    st.plotly_chart(figures.viscosity_figure(curve, unit_system), key="product_chart")
    rows = [
        ("Product", curve["name"] + (" — illustrative preset" if curve.get("illustrative")
                                     and "illustrative" not in curve["name"].lower() else "")),
        ("Law", f"{words(curve['law'])} ({law_parameters_text(curve)})"),
        ("Fit", fit_quality_text(curve)),
        ("Calibration", "none: the law as fitted" if curve.get("viscosity_factor", 1.0) == 1.0 else
         f"viscosity × {curve['viscosity_factor']:.4g} (the scenario's [calibration]) at every temperature"),
        ("Fitted range", f"{fmt(curve.get('t_min'), 'temperature', unit_system)} to "
                         f"{fmt(curve.get('t_max'), 'temperature', unit_system)}"),
        ("No-flow temperature", fmt(curve["no_flow_temperature"], "temperature", unit_system)),
        ("Highest allowed temperature", fmt(curve["max_temperature"], "temperature", unit_system)),
        (f"Density at {at_20c}", fmt(curve["density_at_20c"], "density", unit_system)),
        (f"Specific heat at {at_20c}", fmt(curve["specific_heat_at_20c"], "specific_heat", unit_system)),
        (f"Thermal conductivity at {at_20c}", fmt(curve["conductivity_at_20c"], "conductivity", unit_system)),
        ("Rheology", words(curve["rheology"])),
    ]
    inlet = curve.get("at_pump_inlet")
    if inlet is not None:
        rows.insert(5, (f"Viscosity at the pump inlet at the start ({fmt(inlet['temperature_k'], 'temperature', unit_system)})",
                        f"{fmt(inlet['viscosity_pa_s'], 'dynamic_viscosity', unit_system)} · "
                        f"{fmt(inlet['kinematic_m2_s'], 'kinematic_viscosity', unit_system)}"))
    st.table(escaped_table(pd.DataFrame(rows, columns=["Item", "Value"])), hide_index=True)
    points = pd.DataFrame({
        with_unit("Temperature", "temperature", unit_system):
            [to_display(t, "temperature", unit_system) for t in curve["lab_temperature"]],
        with_unit("Viscosity", "dynamic_viscosity", unit_system):
            [to_display(v, "dynamic_viscosity", unit_system) for v in curve["lab_viscosity"]],
        with_unit("Kinematic viscosity", "kinematic_viscosity", unit_system):
            [to_display(v, "kinematic_viscosity", unit_system) for v in curve.get("lab_kinematic") or []],
    })
    st.markdown("#### Lab points (edit them under Inputs → Product)")
    data_table(points, 2)
