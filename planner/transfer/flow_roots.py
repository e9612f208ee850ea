"""Root finding on the system's flow: bracket a sign change searching down from the highest flow (first
near a guess), then Brent's method (``planner.line.brent``, SciPy's ``brentq`` to the bit).
"""

from __future__ import annotations

from planner.line.brent import brentq

HUGE_PRESSURE = 1.0e12  # stands in for "this rate cannot be pushed" (product sets) inside root finding
MIN_FLOW_FRACTION = 1e-3
# A warm guess is accepted when the Newton step from it is below this fraction of the flow: 0.01 %,
# below any figure a plan reports (flows to 0.1 m³/h, times to 0.01 h) and above the few-1e-5 scatter
# that the march's own iterations leave in the system curve from one timeline state to the next.
GUESS_TOLERANCE = 1e-4


def bracket_down(function, high: float, guess: float | None):
    """Find [a, b] with function(a) < 0 <= function(b), b <= high, searching down from ``high``
    (first in a narrow band around a guess).  None when no sign change is found down to a trickle."""
    if function(high) < 0.0:
        return None
    if guess is not None and 0.0 < guess < high:
        top = min(high, guess * 1.03)
        bottom = guess * 0.97
        if function(top) >= 0.0 and function(bottom) < 0.0:
            return bottom, top
    a = b = high
    while a > high * MIN_FLOW_FRACTION:
        a = a * 0.6
        if function(a) < 0.0:
            return a, b
        b = a
    return None


def flow_root(function, low: float, high: float) -> float:
    """Root of a function changing sign on [low, high] (Brent's method; values are cached by the caller)."""
    if low == high:
        return low
    return brentq(function, low, high, xtol=1e-9, rtol=1e-5, maxiter=100)
