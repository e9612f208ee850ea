"""Units at the edges: one pint registry, parsing of "4 in" / "55 degC" strings, display systems.

Inside the planner every quantity is a plain SI float (temperatures in kelvin, pressures in Pa).
Scenario files and the dashboard may give values with units; this module turns them into SI and
back.  Plain numbers in a scenario file mean the field's documented default unit (``DEFAULT_UNITS``).
"""

from __future__ import annotations

import math
import functools
import re
import sys
from dataclasses import dataclass
from functools import lru_cache


@lru_cache(maxsize=1)
def _pint():
    """pint, imported on first use: a plan meets only the units of ``unit_factors.FACTORS`` and needs none.

    pint looks for dask when it is imported and, when dask is installed (it is, for ``--scheduler``), loads
    ``dask.base`` for its dask-array support: 0.1-0.2 s of every command's start-up here.  The planner never
    gives pint a dask array, so pint is imported with dask hidden (a ``None`` in ``sys.modules`` makes
    ``importlib.util.find_spec`` answer None); dask itself imports as usual afterwards."""
    hide = "dask" not in sys.modules
    if hide:
        sys.modules["dask"] = None
    try:
        import pint as module
    finally:
        if hide:
            del sys.modules["dask"]
    return module


from planner.errors import quoted
from planner.correlations.constants import GRAVITY  # noqa: F401  (re-exported: one definition)
from planner.scenario.unit_factors import FACTORS

ZERO_CELSIUS_K = 273.15
ATMOSPHERE_PA = 101325.0


@lru_cache(maxsize=1)
def registry():
    """The one unit registry of the package (pint's ``UnitRegistry``, built on first use; about 0.4 s with
    pint's import)."""
    ureg = _pint().UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.define("gpm = gallon / minute")
    ureg.define("bbl_per_hour = barrel / hour")
    return ureg


# What each kind of field means when a plain number is given, and the dimension it must have.
# Temperatures given as plain numbers are degrees Celsius (the trade's habit); in unit strings
# any temperature unit is accepted.
DEFAULT_UNITS: dict[str, str] = {
    "head": "m",
    "energy": "J",
    "mass": "kg",
    "length": "m",
    "small_length": "mm",
    "temperature": "degC",
    "temperature_difference": "K",
    "pressure": "Pa",
    "volume_flow": "m**3/s",
    "volume": "m**3",
    "dynamic_viscosity": "Pa*s",
    "kinematic_viscosity": "m**2/s",
    "density": "kg/m**3",
    "density_slope": "kg/m**3/K",
    "specific_heat": "J/kg/K",
    "conductivity": "W/m/K",
    "linear_power": "W/m",
    "linear_conductance": "W/m/K",
    "power": "W",
    "speed": "m/s",
    "time": "s",
    "rotational_speed": "revolution/minute",
    "displacement": "L",
    "yield_stress": "Pa",
    "consistency": "Pa*s",
    "area": "m**2",
    "heat_transfer_coefficient": "W/m**2/K",
    "mass_flow": "kg/s",
    "dimensionless": "dimensionless",
}

# SI unit each kind is converted to inside the planner.
SI_UNITS: dict[str, str] = {
    "head": "m",
    "energy": "J",
    "mass": "kg",
    "length": "m",
    "small_length": "m",
    "temperature": "K",
    "temperature_difference": "K",
    "pressure": "Pa",
    "volume_flow": "m**3/s",
    "volume": "m**3",
    "dynamic_viscosity": "Pa*s",
    "kinematic_viscosity": "m**2/s",
    "density": "kg/m**3",
    "density_slope": "kg/m**3/K",
    "specific_heat": "J/kg/K",
    "conductivity": "W/m/K",
    "linear_power": "W/m",
    "linear_conductance": "W/m/K",
    "power": "W",
    "speed": "m/s",
    "time": "s",
    "rotational_speed": "revolution/second",
    "displacement": "m**3",
    "yield_stress": "Pa",
    "consistency": "Pa*s",
    "area": "m**2",
    "heat_transfer_coefficient": "W/m**2/K",
    "mass_flow": "kg/s",
    "dimensionless": "dimensionless",
}

