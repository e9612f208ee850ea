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

from planner.scenario.derived_units import derived_system
from planner.scenario.unit_factors import FACTORS
from planner.scenario.units import (_NUMBER_UNIT, DEFAULT_UNITS, SI_UNITS, UNIT_SYSTEMS, UnitError, _normalise_unit,
                                    from_si, registry, to_si, unit_text)



def default_unit_label(kind: str) -> str:
    unit = DEFAULT_UNITS[kind]
    return unit_text(unit)


def si_to_default(value: float, kind: str) -> float:
    """An SI float expressed in the kind's default unit, rounded to 12 significant digits."""
    if kind == "temperature":
        number = value - 273.15
    elif DEFAULT_UNITS[kind] == SI_UNITS[kind]:
        number = value
    elif (SI_UNITS[kind], DEFAULT_UNITS[kind]) in FACTORS:
        number = value * FACTORS[SI_UNITS[kind], DEFAULT_UNITS[kind]]     # pint's value * factor, without pint
    else:
        number = registry().Quantity(value, SI_UNITS[kind]).to(DEFAULT_UNITS[kind]).magnitude
    if number == 0 or not math.isfinite(number):
        return float(number)
    return float(f"{number:.12g}")


def _show(value_si: float, kind: str) -> str:
    return f"{si_to_default(value_si, kind):g} {default_unit_label(kind)}"


class SI(float):
    """A float already in SI: a quantity field takes it as it is (no default-unit reading), still
    checking its range.  Typed changes of a validated scenario assign these (``plan.with_changes``)."""

    __slots__ = ()


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
        if isinstance(value, SI):
            number = float(value)
        else:
            try:
                number = to_si(value, kind, "value")
            except UnitError as exc:   # the path already names the field: drop to_si's own prefix
                raise ValueError(str(exc).removeprefix("value: ")) from None
        unit, shown = _given_unit(value, kind)
        number = _at_bound(number, (gt, ge, lt, le))
        if kind == "temperature" and number <= 0.0:
            raise ValueError(f"{shown} is at or below absolute zero ({_in_unit(0.0, kind, unit)})")
        problems = []
        if gt is not None and not number > gt:
            problems.append(f"must be greater than {_in_unit(gt, kind, unit)}")
        if ge is not None and not number >= ge:
            problems.append(f"must be at least {_in_unit(ge, kind, unit)}")
        if lt is not None and not number < lt:
            problems.append(f"must be less than {_in_unit(lt, kind, unit)}")
        if le is not None and not number <= le:
            problems.append(f"must be at most {_in_unit(le, kind, unit)}")
        if problems:
            raise ValueError(f"{shown} is out of range: " + " and ".join(problems))
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


# A value typed as a bound in another unit lands within a few units in the last place of the SI bound
# ("-90 degC" is 183.14999999999998 K, "1000 L" 1.0000000000000002 m3): it is the bound.
BOUND_RELATIVE_TOLERANCE = 1e-12


def _at_bound(number: float, bounds) -> float:
    """``number``, or the bound it equals but for the rounding of a unit conversion, so the limit a message
    gives is accepted at ``ge``/``le`` and refused at ``gt``/``lt`` whatever unit it is typed in.

    >>> _at_bound(-90 + 273.15, (None, 183.15, None, None))
    183.15
    """
    for bound in bounds:
        if bound is not None and abs(number - bound) <= BOUND_RELATIVE_TOLERANCE * abs(bound):
            return bound
    return number


def _given_unit(value: object, kind: str) -> tuple[str | None, str]:
    """The unit ``value`` was given in (pint spelling; None: the kind's default unit) and the value as the
    user wrote it, for messages: "-300 degC", "-45 m", "12 (m³/s)"."""
    if isinstance(value, SI):   # a derived value (a lever moved, an ambient shifted): in the user's units
        system = derived_system()
        if system is not None and kind in UNIT_SYSTEMS[system]:
            unit = UNIT_SYSTEMS[system][kind]
            return unit.pint_unit, f"{from_si(float(value), kind, system):.6g} {unit.label}"
        return None, f"{si_to_default(float(value), kind):.6g} {default_unit_label(kind)}"   # as a file says it
    if isinstance(value, str):
        match = _NUMBER_UNIT.match(value)
        if match and match.group(2).strip():
            return _normalise_unit(match.group(2)), f"{match.group(1)} {_pretty(_normalise_unit(match.group(2)))}"
        number = match.group(1) if match else value.strip()
        return None, f"{number} {default_unit_label(kind)}"
    return None, f"{value:g} {default_unit_label(kind)}" if isinstance(value, (int, float)) else str(value)


def _pretty(unit: str) -> str:
    return unit_text(unit)


