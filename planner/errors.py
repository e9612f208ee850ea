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
