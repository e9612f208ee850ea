"""Brent's root finder on a bracket, in plain Python: the planner's one ``brentq``.

Brent's method (R. P. Brent, *Algorithms for Minimization Without Derivatives*, 1973, ch. 4): keep a
bracket [x, x_blk] with a sign change, step by inverse quadratic (or secant) interpolation while that
shrinks the bracket fast enough, else bisect.  The steps, their order and their arithmetic are those of
SciPy's ``scipy.optimize.brentq`` (its C routine, BSD licence), so a root agrees with SciPy's to the bit
(``tests/test_brent.py`` checks it against SciPy); it is written here so that planning a transfer does not
import ``scipy.optimize``, which with ``scipy.linalg`` it pulls in took about a quarter of a second of
every plan's start-up (issue: a CLI that starts in a blink).

Licence of the part derived from SciPy (its ``brentq.c``, written by Charles Harris; SciPy is Copyright (c)
2001-2002 Enthought, Inc. and 2003 onwards the SciPy Developers, from memory of its LICENSE.txt): BSD
3-clause.  Redistributions keep this notice; neither the names of the copyright holders nor of the
contributors may be used to endorse this program; the code is provided "as is", without warranty.

Stops when the half-bracket is below (xtol + rtol |x|) / 2, like SciPy's.  Refusals are SciPy's too:
ValueError when f(a) and f(b) have the same sign or f returns NaN, RuntimeError when ``maxiter`` steps do
not converge.
"""

from __future__ import annotations

import math

RTOL_MIN = 4.0 * 2.220446049250313e-16        # 4 machine epsilons, SciPy's lower bound on rtol


def _value(f, x: float) -> float:
    fx = float(f(x))
    if math.isnan(fx):
        raise ValueError(f"The function value at x={x:.6g} is NaN; solver cannot continue.")
    return fx


def _step(x_pre, f_pre, x_cur, f_cur, x_blk, f_blk, s_pre, s_bis, delta):
    """The next step from x_cur: interpolated when short and shrinking, else the bisection."""
    if abs(s_pre) > delta and abs(f_cur) < abs(f_pre):
        if x_pre == x_blk:                                 # secant through the last two points
            s_try = -f_cur * (x_cur - x_pre) / (f_cur - f_pre)
        else:                                              # inverse quadratic through all three
            d_pre = (f_pre - f_cur) / (x_pre - x_cur)
            d_blk = (f_blk - f_cur) / (x_blk - x_cur)
            s_try = -f_cur * (f_blk * d_blk - f_pre * d_pre) / (d_blk * d_pre * (f_blk - f_pre))
        if 2 * abs(s_try) < min(abs(s_pre), 3 * abs(s_bis) - delta):
            return s_try, True
    return s_bis, False


def brentq(f, a: float, b: float, xtol: float = 2e-12, rtol: float = RTOL_MIN, maxiter: int = 100) -> float:
    """A root of ``f`` in [a, b], where f(a) and f(b) differ in sign (either may be 0).

    Examples
    --------
    The positive root of x^2 - 2 is sqrt(2) = 1.41421356237... (by hand); within xtol = 2e-12 of it,
    so printed to 10 decimals:

    >>> round(brentq(lambda x: x * x - 2.0, 0.0, 2.0), 10)
    1.4142135624

    References
    ----------
    [1] Brent, R. P., Algorithms for Minimization Without Derivatives, Prentice-Hall, 1973, chapter 4.
    """
    if xtol <= 0:
        raise ValueError(f"xtol too small ({xtol:g} <= 0)")
    if rtol < RTOL_MIN:
        raise ValueError(f"rtol too small ({rtol:g} < {RTOL_MIN:g})")
    x_pre, x_cur = float(a), float(b)
    f_pre, f_cur = _value(f, x_pre), _value(f, x_cur)
    if f_pre * f_cur > 0:
        raise ValueError("f(a) and f(b) must have different signs")
    if f_pre == 0:
        return x_pre
    if f_cur == 0:
        return x_cur
    x_blk = f_blk = s_pre = s_cur = 0.0
    for _ in range(maxiter):
        if f_pre * f_cur < 0:                              # the bracket's far end is the previous point
            x_blk, f_blk = x_pre, f_pre
            s_pre = s_cur = x_cur - x_pre
        if abs(f_blk) < abs(f_cur):                        # x_cur: the better end
            x_pre, x_cur, x_blk = x_cur, x_blk, x_cur
            f_pre, f_cur, f_blk = f_cur, f_blk, f_cur
        delta = (xtol + rtol * abs(x_cur)) / 2
        s_bis = (x_blk - x_cur) / 2
        if f_cur == 0 or abs(s_bis) < delta:
            return x_cur
        step, interpolated = _step(x_pre, f_pre, x_cur, f_cur, x_blk, f_blk, s_pre, s_bis, delta)
        s_pre, s_cur = (s_cur, step) if interpolated else (s_bis, s_bis)
        x_pre, f_pre = x_cur, f_cur
        x_cur += s_cur if abs(s_cur) > delta else (delta if s_bis > 0 else -delta)
        f_cur = _value(f, x_cur)
    raise RuntimeError(f"Failed to converge after {maxiter} iterations, value is {x_cur}.")
