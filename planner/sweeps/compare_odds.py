"""A comparison by its odds (``compare --uncertainty``): for each value of the lever, the chance to
finish within the planned window with no stop, the P90 total time and the P50 and P90 cost, from the
same sampled plans as ``plan --uncertainty``.

Every row uses the same Sobol points (common random numbers): the rows differ by the lever alone, so
their differences carry far less sampling error than each row's figures.  That error is worked out
on the differences themselves, scramble by scramble (paired), and two rows whose difference is within
``TOLD_APART`` standard errors of it (a 95 % band on 3 degrees of freedom) cannot be told apart; nor can two
whose P50 costs differ by less than the deterministic comparison's ``tie_band`` (``_apart``).

Recommendation: the lowest P50 cost among the rows whose chance reaches ``limits.confidence``; if none
does, none is recommended and the row with the best chance is named.
"""

from __future__ import annotations

import math
from concurrent.futures import Executor
from dataclasses import dataclass, field

import numpy as np

from planner.checks.lever_values import LEVERS, check_values
from planner.scenario.schema import Scenario
from planner.scenario.wording import Q, Sentence, join, money_text
from planner.sweeps.executors import fan_out
from planner.sweeps.odds_inputs import SCRAMBLES, sampling_of
from planner.sweeps.odds_stats import percentile, split
from planner.sweeps.uncertainty import check_work, confidence_of, sample_row, summarise, tasks_for

# standard errors of a difference within which two rows cannot be told apart: the standard error comes from
# 4 scrambles, 3 degrees of freedom, so a two-sided 95 % band is Student's t(0.975, 3) = 3.182 errors
# (any t table, e.g. NIST/SEMATECH e-Handbook of Statistical Methods, table 1.3.6.7.2)
TOLD_APART = 3.182


@dataclass
class OddsComparison:
    """Result record of a comparison by odds (SI values)."""

    lever: str
    quantity: str
    values: list[float]
    rows: list[dict]                      # per value: the odds summary (no fan) plus the row figures
    recommended: int | None
    reason: str
    confidence: float
    not_told_apart: list[int] = field(default_factory=list)   # rows that cannot be told apart from the named one
    named: int | None = None       # the recommended row, or (none reaching the confidence) the best chance
    inputs: list[dict] = field(default_factory=list)
    samples: int = 0
    seed: int = 0
    method: str = ""


def _paired_error(a: list[float], b: list[float], measure) -> tuple[float, float | None]:
    """The difference measure(a) - measure(b) on all samples and its standard error over the scrambles
    (paired: the same points in both); None when it is not finite."""
    whole = measure(a) - measure(b)
    parts = [measure(x) - measure(y) for x, y in zip(split(a, SCRAMBLES), split(b, SCRAMBLES))]
    if not all(math.isfinite(p) for p in parts) or not math.isfinite(whole):
        return whole, None
    return whole, float(np.std(parts, ddof=1) / math.sqrt(len(parts)))


def _success(rows: list[dict], window: float) -> list[float]:
    return [1.0 if r["total_time_s"] <= window and not r["stop_codes"] else 0.0 for r in rows]


def _apart(diff: float, error: float | None, band: float = 0.0) -> bool:
    """A difference that tells two rows apart: beyond ``TOLD_APART`` of its sampling error and beyond
    ``band``, the difference the plans themselves cannot resolve.  With common random numbers the paired
    sampling error of two nearly equal rows shrinks towards 0, so that error alone would call any
    difference real, down to the plans' own numerical scatter (a P50 cost of 509.93 against 510.01 EUR,
    0.08 EUR +- 0.005 on the syrup demo): for costs ``band`` is the comparison's ``tie_band`` (1 % of the
    lowest, at least the costs' rounding; the plans are held to 0.2 %), the one rule of "no clear
    difference" for both comparisons."""
    if not math.isfinite(diff):
        return True
    if abs(diff) <= band:
        return False
    return error is not None and abs(diff) > TOLD_APART * error


def compare_odds(scenario: Scenario, lever: str, values: list[float], executor: Executor | None = None,
                 progress=None, samples: int | None = None, seed: int | None = None) -> OddsComparison:
    """The odds of each of ``values`` (SI) of ``lever`` on ``executor``; ``samples`` and ``seed`` as for
    ``plan_odds`` (the same points for every row)."""
    from planner.sweeps.compare import check_lever

    check_lever(scenario, lever)
    check_values(scenario, lever, values)
    check_work(scenario, sampling_of(scenario, samples, seed)[0], len(values))
    specs, u, base, samples, seed = tasks_for(scenario, samples, seed)
    keyword = LEVERS[lever].keyword
    tasks = [(scenario, draw, {keyword: value}) for value in values for (_, draw, _) in base]
    results = fan_out(sample_row, tasks, executor, progress)
    window = scenario.schedule.planned_window
    raw, rows = [], []
    for i, value in enumerate(values):
        samples_of_row = results[i * samples:(i + 1) * samples]
        raw.append(samples_of_row)
        odds = summarise(scenario, specs, u, samples_of_row, seed, fan_data=False)
        rows.append({"value": value, "unit": LEVERS[lever].si_unit, "chance": odds["probability_in_window_no_stop"],
                     "chance_error": odds["sampling_error"]["probability_in_window_no_stop"],
                     "p90_total_time_s": odds["percentiles"]["total_time_s"]["p90"],
                     "p50_cost": odds["percentiles"]["total_cost"]["p50"],
                     "p90_cost": odds["percentiles"]["total_cost"]["p90"], "odds": odds})
    confidence = confidence_of(scenario)
    best, named, reason, apart = recommend_by_odds(rows, raw, window, confidence, LEVERS[lever].kind)
    method = rows[0]["odds"]["method"] if rows else ""
    return OddsComparison(lever, LEVERS[lever].kind, list(values), rows, best, reason, confidence, apart, named,
                          [s.as_dict() for s in specs], samples, seed,
                          method + "; the same points for every value (common random numbers)")