# How a unit is written for people and in the JSON documents (pint's spelling -> text): the one table of
# unit spellings; ``unit_text`` writes any other pint spelling with superscripts.
UNIT_TEXT = {
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
    "revolution/second": "rev/s",
    "W/m**2/K": "W/(m²·K)",
    "m**2": "m²",
    "dimensionless": "",
}


def unit_text(unit: str) -> str:
    """A pint unit as people read it ("m**3/s" -> "m³/s", "degC" -> "°C")."""
    return UNIT_TEXT.get(unit, unit).replace("**3", "³").replace("**2", "²").replace("degC", "°C").replace("degF", "°F")


def si_unit_text(kind: str) -> str:
    """The SI unit of ``kind`` as the JSON documents and messages write it ("" for a bare number or an
    unknown kind): findings' ``unit``, the comparison's and the calibration's."""
    return unit_text(SI_UNITS[kind]) if kind in SI_UNITS else ""


_NUMBER_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_POWER_SUFFIX = re.compile(r"\b(m|cm|mm|ft|inch|in|yd)([23])\b")


MAX_UNIT_CHARS = 40      # longer unit text is refused unread (the longest unit in use has 19 characters)


class UnitError(ValueError):
    """A value whose unit is unknown or of the wrong dimension."""


class LongInteger:
    """An integer in a scenario text too long for Python to read (more than ``sys.get_int_max_str_digits``
    digits): kept as its length, so that the field it stands in is refused by name."""

    __slots__ = ("digits",)

    def __init__(self, digits: int):
        self.digits = digits

    def __repr__(self) -> str:
        return f"an integer of {self.digits:,} digits"


def _temperature_quantity(ureg, number: float, unit: str, kind: str, field: str, value: object):
    """A temperature as absolute, a temperature difference as a difference, whatever the unit says.

    An absolute temperature given in a difference unit ("55 delta_degC") is refused: read as 55 K it
    would be -218 degC.  A difference given in degC or degF ("10 degC" as a margin) means 10 K.
    """
    quantity = ureg.Quantity(number, unit)
    names = list(quantity.unit_items())
    if kind == "temperature" and any(name.startswith("delta_") for name, _ in names):
        raise UnitError(f"{field}: {quoted(value)} is a temperature difference; give a temperature such as "
                        "'55 degC', '131 degF' or '328.15 K'")
    if kind == "temperature_difference" and not quantity._is_multiplicative and len(names) == 1:  # noqa: SLF001
        quantity = ureg.Quantity(number, "delta_" + names[0][0])
    return quantity


def _normalise_unit(text: str) -> str:
    text = text.strip().replace("°C", "degC").replace("°F", "degF").replace("℃", "degC")
    text = text.replace("²", "**2").replace("³", "**3").replace("·", "*")
    text = _POWER_SUFFIX.sub(lambda m: f"{m.group(1)}**{m.group(2)}", text)
    if text in {"C", "celsius"}:
        text = "degC"
    if text in {"F", "fahrenheit"}:
        text = "degF"
    return text


@lru_cache(maxsize=1024)
def _scale(unit: str, kind: str) -> float | None:
    """SI value of one ``unit`` when the conversion is a pure scale (pint's factor, written out in
    ``unit_factors`` or asked once per unit), else None."""
    known = FACTORS.get((unit, SI_UNITS[kind]))
    if known is not None:
        return known
    ureg = registry()
    quantity = ureg.Quantity(1.0, unit)
    if not quantity._is_multiplicative or any(name.startswith("delta_") for name, _ in quantity.unit_items()):  # noqa: SLF001
        return None
    return float(quantity.to(SI_UNITS[kind]).magnitude)


def _convert(number: float, unit: str, kind: str, field: str, value: object) -> float:
    if kind == "temperature" and unit == "degC":
        return number + ZERO_CELSIUS_K               # pint's own definition of degC, without the parse
    scale = _scale(unit, kind)
    if scale is not None:
        return number * scale                        # what pint computes for a multiplicative unit
    ureg = registry()
    if kind in ("temperature", "temperature_difference"):
        quantity = _temperature_quantity(ureg, number, unit, kind, field, value)
    else:
        quantity = ureg.Quantity(number, unit)
    return quantity.to(SI_UNITS[kind]).magnitude


