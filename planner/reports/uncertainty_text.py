"""The odds of a plan in words and in rows: the block after the key figures (text, either unit system),
report-ready rows (the HTML report and the dashboard format these), the JSON part and the summary
kept with a saved revision.

Input: the dict of ``planner.sweeps.uncertainty.plan_odds`` (SI; +inf for a percentile that reaches a
sample that did not finish, shown as "beyond").
"""

from __future__ import annotations

import math

from planner.plain import plain
from planner.scenario.wording import format_quantity, money_text

FIGURE_LABELS = {"transfer_time_s": "Transfer time", "total_time_s": "Start-up + transfer",
                 "peak_pressure_pa": "Peak discharge pressure", "max_jacket_temperature_k": "Hottest jacket",
                 "electrical_energy_j": "Electrical energy", "steam_kg": "Steam", "total_cost": "Total cost"}
INPUT_LABELS = {"viscosity_factor": "viscosity factor", "ambient_bias": "ambient bias", "wind_factor": "wind factor",
                "heat_loss_factor": "heat-loss factor", "source_temperature_bias": "source temperature bias",
                "pump_slip_factor": "pump slip factor", "pump_head_factor": "pump head factor"}
BEYOND = "beyond"        # a percentile that reaches samples that did not finish


def value_text(value, kind: str, system: str, currency: str = "") -> str:
    """One figure's value: with its unit in ``system``, "beyond" past the samples that finished, "—" unknown."""
    if value is None:
        return "—"
    if isinstance(value, float) and math.isinf(value):
        return BEYOND
    if kind == "money":
        return money_text(value, currency)
    return format_quantity(value, kind, system)


def percentage(value) -> str:
    return "—" if value is None else f"{100.0 * value:.0f} %"


def figure_rows(odds: dict, system: str = "SI") -> list[dict]:
    """One row per figure: label, P10, P50, P90 and the largest sampling error of the three, as text."""
    from planner.sweeps.uncertainty import FIGURES

    rows = []
    for name, kind in FIGURES.items():
        levels, errors = odds["percentiles"][name], odds["sampling_error"][name]
        known = [e for e in errors.values() if e is not None]
        if not known:
            error = "—"
        elif kind == "temperature":       # an error of a temperature is a difference: one decimal
            error = format_quantity(max(known), "temperature_difference", system, 1)
        else:
            error = value_text(max(known), kind, system, odds.get("currency", ""))
        rows.append({"figure": name, "label": FIGURE_LABELS[name],
                     **{key: value_text(levels[key], kind, system, odds.get("currency", "")) for key in levels},
                     "sampling_error": error})
    return rows


def distribution_text(spec: dict, system: str = "SI") -> str:
    """``normal, mean 0 K, sd 1.5 K`` (temperature differences in the user's system)."""
    kind = "temperature_difference" if spec["unit"] == "K" else "dimensionless"
    parts = [f"{key.replace('_', '-')} {format_quantity(value, kind, system, 2 if kind != 'dimensionless' else 3)}"
             for key, value in spec["parameters"].items()]
    return f"{spec['distribution']}, " + ", ".join(parts)


def input_rows(odds: dict, system: str = "SI") -> list[dict]:
    """The inputs: label, distribution in words, share of the total time's spread, source."""
    shares = {row["input"]: row["share"] for row in odds["sensitivity"]}
    return [{"input": spec["input"], "label": INPUT_LABELS.get(spec["input"], spec["input"]),
             "distribution": distribution_text(spec, system), "share": shares.get(spec["input"]),
             "source": spec["source"]} for spec in odds["inputs"]]


def chance_lines(odds: dict, system: str = "SI") -> list[str]:
    """The chances in words: in the window, of a stop (codes by frequency), against the confidence."""
    error = odds["sampling_error"]
    window = format_quantity(odds["planned_window_s"], "time", system)
    codes = ", ".join(f"{c['code']} {percentage(c['share'])}" for c in odds["stop_codes"])
    success = odds["probability_in_window_no_stop"]
    verdict = "reaches" if success >= odds["confidence"] else "is below"
    lines = [f"chance to finish within the planned window ({window}): {percentage(odds['probability_in_window'])} "
             f"(± {percentage(error['probability_in_window'])})",
             f"chance of a stop-level finding: {percentage(odds['stop_probability'])}" + (f" ({codes})" if codes else ""),
             f"finish in the window with no stop: {percentage(success)} (± "
             f"{percentage(error['probability_in_window_no_stop'])}), {verdict} the confidence asked for "
             f"({percentage(odds['confidence'])}, limits.confidence)"]
    if odds["did_not_finish"]:
        lines.append(f"did not finish: {odds['did_not_finish']} of {odds['samples']} samples (kept, counted as "
                     f"{BEYOND} every time; {odds['not_computed']} could not be planned at all)")
    return lines


