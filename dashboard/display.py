"""Display units and number formatting for the dashboard and its report (no Streamlit here).

Every conversion goes through ``planner.units``: ``from_si`` / ``to_si_from_display`` for the kinds
of ``planner.scenario.units.UNIT_SYSTEMS`` and the package's pint registry for the few kinds shown in the same
unit in both systems (pump speed in rpm, displacement in litres, coefficients per m² or per m).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from planner.reports.text import STANDING_CAUTION
from planner.scenario.units import SI_UNITS, from_si, registry, to_si, to_si_from_display, unit_label

SYSTEM_NAMES = {"SI": "SI (metric)", "US": "US customary"}

# Shown in the same unit whatever the system: (label, pint unit).
FIXED_DISPLAY = {
    "rotational_speed": ("rpm", "revolution/minute"),
    "displacement": ("L", "L"),
    "heat_transfer_coefficient": ("W/(m²·K)", "W/m**2/K"),
    "linear_conductance": ("W/(m·K)", "W/m/K"),
    "density_slope": ("kg/m³ per K", "kg/m**3/K"),
    "yield_stress": ("Pa", "Pa"),
}
_SI_FOR_FIXED = {"rotational_speed": "revolution/second", "displacement": "m**3"}

EXTRA_CAUTION = (
    "Surfaces above about 60 °C burn on contact: guard or insulate them. Check hose and loading-arm "
    "ratings and their test dates before every transfer. Local codes, site procedures and the advice "
    "of a licensed engineer take precedence over this plan."
)
CAUTION_TEXT = STANDING_CAUTION + " " + EXTRA_CAUTION

DECIMALS = {
    "temperature": 1, "temperature_difference": 1, "pressure": 2, "volume_flow": 2, "volume": 1,
    "length": 1, "small_length": 1, "head": 2, "time": 2, "energy": 1, "mass": 0, "power": 2,
    "dynamic_viscosity": 1, "kinematic_viscosity": 1, "density": 1, "linear_power": 1, "speed": 2,
    "rotational_speed": 0, "displacement": 2, "heat_transfer_coefficient": 2, "specific_heat": 3,
    "conductivity": 3, "linear_conductance": 2,
}


def label(kind: str, system: str) -> str:
    """The unit label of ``kind`` in ``system`` ("SI" or "US")."""
    if kind in FIXED_DISPLAY:
        return FIXED_DISPLAY[kind][0]
    return unit_label(kind, system)


def to_display(si_value: float | None, kind: str, system: str) -> float | None:
    """SI float -> number in the display unit (None stays None)."""
    if si_value is None:
        return None
    if kind in FIXED_DISPLAY:
        si_unit = _SI_FOR_FIXED.get(kind) or SI_UNITS[kind]
        return float(registry().Quantity(si_value, si_unit).to(FIXED_DISPLAY[kind][1]).magnitude)
    return from_si(float(si_value), kind, system)


def from_display(value: float, kind: str, system: str) -> float:
    """Number in the display unit -> SI float."""
    if kind in FIXED_DISPLAY:
        si_unit = _SI_FOR_FIXED.get(kind) or SI_UNITS[kind]
        return float(registry().Quantity(value, FIXED_DISPLAY[kind][1]).to(si_unit).magnitude)
    return to_si_from_display(float(value), kind, system)


@lru_cache(maxsize=256)
def _affine(kind: str, system: str) -> tuple[float, float]:
    zero = to_display(0.0, kind, system)
    scale = (to_display(1000.0, kind, system) - zero) / 1000.0
    return zero, scale


def convert_array(values, kind: str, system: str) -> np.ndarray:
    """Convert an array of SI values (all display units are affine in SI)."""
    zero, scale = _affine(kind, system)
    array = np.asarray(values, dtype=float)
    return zero + scale * array


def si_string(si_value: float, kind: str) -> str:
    """An SI value as a scenario-file string with its unit, e.g. ``"328.15 K"``."""
    unit = SI_UNITS[kind]
    return f"{float(si_value):.12g} {unit}"


def stored_to_si(raw, kind: str) -> float | None:
    """A scenario-dict value (plain number in the default unit, or a unit string) -> SI float."""
    if raw is None:
        return None
    return to_si(raw, kind)


def number_text(value: float | None, decimals: int) -> str:
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "—"
    return f"{value:,.{decimals}f}"


def fmt(si_value: float | None, kind: str, system: str, decimals: int | None = None) -> str:
    """``"12.34 m³/h"``; "—" for a missing value."""
    if si_value is None or (isinstance(si_value, float) and not math.isfinite(si_value)):
        return "—"
    digits = DECIMALS.get(kind, 2) if decimals is None else decimals
    return f"{number_text(to_display(si_value, kind, system), digits)} {label(kind, system)}"


def with_unit(text: str, kind: str | None, system: str) -> str:
    """A column or axis title with its unit in brackets."""
    if kind is None:
        return text
    return f"{text} [{label(kind, system)}]"


# ---------------------------------------------------------------------------------------------
# Key figures: the numbers at the top of every page, from the documented plan JSON.

J_PER_KWH = 3.6e6


@dataclass
class KeyFigure:
    key: str
    label: str
    si: float | None
    kind: str | None
    text: str
    note: str = ""
    help: str = ""


def peak_discharge_pressure(plan: dict) -> float | None:
    """Highest gauge pressure at the pump discharge in the plan JSON: over the transfer timeline and
    over the push-out that starts it (the cold contents when the plan starts by pushing them out;
    the pre-warmed contents when the JSON carries ``startup.after_prewarm``)."""
    if plan.get("peak_discharge_pressure_pa") is not None:
        return plan["peak_discharge_pressure_pa"]
    arrays = plan["timeline"].get("arrays") or {}
    values = [v for v in arrays.get("discharge_pressure_pa", []) if v is not None]
    start = plan["start"].get("discharge_pressure_pa")
    if start is not None:
        values.append(start)
    startup = plan["startup"]
    pushes = []
    if startup.get("mode") == "push_cold":
        pushes.append(startup.get("push_cold") or {})
    else:
        pushes.append(startup.get("after_prewarm") or {})
    for push in pushes:
        if push.get("possible") and push.get("peak_discharge_pressure_pa") is not None:
            values.append(push["peak_discharge_pressure_pa"])
    return max(values) if values else None


def key_figures(plan: dict, rating: dict | None, system: str) -> list[KeyFigure]:
    """The plan's key figures in the display system, with stable labels."""
    start = plan["start"]
    timeline = plan["timeline"]
    energy = plan["energy"]
    costs = plan["costs"]
    window = plan.get("planned_window_s")
    figures = []
    transfer = timeline.get("total_time_s")
    note = "" if timeline.get("completed") else "stopped: " + (timeline.get("stop_reason") or "")
    figures.append(KeyFigure("transfer_time", "Transfer time", transfer, "time", fmt(transfer, "time", system), note,
                             "pumping time from the first to the last increment (start-up not included)"))
    total = plan.get("total_time_s")
    figures.append(KeyFigure("total_time", "Start-up + transfer", total, "time", fmt(total, "time", system),
                             f"window {fmt(window, 'time', system)}" if window else "",
                             "start-up (pre-warm or push-cold) plus transfer, against the planned window"))
    flow = start.get("flow_m3_s") if start.get("status") != "no_flow" else 0.0
    figures.append(KeyFigure("start_flow", "Starting flow", flow, "volume_flow", fmt(flow, "volume_flow", system),
                             start.get("status", ""), "pump and line agree at this flow at the start"))
    peak = peak_discharge_pressure(plan)
    limit = (rating or {}).get("value")
    if limit:
        share = f" ({100.0 * peak / limit:.0f} %)" if peak is not None else ""
        rating_note = f"rating {fmt(limit, 'pressure', system)}{share}"
    else:
        rating_note = "no rating known at the pump outlet"
    figures.append(KeyFigure("peak_pressure", "Peak discharge pressure", peak, "pressure", fmt(peak, "pressure", system),
                             rating_note, "highest gauge pressure at the pump discharge over the transfer and the "
                             "push-out that starts it, against the rating at the pump outlet"
                             + (f" ({rating.get('where')})" if limit and rating.get("where") else "")))
    margin = start.get("npsh_margin_m")
    figures.append(KeyFigure("npsh_margin", "NPSH margin", margin, "head", fmt(margin, "head", system),
                             f"required {fmt(start.get('npsh_required_m'), 'head', system)}",
                             "NPSH available minus required at the start"))
    kwh = (energy.get("tracing_kwh") or 0.0) + (energy.get("pump_kwh") or 0.0) + (energy.get("vessel_heating_kwh") or 0.0)
    figures.append(KeyFigure("electrical_energy", "Electrical energy", kwh * J_PER_KWH, "energy",
                             fmt(kwh * J_PER_KWH, "energy", system), "tracing + pump + vessel heating"))
    steam = (energy.get("tracing_steam_kg") or 0.0) + (energy.get("vessel_heating_steam_kg") or 0.0)
    figures.append(KeyFigure("steam", "Steam", steam, "mass", fmt(steam, "mass", system), "tracing + vessel heating"))
    currency = costs.get("currency", "")
    total_cost = costs.get("total")
    figures.append(KeyFigure("total_cost", "Total cost", total_cost, None, f"{number_text(total_cost, 2)} {currency}",
                             f"demurrage {number_text(costs.get('demurrage'), 2)} {currency}",
                             "energy at the tariffs plus demurrage"))
    return figures


