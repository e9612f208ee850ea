"""The Inputs view's sections, one function per sub-tab (product, route, tracing, pump, vessels, site and
limits, costs and schedule)."""

from __future__ import annotations

import streamlit as st

from planner.scenario.labels import field_label
from planner.scenario.presets import PRODUCT_PRESETS
from planner.scenario.wording import Q, Sentence, render
from planner.scenario.schema import (Destination, ProductSpec, PumpSpec, Route, Tracing, Schedule, Vessel,
                                     ViscositySpec, field_choices)

from dashboard.compute.results import product_preview
from dashboard.present import figures
from dashboard.present.display import fit_quality_text, law_parameters_text, words
from dashboard.present.plaintext import escaped

from .fields import Problems, _wkey, checkbox, get_path, locked, number, select, show_problems, system, text, work
from .table_editor import CURVE_COLUMNS, LAB_POINT_COLUMNS, SEGMENT_COLUMNS, _new_segment, table

OWN_PRODUCT = "(own lab data)"

# ------------------------------------------------------------------------------------------ sections

def _change_preset(key: str) -> None:
    choice = st.session_state.get(key)
    data = work()
    product = data.get("product") or {}
    if choice == OWN_PRODUCT:
        try:
            full = ProductSpec.model_validate(product).model_dump(mode="json", exclude_none=True)
        except Exception:  # noqa: BLE001  (invalid product: keep what is there)
            full = dict(product)
        full.pop("preset", None)
        full["illustrative"] = False
        data["product"] = full
    else:
        data["product"] = ProductSpec.model_validate({"preset": choice}).model_dump(mode="json", exclude_none=True)
    st.session_state["gen"] = st.session_state.get("gen", 0) + 1


def product_section(c, problems: Problems) -> None:
    product = work().get("product") or {}
    options = sorted(PRODUCT_PRESETS) + [OWN_PRODUCT]
    current = product.get("preset") if product.get("preset") in PRODUCT_PRESETS else OWN_PRODUCT
    key = _wkey("product.preset")
    c.selectbox("Product", options, index=options.index(current), key=key, on_change=_change_preset, args=(key,),
                format_func=lambda k: PRODUCT_PRESETS[k]["name"] if k in PRODUCT_PRESETS else k,
                disabled=locked(),
                help="a preset (illustrative figures) or your own lab data; fields edited below override the preset")
    show_problems(c, problems, "product.preset", "Product")
    if product.get("illustrative"):
        c.info("Preset figures are illustrative, not a data sheet: enter your product's lab data before a real transfer.")
    left, right = c.columns([6, 5])
    text(left, problems, "product.name")
    select(left, problems, "product.viscosity.law", field_choices(ViscositySpec, "law"),
           help="andrade: 2+ points; vft: 3+ points; walther (ASTM D341, oils): 2+ points")
    table(left, problems, "product.viscosity.points", "Lab points", LAB_POINT_COLUMNS, lambda items: {},
          row_name=lambda item, i: f"point {i + 1}", help="one viscosity per row, dynamic or kinematic")
    show_problems(left, problems, "product.viscosity", "Viscosity")
    curve, _ = product_preview(product)
    if curve is not None:
        right.plotly_chart(figures.viscosity_figure(curve, system(), height=380, compact=True),
                           key="product_preview_chart")
        right.caption(escaped(f"Fitted {words(curve['law'])} law ({law_parameters_text(curve)}); "
                            f"{fit_quality_text(curve)}. Outside the shaded range the law is extrapolated."))
    else:
        right.info("The curve appears when the product's fields are valid (see the messages on the left).")
    a, b, d = c.columns(3)
    number(a, problems, "product.density", "density")
    number(a, problems, "product.density_reference_temperature", "temperature")
    number(a, problems, "product.specific_heat", "specific_heat")
    number(b, problems, "product.thermal_conductivity", "conductivity")
    number(b, problems, "product.no_flow_temperature", "temperature",
           help="pour, setting or crystallisation temperature")
    number(b, problems, "product.max_temperature", "temperature")
    number(d, problems, "product.flash_point", "temperature")
    select(d, problems, "product.rheology", field_choices(ProductSpec, "rheology"))
    if product.get("rheology", "newtonian") != "newtonian":
        number(d, problems, "product.flow_index", None)
        number(d, problems, "product.yield_stress", "yield_stress")


