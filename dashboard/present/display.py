"""Display units, number formatting and the page's caution for the dashboard and its report (no Streamlit here).

Every conversion goes through ``planner.scenario.units``: ``from_si`` / ``to_si_from_display`` for the kinds
of ``planner.scenario.units.UNIT_SYSTEMS`` and the package's pint registry for the few kinds shown in the same
unit in both systems (pump speed in rpm, displacement in litres, coefficients per m² or per m).
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from planner.checks.caution import STANDING_CAUTION
from planner.scenario.wording import DECIMALS, Q, Sentence, render  # noqa: F401  (DECIMALS: the one table)
from planner.scenario.units import (SI_UNITS, UNIT_SYSTEMS, from_si, registry, to_si, to_si_from_display, unit_label,
                                    unit_text)
from planner.transfer.operating import OUTCOME_WORDS

SYSTEM_NAMES = {"SI": "SI (metric)", "US": "US customary"}

# Shown in the same unit whatever the system: (label, pint unit); the label is the unit's one spelling
# (planner.scenario.units.unit_text).  Only kinds the unit table (planner.scenario.units.UNIT_SYSTEMS) has
# no display unit for: a kind the table has takes the table's unit (BTU/(h·ft²·°F) in US, not W/(m²·K)).
FIXED_DISPLAY = {kind: (unit_text(unit), unit) for kind, unit in {
    "displacement": "L",
    "linear_conductance": "W/m/K",
    "density_slope": "kg/m**3/K",
    "yield_stress": "Pa",
}.items()}
_SI_FOR_FIXED = {"displacement": "m**3"}

def extra_caution(touch_k: float) -> Sentence:
    """The dashboard's caution beside the standing one; ``touch_k`` is the scenario's
    ``limits.touch_temperature`` (the limit its checks and charts use)."""
    return Sentence(
        "Surfaces above about {touch} burn on contact: guard or insulate them. Check hose and loading-arm "
        "ratings and their test dates before every transfer. Local codes, site procedures and the advice "
        "of a licensed engineer take precedence over this plan.", touch=Q(touch_k, "temperature", 0))


def caution_text(system: str, touch_k: float) -> str:
    """The standing caution and the dashboard's own, in the display system."""
    return STANDING_CAUTION + " " + render(extra_caution(touch_k), system)


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


def display_string(value: float, kind: str, system: str) -> str:
    """A number typed in the display unit as a scenario-file string in that unit ("-300 degC", "15 gpm"),
    so that a problem with it is reported in the unit the user gave."""
    if kind in FIXED_DISPLAY:
        unit = FIXED_DISPLAY[kind][1]
    else:
        unit = UNIT_SYSTEMS[system][kind].pint_unit
    return f"{float(value):.12g} {unit}"


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
# Words for codes and numbers of any size (tables and selects show words, never raw codes or None)

WORDS = {
    # pump and line outcomes (planner.transfer.system), start-up modes, heater and vessel choices
    **OUTCOME_WORDS, "prewarm": "pre-warm the line",
    "push_cold": "push the cold contents out", "positive_displacement": "positive displacement",
    "fixed_speed": "fixed speed", "fixed_flow": "fixed flow", "electric_constant": "electric, constant wattage",
    "electric_self_regulating": "electric, self-regulating", "none": "none", "loading_arm": "loading arm",
    "horizontal_cylinder": "horizontal cylinder", "vertical_cylinder": "vertical cylinder",
    "herschel_bulkley": "Herschel–Bulkley", "power_law": "power law", "newtonian": "Newtonian",
    "andrade": "Andrade", "vft": "Vogel–Fulcher–Tammann", "walther": "Walther (ASTM D341)",
    "hooper": "Hooper 2-K", "darby": "Darby 3-K", "mineral_wool": "mineral wool",
    "calcium_silicate": "calcium silicate", "carbon_steel": "carbon steel", "stainless_steel": "stainless steel",
    "rubber_hose": "rubber hose", "composite_hose": "composite hose",
    # fittings (planner.correlations.fittings) and calibration factors (planner.calibration.replay)
    "elbow_90_standard": "90° elbow, standard", "elbow_90_long_radius": "90° elbow, long radius",
    "elbow_45_standard": "45° elbow, standard", "tee_run_through": "tee, run through",
    "tee_through_branch": "tee, through the branch", "swing_check_valve": "swing check valve",
    "viscosity_factor": "viscosity factor", "heat_loss_factor": "heat-loss factor", "slip_factor": "pump slip factor",
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
    text = (f"RMS log residual {rms_text}; largest deviation {100 * curve['max_relative_residual']:.1f} % "
            f"over {curve['n_points']} points")
    spare = curve["n_points"] - len(curve.get("parameters") or {})
    if spare <= 0:      # a law through exactly as many points as it has parameters fits them whatever they are
        text += f" — the law has {len(curve.get('parameters') or {})} parameters, so no spare point checks it"
    return text