def seconds_text(seconds: float | None) -> str:
    """Durations in hours (both systems) for sentences."""
    if seconds is None:
        return "—"
    return f"{seconds / 3600.0:.2f} h"


# ---------------------------------------------------------------------------------------------
# Words for codes and numbers of any size (tables and selects show words, never raw codes or None)

WORDS = {
    # pump and line outcomes (planner.transfer.system), start-up modes, heater and vessel choices
    "ok": "ok", "relief_lifting": "relief valve lifting", "no_flow": "no flow", "product_sets": "product sets",
    "rate_not_reachable": "flow setpoint not reachable", "prewarm": "pre-warm the line",
    "push_cold": "push the cold contents out", "positive_displacement": "positive displacement",
    "fixed_speed": "fixed speed", "fixed_flow": "fixed flow", "electric_constant": "electric, constant wattage",
    "electric_self_regulating": "electric, self-regulating", "none": "none", "loading_arm": "loading arm",
    "horizontal_cylinder": "horizontal cylinder", "vertical_cylinder": "vertical cylinder",
    "herschel_bulkley": "Herschel–Bulkley", "power_law": "power law", "newtonian": "Newtonian",
    "andrade": "Andrade", "vft": "Vogel–Fulcher–Tammann", "walther": "Walther (ASTM D341)",
    "hooper": "Hooper 2-K", "darby": "Darby 3-K", "mineral_wool": "mineral wool",
    "calcium_silicate": "calcium silicate", "carbon_steel": "carbon steel", "stainless_steel": "stainless steel",
    "rubber_hose": "rubber hose", "composite_hose": "composite hose",
}