def route_section(c, problems: Problems) -> None:
    select(c, problems, "route.fitting_method", field_choices(Route, "fitting_method"),
           help="Hooper 2-K or Darby 3-K loss coefficients")
    table(c, problems, "route.segments", "Discharge route (pump to destination)", SEGMENT_COLUMNS, _new_segment,
          row_name=lambda item, i: item.get("name") or f"segment {i + 1}",
          help="add a row at the bottom, delete with the row's checkbox")
    if work().get("suction") is not None:
        table(c, problems, "suction.segments", "Suction route (source to pump)", SEGMENT_COLUMNS, _new_segment,
              row_name=lambda item, i: item.get("name") or f"segment {i + 1}")
    else:
        c.caption("No suction route: the pump sits at the source outlet.")
    show_problems(c, problems, "route", "Discharge route")
    show_problems(c, problems, "suction", "Suction route")


def tracing_section(c, problems: Problems) -> None:
    tracing = work().get("tracing") or {}
    kind = tracing.get("kind", "none")
    a, b = c.columns(2)
    select(a, problems, "tracing.kind", field_choices(Tracing, "kind"))
    number(a, problems, "tracing.setpoint", "temperature", help="thermostat setpoint on the pipe wall",
           label=field_label("tracing.setpoint") + (" (optional for steam)" if kind == "steam" else ""))
    if kind in ("electric_constant", "electric_self_regulating"):
        at_10c = render(Sentence(" at {t} pipe", t=Q(283.15, "temperature", 0)), system())
        number(a, problems, "tracing.output", "linear_power",
               label=field_label("tracing.output") + (at_10c if kind == "electric_self_regulating" else ""))
    if kind == "electric_self_regulating":
        number(b, problems, "tracing.zero_output_temperature", "temperature")
    if kind == "steam":
        number(a, problems, "tracing.steam_pressure", "pressure")
        checkbox(b, problems, "tracing.heat_transfer_cement")
    if kind != "none":
        number(b, problems, "tracing.circuits_per_metre", None, decimals=1)
        number(b, problems, "tracing.max_exposure_temperature", "temperature")
    show_problems(c, problems, "tracing", "Tracing")


def pump_section(c, problems: Problems) -> None:
    pump = work().get("pump")
    if pump is None:
        c.warning("The scenario has no pump: the plan needs one (add a [pump] table to the file).")
        show_problems(c, problems, "pump", "Pump")
        return
    a, b = c.columns(2)
    select(a, problems, "pump.kind", field_choices(PumpSpec, "kind"))
    text(a, problems, "pump.name")
    number(a, problems, "pump.speed", "rotational_speed")
    number(a, problems, "pump.max_speed", "rotational_speed")
    number(b, problems, "pump.motor_power", "power")
    number(b, problems, "pump.npsh_required", "length")
    select(b, problems, "pump.control", field_choices(PumpSpec, "control"))
    if pump.get("control") == "fixed_flow":
        number(b, problems, "pump.flow_setpoint", "volume_flow")
    if pump.get("kind") == "centrifugal":
        table(c, problems, "pump.curve", "Water curve (first point at zero flow)", CURVE_COLUMNS, lambda items: {},
              row_name=lambda item, i: f"point {i + 1}")
    else:
        number(a, problems, "pump.displacement", "displacement")
        number(b, problems, "pump.slip_flow", "volume_flow")
        number(b, problems, "pump.slip_reference_pressure", "pressure", help="the differential the slip was measured at")
        number(b, problems, "pump.slip_reference_viscosity", "dynamic_viscosity",
               help="the viscosity the slip was measured at; slip scales inversely with viscosity from it")
        number(b, problems, "pump.relief_setting", "pressure")
        number(a, problems, "pump.mechanical_efficiency", None, decimals=2)
    show_problems(c, problems, "pump", "Pump")


