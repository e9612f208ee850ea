"""Issue 10 items 2 and 8: the film's wall-viscosity range is reported, and product data that no liquid
has is refused at the field.

Sources:
- Sieder & Tate (1936) laminar film correlation, Nu = 1.86 (Re Pr D/L)^(1/3) (mu/mu_w)^0.14, quoted with
  the range 0.0044 < mu/mu_w < 9.75 (Incropera & DeWitt, *Fundamentals of Heat and Mass Transfer*,
  eq. 8.57 and its conditions) [from memory].
- Vogel-Fulcher-Tammann law ln mu = a + b/(T - c): it is defined for T > c only and falls with
  temperature only for b > 0 (the law's form itself).
- Every liquid this planner is for (syrups, oils, fuel oils, bitumen, polyols) gets less viscous as it
  warms (any handbook's viscosity table, e.g. *Perry's Chemical Engineers' Handbook*, 8th ed., section 2).
"""

from __future__ import annotations

import pytest

from conftest import base_scenario
from planner.checks.findings import assess_line
from planner.correlations.heat_transfer import VISCOSITY_RATIO_MAX, VISCOSITY_RATIO_MIN
from planner.errors import ScenarioError
from planner.line.march import DEFAULT_STEP_M, march
from planner.line.model import line_from_scenario
from planner.scenario.schema import scenario_from_dict


def _bare_arm_fuel_oil() -> dict:
    """An untraced insulated fuel-oil run ending in a bare 14 m loading arm on a cold, windy day."""
    d = base_scenario()
    d["product"] = {"name": "heavy fuel oil (test)", "density": 980.0, "specific_heat": 1900.0,
                    "thermal_conductivity": 0.12,
                    "viscosity": {"law": "walther", "points": [
                        {"temperature": 50.0, "kinematic_viscosity": "380 cSt"},
                        {"temperature": 100.0, "kinematic_viscosity": "35 cSt"}]},
                    "no_flow_temperature": 0.0, "max_temperature": 150.0}
    d["site"] = {"name": "test", "ambient_temperature": -20.0, "wind_speed": 8.0}
    d["route"] = {"segments": [
        {"name": "insulated run", "nps": "6", "length": 200.0,
         "insulation": [{"material": "mineral_wool", "thickness": 50}]},
        {"name": "loading arm", "kind": "loading_arm", "inside_diameter": "150 mm", "length": 14.0,
         "pressure_rating": "16 bar", "traced": False}]}
    d["operation"] = {"flow": "60 m3/h", "inlet_temperature": 85.0}
    return d


def test_the_range_constants_are_the_correlations():
    # Incropera & DeWitt, conditions of the Sieder-Tate equation [from memory]
    assert (VISCOSITY_RATIO_MIN, VISCOSITY_RATIO_MAX) == (0.0044, 9.75)


def test_a_bare_arm_far_colder_than_the_oil_is_reported_where_the_ratio_leaves_the_range():
    scenario = scenario_from_dict(_bare_arm_fuel_oil())
    line = line_from_scenario(scenario)
    result = march(line, scenario.operation.flow, scenario.operation.inlet_temperature, 0.0)
    ratios = result.steps["viscosity_ratio"]
    assert ratios.min() < VISCOSITY_RATIO_MIN       # the arm's wall sits near the -20 degC air
    [found] = [f for f in assess_line(scenario, line, result) if f.code == "FILM-VISCOSITY-RATIO"]
    assert found.severity == "caution" and found.segment == "loading arm"
    assert found.value == pytest.approx(float(ratios.min()), rel=1e-12)
    assert found.limit == VISCOSITY_RATIO_MIN
    assert "0.0044" in found.message and f"{found.value:.3g}" in found.message
    # the film solved with the correction held at the range edge converges with the step (0.05 K:
    # the planner's grid target, tests/test_march_grid.py)
    fine = march(line, scenario.operation.flow, scenario.operation.inlet_temperature, 0.0, step=DEFAULT_STEP_M / 100,
                 record=False)
    assert abs(fine.summary.outlet_temperature_k - result.summary.outlet_temperature_k) < 0.05


def test_an_insulated_line_near_the_product_temperature_has_no_such_finding():
    data = _bare_arm_fuel_oil()
    data["route"]["segments"] = data["route"]["segments"][:1]
    scenario = scenario_from_dict(data)
    line = line_from_scenario(scenario)
    result = march(line, scenario.operation.flow, scenario.operation.inlet_temperature, 0.0)
    assert VISCOSITY_RATIO_MIN <= result.steps["viscosity_ratio"].min()
    assert "FILM-VISCOSITY-RATIO" not in {f.code for f in assess_line(scenario, line, result)}


def _problems(data: dict) -> list[tuple[str, str]]:
    with pytest.raises(ScenarioError) as caught:
        scenario_from_dict(data)
    return caught.value.problems


@pytest.mark.parametrize("kind, values", [("viscosity", ("60 Pa*s", "12 Pa*s", "20 Pa*s")),
                                          ("kinematic_viscosity", ("380 cSt", "400 cSt", "30 cSt"))])
def test_lab_points_that_rise_with_temperature_are_refused_at_the_points(kind, values):
    data = base_scenario()
    data["product"]["viscosity"] = {"law": "vft", "points": [
        {"temperature": t, kind: v} for t, v in zip((25.0, 40.0, 60.0), values)]}
    [(field, message)] = _problems(data)
    assert field == "product.viscosity.points"
    assert "must fall as the temperature rises" in message and "lab point" in message


@pytest.mark.parametrize("coefficients, words", [
    ({"a": -7.0, "b": -900.0, "c": 200.0}, "b = -900 K must be > 0"),
    ({"a": -7.0, "b": 900.0, "c": 300.0}, "c = 300 K must be below the no_flow_temperature"),
])
def test_vft_constants_outside_the_laws_domain_are_refused(coefficients, words):
    data = base_scenario()
    data["product"]["viscosity"] = {"law": "vft", "coefficients": coefficients}
    data["product"]["no_flow_temperature"] = 0.0          # 273.15 K
    [(field, message)] = _problems(data)
    assert field == "product" and message.startswith("viscosity: the VFT constant") and words in message


def test_vft_points_whose_fit_diverges_above_the_no_flow_temperature_are_refused():
    # three points curved so strongly that the exact VFT through them has c above 0 degC
    data = base_scenario()
    data["product"]["viscosity"] = {"law": "vft", "points": [
        {"temperature": 20.0, "viscosity": "500 Pa*s"}, {"temperature": 25.0, "viscosity": "5 Pa*s"},
        {"temperature": 60.0, "viscosity": "1 Pa*s"}]}
    data["product"]["no_flow_temperature"] = 0.0
    [(field, message)] = _problems(data)
    assert field == "product" and "must be below the no_flow_temperature" in message
