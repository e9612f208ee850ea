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

from planner.scenario.units import DEFAULT_UNITS, SI_UNITS, UnitError, registry, to_si

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


class QuantityKind:
    """Marks a field as a quantity of ``kind`` (SI inside), so exact dumps can name its unit."""

    __slots__ = ("kind",)

    def __init__(self, kind: str):
        self.kind = kind

    def __repr__(self) -> str:
        return f"QuantityKind({self.kind!r})"


def Quantity(kind: str, *, gt: float | None = None, ge: float | None = None,
             lt: float | None = None, le: float | None = None, description: str = ""):
    """An annotated float type for a quantity of ``kind``; bounds are given in SI."""

    def parse(value: object, info) -> float:
        field = info.field_name or "value"
        try:
            number = to_si(value, kind, field)
        except UnitError as exc:   # the path already names the field: drop to_si's own prefix
            raise ValueError(str(exc).removeprefix(f"{field}: ")) from None
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
        QuantityKind(kind),
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


def exact_dump(model, skip_defaults: bool = True) -> dict:
    """A plain dict of a model in which every quantity is a string carrying its SI value exactly
    ("328.15 K", "0.004166666666666667 m**3/s"), so that validating it gives back the very same floats.
    Fields at their defaults are left out when ``skip_defaults``."""
    import typing

    from pydantic import BaseModel

    from planner.scenario.units import SI_UNITS

    def kind_of(annotation):
        for arg in typing.get_args(annotation):
            if isinstance(arg, QuantityKind):
                return arg.kind
            found = kind_of(arg)
            if found:
                return found
        return None

    def convert(value, kind):
        if value is None:
            return None
        if isinstance(value, BaseModel):
            return exact_dump(value, skip_defaults)
        if isinstance(value, list):
            return [convert(v, kind) for v in value]
        if isinstance(value, dict):
            return {k: convert(v, kind) for k, v in value.items()}
        if kind is not None and isinstance(value, float):
            return f"{value!r} {SI_UNITS[kind]}"
        return value

    out = {}
    for name, field in type(model).model_fields.items():
        value = getattr(model, name)
        if skip_defaults and not field.is_required():
            default = field.get_default(call_default_factory=True)
            if value == default:
                continue
        kind = None
        for meta in field.metadata:
            if isinstance(meta, QuantityKind):
                kind = meta.kind
        if kind is None:
            kind = kind_of(field.annotation)
        out[name] = convert(value, kind)
    return out