def to_si(value: object, kind: str, field: str = "value") -> float:
    """Convert a number or a "number unit" string of the given kind to its SI float.

    >>> round(to_si("4 in", "length"), 4)
    0.1016
    >>> round(to_si("55 degC", "temperature"), 2)
    328.15
    >>> round(to_si(20, "temperature"), 2)   # plain number: degC
    293.15
    """
    if kind not in SI_UNITS:
        raise KeyError(f"unknown quantity kind {kind!r}")
    if isinstance(value, LongInteger):
        raise UnitError(f"{field}: {value!r} is past the range of numbers (about 1e308 at most)")
    if isinstance(value, bool):
        raise UnitError(f"{field}: expected a number or a 'number unit' string, got {quoted(value)}")
    if isinstance(value, (int, float)):
        try:
            number = float(value)
        except OverflowError:          # an integer past the float range (JSON and TOML allow any)
            raise UnitError(f"{field}: an integer of {value.bit_length()} bits is past the range of numbers") from None
        unit = DEFAULT_UNITS[kind]
    elif isinstance(value, str):
        match = _NUMBER_UNIT.match(value)
        if not match:
            raise UnitError(f"{field}: cannot read {quoted(value)} as 'number unit' (e.g. '4 in', '55 degC')")
        number = float(match.group(1))
        if len(match.group(2)) > MAX_UNIT_CHARS:
            raise UnitError(f"{field}: the unit of {quoted(value, 40)} is {len(match.group(2)):,} characters long; "
                            f"a unit has at most {MAX_UNIT_CHARS} (e.g. '4 in', '55 degC', 'kg/m3')")
        if match.group(2).count("(") != match.group(2).count(")"):
            raise UnitError(f"{field}: the unit of {quoted(value)} has unbalanced brackets; give a unit such as "
                            "'m3/h', 'kg/(m*s)' or '55 degC'")
        unit = _normalise_unit(match.group(2)) or DEFAULT_UNITS[kind]
    else:
        raise UnitError(f"{field}: expected a number or a 'number unit' string, got {type(value).__name__}")
    if not math.isfinite(number):
        raise UnitError(f"{field}: {quoted(value)} is not a finite number")
    try:
        result = _convert(number, unit, kind, field, value)
    except UnitError:
        raise
    except Exception as exc:  # noqa: BLE001  (pint's parser raises many kinds: TokenError, SyntaxError, KeyError ...)
        if isinstance(exc, _pint().errors.DimensionalityError):
            raise UnitError(
                f"{field}: {quoted(value)} has the wrong dimension; expected a {kind.replace('_', ' ')} "
                f"(e.g. in {DEFAULT_UNITS[kind].replace('**', '')})"
            ) from None
        raise UnitError(f"{field}: unknown unit {quoted(unit, 40)} in {quoted(value)}") from None
    result = float(result)
    if not math.isfinite(result):
        raise UnitError(f"{field}: {quoted(value)} is not a finite number")
    return result


# ---------------------------------------------------------------------------------------------
# Display: the two unit systems users choose between.


@dataclass(frozen=True)
class DisplayUnit:
    label: str
    pint_unit: str


