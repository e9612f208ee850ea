"""planner.line.brent: the planner's Brent root finder agrees with SciPy's ``scipy.optimize.brentq``
(the reference implementation; SciPy used test-only here) to the bit, so plans did not change when the
planner stopped importing ``scipy.optimize`` (Brent 1973, ch. 4: the method)."""

from __future__ import annotations

import math
import random

import pytest
from scipy.optimize import brentq as scipy_brentq

from planner.line.brent import brentq


def _cases():
    rng = random.Random(20261205)
    for _ in range(300):
        root = rng.uniform(-5.0, 5.0)
        scale = 10.0 ** rng.uniform(-6, 6)
        power = rng.choice([1, 3, 5])
        kind = rng.choice(["poly", "exp", "atan", "kink"])
        a = root - rng.uniform(1e-3, 10.0)
        b = root + rng.uniform(1e-3, 10.0)
        if rng.random() < 0.5:
            a, b = b, a
        xtol = rng.choice([1e-12, 1e-9, 1e-7, 1e-3])
        rtol = rng.choice([1e-15, 1e-12, 1e-5, 1e-4])
        yield kind, root, scale, power, a, b, xtol, rtol


def _function(kind, root, scale, power):
    if kind == "poly":
        return lambda x: scale * (x - root) ** power + 0.1 * scale * (x - root)
    if kind == "exp":
        return lambda x: math.exp(0.5 * (x - root)) - 1.0
    if kind == "atan":
        return lambda x: scale * math.atan(3.0 * (x - root))
    return lambda x: (x - root) * (1.0 if x < root else 40.0)       # a kink at the root: bisection steps


@pytest.mark.parametrize("case", list(_cases()), ids=lambda c: f"{c[0]}-{c[1]:.3f}-{c[6]:g}-{c[7]:g}")
def test_the_root_and_the_calls_are_scipys(case):
    kind, root, scale, power, a, b, xtol, rtol = case
    ours, theirs = [], []
    f = _function(kind, root, scale, power)
    mine = brentq(lambda x: ours.append(x) or f(x), a, b, xtol=xtol, rtol=rtol)
    reference = scipy_brentq(lambda x: theirs.append(x) or f(x), a, b, xtol=xtol, rtol=rtol)
    assert mine == reference                       # bit for bit
    assert ours == theirs                          # the same points, in the same order
    assert abs(mine - root) <= 4 * (xtol + rtol * abs(root)) + 1e-9 * (1 + abs(root))


def test_refusals_are_scipys():
    """The same inputs are refused by both, with the same kind of error."""
    cases = [(lambda x: x * x + 1.0, -1.0, 1.0, {}, ValueError, "different signs"),
             (lambda x: math.nan if x > 0.5 else x - 0.7, 0.0, 1.0, {}, ValueError, "NaN"),
             (lambda x: math.exp(x) - 1.5, 0.0, 1.0, {"xtol": 1e-300, "maxiter": 2}, RuntimeError, "converge"),
             (lambda x: x, -1.0, 1.0, {"rtol": 1e-17}, ValueError, "rtol")]
    for f, a, b, options, error, words in cases:
        with pytest.raises(error, match=words):
            brentq(f, a, b, **options)
        with pytest.raises(error):
            scipy_brentq(f, a, b, **options)


def test_an_end_at_the_root_is_returned():
    assert brentq(lambda x: x - 2.0, 2.0, 5.0) == 2.0
    assert brentq(lambda x: x - 5.0, 2.0, 5.0) == 5.0
