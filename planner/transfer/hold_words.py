"""Hours in words: the one wording of a time in hours, and of a stop the line holds through (the hold's
horizon).  Here, apart from ``transfer/hold.py``, so that tables and pages that write times load nothing of
the transfer's models (``hold`` imports the line's transients and the transfer system).
"""

from __future__ import annotations

from planner.scenario.budget import HOLD_HORIZON_S   # how long a stop is followed: past it, the line holds
from planner.scenario.wording import Q, Sentence, render

HOLDS_WORDS = f"holds {HOLD_HORIZON_S / 86400:.0f} days"    # a time to the limit past the hold horizon


def hours(value: float | None):
    """A time in a sentence (``Sentence(..., t=hours(s))``): the time as a quantity (the display decimals of
    "time", in hours) or, for None (no limit reached), "holds 14 days".  The one wording of hours as text;
    ``hours_text`` renders it.

    Examples
    --------
    5400 s is a time quantity (shown in hours); no limit reached reads as the hold horizon:

    >>> hours(5400.0).value, hours(5400.0).kind, hours(None)
    (5400.0, 'time', 'holds 14 days')
    """
    return HOLDS_WORDS if value is None else Q(value, "time")


def hours_text(value: float | None, system: str = "SI") -> str:
    """``hours(value)`` as text in ``system`` (tables).

    Examples
    --------
    5400 s = 1.5 h, at the display decimals of "time":

    >>> hours_text(5400.0), hours_text(None)
    ('1.50 h', 'holds 14 days')
    """
    return render(Sentence("{t}", t=hours(value)), system)