UNIT_SYSTEMS: dict[str, dict[str, DisplayUnit]] = {
    "SI": {
        "length": DisplayUnit("m", "m"),
        "small_length": DisplayUnit("mm", "mm"),
        "temperature": DisplayUnit("°C", "degC"),
        "temperature_difference": DisplayUnit("K", "K"),
        "pressure": DisplayUnit("bar", "bar"),
        "volume_flow": DisplayUnit("m³/h", "m**3/h"),
        "volume": DisplayUnit("m³", "m**3"),
        "dynamic_viscosity": DisplayUnit("mPa·s", "mPa*s"),
        "kinematic_viscosity": DisplayUnit("cSt", "cSt"),   # = mm²/s; what operators read, in both systems
        "density": DisplayUnit("kg/m³", "kg/m**3"),
        "linear_power": DisplayUnit("W/m", "W/m"),
        "power": DisplayUnit("kW", "kW"),
        "heat_rate": DisplayUnit("kW", "kW"),
        "mass_flow": DisplayUnit("kg/s", "kg/s"),
        "speed": DisplayUnit("m/s", "m/s"),
        "time": DisplayUnit("h", "h"),
        "energy": DisplayUnit("kWh", "kWh"),
        "mass": DisplayUnit("kg", "kg"),
        "specific_heat": DisplayUnit("kJ/(kg·K)", "kJ/kg/K"),
        "conductivity": DisplayUnit("W/(m·K)", "W/m/K"),
        "head": DisplayUnit("m", "m"),
        "heat_transfer_coefficient": DisplayUnit("W/(m²·K)", "W/m**2/K"),
        "rotational_speed": DisplayUnit("rpm", "revolution/minute"),
    },
    "US": {
        "length": DisplayUnit("ft", "ft"),
        "small_length": DisplayUnit("in", "inch"),
        "temperature": DisplayUnit("°F", "degF"),
        "temperature_difference": DisplayUnit("°F", "delta_degF"),
        "pressure": DisplayUnit("psi", "psi"),
        "volume_flow": DisplayUnit("gpm", "gpm"),
        "volume": DisplayUnit("bbl", "oil_barrel"),
        "dynamic_viscosity": DisplayUnit("cP", "cP"),
        "kinematic_viscosity": DisplayUnit("cSt", "cSt"),
        "density": DisplayUnit("lb/ft³", "lb/ft**3"),
        "linear_power": DisplayUnit("W/ft", "W/ft"),
        "power": DisplayUnit("hp", "hp"),
        "heat_rate": DisplayUnit("BTU/h", "BTU/hour"),
        "mass_flow": DisplayUnit("lb/h", "lb/hour"),
        "speed": DisplayUnit("ft/s", "ft/s"),
        "time": DisplayUnit("h", "h"),
        "energy": DisplayUnit("kWh", "kWh"),
        "mass": DisplayUnit("lb", "lb"),
        "specific_heat": DisplayUnit("BTU/(lb·°F)", "BTU/lb/delta_degF"),
        "conductivity": DisplayUnit("BTU/(h·ft·°F)", "BTU/h/ft/delta_degF"),
        "head": DisplayUnit("ft", "ft"),
        "heat_transfer_coefficient": DisplayUnit("BTU/(h·ft²·°F)", "BTU/hour/ft**2/delta_degF"),
        "rotational_speed": DisplayUnit("rpm", "revolution/minute"),
    },
}

_SI_FOR_DISPLAY = {
    "energy": "J",
    "heat_rate": "W",
    "mass": "kg",
    "head": "m",
}


@functools.lru_cache(maxsize=None)
def _display_factor(kind: str, system: str) -> float:
    """Display units per SI unit of ``kind`` (every kind but the absolute temperature is a pure
    scale): worked out once with pint, then a multiplication (messages format many quantities)."""
    unit = UNIT_SYSTEMS[system][kind]
    si_unit = SI_UNITS.get(kind) or _SI_FOR_DISPLAY[kind]
    known = FACTORS.get((si_unit, unit.pint_unit))
    if known is not None:
        return known
    return float(registry().Quantity(1.0, si_unit).to(unit.pint_unit).magnitude)


def from_si(value: float, kind: str, system: str = "SI") -> float:
    """Convert an SI float to the display unit of ``kind`` in the unit system ``system``."""
    if kind == "temperature":
        celsius = value - ZERO_CELSIUS_K
        return celsius if system == "SI" else celsius * 9.0 / 5.0 + 32.0
    return float(value) * _display_factor(kind, system)


def to_si_from_display(value: float, kind: str, system: str = "SI") -> float:
    """Inverse of :func:`from_si`."""
    if kind == "temperature":
        celsius = value if system == "SI" else (value - 32.0) * 5.0 / 9.0
        return celsius + ZERO_CELSIUS_K
    return float(value) / _display_factor(kind, system)


def unit_label(kind: str, system: str = "SI") -> str:
    return UNIT_SYSTEMS[system][kind].label


def celsius(kelvin: float) -> float:
    return kelvin - ZERO_CELSIUS_K


def kelvin(celsius_value: float) -> float:
    return celsius_value + ZERO_CELSIUS_K
