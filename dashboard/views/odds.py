"""The Odds view: the plan at many sampled inputs (``planner.sweeps.uncertainty``), summed up as P10/P50/P90
of its figures, the chances (in the window, of a stop), the fan over time, the total time's distribution
with the planned window, and which input drives its spread.

The samples run in the dashboard's worker (``compute/odds``, ``cache.run_remembered``) with a progress bar;
the boxes Samples and Seed are checked by the planner's rules first (``compute/odds.check_sampling``), a
refusal naming the box and its limit.  The last result is kept as ``odds`` in the session: the sidebar's
report and a saved revision (``services/revisions``) take it while the inputs are the same.
"""

from __future__ import annotations

import streamlit as st

from planner.reports.uncertainty_text import plain_outside_words, sensitivity_caveat

from planner.scenario.schema import Scenario

from dashboard.compute import cache as compute
from dashboard.compute.odds import check_sampling, whole_number
from dashboard.present import odds_figures, odds_tables
from dashboard.present.plaintext import escaped, escaped_table

from .page import Page

NEEDS_RESULTS = False
CAUTION = ("The odds are as good as the distributions given (Inputs, or the defaults with their sources in the "
           "table below): a planning estimate, not a guarantee. Local codes, site procedures and a licensed "
           "engineer's advice take precedence.")


def draw(page: Page) -> None:
    plan = page.results.plan if page.results is not None and not page.stale else {}   # the plan JSON (SI)
    odds_view(page.scenario, page.scenario_json if not page.stale else None, page.unit_system,
              plan.get("total_time_s"))


def run_with_progress(kind: str, args: tuple, total: int, what: str) -> dict:
    """The worker job ``kind`` (from this process's memory when it has run before), with a progress bar of
    its ``total`` sampled plans while it runs (drawn here, outside any cached function)."""
    found = compute.remembered(kind, args)
    if found is not None:
        return found
    with st.status(f"Working out {total:,} sampled plans…", expanded=True) as status:
        bar = st.progress(0.0, text=f"0/{total:,} plans")

        def progress(done, n):
            bar.progress(min(1.0, done / max(n, 1)), text=f"{done:,}/{n:,} plans")

        result = compute.run_remembered(kind, args, progress=progress)
        failed = "error" in result
        status.update(label=f"{what} failed" if failed else f"{what} done", state="error" if failed else "complete",
                      expanded=False)
    return result


def sampling_controls(column_a, column_b, scenario: Scenario, key: str) -> tuple:
    """The boxes Samples and Seed (defaults: the scenario's ``[uncertainty]``, else 128 and 21), as typed."""
    from planner.scenario.uncertainty_spec import MAX_SAMPLES, MIN_SAMPLES
    from planner.sweeps.odds_inputs import sampling_of

    samples, seed = sampling_of(scenario)
    gen = st.session_state.get("gen", 0)
    samples = column_a.number_input("Samples", value=samples, step=1, format="%d", key=f"{key}_samples{gen}",
                                    help=f"plans at sampled inputs: a power of two from {MIN_SAMPLES} to "
                                         f"{MAX_SAMPLES:,} (each is a whole plan)")
    seed = column_b.number_input("Seed", value=seed, step=1, format="%d", key=f"{key}_seed{gen}",
                                 help="the same seed gives the same samples")
    return whole_number(samples), whole_number(seed)


def refused(problems: list) -> bool:
    """Each problem beside the boxes, naming the box and its limit; True when there is any."""
    for field, message in problems:
        st.error(escaped(f"{field}: {message}" if field else message))
    return bool(problems)


def odds_view(scenario: Scenario | None, scenario_json: str | None, unit_system: str,
              plain_total_s: float | None = None) -> None:
    if scenario is None or scenario_json is None:
        st.info("Fix the inputs first: the odds are worked out on a valid scenario.")
        return
    a, b, c = st.columns([1, 1, 2])
    samples, seed = sampling_controls(a, b, scenario, "odds")
    c.caption("Each sample is the whole plan at one draw of the uncertain inputs (viscosity, ambient, wind, heat "
              "loss, source temperature, the pump). 128 samples take about as long as 128 plans.")
    if st.button("Work out the odds", type="primary", key=f"odds_run{st.session_state.get('gen', 0)}"):
        if refused(check_sampling(scenario, samples, seed)):
            return
        result = run_with_progress("odds", (scenario_json, samples, seed), samples, "The odds")
        st.session_state["odds"] = {"json": scenario_json, "result": result}
    saved = kept_odds("odds", scenario_json, "Work out the odds", "Choose the samples and press “Work out the odds”.")
    if saved:
        odds_result(saved["result"], unit_system, plain_total_s if saved["json"] == scenario_json else None)


def kept_odds(key: str, scenario_json: str, button: str, hint: str) -> dict | None:
    """The odds kept under session key ``key`` ({json, result}), with a warning when the inputs have changed
    since; None (and ``hint`` shown) when there are none yet."""
    saved = st.session_state.get(key)
    if not saved:
        st.caption(hint)
        return None
    if saved["json"] != scenario_json:
        st.warning(f"The inputs have changed since these odds: press “{button}” to run them again.")
    return saved


def odds_result(result: dict, unit_system: str, plain_total_s: float | None = None) -> None:
    """Finished odds: the chances, the range of the figures, the fan, the total time and the shares;
    ``plain_total_s``: the plan's own total time (the inputs as given), marked beside the samples'."""
    if "error" in result:
        st.error(escaped(result["error"]))
        return
    odds = result["odds"]
    st.markdown("#### The chances")
    st.caption(escaped(odds_tables.sampling_text(odds)))
    box = st.success if odds["probability_in_window_no_stop"] >= odds["confidence"] else st.warning
    box("  \n".join(escaped(line) for line in odds_tables.chance_lines(odds, unit_system)))
    st.markdown("#### P10 / P50 / P90")
    st.table(escaped_table(odds_tables.figures_frame(odds, unit_system)), hide_index=True)
    st.plotly_chart(odds_figures.total_time_figure(result["total_time_s"], odds, unit_system, plain_total_s),
                    key="odds_total_chart")
    outside = plain_outside_words(odds, plain_total_s, unit_system)
    if outside:
        st.caption(escaped(outside[0].upper() + outside[1:] + "."))
    st.plotly_chart(odds_figures.fan_figure(odds, unit_system), key="odds_fan_chart")
    st.plotly_chart(odds_figures.sensitivity_figure(odds), key="odds_share_chart")
    rough = sensitivity_caveat(odds["samples"])
    if rough:
        st.caption(escaped(f"The shares are {rough}."))
    with st.expander("Sampled inputs and the method"):
        st.table(escaped_table(odds_tables.inputs_frame(odds, unit_system)), hide_index=True)
        st.caption(escaped(odds["method"]))
    st.caption(CAUTION)


def saved_odds(results: dict, unit_system: str) -> None:
    """The range kept with a saved revision (its results' ``uncertainty``, ``odds_summary``), when it has one."""
    summary = results.get("uncertainty")
    if not summary:
        return
    odds = odds_tables.restored(summary, results.get("currency", ""))
    st.markdown("**The odds as saved**")
    st.caption(escaped(odds_tables.sampling_text(odds)))
    st.table(escaped_table(odds_tables.figures_frame(odds, unit_system)), hide_index=True)
    st.markdown("  \n".join(escaped(line) for line in odds_tables.chance_lines(odds, unit_system)))