def sensitivity_caveat(samples: int) -> str:
    """Why the shares are rough at ``samples`` plans, or "" when each bin holds 16 plans or more (a rule of
    thumb of this project for the binned estimator, not a published threshold)."""
    from planner.sweeps.odds_stats import bin_count

    per_bin = samples // bin_count(samples)
    if per_bin >= 16:
        return ""
    return (f"rough: {per_bin} plans per bin at {samples} samples, the shares can sum past 1; "
            "128 samples or more give 16 per bin")


def odds_lines(odds: dict, system: str = "SI") -> list[str]:
    """The text block shown after the key figures."""
    lines = [f"  odds: {odds['samples']} plans at sampled inputs (seed {odds['seed']})",
             f"    {'':26s} {'P10':>14s} {'P50':>14s} {'P90':>14s}   sampling error"]
    for row in figure_rows(odds, system):
        lines.append(f"    {row['label']:26s} {row['p10']:>14s} {row['p50']:>14s} {row['p90']:>14s}   "
                     f"± {row['sampling_error']}")
    lines += ["    " + line for line in chance_lines(odds, system)]
    lines.append(f"    what drives the spread of the total time (first-order share{', on ranks' if 'ranks' in odds['sensitivity_of'] else ''}):")
    for row in sorted(input_rows(odds, system), key=lambda r: -(r["share"] or 0.0)):
        lines.append(f"      {row['label']:26s} {row['share']:5.2f}   {row['distribution']}")
    rough = sensitivity_caveat(odds["samples"])
    if rough:
        lines.append(f"      ({rough})")
    lines.append("    ± is one standard error over the 4 scrambles (3 degrees of freedom: a 95 % band is 3.2 of them)")
    lines.append(f"    method: {odds['method']}")
    return lines


def plain_outside_words(odds: dict, plain_total_s: float | None, system: str = "SI") -> str:
    """Why the plan's own total time (the inputs as given) lies outside the samples' P10-P90, or "" when it
    lies inside (or either is not known)."""
    levels = odds["percentiles"]["total_time_s"]
    low, high = levels.get("p10"), levels.get("p90")
    if plain_total_s is None or not math.isfinite(plain_total_s) or low is None or not math.isfinite(low):
        return ""
    if plain_total_s < low:
        side = "below the P10"
    elif high is not None and math.isfinite(high) and plain_total_s > high:
        side = "above the P90"
    else:
        return ""
    return (f"this plan, with the inputs as given, takes {value_text(plain_total_s, 'time', system)}, {side} of the "
            "sampled plans: the sampled inputs are not centred on the given ones (e.g. a heat-loss factor whose "
            "mode is above 1 for aged or wet insulation); see the sampled inputs")


def odds_json(odds: dict) -> dict:
    """The ``uncertainty`` part of the plan JSON (SI; a percentile beyond the samples that finished is null
    and listed in ``beyond``; ``sensitivity_caveat`` says when the shares are rough, else null)."""
    return plain({**odds, "sensitivity_caveat": sensitivity_caveat(odds["samples"]) or None})


def odds_summary(odds: dict) -> dict:
    """What a saved revision keeps of the odds (SI, no fan): the range the supervisor signs."""
    keep = ("samples", "seed", "confidence", "planned_window_s", "percentiles", "beyond", "probability_in_window",
            "stop_probability", "probability_in_window_no_stop", "sampling_error", "did_not_finish", "not_computed",
            "stop_codes", "sensitivity", "sensitivity_of", "inputs", "method")
    return plain({key: odds[key] for key in keep if key in odds})


def comparison_odds_table(c, system: str = "SI") -> str:
    """A comparison by odds (``sweeps.compare_odds.OddsComparison``) as a text table in ``system``."""
    from planner.scenario.units import unit_label
    from planner.scenario.wording import render
    from planner.checks.lever_values import lever_decimals

    currency = c.rows[0]["odds"]["currency"] if c.rows else ""
    lines = [f"  odds of each value: {c.samples} plans at sampled inputs each (seed {c.seed}, the same points for "
             f"every value)",
             f"    {c.lever} [{unit_label(c.quantity, system)}]   in window, no stop   P90 total   P50 cost   "
             f"P90 cost   stops"]
    decimals = lever_decimals(c.quantity, [r["value"] for r in c.rows], system=system)
    for i, r in enumerate(c.rows):
        mark = "*" if i == c.recommended else "+" if i == c.named else "=" if i in c.not_told_apart else " "
        value = format_quantity(r["value"], c.quantity, system, decimals).rsplit(" ", 1)[0]
        chance = f"{percentage(r['chance'])} ± {percentage(r['chance_error'])}"
        lines.append(f"  {mark} {value:>10s}   {chance:>17s}   {value_text(r['p90_total_time_s'], 'time', system):>9s}   "
                     f"{value_text(r['p50_cost'], 'money', system, currency):>12s}   "
                     f"{value_text(r['p90_cost'], 'money', system, currency):>12s}   "
                     f"{percentage(r['odds']['stop_probability'])}")
    lines.append("")
    lines.append(f"  by the odds: {render(c.reason, system)}")
    lines.append("  (* recommended; + the best chance, none reaching the confidence; = cannot be told apart from the "
                 "row marked within the sampling error)")
    return "\n".join(lines)
