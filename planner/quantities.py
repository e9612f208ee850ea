"""Pydantic field types for physical quantities: accept "4 in" or a plain number, hold SI floats.

``Quantity("length", gt=0)`` makes an annotated float type that
- reads a plain number in the kind's documented default unit, or a "number unit" string;
- converts to SI (kelvin for temperatures) with the package's one pint registry;
- checks the allowed range and says, on failure, the value and the limit in the default unit;
- writes back as a plain number in the default unit, so files stay readable and round-trip.
"""

from __future__ import annotations

import math
from typing import Annotated

from pydantic import BeforeValidator, PlainSerializer, WithJsonSchema

from .units import DEFAULT_UNITS, SI_UNITS, UnitError, registry, to_si

_LABELS = {
    "degC": "°C",
    "m**3/s": "m³/s",
    "m**3": "m³",
    "m**2/s": "m²/s",
    "kg/m**3": "kg/m³",
    "kg/m**3/K": "kg/m³ per K",
    "J/kg/K": "J/(kg·K)",
    "W/m/K": "W/(m·K)",
    "Pa*s": "Pa·s",
    "revolution/minute": "rpm",
    "W/m**2/K": "W/(m²·K)",
    "m**2": "m²",
}


def default_unit_label(kind: str) -> str:
    unit = DEFAULT_UNITS[kind]
    return _LABELS.get(unit, unit)


def si_to_default(value: float, kind: str) -> float:
    """An SI float expressed in the kind's default unit, rounded to 12 significant digits."""
    if kind == "temperature":
        number = value - 273.15
    elif DEFAULT_UNITS[kind] == SI_UNITS[kind]:
        number = value
    else:
        number = registry().Quantity(value, SI_UNITS[kind]).to(DEFAULT_UNITS[kind]).magnitude
    if number == 0 or not math.isfinite(number):
        return float(number)
    return float(f"{number:.12g}")


def _show(value_si: float, kind: str) -> str:
    return f"{si_to_default(value_si, kind):g} {default_unit_label(kind)}"


def Quantity(kind: str, *, gt: float | None = None, ge: float | None = None,
             lt: float | None = None, le: float | None = None, description: str = ""):
    """An annotated float type for a quantity of ``kind``; bounds are given in SI."""

    def parse(value: object, info) -> float:
        field = info.field_name or "value"
        number = to_si(value, kind, field)
        if kind == "temperature" and number <= 0.0:
            raise ValueError(f"{value!r} is at or below absolute zero")
        problems = []
        if gt is not None and not number > gt:
            problems.append(f"must be greater than {_show(gt, kind)}")
        if ge is not None and not number >= ge:
            problems.append(f"must be at least {_show(ge, kind)}")
        if lt is not None and not number < lt:
            problems.append(f"must be less than {_show(lt, kind)}")
        if le is not None and not number <= le:
            problems.append(f"must be at most {_show(le, kind)}")
        if problems:
            raise ValueError(f"{value!r} ({_show(number, kind)}) is out of range: " + " and ".join(problems))
        return number

    limits = []
    for word, bound in (("greater than", gt), ("at least", ge), ("less than", lt), ("at most", le)):
        if bound is not None:
            limits.append(f"{word} {_show(bound, kind)}")
    text = description or kind.replace("_", " ")
    text += f". Plain numbers are in {default_unit_label(kind)}; strings may carry units (e.g. '{_example(kind)}')."
    if limits:
        text += " Allowed: " + ", ".join(limits) + "."
    return Annotated[
        float,
        BeforeValidator(parse),
        PlainSerializer(lambda v: si_to_default(v, kind), return_type=float),
        WithJsonSchema({"anyOf": [{"type": "number"}, {"type": "string"}], "description": text}),
    ]


def _example(kind: str) -> str:
    return {
        "length": "1250 ft",
        "small_length": "2 in",
        "temperature": "131 degF",
        "temperature_difference": "10 K",
        "pressure": "150 psi",
        "volume_flow": "176 gpm",
        "volume": "80 m3",
        "dynamic_viscosity": "350 cP",
        "kinematic_viscosity": "180 cSt",
        "density": "1380 kg/m3",
        "linear_power": "10 W/ft",
        "linear_conductance": "1.5 W/m/K",
        "power": "15 kW",
        "speed": "8 mph",
        "time": "4 h",
        "rotational_speed": "400 rpm",
        "displacement": "1.2 L",
        "yield_stress": "12 Pa",
        "heat_transfer_coefficient": "2.5 W/m2/K",
        "conductivity": "0.04 W/m/K",
        "specific_heat": "2.2 kJ/kg/K",
        "density_slope": "-0.6 kg/m3/K",
        "consistency": "4 Pa*s",
        "area": "30 m2",
        "mass_flow": "12 kg/s",
    }.get(kind, "1")


__all__ = ["Quantity", "si_to_default", "default_unit_label", "UnitError"]
