"""Issue 15: the Product view draws the viscosity the plan uses, calibration included, beside the law as
fitted to the lab points (the calibration multiplies the viscosity at every temperature, DEVELOPERS.md
"Calibration")."""

from __future__ import annotations

import numpy as np
import pytest

from conftest import DEMO_DIR
from dashboard.present.figures import viscosity_figure
from dashboard.compute.results import product_curve
from planner.line.products import scenario_product
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict

BARGE = DEMO_DIR / "fuel_oil_barge_discharge.toml"


def _calibrated(factor: float):
    data = scenario_to_dict(load_scenario(BARGE))
    data["calibration"] = {"viscosity_factor": factor}
    return scenario_from_dict(data)


def test_the_curve_is_the_plans_calibrated_viscosity():
    scenario = _calibrated(1.2)
    product = scenario_product(scenario)          # applies the [calibration] factor
    curve = product_curve(scenario.product, product=product)
    ratio = curve["viscosity"] / curve["viscosity_as_fitted"]
    assert np.nanmax(np.abs(ratio - 1.2)) < 1e-12
    t = 60.0 + 273.15
    assert np.interp(t, curve["temperature"], curve["viscosity"]) == pytest.approx(product.viscosity(t), rel=1e-3)
    names = [trace.name for trace in viscosity_figure(curve, "SI").data]
    assert "in the plan: calibrated × 1.2" in names and any("as fitted" in n or "(lab points)" in n for n in names)


def test_an_uncalibrated_product_draws_one_law():
    scenario = load_scenario(BARGE)
    curve = product_curve(scenario.product, product=scenario_product(scenario))
    assert curve["viscosity_factor"] == 1.0 and curve["viscosity_as_fitted"] is None
    assert [trace.name for trace in viscosity_figure(curve, "US").data][0].startswith("fitted ")
