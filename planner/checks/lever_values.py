"""The values a comparison may take: each one checked against its lever's field, as the scenario file's
value would be, and no value twice.

A comparison row is a whole plan at one value of a lever; a value its field refuses (steam at -5 bar(g),
a flow of 1e9 m³/h) would be a row of errors or, worse, a plan the scenario file could never hold, and
a value given twice makes a runner-up that is the recommendation itself.  So the values are refused
before any plan runs, each named by its position and as the user typed it, with the field's limit in
the user's unit.
"""

from __future__ import annotations

import math
from typing import NamedTuple

from pydantic import ValidationError

from planner.errors import ScenarioError, quoted
from planner.scenario.units import UNIT_SYSTEMS, from_si, si_unit_text
from planner.scenario.wording import DECIMALS, SYSTEMS

class Lever(NamedTuple):
    keyword: str       # plan.with_changes keyword
    section: str       # the scenario section of its field
    field: str
    kind: str          # quantity kind of its values

    @property
    def si_unit(self) -> str:
        """The SI unit of its values, as the JSON writes it (scenario.units.si_unit_text)."""
        return si_unit_text(self.kind)


LEVERS = {
    "setpoint": Lever("setpoint", "tracing", "setpoint", "temperature"),
    "steam_pressure": Lever("steam_pressure", "tracing", "steam_pressure", "pressure"),
    "pump_speed": Lever("pump_speed", "pump", "speed", "rotational_speed"),
    "flow_limit": Lever("flow_limit", "pump", "flow_setpoint", "volume_flow"),
}
SAME_RELATIVE = 1e-9     # values this close are one value (the dashboard's cache keys them to 9 digits)


class ValuesError(ScenarioError):
    """Values to compare that cannot be compared; ``problems`` name the option or ``values``."""

    def __init__(self, problems: list[tuple[str, str]]):
        super().__init__(problems)
        self.args = ("the values to compare are not valid:\n  " + "\n  ".join(f"{f}: {m}" for f, m in problems),)

    def __str__(self) -> str:
        return self.args[0]


def typed_values(scenario, lever: str, numbers: list[float], system: str, option: str) -> list[float]:
    """SI values of ``numbers`` as typed in ``system``'s display unit of the lever, each checked against
    the lever's field with the limit in that unit; ValuesError naming ``option`` otherwise."""
    _, section, name, kind = LEVERS[lever]
    unit = UNIT_SYSTEMS[system][kind]
    model = getattr(scenario, section)
    values, problems = [], []
    for i, number in enumerate(numbers):
        text = f"{number!r} {unit.pint_unit}"
        shown = f"value {i + 1} ({number:g} {unit.label})"
        if model is None:              # no pump: with_changes names the missing section below
            from planner.scenario.units import to_si

            values.append(to_si(text, kind, option))
            continue
        copy = model.model_copy()
        try:
            setattr(copy, name, text)
        except ValidationError as exc:
            from planner.scenario.schema import problems_from

            problems += [(option, f"{shown}: {message}") for _, message in problems_from(exc)]
            values.append(math.nan)
            continue
        values.append(getattr(copy, name))
    if problems:
        raise ValuesError(problems[:10])
    check_values(scenario, lever, values, option, [f"{n:g} {unit.label}" for n in numbers])
    return values


def check_values(scenario, lever: str, values: list[float], field: str = "values", shown: list[str] | None = None) -> None:
    """Refuse (ValuesError at ``field``) values that are not finite, repeat an earlier value, or that the
    scenario refuses at the lever's field (``plan.with_changes``, SI); ``shown`` is each value as typed."""
    from planner.scenario.wording import format_quantity
    from planner.transfer.changes import with_changes

    keyword, _, _, kind = LEVERS[lever]
    problems = []
    for i, value in enumerate(values):
        if not isinstance(value, (int, float)) or isinstance(value, bool) or not math.isfinite(value):
            problems.append((field, f"value {i + 1} ({quoted(value)}) is not a finite number"))
            continue
        words = f"value {i + 1} ({shown[i] if shown else format_quantity(value, kind)})"
        earlier = next((j for j in range(i) if _same(values[j], value)), None)
        if earlier is not None:
            problems.append((field, f"{words} repeats value {earlier + 1}: give each value once"))
            continue
        try:
            with_changes(scenario, **{keyword: float(value)})
        except ScenarioError as exc:
            problems += [(field, f"{words}: {path + ': ' if path else ''}{message}") for path, message in exc.problems]
        if len(problems) >= 10:
            break
    if problems:
        raise ValuesError(problems[:10])


def _same(a, b) -> bool:
    return isinstance(a, (int, float)) and math.isfinite(a) and abs(a - b) <= SAME_RELATIVE * max(abs(a), abs(b))


MAX_EXTRA_DECIMALS = 3   # a lever's values are shown with at most this many decimals beyond the display table's
SHOWN_CLOSE = 0.005      # a value shown within 0.5 % of itself (of 10 display units near zero) is shown as it is


def lever_decimals(quantity: str, values=(), least: int | None = None, system: str | None = None) -> int:
    """Decimals of a lever's values in tables and sentences: the display table's (``wording.DECIMALS``), or
    more (at most ``MAX_EXTRA_DECIMALS``) where the values need them, in either unit system, to be told
    apart and each shown within ``SHOWN_CLOSE`` of itself: pump speeds of 0.5 and 2.5 rpm are not shown as
    "0" and "2 rpm", nor setpoints of 40.25 and 40.3 degC both as "40.2 degC".  ``least``: start from these
    decimals instead of the display table's (a grid's ambients in whole degrees where they are whole);
    ``system``: only as that unit system shows them (a table drawn in one), else as either does (a sentence).

    Examples
    --------
    >>> lever_decimals("rotational_speed"), lever_decimals("rotational_speed", [0.5 / 60.0, 100.0 / 60.0])
    (0, 1)
    >>> lever_decimals("temperature", [313.15, 323.15]), lever_decimals("temperature", [313.4, 313.45])
    (1, 2)
    >>> lever_decimals("temperature", [268.15, 278.15], least=0), lever_decimals("temperature", [270.65, 271.15], least=0)
    (0, 1)
    >>> lever_decimals("temperature", [275.15], least=0, system="SI"), lever_decimals("temperature", [275.15], least=0)
    (0, 1)
    """
    base = DECIMALS.get(quantity, 2) if least is None else least
    numbers = sorted({float(v) for v in values if isinstance(v, (int, float)) and math.isfinite(v)})
    needed = base
    for each in SYSTEMS if system is None else (system,):
        shown = [from_si(v, quantity, each) for v in numbers]
        digits = base
        while digits < base + MAX_EXTRA_DECIMALS and not _faithful(shown, digits):
            digits += 1
        needed = max(needed, digits)
    return needed


def _faithful(numbers: list[float], digits: int) -> bool:
    texts = [f"{x:.{digits}f}" for x in numbers]
    return len(set(texts)) == len(texts) and all(
        abs(float(text) - x) <= SHOWN_CLOSE * max(abs(x), 10.0) for text, x in zip(texts, numbers))