def vessels_section(c, problems: Problems) -> None:
    a, b = c.columns(2)
    a.markdown("**Source**")
    source = work().get("source") or {}
    select(a, problems, "source.kind", field_choices(Vessel, "kind"))
    text(a, problems, "source.name")
    select(a, problems, "source.shape", field_choices(Vessel, "shape"))
    shape = source.get("shape", "vertical_cylinder")
    if shape in ("horizontal_cylinder", "vertical_cylinder"):
        number(a, problems, "source.diameter", "length")
    if shape in ("horizontal_cylinder", "box"):
        number(a, problems, "source.length", "length")
    if shape == "box":
        number(a, problems, "source.width", "length")
    number(a, problems, "source.initial_volume", "volume")
    number(a, problems, "source.volume_to_move", "volume")
    number(a, problems, "source.temperature", "temperature")
    number(a, problems, "source.outlet_height", "length")
    number(a, problems, "source.pressure", "pressure", help="empty: 0, open to the air")
    number(a, problems, "source.heat_loss_coefficient", "heat_transfer_coefficient")
    number(a, problems, "source.heating_power", "power")
    select(a, problems, "source.heating_medium", field_choices(Vessel, "heating_medium"))
    if get_path(work(), "source.heating_medium") == "electric":
        number(a, problems, "source.heating_limit_temperature", "temperature",
               help="the contents are not heated past this; empty: the product's maximum")
    else:
        number(a, problems, "source.heating_steam_pressure", "pressure",
               help="the contents are not heated past its saturation temperature; empty: the tracing's steam, else 3.5 bar")
    show_problems(a, problems, "source", "Source")
    b.markdown("**Destination**")
    text(b, problems, "destination.name")
    number(b, problems, "destination.diameter", "length")
    number(b, problems, "destination.initial_level", "length")
    number(b, problems, "destination.max_level", "length")
    select(b, problems, "destination.inlet", field_choices(Destination, "inlet"))
    number(b, problems, "destination.pressure", "pressure", help="empty: 0, an open (atmospheric) tank")
    number(b, problems, "destination.max_pressure", "pressure",
           help="a gas pressure above it stops the plan; empty: not checked")
    show_problems(b, problems, "destination", "Destination")


def site_section(c, problems: Problems) -> None:
    a, b = c.columns(2)
    a.markdown("**Site and weather**")
    number(a, problems, "site.ambient_temperature", "temperature")
    number(a, problems, "site.wind_speed", "speed")
    number(a, problems, "site.design_ambient_temperature", "temperature",
           help="the coldest ambient the plan must hold at; empty: the ambient")
    show_problems(a, problems, "site", "Site")
    b.markdown("**Limits of the checks**")
    number(b, problems, "limits.touch_temperature", "temperature")
    number(b, problems, "limits.npsh_margin", "length")
    number(b, problems, "limits.max_velocity", "speed")
    number(b, problems, "limits.min_velocity", "speed")
    number(b, problems, "limits.flash_point_margin", "temperature_difference")
    number(b, problems, "limits.poor_film_coefficient", "heat_transfer_coefficient",
           help="an inner film coefficient below this in laminar flow is reported as poor heat transfer")
    show_problems(b, problems, "limits", "Limits")


def costs_section(c, problems: Problems) -> None:
    a, b = c.columns(2)
    a.markdown("**Tariffs and demurrage**")
    text(a, problems, "costs.currency")
    number(a, problems, "costs.electricity_per_kwh", None, decimals=3)
    number(a, problems, "costs.steam_per_tonne", None, decimals=2)
    number(a, problems, "costs.demurrage_per_hour", None, decimals=2)
    show_problems(a, problems, "costs", "Costs")
    b.markdown("**Planned window and start-up**")
    number(b, problems, "schedule.planned_window", "time")
    select(b, problems, "schedule.start_mode", field_choices(Schedule, "start_mode"))
    number(b, problems, "schedule.line_start_temperature", "temperature",
           help="empty: the design ambient")
    number(b, problems, "schedule.stop_duration", "time")
    show_problems(b, problems, "schedule", "Schedule")