def recommend_by_odds(rows: list[dict], raw: list[list[dict]], window: float, confidence: float,
                      quantity: str) -> tuple[int | None, int, str, list[int]]:
    """(recommended row or None, the row named: recommended or with the best chance, the reason as a
    Sentence, rows that cannot be told apart from the named one)."""
    from planner.checks.lever_values import lever_decimals
    from planner.sweeps.compare import tie_band

    decimals = lever_decimals(quantity, [r["value"] for r in rows])
    value = lambda i: Q(rows[i]["value"], quantity, decimals)  # noqa: E731
    pct = lambda p: f"{100.0 * p:.0f} %"  # noqa: E731
    reaching = [i for i, r in enumerate(rows) if r["chance"] >= confidence and math.isfinite(r["p50_cost"])]
    if not reaching:
        best = max(range(len(rows)), key=lambda i: (rows[i]["chance"], -rows[i]["value"]))
        close = [i for i in range(len(rows)) if i != best and not _apart(*_paired_error(
            _success(raw[best], window), _success(raw[i], window), np.mean))]
        return None, best, Sentence("no value reaches the confidence asked for ({c}, limits.confidence) of finishing in the "
                              "window with no stop: the best chance is {p} at {v}{close}", c=pct(confidence),
                              p=pct(rows[best]["chance"]), v=value(best), close=_close_words(close, value)), close
    cheapest = min(reaching, key=lambda i: (rows[i]["p50_cost"], rows[i]["value"]))
    cost = lambda i: [x["total_cost"] for x in raw[i]]  # noqa: E731
    p50 = lambda values: percentile(values, 0.5)  # noqa: E731
    band = tie_band(rows[cheapest]["p50_cost"])
    # as the plain comparison: among the values with no clear difference from the cheapest, the gentlest
    tied = [i for i in reaching if i == cheapest or not _apart(*_paired_error(cost(i), cost(cheapest), p50), band)]
    best = min(tied, key=lambda i: rows[i]["value"])
    close = [i for i in reaching if i != best and not _apart(*_paired_error(cost(i), cost(best), p50), band)]
    money = lambda i: money_text(rows[i]["p50_cost"], rows[i]["odds"]["currency"])  # noqa: E731
    choice = Sentence("lowest P50 cost {cost}", cost=money(best)) if best == cheapest else Sentence(
        "the gentlest of the values with no clear difference in P50 cost from the lowest ({low} at {v}), at "
        "{cost}", low=money(cheapest), v=value(cheapest), cost=money(best))
    reason = Sentence("{v}: {choice} among the {n} of {total} values that finish in the window "
                      "with no stop at least {c} of the time (its chance {p}){close}", v=value(best),
                      choice=choice, n=len(reaching),
                      total=len(rows), c=pct(confidence), p=pct(rows[best]["chance"]),
                      close=_close_words(close, value, cost=True))
    return best, best, reason, close


def _close_words(close: list[int], value, cost: bool = False) -> str:
    if not close:
        return ""
    from planner.sweeps.compare import TIE_BAND

    within = Sentence("the sampling error (or, in P50 cost, {band} % of the lowest: the comparison's band of no "
                      "clear difference)", band=f"{TIE_BAND * 100:g}") if cost else "the sampling error"
    return Sentence("; within {within} it cannot be told apart from {vs}", within=within,
                    vs=join([Sentence("{v}", v=value(i)) for i in close], ", "))


def comparison_odds_json(c: OddsComparison) -> dict:
    """The comparison by odds as JSON (SI; beyond the samples that finished: null)."""
    from planner.plain import plain

    rows = [{k: v for k, v in r.items() if k != "odds"} | {
        "stop_probability": r["odds"]["stop_probability"], "stop_codes": r["odds"]["stop_codes"],
        "did_not_finish": r["odds"]["did_not_finish"], "percentiles": r["odds"]["percentiles"],
        "sampling_error": r["odds"]["sampling_error"], "sensitivity": r["odds"]["sensitivity"]} for r in c.rows]
    return plain({"lever": c.lever, "quantity": c.quantity, "unit": LEVERS[c.lever].si_unit, "values": c.values,
                  "samples": c.samples, "seed": c.seed, "confidence": c.confidence, "rows": rows,
                  "recommended_index": c.recommended,
                  "recommended_value": None if c.recommended is None else c.rows[c.recommended]["value"],
                  "named_index": c.named, "reason": c.reason, "not_told_apart": c.not_told_apart, "inputs": c.inputs, "method": c.method})