def words(code) -> str:
    """A code (``relief_lifting``) as words (``relief valve lifting``); None as "—", booleans as yes/no."""
    if code is None or (isinstance(code, float) and not math.isfinite(code)):
        return "—"
    if isinstance(code, bool):
        return "yes" if code else "no"
    text = str(code)
    return WORDS.get(text, text.replace("_", " "))


def general_number(value: float | None, significant: int = 4) -> str:
    """A number of any size without an exponent: ``25,822``, ``14.99``, ``0.01234``; "—" when missing."""
    if value is None or not math.isfinite(float(value)):
        return "—"
    magnitude = abs(float(value))
    if magnitude == 0.0:
        return "0"
    exponent = math.floor(math.log10(magnitude))
    if exponent >= significant - 1:
        return f"{value:,.0f}"
    return f"{value:,.{min(15, significant - 1 - exponent)}f}"


def law_parameters_text(curve: dict) -> str:
    """``a = -6.831, b = 948.6, c = 211.3``: the fitted law's parameters without exponents."""
    return ", ".join(f"{k} = {general_number(v, 5)}" for k, v in curve["parameters"].items())


def fit_quality_text(curve: dict) -> str:
    """How well the law fits its lab points, in words a person reads."""
    rms = curve["rms_log_residual"]
    rms_text = "below 0.001" if rms < 1e-3 else f"{rms:.3f}"
    return (f"RMS log residual {rms_text}; largest deviation {100 * curve['max_relative_residual']:.1f} % "
            f"over {curve['n_points']} points")
