"""Which rows of a comparison by odds cannot be told apart (``planner.sweeps.compare_odds._apart``).

With common random numbers (every row at the same sampled points) the paired sampling error of two nearly
equal rows shrinks towards 0; the sampling error alone then called a P50 cost of 509.93 EUR different from
510.01 EUR (the syrup demo at 45 against 5-40 degC, 128 samples: 0.079 +- 0.005 EUR, every sample 0.02-0.23 EUR
apart).  A difference that small is inside what the plans themselves resolve (held to 0.2 %,
tests/test_plan_grid.py), so the rows must be marked as not told apart, by the deterministic comparison's one
rule of "no clear difference" (``planner.sweeps.compare.tie_band``: 1 % of the lowest cost).  The 95 % band
of 3.182 standard errors is Student's t(0.975, 3) (NIST/SEMATECH e-Handbook, table 1.3.6.7.2).
"""

from __future__ import annotations

from planner.scenario.wording import render
from planner.sweeps.compare import TIE_BAND, tie_band
from planner.sweeps.compare_odds import TOLD_APART, _apart, _paired_error, recommend_by_odds
from planner.sweeps.odds_stats import percentile

N = 32          # 4 scrambles of 8 samples


def _rows(costs: list[list[float]]):
    """Rows that all finish in the window (chance 1) with the given sampled costs."""
    raw = [[{"total_cost": c, "total_time_s": 1.0, "stop_codes": []} for c in cs] for cs in costs]
    rows = [{"value": 300.0 + 5.0 * i, "chance": 1.0, "p50_cost": percentile(cs, 0.5), "odds": {"currency": "EUR"}}
            for i, cs in enumerate(costs)]
    return rows, raw


def _scattered(base: float, shift: float) -> list[float]:
    # a spread of costs like the syrup's (about +-60 EUR), every sample moved by the same small shift
    return [base + 60.0 * ((7 * i) % N) / N + shift + 0.001 * (i % 3) for i in range(N)]


def test_a_difference_far_inside_the_plans_precision_is_not_told_apart():
    cheap, near = _scattered(480.0, 0.0), _scattered(480.0, 0.08)
    diff, error = _paired_error(near, cheap, lambda v: percentile(v, 0.5))
    assert abs(diff - 0.08) < 0.01 and error is not None and abs(diff) > TOLD_APART * error   # "significant" alone
    assert not _apart(diff, error, tie_band(percentile(cheap, 0.5)))
    assert _apart(diff, error)           # without the band the old rule called them apart
    rows, raw = _rows([near, cheap])
    best, named, reason, close = recommend_by_odds(rows, raw, 2.0, 0.9, "temperature")
    # no clear difference: the gentlest (lowest) value is recommended, as by the plain comparison's rule
    # (planner.sweeps.compare.recommend), and the cheapest is named as not told apart from it
    assert best == named == 0 and close == [1]
    text = render(reason, "SI")
    assert text.startswith("26.9 °C: the gentlest") and "(480.0" not in text                   # 300 K
    assert text.endswith("it cannot be told apart from 31.9 °C"), text                          # 305 K


def test_a_difference_beyond_the_band_and_the_sampling_error_is_told_apart():
    cheap = _scattered(480.0, 0.0)
    dear = _scattered(480.0, 3.0 * TIE_BAND * 500.0)      # 3 % dearer at every sample
    rows, raw = _rows([dear, cheap])
    best, _, reason, close = recommend_by_odds(rows, raw, 2.0, 0.9, "temperature")
    assert best == 1 and close == [] and "cannot be told apart" not in render(reason, "SI")


def test_inside_the_band_but_a_scattered_difference_still_within_sampling_error():
    # the band only adds rows: a difference past the band but inside the sampling error stays "not apart"
    assert not _apart(10.0, 5.0, 1.0)           # 10 < 3.182 x 5
    assert _apart(10.0, 1.0, 1.0)
    assert not _apart(0.5, 0.0, 1.0)            # inside the band even with no sampling error
    assert _apart(float("inf"), None, 1.0)      # a row that does not finish is apart
