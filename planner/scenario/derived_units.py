"""The unit system that values a change derived are said in when a field refuses them.

A lever moved or an ambient shifted assigns SI floats (``quantities.SI``) to a scenario's fields; a value
the user never typed (a segment's own ambient moved with the site's) is then refused in the units the
command's user reads (``derived_values_in``, set at the edge: the CLI, the dashboard), else in the kind's
default unit, as a scenario file gives it.  Kept apart from ``quantities`` so that the CLI sets it
without importing pydantic.
"""

from __future__ import annotations

import contextlib
import contextvars

_DERIVED_SYSTEM: contextvars.ContextVar[str | None] = contextvars.ContextVar("planner_derived_system", default=None)


@contextlib.contextmanager
def derived_values_in(system: str):
    """Within it, a value a change derived (an ``SI`` float: a segment's own ambient moved with the
    site's) that its field refuses is said, with the field's limit, in ``system``'s units ("SI" or "US"
    of ``units.UNIT_SYSTEMS``); outside, in the kind's default unit, as a scenario file gives it.

    Examples
    --------
    >>> from pydantic import TypeAdapter
    >>> from planner.scenario.quantities import SI, Quantity
    >>> adapter = TypeAdapter(Quantity("temperature", le=343.15))
    >>> with derived_values_in("US"):
    ...     adapter.validate_python(SI(349.15))
    Traceback (most recent call last):
    ...
    pydantic_core._pydantic_core.ValidationError: 1 validation error for function-before[parse(), float]
      Value error, 168.8 °F is out of range: must be at most 158 °F ...
    """
    token = _DERIVED_SYSTEM.set(system)
    try:
        yield
    finally:
        _DERIVED_SYSTEM.reset(token)


def derived_system() -> str | None:
    """The unit system set by ``derived_values_in`` (None: none set)."""
    return _DERIVED_SYSTEM.get()
