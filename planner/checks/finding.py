"""One finding: what every check returns (code, severity, where, message, value and limit, what to do).

Kept apart from ``findings`` so that the checks in sibling modules (``line_checks``, ``plan_checks``,
``bounds``) and the runners (``one_line.assess_line``, ``findings.assess``) share one definition without
importing each other; with it the severity order, the lines' names and the order every output lists
findings in (``ordered``: most severe first, the standing caution last).
"""

from __future__ import annotations

from dataclasses import dataclass

from planner.checks.caution import STANDING_CAUTION
from planner.scenario.units import si_unit_text
from planner.scenario.wording import render

# The severity order, least severe first: the one definition (tests/test_one_definition.py)
SEVERITIES = ("info", "caution", "warning", "stop")
SEVERITY_RANK = {name: i for i, name in enumerate(SEVERITIES)}
MOST_SEVERE_FIRST = tuple(reversed(SEVERITIES))     # as the outputs list them


# The lines a finding names (``Finding.line``): one name each, in ``evaluate`` and in ``plan`` alike
# (``evaluate`` marches the scenario's route: the discharge line)
SUCTION, DISCHARGE = "suction", "discharge"
LINES = (SUCTION, DISCHARGE)


def at_least(severity: str, floor: str) -> bool:
    """Whether ``severity`` is ``floor`` or worse (``--fail-on``, the comparison's notes)."""
    return SEVERITY_RANK[severity] >= SEVERITY_RANK[floor]


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
        return si_unit_text(self.quantity)

    def where(self) -> dict:
        return {"line": self.line, "segment": self.segment, "at_m": self.at_m}

    def as_dict(self, system: str | None = None) -> dict:
        """The finding as the JSON documents carry it (SI numbers); ``system`` renders the message in that
        unit system, else it stays a ``Sentence`` (text in SI display units)."""
        return {"code": self.code, "severity": self.severity, "title": self.title,
                "message": self.message if system is None else render(self.message, system),
                "where": self.where(), "value": self.value, "limit": self.limit, "quantity": self.quantity,
                "unit": self.unit, "action": self.action}


# -- findings in severity order ------------------------------------------------------------------------

def standing_caution() -> Finding:
    return Finding("PLANNING-ESTIMATE", "info", "Planning estimate", STANDING_CAUTION,
                   "Follow site procedures, hazardous-area rules and pressure ratings; ask a licensed engineer.")


def ordered(found: list[Finding]) -> list[Finding]:
    """Findings most severe first, the standing caution last (every output lists them so)."""
    found = sorted(found, key=lambda f: -SEVERITY_RANK[f.severity])
    return found + [standing_caution()]


def count_by_severity(findings: list) -> dict[str, int]:
    """Findings (objects or their dicts) counted by severity."""
    counts = {name: 0 for name in SEVERITIES}
    for f in findings:
        counts[f["severity"] if isinstance(f, dict) else f.severity] += 1
    return counts


def worst_severity(findings: list) -> str:
    """The most severe level among the findings (objects or dicts); "info" when there are none."""
    levels = [f["severity"] if isinstance(f, dict) else f.severity for f in findings]
    return max(levels, key=SEVERITY_RANK.__getitem__, default="info")
