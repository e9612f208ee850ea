"""The odds as tables and words in the user's unit system (no Streamlit here): the P10/P50/P90 of the
figures, the chances, a comparison's rows by their odds, and the block of the HTML report.

The words and the formatting are the planner's (``planner.reports.uncertainty_text``: ``figure_rows``,
``chance_lines``, ``value_text``, ``percentage``); this module only lays them out.  Input: the summary of
``planner.sweeps.uncertainty.summarise`` (SI, +inf beyond the samples that finished) or the summary a saved
revision keeps (``odds_summary``: null there, listed in ``beyond``; ``restored`` puts +inf back).
"""

from __future__ import annotations

import copy
import html
import math
from typing import TYPE_CHECKING

from planner.reports.uncertainty_text import (BEYOND, chance_lines, figure_rows, input_rows, percentage,
                                              value_text)

if TYPE_CHECKING:
    import pandas as pd             # imported where a frame is built: ``odds_diff_row`` (the header) needs none


def restored(summary: dict, currency: str = "") -> dict:
    """A saved summary made whole again for the tables: +inf for each percentile listed in ``beyond``, the
    currency given (a revision keeps it beside the figures) and "—" for the count of samples that could not be
    planned, which summaries saved before it was kept lack."""
    odds = copy.deepcopy(summary)
    for name, keys in (odds.get("beyond") or {}).items():
        for key in keys:
            odds["percentiles"][name][key] = math.inf
    odds.setdefault("currency", currency)
    odds.setdefault("not_computed", "—")
    return odds


def figures_frame(odds: dict, system: str) -> pd.DataFrame:
    """P10, P50, P90 and the sampling error of each figure, as text in ``system``."""
    import pandas as pd

    rows = [(r["label"], r["p10"], r["p50"], r["p90"], f"± {r['sampling_error']}") for r in figure_rows(odds, system)]
    return pd.DataFrame(rows, columns=["Figure", "P10", "P50", "P90", "Sampling error"])


def inputs_frame(odds: dict, system: str) -> pd.DataFrame:
    """The sampled inputs: distribution, share of the total time's spread, source."""
    import pandas as pd

    rows = [(r["label"], r["distribution"], "—" if r["share"] is None else f"{r['share']:.2f}", r["source"])
            for r in sorted(input_rows(odds, system), key=lambda r: -(r["share"] or 0.0))]
    return pd.DataFrame(rows, columns=["Input", "Distribution", "Share of the spread", "Source"])


def sampling_text(odds: dict) -> str:
    return (f"{odds['samples']} plans at sampled inputs (seed {odds['seed']}); ± is one standard error over the 4 "
            f"scrambles (3 degrees of freedom: a 95 % band is 3.2 of them)")


def comparison_odds_frame(result: dict, system: str, currency: str) -> pd.DataFrame:
    """One row per value of a comparison by odds (``comparison_odds_json``, SI): the value, the chance to finish
    in the window with no stop (± its error), the P90 total time, the P50 and P90 cost, the chance of a stop
    and the mark: recommended, best chance (none reaching the confidence), cannot be told apart."""
    import pandas as pd

    from planner.scenario.wording import format_quantity
    from planner.checks.lever_values import lever_decimals

    quantity = result["quantity"]
    beyond = lambda v: math.inf if v is None else v  # noqa: E731  (null in the JSON: beyond the samples)
    rows = []
    decimals = lever_decimals(quantity, [r["value"] for r in result["rows"]], system=system)
    for i, r in enumerate(result["rows"]):
        mark = ("recommended" if i == result.get("recommended_index") else
                "best chance" if i == result.get("named_index") else
                "cannot be told apart" if i in (result.get("not_told_apart") or []) else "")
        rows.append((format_quantity(r["value"], quantity, system, decimals),
                     f"{percentage(r['chance'])} ± {percentage(r['chance_error'])}",
                     value_text(beyond(r["p90_total_time_s"]), "time", system),
                     value_text(beyond(r["p50_cost"]), "money", system, currency),
                     value_text(beyond(r["p90_cost"]), "money", system, currency),
                     percentage(r["stop_probability"]), mark))
    return pd.DataFrame(rows, columns=["Value", "In window, no stop", "P90 total time", "P50 cost", "P90 cost",
                                       "Chance of a stop", "By the odds"])


def report_section(odds: dict, system: str, where: str) -> str:
    """The report's block of the odds: the range of the figures, the chances and the inputs; ``where`` says
    where they come from (worked out in this session, or kept with a saved revision)."""
    def table(frame: pd.DataFrame) -> str:
        return frame.to_html(index=False, na_rep="—", border=0, escape=True)

    chances = "".join(f"<li>{html.escape(line)}</li>" for line in chance_lines(odds, system))
    return f"""
<h2>The odds of the plan</h2>
<p class="meta">{html.escape(sampling_text(odds))} · {html.escape(where)}. A "{BEYOND}" percentile reaches samples
that did not finish. The odds are as good as the distributions given: a planning estimate, not a guarantee.</p>
{table(figures_frame(odds, system))}
<ul>{chances}</ul>
<h3>Sampled inputs</h3>
{table(inputs_frame(odds, system))}
"""


CHANCES = {"probability_in_window": "Odds: chance in the window",
           "stop_probability": "Odds: chance of a stop",
           "probability_in_window_no_stop": "Odds: in the window with no stop"}


def odds_diff_row(path: str, old, new, system: str, currency_a: str = "", currency_b: str = "") -> tuple | None:
    """A changed leaf of two revisions' saved odds (``PlanStore.diff`` path under ``uncertainty``) as
    (label, before, after) as shown; None for the details not listed (errors, shares, inputs' words)."""
    from planner.reports.uncertainty_text import FIGURE_LABELS
    from planner.sweeps.uncertainty import FIGURES

    parts = path.split(".")[1:]
    if not parts:                                   # one revision has odds, the other none
        kept = lambda v: "—" if v is None else f"{v.get('samples')} samples, seed {v.get('seed')}"  # noqa: E731
        return "Odds", kept(old), kept(new)
    if parts[0] == "percentiles" and len(parts) == 3 and parts[1] in FIGURES:
        kind = FIGURES[parts[1]]
        # null in a saved summary: beyond the samples that finished
        shown = lambda v, cur: value_text(math.inf if v is None else v, kind, system, cur)  # noqa: E731
        return f"Odds: {parts[2].upper()} {FIGURE_LABELS[parts[1]].lower()}", shown(old, currency_a), shown(new, currency_b)
    if parts[0] in CHANCES and len(parts) == 1:
        return CHANCES[parts[0]], percentage(old), percentage(new)
    if parts[0] in ("samples", "seed") and len(parts) == 1:
        return f"Odds: {parts[0]}", str(old), str(new)
    return None
