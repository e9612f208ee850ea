"""The odds of a plan (``planner.sweeps.uncertainty``, ``odds_inputs``, ``odds_stats``), checked against
outside sources: Hagen–Poiseuille for an exact case, the lognormal's quantiles, the Ishigami function's
published first-order indices, and the deterministic plan for degenerate distributions.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import DEMO_DIR
from planner.errors import ScenarioError
from planner.scenario.budget import Budget, BudgetError, use_budget
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict
from planner.sweeps.odds_inputs import default_distribution, input_specs, unit_points
from planner.sweeps.odds_stats import first_order_indices, percentile
from planner.sweeps.uncertainty import FIGURES, plan_odds
from planner.transfer.plan import make_plan, with_changes

SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"
HELD = {"distribution": "normal", "mean": 0, "sd": 0}
ONE = {"distribution": "uniform", "low": 1, "high": 1}
ALL_HELD = {"viscosity_factor": ONE, "ambient_bias": HELD, "wind_factor": ONE, "heat_loss_factor": ONE,
            "source_temperature_bias": HELD, "pump_slip_factor": ONE}


def _with_uncertainty(scenario, section: dict):
    data = scenario_to_dict(scenario)
    data["uncertainty"] = section
    return scenario_from_dict(data)


def _relief_line() -> dict:
    """An isothermal laminar line (ambient, source and line at 40 degC, Re < 10, no fittings, level run,
    top entry) fed by a PD pump whose relief valve holds the differential at 2 bar: a fixed pressure
    difference, so the flow is Q = dp pi D^4 / (128 mu L) (Hagen–Poiseuille) and the time to move a volume
    is proportional to the viscosity."""
    return {
        "name": "Isothermal laminar line at a fixed differential", "site": {"ambient_temperature": "40 degC"},
        "product": {"name": "test oil", "density": "900 kg/m3", "density_slope": 0.0, "specific_heat": 2000.0,
                    "thermal_conductivity": 0.13, "no_flow_temperature": "0 degC", "max_temperature": "90 degC",
                    "viscosity": {"law": "andrade", "coefficients": {"a": math.log(0.4) - 1500.0 / 313.15, "b": 1500.0}}},
        "route": {"segments": [{"name": "run", "inside_diameter": "0.1 m", "length": "400 m", "traced": False,
                                "insulation": [{"material": "mineral_wool", "thickness": "50 mm"}]}]},
        "operation": {"flow": "10 m3/h", "inlet_temperature": "40 degC"},
        "pump": {"kind": "positive_displacement", "speed": "300 rpm", "displacement": "5 L", "relief_setting": "2 bar"},
        "source": {"kind": "tank", "diameter": "10 m", "initial_volume": "500 m3", "volume_to_move": "100 m3",
                   "temperature": "40 degC", "heat_loss_coefficient": 0.0},
        "destination": {"diameter": "10 m", "initial_level": "0 m", "inlet": "top"},
        "schedule": {"planned_window": "60 h", "start_mode": "push_cold", "line_start_temperature": "40 degC"},
    }


def test_exact_case_transfer_time_is_proportional_to_the_viscosity_factor():
    # Hagen–Poiseuille (White, Fluid Mechanics, section 6.4): Q = dp pi D^4 / (128 mu L) at a fixed dp,
    # so the time to move a volume scales with mu.  Viscous heating (dp / (rho cp) = 0.03 K) and the
    # entrance's velocity heads (Re D / L ~ 1e-5 of the drop) are the model's only departures.
    scenario = scenario_from_dict(_relief_line())
    times = {f: make_plan(scenario, viscosity_factor=f, both_startups=False).timeline.total_time_s
             for f in (0.5, 1.0, 2.0)}
    assert times[2.0] / times[1.0] == pytest.approx(2.0, rel=0.003)
    assert times[0.5] / times[1.0] == pytest.approx(0.5, rel=0.003)
    plan = make_plan(scenario, both_startups=False)
    start = plan.start
    drop = start.point.discharge_pressure - 0.0                # top entry at 0 barg, level run, no fittings
    assert start.flow == pytest.approx(drop * math.pi * 0.1 ** 4 / (128 * 0.4 * 400.0), rel=0.01)


def test_lognormal_viscosity_gives_p90_over_p50_of_exp_1_2816_sigma():
    # A lognormal factor of log-sd sigma has P90/P50 = exp(z_0.9 sigma), z_0.9 = 1.2816 (the normal's
    # 90 % quantile, Abramowitz & Stegun table 26.1); the transfer time is proportional to the factor here.
    sigma = 0.25
    scenario = _with_uncertainty(scenario_from_dict(_relief_line()), {
        "samples": 64, "viscosity_factor": {"distribution": "lognormal", "median": 1.0, "log_sd": sigma},
        "ambient_bias": HELD, "wind_factor": ONE, "heat_loss_factor": ONE, "source_temperature_bias": HELD,
        "pump_slip_factor": ONE})
    odds = plan_odds(scenario)
    levels, errors = odds["percentiles"]["transfer_time_s"], odds["sampling_error"]["transfer_time_s"]
    ratio = levels["p90"] / levels["p50"]
    error = ratio * math.hypot(errors["p90"] / levels["p90"], errors["p50"] / levels["p50"])
    assert abs(ratio - math.exp(1.2816 * sigma)) <= 2.0 * error + 0.003 * ratio
    assert error < 0.05 * ratio                     # the check can fail: the error is not a wide net
    assert odds["sensitivity"][0] == {"input": "viscosity_factor", "share": pytest.approx(1.0, abs=0.05)}


def test_degenerate_distributions_give_the_deterministic_plan_exactly():
    scenario = _with_uncertainty(load_scenario(SYRUP), {"samples": 16, **ALL_HELD})
    odds = plan_odds(scenario)
    plan = make_plan(scenario)
    expected = {"transfer_time_s": plan.timeline.total_time_s, "total_time_s": plan.total_time_s,
                "peak_pressure_pa": plan.peak_discharge_pressure_pa, "electrical_energy_j": plan.energy.electrical_j,
                "steam_kg": plan.energy.steam_kg, "total_cost": plan.costs.total,
                "max_jacket_temperature_k": max(p.summary.max_jacket_temperature_k for p in
                                                (plan.start_profile, plan.suction_profile) if p is not None)}
    assert set(expected) == set(FIGURES)
    for name, value in expected.items():
        assert odds["percentiles"][name] == {"p10": value, "p50": value, "p90": value}, name
    assert odds["probability_in_window"] == float(plan.total_time_s <= scenario.schedule.planned_window)


def test_samples_that_do_not_finish_are_kept_as_beyond():
    # heat loss at 3-6 times design: the syrup line's pre-warm cannot reach its target in some samples
    scenario = _with_uncertainty(load_scenario(SYRUP), {
        "samples": 16, "heat_loss_factor": {"distribution": "uniform", "low": 1.0, "high": 6.0}})
    odds = plan_odds(scenario)
    assert odds["samples"] == 16 and odds["did_not_finish"] >= 2
    assert odds["percentiles"]["total_time_s"]["p90"] == math.inf and "p90" in odds["beyond"]["total_time_s"]
    assert odds["probability_in_window"] <= 1.0 - odds["did_not_finish"] / 16
    assert odds["stop_codes"] and odds["stop_codes"][0]["samples"] >= odds["stop_codes"][-1]["samples"]


def test_hazen_percentiles_and_beyond():
    # Hyndman & Fan (1996) definition 5: rank N p + 1/2; on 1..10, P10 = 1.5, P50 = 5.5, P90 = 9.5
    data = list(range(1, 11))
    assert [percentile(data, p) for p in (0.1, 0.5, 0.9)] == [1.5, 5.5, 9.5]
    assert percentile([1.0, 2.0, 3.0, math.inf], 0.5) == 2.5
    assert percentile([1.0, 2.0, 3.0, math.inf], 0.9) == math.inf


def test_ishigami_first_order_indices_from_given_data():
    # Ishigami function, a = 7, b = 0.1, X uniform on [-pi, pi]^3: S1 = 0.314, S2 = 0.442, S3 = 0
    # (Saltelli et al., Global Sensitivity Analysis: The Primer, Wiley 2008, section 4.5 [mem] unverified digits)
    u = unit_points(3, 4096, seed=5)
    x = -math.pi + 2 * math.pi * u
    y = np.sin(x[:, 0]) + 7.0 * np.sin(x[:, 1]) ** 2 + 0.1 * x[:, 2] ** 4 * np.sin(x[:, 0])
    s1, s2, s3 = first_order_indices(u, y)
    assert s1 == pytest.approx(0.314, abs=0.03) and s2 == pytest.approx(0.442, abs=0.03) and s3 < 0.03


def test_linear_model_shares_are_the_squared_coefficients():
    # y = 3 x1 + 1 x2 + 0 x3 with independent uniforms: S_i = a_i^2 / sum a^2 = 0.9, 0.1, 0 (analytic)
    u = unit_points(3, 1024, seed=1)
    s = first_order_indices(u, 3.0 * u[:, 0] + 1.0 * u[:, 1])
    assert s[0] == pytest.approx(0.9, abs=0.03) and s[1] == pytest.approx(0.1, abs=0.03) and s[2] < 0.02


def test_same_seed_same_points_other_seed_other_points():
    a, b, c = unit_points(4, 128, 7), unit_points(4, 128, 7), unit_points(4, 128, 8)
    assert np.array_equal(a, b) and not np.array_equal(a, c)
    # each scramble is a balanced Sobol set: every 1/32 of each axis holds one point of its 32
    for part in np.split(a, 4):
        assert all(sorted((part[:, j] * 32).astype(int)) == list(range(32)) for j in range(4))


@pytest.mark.parametrize("section, field, words", [
    ({"viscosity_factor": {"distribution": "normal", "mean": 1.0}}, "uncertainty.viscosity_factor", "missing sd"),
    ({"viscosity_factor": {"distribution": "normal", "mean": 1.0, "sd": 0.5}}, "uncertainty.viscosity_factor",
     "must stay within 0.05 to 20"),
    ({"ambient_bias": {"distribution": "lognormal", "median": 1.0, "log_sd": 0.1}},
     "uncertainty.ambient_bias.distribution", "lognormal is for factors"),
    ({"samples": 100}, "uncertainty.samples", "power of two"),
    ({"ambient_bias": {"distribution": "normal", "mean": "1e308 K", "sd": "1 K"}}, "uncertainty.ambient_bias.mean",
     "at most 100 K"),
    ({"heat_loss_factor": {"distribution": "triangular", "low": 2, "mode": 1, "high": 3}},
     "uncertainty.heat_loss_factor", "low <= mode <= high"),
])
def test_bad_distributions_are_refused_by_name(section, field, words):
    with pytest.raises(ScenarioError) as caught:
        _with_uncertainty(load_scenario(SYRUP), section)
    assert any(f == field and words in m for f, m in caught.value.problems), caught.value.problems


def test_an_extreme_draw_past_a_field_is_refused_before_any_plan():
    barge = load_scenario(DEMO_DIR / "fuel_oil_barge_discharge.toml")        # wind 7 m/s: x 10 is past 60 m/s
    scenario = _with_uncertainty(barge, {"wind_factor": {"distribution": "uniform", "low": 1, "high": 10}})
    with pytest.raises(ScenarioError) as caught:
        plan_odds(scenario, samples=16)
    assert caught.value.problems[0][0] == "uncertainty.wind_factor" and "60 m/s" in caught.value.problems[0][1]


def test_an_extreme_draw_of_a_calibrations_standard_error_names_that_field():
    # no [uncertainty]: the viscosity factor's spread is the fit's standard error (20, the schema's top) over
    # the factor 1.5, lognormal log_sd 2 cut at 4 sd: exp(-8) x 1.5 = 0.0005 is below the factor's 0.05.
    # The refusal named only uncertainty.viscosity_factor, a field the file does not have
    data = scenario_to_dict(load_scenario(DEMO_DIR / "fuel_oil_barge_discharge.toml"))
    data["calibration"] = {"viscosity_factor": 1.5, "viscosity_factor_standard_error": 20.0}
    with pytest.raises(ScenarioError) as caught:
        plan_odds(scenario_from_dict(data), samples=16)
    field, message = caught.value.problems[0]
    assert field == "calibration.viscosity_factor_standard_error"
    assert "uncertainty.viscosity_factor" in message and "0.05 to 20" in message and "  " not in message
    data["uncertainty"] = {"viscosity_factor": {"distribution": "lognormal", "median": 1.0, "log_sd": 2.0}}
    with pytest.raises(ScenarioError) as caught:                    # its own distribution: named as before
        plan_odds(scenario_from_dict(data), samples=16)
    assert caught.value.problems[0][0] == "uncertainty.viscosity_factor"


@pytest.mark.parametrize("demo, name", [("polyol_tank_transfer.toml", "pump_slip_factor"),          # centrifugal
                                         ("syrup_railcar_unload.toml", "pump_head_factor")])        # PD
def test_a_pump_input_given_for_the_other_kind_of_pump_is_refused_not_ignored(demo, name):
    # only the inputs that act on the scenario are sampled; one given that cannot act was dropped silently
    section = {name: {"distribution": "uniform", "low": 0.95, "high": 1.0}}
    scenario = _with_uncertainty(load_scenario(DEMO_DIR / demo), section)
    with pytest.raises(ScenarioError) as caught:
        input_specs(scenario)
    field, message = caught.value.problems[0]
    assert field == f"uncertainty.{name}" and "pump only" in message and "leave it out" in message


def test_the_work_budget_counts_samples():
    scenario = load_scenario(SYRUP)
    with use_budget(Budget(uncertainty_steps=500_000)), pytest.raises(BudgetError) as caught:
        plan_odds(scenario, samples=128)
    field, message = caught.value.problems[0]
    assert field == "--samples" and "128 samples" in message and "give at most 64 samples" in message   # 7,566 steps a plan


def test_wind_factor_multiplies_every_wind_speed():
    scenario = load_scenario(DEMO_DIR / "fuel_oil_barge_discharge.toml")
    changed = with_changes(scenario, wind_factor=1.5)
    assert changed.site.wind_speed == pytest.approx(1.5 * scenario.site.wind_speed)
    for old, new in zip(scenario.route.segments, changed.route.segments):
        if old.surroundings.wind_speed is not None:
            assert new.surroundings.wind_speed == pytest.approx(1.5 * old.surroundings.wind_speed)


def test_default_viscosity_spread_follows_a_fitted_calibration():
    scenario = load_scenario(SYRUP)
    assert default_distribution(scenario, "viscosity_factor").distribution.log_sd == 0.18   # lab-law scatter
    data = scenario_to_dict(scenario)
    data["calibration"] = {"viscosity_factor": 1.25, "viscosity_factor_standard_error": 0.05}
    calibrated = scenario_from_dict(data)
    spec = default_distribution(calibrated, "viscosity_factor")
    assert spec.distribution.log_sd == pytest.approx(0.05 / 1.25) and "calibration" in spec.source
    names = [s.name for s in input_specs(calibrated)]
    assert "pump_slip_factor" in names and "pump_head_factor" not in names        # a PD pump


def test_the_sensitivity_shares_are_called_rough_below_16_plans_per_bin():
    """The binned estimator's bins hold samples // bins plans (bins: the power of two below sqrt(samples));
    below 16 a bin (the project's rule of thumb) the text and JSON say the shares are rough."""
    from planner.reports.uncertainty_text import sensitivity_caveat

    assert "4 plans per bin" in sensitivity_caveat(16)
    assert "8 plans per bin" in sensitivity_caveat(32)
    assert "8 plans per bin" in sensitivity_caveat(64)
    assert sensitivity_caveat(128) == ""
    assert sensitivity_caveat(4096) == ""


def test_the_plans_own_total_outside_the_samples_range_is_explained():
    """``plain_outside_words``: the plan with the inputs as given can lie outside P10-P90 when the sampled
    inputs are not centred on them (the barge demo: heat-loss factor mode 1.2); inside it nothing is said."""
    from planner.reports.uncertainty_text import plain_outside_words

    odds = {"percentiles": {"total_time_s": {"p10": 3600.0 * 18.0, "p50": 3600.0 * 21.0, "p90": float("inf")}}}
    assert "15.80 h, below the P10" in plain_outside_words(odds, 3600.0 * 15.8)
    assert plain_outside_words(odds, 3600.0 * 19.0) == ""                      # inside (P90 beyond)
    assert plain_outside_words(odds, None) == ""
    odds["percentiles"]["total_time_s"]["p90"] = 3600.0 * 25.0
    assert "above the P90" in plain_outside_words(odds, 3600.0 * 26.0, "US")
