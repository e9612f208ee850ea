"""Sentences that carry their quantities, so every message can be read in the user's unit system.

A ``Sentence`` is a ``str`` (its text in SI display units: °C, bar, m³/h, m ...) that also keeps its
template and the SI numbers with their kind; ``render(text, "US")`` gives the same sentence in US
customary units (°F, psi, gpm, ft ...).  Plain strings render as themselves, so any message may be
passed to ``render``.  Quantities are ``Q(value_si, kind, decimals)``; kinds are those of
``planner.scenario.units.UNIT_SYSTEMS`` plus ``"dimensionless"`` (shown as a bare number).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from planner.scenario.units import UNIT_SYSTEMS, from_si

SYSTEMS = ("SI", "US")

# Display decimals of each quantity kind, in the display unit of either system: the one table every output
# reads (sentences, findings, key figures, text and HTML reports, the dashboard's tables) unless a caller
# asks for others (``Q(value, kind, decimals)``).  tests/test_one_definition.py keeps it the only one.
DECIMALS = {
    "temperature": 1, "temperature_difference": 0, "pressure": 2, "volume_flow": 2, "volume": 1,
    "length": 0, "small_length": 1, "head": 2, "time": 2, "energy": 1, "mass": 0, "power": 2, "heat_rate": 2,
    "mass_flow": 2, "dynamic_viscosity": 1, "kinematic_viscosity": 1, "density": 1, "linear_power": 1, "speed": 2,
    "rotational_speed": 0, "displacement": 2, "heat_transfer_coefficient": 2, "specific_heat": 3,
    "conductivity": 3, "linear_conductance": 2,
}


def check_system(system: str) -> str:
    if system not in SYSTEMS:
        raise ValueError(f"unit system must be one of {', '.join(SYSTEMS)}, not {system!r}")
    return system


def format_quantity(value: float | None, kind: str, system: str = "SI", decimals: int | None = None) -> str:
    """``"55.0 °C"`` / ``"131.0 °F"`` for an SI value of ``kind``; "—" for a missing value."""
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "—"
    if kind == "dimensionless":    # a bare number: whole above 100, else three significant figures
        if decimals is None:
            return f"{value:,.0f}" if abs(value) >= 100 else f"{value:.3g}"
        return f"{value:,.{decimals}f}"
    digits = DECIMALS.get(kind, 2) if decimals is None else decimals
    number = from_si(float(value), kind, system)
    return f"{number:,.{digits}f} {UNIT_SYSTEMS[system][kind].label}"


def money_text(value: float | None, currency: str = "") -> str:
    """An amount of money as every output shows it: ``"6,800.40 EUR"`` (two decimals, thousands
    separated); "—" for a missing amount.

    >>> money_text(5964.875, "EUR"), money_text(None)
    ('5,964.88 EUR', '—')
    """
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "—"
    return f"{value:,.2f} {currency}".strip()


@dataclass(frozen=True)
class Q:
    """A quantity in a sentence: SI value, its kind, and optionally the decimals to show."""

    value: float
    kind: str
    decimals: int | None = None

    def text(self, system: str) -> str:
        return format_quantity(self.value, self.kind, system, self.decimals)


def _piece(value, system: str) -> str:
    if isinstance(value, Q):
        return value.text(system)
    if isinstance(value, Sentence):
        return value.render(system)
    return str(value)


class Sentence(str):
    """A message whose text is in SI display units and which renders in any unit system.

    >>> s = Sentence("jacket at {t}", t=Q(343.15, "temperature"))
    >>> str(s), s.render("US")
    ('jacket at 70.0 °C', 'jacket at 158.0 °F')
    """

    def __new__(cls, template: str, /, **values):
        text = template.format(**{k: _piece(v, "SI") for k, v in values.items()})
        obj = super().__new__(cls, text)
        obj.template = template
        obj.values = values
        return obj

    def render(self, system: str) -> str:
        return self.template.format(**{k: _piece(v, system) for k, v in self.values.items()})

    def __add__(self, other):
        return Sentence("{a}{b}", a=self, b=other)

    def __radd__(self, other):
        return Sentence("{a}{b}", a=other, b=self)

    def __reduce__(self):
        return (_rebuild, (self.template, self.values))


def _rebuild(template: str, values: dict) -> Sentence:
    return Sentence(template, **values)


def render(text, system: str = "SI") -> str:
    """Any message in ``system``: a Sentence is rendered, a plain string returned as it is."""
    if isinstance(text, Sentence):
        return text.render(system)
    return "" if text is None else str(text)


def join(parts, separator: str = "; ") -> Sentence:
    """Sentences (or strings) joined, keeping every part's quantities."""
    parts = list(parts)
    names = {f"p{i}": part for i, part in enumerate(parts)}
    return Sentence(separator.replace("{", "{{").replace("}", "}}").join("{" + n + "}" for n in names), **names)
