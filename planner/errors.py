"""Errors the planner raises on purpose: each says which field or step and why."""

from __future__ import annotations


class PlannerError(Exception):
    """Base class: a message meant for the user, never a traceback."""


class ScenarioError(PlannerError):
    """A scenario that cannot be read or fails validation.

    ``problems`` holds one ``(field_path, message)`` pair per bad field so that a form can show each
    message beside its field.
    """

    def __init__(self, problems: list[tuple[str, str]]):
        from planner.scenario.labels import named   # the page's words for each field

        self.problems = problems
        lines = [f"{named(field)}: {message}" if field else message for field, message in problems]
        super().__init__("scenario is not valid:\n  " + "\n  ".join(lines))


class ComputationError(PlannerError):
    """A computation that has no answer for these inputs, with the reason in words."""


QUOTE_CHARS = 80   # at most this many characters of the user's input are echoed in a message


def quoted(value: object, limit: int = QUOTE_CHARS) -> str:
    """The user's input as a message quotes it: its ``repr``, cut to about ``limit`` characters with the
    full length said, so a refusal never echoes a whole file or a 100 kB field back.

    >>> quoted("5 m)")
    "'5 m)'"
    >>> quoted("x" * 5000)[-24:]
    "xxx'… (5,000 characters)"
    """
    if isinstance(value, int) and not isinstance(value, bool) and value.bit_length() > 4 * limit:
        return f"an integer of about {int(value.bit_length() * 0.30103) + 1:,} digits"   # repr may refuse it
    text = repr(value)
    if len(text) <= limit:
        return text
    size = f" ({len(value):,} characters)" if isinstance(value, (str, bytes)) else ""
    return text[:limit - 1] + "'…" + size if isinstance(value, (str, bytes)) else text[:limit - 1] + "…"


def shortened(name: object, limit: int = QUOTE_CHARS) -> str:
    """A name (a segment's, a product's) as a message shows it: in full up to ``limit`` characters, else
    its start and the full length, so a 10 kB name does not fill the page.

    >>> shortened("Jetty head manifold")
    'Jetty head manifold'
    >>> shortened("y" * 10240)[-22:]
    'y… (10,240 characters)'
    """
    text = str(name)
    if len(text) <= limit:
        return text
    return f"{text[:limit - 1]}… ({len(text):,} characters)"
