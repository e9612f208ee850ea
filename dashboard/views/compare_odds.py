"""The comparison's odds (Setpoint comparison tab, opt-in "With odds"): each value of the lever at the same
sampled inputs (``planner.sweeps.compare_odds``), its chance to finish in the window with no stop, its P90
total time and P50/P90 cost, the recommendation by the odds and the values that cannot be told apart.

Drawn under the comparison by ``views/compare`` with its lever and values; the samples run in the dashboard's
worker with a progress bar (``views/odds.run_with_progress``).  The last result is ``cmp_odds`` in the session.
"""

from __future__ import annotations

import streamlit as st

from planner.errors import PlannerError
from planner.scenario.schema import Scenario
from planner.scenario.wording import render

from dashboard.compute.odds import check_sampling
from dashboard.present import odds_tables
from dashboard.present.plaintext import escaped

from .odds import kept_odds, refused, run_with_progress, sampling_controls


def odds_section(scenario: Scenario, scenario_json: str, unit_system: str, lever: str, values_text: str) -> None:
    """The "With odds" box and, when ticked, the sampling boxes, the button and the last result."""
    gen = st.session_state.get("gen", 0)
    if not st.checkbox("With odds", value=False, key=f"cmp_odds_on{gen}",
                       help="each value at many sampled inputs (the samples times the values in plans): the chance "
                            "to finish in the window with no stop, the P90 time, the P50 and P90 cost"):
        return
    st.markdown("#### The odds of each value")
    a, b, c = st.columns([1, 1, 2])
    samples, seed = sampling_controls(a, b, scenario, "cmp_odds")
    c.caption("Every value is planned at the same sampled inputs, so their differences are due to the value alone.")
    if st.button("Compare with odds", key=f"cmp_odds_run{gen}"):
        from planner.checks.lever_values import typed_values
        from planner.sweeps.compare import parse_range

        try:   # each value checked against the lever's field in the unit typed, as the comparison does
            values = tuple(typed_values(scenario, lever, parse_range(values_text), unit_system, "Values"))
        except (ValueError, PlannerError) as exc:
            st.error(escaped(str(exc)))
            return
        if refused(check_sampling(scenario, samples, seed, len(values))):
            return
        result = run_with_progress("comparison_odds", (scenario_json, lever, values, samples, seed),
                                   samples * len(values), "The comparison with odds")
        st.session_state["cmp_odds"] = {"json": scenario_json, "result": result}
    saved = kept_odds("cmp_odds", scenario_json, "Compare with odds",
                      "Press “Compare with odds” to plan each value above at the sampled inputs.")
    if saved:
        odds_comparison(saved["result"], unit_system, scenario.costs.currency)


def odds_comparison(result: dict, unit_system: str, currency: str) -> None:
    """A finished comparison with odds: the recommendation by the odds and one row per value."""
    if "error" in result:
        st.error(escaped(result["error"]))
        return
    reason = escaped(render(result["reason"], unit_system))
    if result.get("recommended_index") is not None:
        st.success(f"By the odds: {reason}")
    else:
        st.warning(f"By the odds: {reason}")
    frame = odds_tables.comparison_odds_frame(result, unit_system, currency)
    named = result.get("named_index")

    def highlight(row):
        return ["background-color: #fcf3cf" if row.name == named else ""] * len(row)

    st.dataframe(frame.style.apply(highlight, axis=1), hide_index=True, width="stretch")
    st.caption(escaped(f"{result['samples']} plans at sampled inputs for each value (seed {result['seed']}, the same "
                       "points for every value); ± is one standard error over the 4 scrambles. “Cannot be told "
                       "apart”: within the sampling error of the difference, or within the comparison's band of no "
                       "clear difference in cost. A “beyond” figure reaches samples that did not finish."))