def _in_unit(si_value: float, kind: str, unit: str | None) -> str:
    """An SI bound in the unit the value was given in (the default unit for plain numbers)."""
    target = unit or DEFAULT_UNITS[kind]
    try:
        number = registry().Quantity(si_value, SI_UNITS[kind]).to(target).magnitude
    except Exception:  # noqa: BLE001  (a unit pint reads but cannot convert to: fall back to the default)
        target = DEFAULT_UNITS[kind]
        number = registry().Quantity(si_value, SI_UNITS[kind]).to(target).magnitude
    return f"{float(number):.6g} {_pretty(target)}"


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


__all__ = ["Quantity", "SI", "si_to_default", "default_unit_label", "UnitError"]


def exact_dump(model, skip_defaults: bool = True) -> dict:
    """A plain dict of a model in which every quantity is a string carrying its SI value exactly
    ("328.15 K", "0.004166666666666667 m**3/s"), so that validating it gives back the very same floats.
    Fields at their defaults are left out when ``skip_defaults``."""
    return _dump(model, lambda value, kind: f"{value!r} {SI_UNITS[kind]}", skip_defaults)


def _kind_of(annotation):
    import typing

    for arg in typing.get_args(annotation):
        if isinstance(arg, QuantityKind):
            return arg.kind
        found = _kind_of(arg)
        if found:
            return found
    return None


def _dump(model, quantity_text, skip_defaults: bool) -> dict:
    """The fields of a model as plain data; quantities (floats of a known kind) through ``quantity_text``."""
    from pydantic import BaseModel

    def convert(value, kind):
        if value is None:
            return None
        if isinstance(value, BaseModel):
            return _dump(value, quantity_text, skip_defaults)
        if isinstance(value, list):
            return [convert(v, kind) for v in value]
        if isinstance(value, dict):
            return {k: convert(v, kind) for k, v in value.items()}
        if kind is not None and isinstance(value, float):
            return quantity_text(value, kind)
        return value

    out = {}
    for name, field in type(model).model_fields.items():
        value = getattr(model, name)
        if value is None:
            continue
        if skip_defaults and not field.is_required() and value == field.get_default(call_default_factory=True):
            continue
        kind = next((m.kind for m in field.metadata if isinstance(m, QuantityKind)), None) or _kind_of(field.annotation)
        out[name] = convert(value, kind)
    return out


# Units a person writes in a scenario file, per unit system (pint spellings this package reads).
FILE_UNITS = {
    "SI": {"temperature": "degC", "temperature_difference": "K", "pressure": "bar", "volume_flow": "m3/h",
           "volume": "m3", "length": "m", "small_length": "mm", "dynamic_viscosity": "mPa*s",
           "kinematic_viscosity": "mm2/s", "density": "kg/m3", "density_slope": "kg/m3/K", "specific_heat": "kJ/kg/K",
           "conductivity": "W/m/K", "linear_power": "W/m", "linear_conductance": "W/m/K", "power": "kW",
           "speed": "m/s", "time": "h", "rotational_speed": "rpm", "displacement": "L", "yield_stress": "Pa",
           "consistency": "Pa*s", "area": "m2", "heat_transfer_coefficient": "W/m2/K", "mass_flow": "kg/s"},
    "US": {"temperature": "degF", "temperature_difference": "delta_degF", "pressure": "psi", "volume_flow": "gpm",
           "volume": "gallon", "length": "ft", "small_length": "in", "dynamic_viscosity": "cP",
           "kinematic_viscosity": "cSt", "density": "lb/ft3", "density_slope": "lb/ft3/delta_degF",
           "specific_heat": "BTU/lb/delta_degF", "conductivity": "BTU/h/ft/delta_degF", "linear_power": "W/ft",
           "linear_conductance": "W/ft/delta_degF", "power": "hp", "speed": "ft/s", "time": "h",
           "rotational_speed": "rpm", "displacement": "L", "yield_stress": "Pa", "consistency": "Pa*s",
           "area": "ft2", "heat_transfer_coefficient": "BTU/h/ft2/delta_degF", "mass_flow": "lb/s"},
}


def readable_quantity(si_value: float, kind: str, system: str = "SI"):
    """``si_value`` as a person writes it in a file ("10 bar", "55 degC", "176 gpm") with the fewest
    digits that read back to exactly the same float; the exact SI value ("328.15 K") if no display
    figure does.  Dimensionless values stay numbers."""
    unit = FILE_UNITS[system].get(kind)
    if unit is None:
        return si_value
    number = registry().Quantity(si_value, SI_UNITS[kind]).to(_normalise_unit(unit)).magnitude
    for digits in range(6, 18):
        text = f"{float(number):.{digits}g} {unit}"
        if to_si(text, kind) == si_value:
            return text
    return f"{si_value!r} {SI_UNITS[kind]}"


def readable_dump(model, system: str = "SI") -> dict:
    """A plain dict of a model with every quantity as a unit string of ``system`` (``readable_quantity``),
    reading back to the very same floats; optional fields left unset are dropped."""
    return _dump(model, lambda value, kind: readable_quantity(value, kind, system), skip_defaults=False)
