"""Convergence of the odds at a small size (the full check, 128 against 4,096 samples on the three demos
within 2 %, is ``python3 -m tests.validation.odds_convergence``): on the polyol demo, the percentiles at 64
samples lie within a 99 % band of their reported standard errors of those at 512 (another seed), so the
reported sampling error is an honest measure of the difference.  The errors come from 4 scrambles, 3
degrees of freedom: the band is Student's t(0.995, 3) = 5.841 standard errors (NIST/SEMATECH
e-Handbook of Statistical Methods, table 1.3.6.7.2); at 3 errors (a normal's 99.7 %) one of the 15
percentiles, the P10 of the transfer time, lay 4.9 errors off.
"""

from __future__ import annotations

import math

import pytest

from conftest import DEMO_DIR
from planner.scenario.schema import load_scenario
from planner.sweeps.executors import local_executor
from planner.sweeps.uncertainty import plan_odds


@pytest.mark.slow
def test_percentiles_at_64_samples_agree_with_512_within_their_sampling_error():
    # randomised QMC: the replicate standard error over independent scrambles (Owen 1998; L'Ecuyer &
    # Lemieux 2002), with the t band of its 3 degrees of freedom
    scenario = load_scenario(DEMO_DIR / "polyol_tank_transfer.toml")
    with local_executor(2) as pool:
        small = plan_odds(scenario, samples=64, seed=1, executor=pool)
        large = plan_odds(scenario, samples=512, seed=2, executor=pool)
    checked = 0
    for figure in ("transfer_time_s", "total_time_s", "peak_pressure_pa", "electrical_energy_j", "total_cost"):
        for level in ("p10", "p50", "p90"):
            a, b = small["percentiles"][figure][level], large["percentiles"][figure][level]
            ea, eb = small["sampling_error"][figure][level], large["sampling_error"][figure][level]
            assert math.isfinite(a) and math.isfinite(b), (figure, level)
            assert abs(a - b) <= 5.841 * math.hypot(ea, eb) + 1e-9 * abs(b), (figure, level, a, b, ea, eb)
            checked += 1
    assert checked == 15
    # the error falls with the samples: about 1/sqrt(8) for 8 times the samples (plain Monte Carlo's
    # rate; randomised QMC does no worse), checked loosely on the P50 of the total time
    assert large["sampling_error"]["total_time_s"]["p50"] < 0.8 * small["sampling_error"]["total_time_s"]["p50"]
