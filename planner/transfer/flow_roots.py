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
    (first in a narrow band around a guess).  None when no sign change is found down to a trickle.

    Examples
    --------
    For f(q) = q - 0.3 from 1.0: 0.6 and 0.36 are still above the root, 0.216 = 0.6^3 below it; a
    guess of 0.305 brackets it at once in its +-3 % band (by hand); a function below zero at the top
    has no bracket:

    >>> [tuple(round(v, 5) for v in bracket_down(lambda q: q - 0.3, 1.0, g)) for g in (None, 0.305)]
    [(0.216, 0.36), (0.29585, 0.31415)]
    >>> bracket_down(lambda q: q - 2.0, 1.0, None) is None
    True
    """
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
    """Root of a function changing sign on [low, high] (Brent's method; values are cached by the caller).

    Examples
    --------
    A pump head 50 - 2e4 q^2 [m] meets a system head 10 + 3e4 q^2 at q = sqrt(40 / 5e4) = 0.028284 m^3/s
    (by hand); the relative tolerance is 1e-5, so 4 significant digits are shown:

    >>> round(flow_root(lambda q: (10.0 + 3e4 * q * q) - (50.0 - 2e4 * q * q), 0.0, 0.05), 5)
    0.02828

    References
    ----------
    [1] Brent, R. P., Algorithms for Minimization Without Derivatives, Prentice-Hall, 1973, chapter 4.
    """
    if low == high:
        return low
    return brentq(function, low, high, xtol=1e-9, rtol=1e-5, maxiter=100)
