"""Kinematic viscosity in cSt beside the dynamic one (Product view, the profile table): nu = mu / rho, one
unit table (``planner.scenario.units.UNIT_SYSTEMS``: cSt in both systems, 1 cSt = 1 mm2/s = 1e-6 m2/s,
NIST SP 811 (2008) Appendix B.8: 1 St = 1e-4 m2/s)."""

from __future__ import annotations

import numpy as np
import pytest
from streamlit.testing.v1 import AppTest

from conftest import ROOT, newtonian_product
from dashboard.compute.kinematic import at_temperature, lab_kinematic, step_kinematic
from dashboard.present.display import fmt
from planner.line.products import Product
from planner.scenario.schema import ProductSpec, load_scenario
from planner.line.products import scenario_product

APP = str(ROOT / "dashboard" / "app.py")
SYRUP = ROOT / "demo_scenarios" / "syrup_railcar_unload.toml"


def test_hand_value_1000_mpas_at_1250_kg_m3_is_800_cst():
    product = Product(ProductSpec.model_validate(newtonian_product(mu_pa_s=1.0, density=1250.0)))
    value = at_temperature(product, 300.0)
    assert value["kinematic_m2_s"] == pytest.approx(1.0 / 1250.0, rel=1e-12)      # 8e-4 m2/s by hand
    assert fmt(value["kinematic_m2_s"], "kinematic_viscosity", "SI") == "800.0 cSt"
    assert fmt(value["kinematic_m2_s"], "kinematic_viscosity", "US") == "800.0 cSt"
    assert fmt(value["viscosity_pa_s"], "dynamic_viscosity", "SI") == "1,000.0 mPa·s"


def test_mid_step_density_at_its_mean_temperature():
    data = newtonian_product(mu_pa_s=2.0, density=1000.0)
    data["density_slope"] = -0.5       # kg/m3 per K: 1000 kg/m3 at the reference 15 degC, falling as it warms
    product = Product(ProductSpec.model_validate(data))
    nodes = {"x": [0.0, 10.0], "temperature": [300.0, 310.0]}
    steps = {"x": [5.0], "viscosity": [2.0]}
    rho = product.density(305.0)
    assert rho == pytest.approx(1000.0 - 0.5 * (305.0 - 288.15), rel=1e-12)      # 991.575 kg/m3 by hand
    assert step_kinematic(nodes, steps, product.density)[0] == pytest.approx(2.0 / rho, rel=1e-12)


@pytest.mark.parametrize("units", ["SI", "US"])
def test_product_view_shows_cst_beside_the_dynamic_viscosity(units):
    scenario = load_scenario(SYRUP)
    expected = np.array(lab_kinematic(scenario.product, scenario_product(scenario))) * 1e6
    at = AppTest.from_file(APP, default_timeout=90).run()
    if at.session_state["demo_choice"] != SYRUP.name:
        at.selectbox(key="demo_choice").set_value(SYRUP.name).run()
    at.session_state["unit_system"] = units
    at.session_state["view"] = "Product"
    at.run()
    assert not at.exception
    lab = [d.value for d in at.dataframe if "Kinematic viscosity [cSt]" in d.value.columns]
    assert lab, "no lab table with kinematic viscosity"
    assert lab[0]["Kinematic viscosity [cSt]"].to_numpy(dtype=float) == pytest.approx(expected, rel=1e-9)
    dynamic = "Viscosity [mPa·s]" if units == "SI" else "Viscosity [cP]"
    assert dynamic in lab[0].columns
    rows = " ".join(t.value.to_string() for t in at.table)
    assert "Viscosity at the pump inlet at the start" in rows and "cSt" in rows
