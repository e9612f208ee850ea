"""Command-line options that stand for a scenario field (``--flow`` for ``operation.flow``): checked by
the field's own validator, so they meet the same ranges and units as the file; a bare number is
refused, since the command line has no default unit."""

from __future__ import annotations

import re

from pydantic import ValidationError

from planner.errors import quoted
from planner.scenario.schema import Scenario, problems_from
from planner.scenario.units import UnitError

_BARE_NUMBER = re.compile(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*$")
EXAMPLES = {"flow": "'15 m3/h' or '66 gpm'", "inlet_temperature": "'55 degC' or '131 degF'"}


def option_quantity(scenario: Scenario, text: str, option: str, section: str, name: str) -> float:
    """The SI value of ``text`` for the field ``section.name``; UnitError naming ``option`` otherwise."""
    if _BARE_NUMBER.match(text):
        example = EXAMPLES.get(name, "a number with its unit")
        raise UnitError(f"{option}: {quoted(text.strip())} has no unit; give the unit too, e.g. {example}")
    copy = getattr(scenario, section).model_copy()
    try:
        setattr(copy, name, text)
    except ValidationError as exc:
        raise UnitError("; ".join(f"{option}: {message}" for _, message in problems_from(exc))) from None
    return getattr(copy, name)
