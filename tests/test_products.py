"""planner.line.products: a product's properties as functions of temperature.

Sources: water's saturation pressure by IAPWS-IF97 (iapws 1.5.5 ``_PSat_T``, test-time reference); ISO 8217
RME180, at most 180 cSt at 50 degC [pub, REFERENCES.md]; the viscosity law fits are checked against their
sources in test_viscosity.py.
"""

from __future__ import annotations

import pytest
from iapws.iapws97 import _PSat_T

from conftest import base_scenario
from planner.line.products import scenario_product
from planner.scenario.schema import scenario_from_dict


def test_lab_points_given_out_of_order_but_falling_are_accepted():
    data = base_scenario()
    data["product"]["viscosity"] = {"law": "andrade", "points": [
        {"temperature": 60.0, "viscosity": "2.6 Pa*s"}, {"temperature": 25.0, "viscosity": "60 Pa*s"}]}
    product = scenario_product(scenario_from_dict(data))
    assert product.viscosity(298.15) == pytest.approx(60.0, rel=1e-9)


def test_the_extrapolation_finding_ignores_a_read_within_a_kelvin_of_the_lab_points():
    data = base_scenario()
    data["product"]["viscosity"] = {"law": "andrade", "points": [
        {"temperature": 25.0, "viscosity": "60 Pa*s"}, {"temperature": 60.0, "viscosity": "2.6 Pa*s"}]}
    product = scenario_product(scenario_from_dict(data))
    low, high = product.fit.t_min, product.fit.t_max
    assert not product.is_extrapolation(high + 5e-4) and not product.is_extrapolation(low - 0.9)
    assert product.is_extrapolation(high + 1.1) and product.is_extrapolation(low - 1.1)
    assert (low, high) == pytest.approx((298.15, 333.15))


@pytest.mark.parametrize("t_c", [20.0, 60.0, 95.0])
def test_vapour_pressure_is_water_activity_times_water_saturation(t_c):
    # a syrup of water activity 0.85 (DEVELOPERS.md "Vapour pressure"); IAPWS-IF97 via iapws 1.5.5
    data = base_scenario()
    data["product"].update(water_activity=0.85, max_temperature=100.0)
    product = scenario_product(scenario_from_dict(data))
    assert product.vapour_pressure(t_c + 273.15) == pytest.approx(0.85 * _PSat_T(t_c + 273.15) * 1e6, rel=1e-7)


def test_a_kinematic_law_gives_the_dynamic_viscosity_with_the_density_law():
    # Walther through 180 cSt at 50 degC (ISO 8217 RME180 limit) and 30 cSt at 100 degC (invented); mu = nu rho(T)
    data = base_scenario()
    data["product"].update(density=990.0, density_slope=-0.6)
    data["product"]["viscosity"] = {"law": "walther", "points": [
        {"temperature": 50.0, "kinematic_viscosity": "180 cSt"}, {"temperature": 100.0, "kinematic_viscosity": "30 cSt"}]}
    product = scenario_product(scenario_from_dict(data))
    t = 323.15
    assert product.kinematic_viscosity(t) == pytest.approx(180e-6, rel=1e-9)
    assert product.density(t) == pytest.approx(990.0 - 0.6 * 35.0, rel=1e-12)   # density given at 15 degC
    assert product.viscosity(t) == pytest.approx(180e-6 * product.density(t), rel=1e-9)


def test_the_calibration_and_the_study_factor_multiply_the_viscosity():
    # DEVELOPERS.md "Calibration": scenario_product multiplies the law by [calibration].viscosity_factor
    # times its own viscosity_factor
    data = base_scenario()
    plain = scenario_product(scenario_from_dict(data))
    data["calibration"] = {"viscosity_factor": 1.18}
    scaled = scenario_product(scenario_from_dict(data), viscosity_factor=1.2)
    assert scaled.viscosity(320.0) == pytest.approx(1.18 * 1.2 * plain.viscosity(320.0), rel=1e-12)


@pytest.mark.parametrize("field, slope", [("specific_heat_slope", -50.0), ("conductivity_slope", -0.01),
                                          ("density_slope", -10.0)])
def test_a_property_slope_that_reaches_zero_in_range_is_refused_naming_it(field, slope):
    # a slope inside its own bounds could still take the linear law through zero between -90 degC and the
    # product's max_temperature: the plan then ended in a ZeroDivisionError that named the viscosity data
    from planner.errors import ScenarioError
    from planner.scenario.product_spec import PROPERTY_REFERENCE_K

    data = base_scenario()
    product = data["product"]
    product.update({"specific_heat": "2000 J/(kg K)", "thermal_conductivity": "0.13 W/(m K)", "density": "900 kg/m3",
                    "max_temperature": "150 degC", field: slope})
    with pytest.raises(ScenarioError, match=f"{field}: with a slope of {slope:g} the .* falls to"):
        scenario_from_dict(data)
    # a twentieth of the slope keeps the law above zero over the range: taken, and the planner's law is that
    # line about 20 degC (by hand)
    product[field] = slope / 20.0
    made = scenario_product(scenario_from_dict(data))
    if field == "specific_heat_slope":
        assert made.specific_heat(PROPERTY_REFERENCE_K + 10.0) == pytest.approx(2000.0 - 25.0)
    if field == "conductivity_slope":
        assert made.conductivity(PROPERTY_REFERENCE_K + 10.0) == pytest.approx(0.13 - 0.005)
