"""One finding: what every check returns (code, severity, where, message, value and limit, what to do).

Kept apart from ``findings`` so that the checks in sibling modules (``ranges``, ``bounds``) and the
collection of all checks (``findings.assess``) share one definition without importing each other.
"""

from __future__ import annotations

from dataclasses import dataclass

from planner.scenario.units import SI_UNITS
from planner.scenario.wording import render

SEVERITIES = ("info", "caution", "warning", "stop")
SEVERITY_RANK = {name: i for i, name in enumerate(SEVERITIES)}

# SI unit of each quantity kind a finding may carry (for the JSON; "" when dimensionless)
_SI_LABELS = {"temperature": "K", "pressure": "Pa", "length": "m", "head": "m", "power": "W", "time": "s",
              "speed": "m/s", "linear_power": "W/m", "heat_transfer_coefficient": "W/(m2 K)",
              "volume_flow": "m3/s", "volume": "m3", "energy": "J", "mass": "kg", "dimensionless": ""}


@dataclass
class Finding:
    """One finding.  ``value`` and ``limit`` are SI numbers of the kind ``quantity`` (temperature,
    pressure, length, ...); ``message`` is a ``Sentence`` that renders in either unit system."""

    code: str
    severity: str
    title: str
    message: str
    action: str
    line: str | None = None
    segment: str | None = None
    at_m: float | None = None
    value: float | None = None
    limit: float | None = None
    quantity: str = ""

    @property
    def unit(self) -> str:
        """The SI unit of ``value`` and ``limit``."""
        return _SI_LABELS.get(self.quantity, SI_UNITS.get(self.quantity, ""))

    def where(self) -> dict:
        return {"line": self.line, "segment": self.segment, "at_m": self.at_m}

    def as_dict(self, system: str | None = None) -> dict:
        """The finding as the JSON documents carry it (SI numbers); ``system`` renders the message in that
        unit system, else it stays a ``Sentence`` (text in SI display units)."""
        return {"code": self.code, "severity": self.severity, "title": self.title,
                "message": self.message if system is None else render(self.message, system),
                "where": self.where(), "value": self.value, "limit": self.limit, "quantity": self.quantity,
                "unit": self.unit, "action": self.action}
