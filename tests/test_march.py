"""Whole-line checks of the steady march against closed forms and hand calculations."""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import DEMO_FILES, base_scenario, newtonian_product
from planner.line.march import DEFAULT_STEP_M
from planner.line.model import evaluate, line_from_scenario
from planner.scenario.schema import load_scenario, scenario_from_dict
from planner.scenario.units import GRAVITY

ID_2IN_SCH40 = 0.05248   # ASME B36.10M NPS 2 Sch 40 inside diameter (REFERENCES.md, fluids.piping)
OD_2IN = 0.0603


def test_isothermal_laminar_line_equals_hagen_poiseuille():
    # Hagen–Poiseuille: dp = 128 mu L Q / (pi D^4) for fully developed laminar flow (any fluids text),
    # plus the hydrodynamic entrance's incremental drop K(inf) rho V^2 / 2, K(inf) = 1.25 (Shah & London
    # 1978 [mem]; here x+ = L / (D Re) is about 180, far past the entrance, so nothing else is left).
    # Isothermal: ambient equals inlet temperature, constant viscosity and density.
    mu, length, flow = 2.0, 150.0, 4.0 / 3600.0
    data = base_scenario(product=newtonian_product(mu_pa_s=mu, density=1200.0, cp=2000.0, k=0.2))
    data["route"]["segments"][0]["length"] = length
    data["operation"] = {"flow": flow, "inlet_temperature": 20.0}
    result = evaluate(scenario_from_dict(data))
    velocity = flow / (math.pi * ID_2IN_SCH40 ** 2 / 4.0)
    expected = 128.0 * mu * length * flow / (math.pi * ID_2IN_SCH40 ** 4) + 1.25 * 1200.0 * velocity ** 2 / 2.0
    assert result.summary.laminar_fraction == 1.0
    assert result.summary.friction_drop_pa == pytest.approx(expected, rel=1e-6)
    assert result.summary.pressure_drop_pa == pytest.approx(expected, rel=1e-6)


def test_untraced_line_with_fixed_loss_coefficient_follows_exponential_cooling():
    # T(x) = Ta + (Tin - Ta) exp(-U' x / (m cp)) for a fixed loss conductance U' per metre.
    # A buried, insulated run has a fixed U' (fixed-k insulation, soil shape factor); water-like
    # turbulent flow keeps the film resistance near 0.1 % of the total.  The small viscous heating
    # (Darcy–Colebrook friction via fluids 1.3.1) is a constant source S that shifts T_eq by S/U'.
    fluids = pytest.importorskip("fluids")
    k_ins, thickness, k_soil, depth = 0.04, 0.05, 1.2, 1.0
    data = base_scenario(product=newtonian_product(mu_pa_s=0.001, density=1000.0, cp=4180.0, k=0.6))
    seg = data["route"]["segments"][0]
    seg.update(length=2000.0, insulation=[{"conductivity": k_ins, "thickness": thickness * 1000.0}],
               surroundings={"location": "buried", "ambient_temperature": 5.0, "burial_depth": depth,
                             "soil_conductivity": k_soil})
    data["operation"] = {"flow": "3 m3/h", "inlet_temperature": 80.0}
    result = evaluate(scenario_from_dict(data), step=10.0)
    r1, r2 = OD_2IN / 2, OD_2IN / 2 + thickness
    # Incropera, Fundamentals of Heat and Mass Transfer: cylinder conduction ln(r2/r1)/(2 pi k) and the
    # buried-cylinder shape factor S = 2 pi / acosh(2z/D) (Table 4.1).
    r_ins = math.log(r2 / r1) / (2 * math.pi * k_ins)
    r_soil = math.acosh(depth / r2) / (2 * math.pi * k_soil)
    r_wall = math.log(OD_2IN / ID_2IN_SCH40) / (2 * math.pi * 45.0)
    u_line = 1.0 / (r_ins + r_soil + r_wall)
    q = 3.0 / 3600.0
    m = 1000.0 * q
    v = q / (math.pi * ID_2IN_SCH40 ** 2 / 4)
    f = fluids.friction.Colebrook(1000.0 * v * ID_2IN_SCH40 / 0.001, 4.6e-5 / ID_2IN_SCH40)
    source = f / ID_2IN_SCH40 * 1000.0 * v * v / 2 * q          # W/m of viscous heating
    t_eq = 278.15 + source / u_line
    expected = t_eq + (353.15 - t_eq) * math.exp(-u_line * 2000.0 / (m * 4180.0))
    drop_expected = 353.15 - expected
    drop = 353.15 - result.summary.outlet_temperature_k
    assert drop == pytest.approx(drop_expected, rel=2e-3)
    # and along the way, at every node
    x = result.nodes["x"]
    t_expected = t_eq + (353.15 - t_eq) * pytest.importorskip("numpy").exp(-u_line * x / (m * 4180.0))
    assert abs(result.nodes["temperature"] - t_expected).max() < 0.02


def test_traced_line_with_capacity_to_spare_holds_its_setpoint():
    data = base_scenario(product=newtonian_product(mu_pa_s=0.01, density=900.0, cp=2000.0, k=0.15))
    data["site"]["ambient_temperature"] = -10.0
    seg = data["route"]["segments"][0]
    seg.update(length=500.0, insulation=[{"material": "mineral_wool", "thickness": 50}])
    data["tracing"] = {"kind": "electric_constant", "setpoint": 60.0, "output": "200 W/m"}
    data["operation"] = {"flow": "2 m3/h", "inlet_temperature": 60.0}
    result = evaluate(scenario_from_dict(data))
    s = result.summary
    # the wall is held at the setpoint; product enters at it and stays within viscous heating of it
    assert result.steps["wall_temperature"] == pytest.approx(333.15, abs=1e-9)
    assert s.outlet_temperature_k == pytest.approx(333.15, abs=0.05)
    # the heater then supplies exactly the outward loss (energy balance on the wall)
    assert s.trace_power_w == pytest.approx(s.heat_loss_w, rel=0.02)
    assert s.heater_short_fraction == 0.0


def test_undersized_heater_lets_the_line_cool_with_the_heater_on():
    data = base_scenario(product=newtonian_product(mu_pa_s=0.01, density=900.0, cp=2000.0, k=0.15))
    data["site"]["ambient_temperature"] = -10.0
    data["route"]["segments"][0].update(length=500.0, insulation=[{"material": "mineral_wool", "thickness": 25}])
    data["tracing"] = {"kind": "electric_constant", "setpoint": 60.0, "output": "5 W/m"}
    data["operation"] = {"flow": "0.5 m3/h", "inlet_temperature": 60.0}
    result = evaluate(scenario_from_dict(data))
    assert result.summary.outlet_temperature_k < 333.15 - 1.0
    assert result.summary.trace_power_w == pytest.approx(5.0 * 500.0, rel=1e-9)   # full output all along
    assert result.summary.heater_short_fraction > 0.95


def test_static_head_alone_equals_rho_g_dz():
    rho, rise = 1250.0, 35.0
    data = base_scenario(product=newtonian_product(mu_pa_s=0.001, density=rho))
    data["route"]["segments"][0].update(length=40.0, elevation_change=rise)
    result = evaluate(scenario_from_dict(data))
    assert result.summary.static_drop_pa == pytest.approx(rho * GRAVITY * rise, rel=1e-12)
    s = result.summary
    assert s.pressure_drop_pa == pytest.approx(s.friction_drop_pa + s.fittings_drop_pa + s.static_drop_pa, rel=1e-12)


def test_turbulent_water_line_matches_darcy_with_colebrook():
    # Darcy–Weisbach with Colebrook f from fluids 1.3.1 (reference library, not used by the march).
    fluids = pytest.importorskip("fluids")
    data = base_scenario(product=newtonian_product(mu_pa_s=0.001, density=998.0))
    data["route"]["segments"][0].update(length=300.0)
    data["operation"] = {"flow": "15 m3/h", "inlet_temperature": 20.0}
    result = evaluate(scenario_from_dict(data))
    q = 15.0 / 3600.0
    v = q / (math.pi * ID_2IN_SCH40 ** 2 / 4)
    re = 998.0 * v * ID_2IN_SCH40 / 0.001
    f = fluids.friction.Colebrook(re, 4.6e-5 / ID_2IN_SCH40)
    expected = f * 300.0 / ID_2IN_SCH40 * 998.0 * v * v / 2
    assert result.summary.friction_drop_pa == pytest.approx(expected, rel=1e-4)


def test_fittings_add_hooper_k_at_the_local_reynolds_number():
    # Hooper 2-K via fluids 1.3.1 (fluids.fittings.Hooper) as the reference.
    fluids = pytest.importorskip("fluids")
    mu, flow = 1.5, 6.0 / 3600.0
    data = base_scenario(product=newtonian_product(mu_pa_s=mu, density=1100.0))
    data["route"]["segments"][0].update(fittings=[{"type": "elbow_90_standard", "count": 5}])
    plain = base_scenario(product=newtonian_product(mu_pa_s=mu, density=1100.0))
    for d in (data, plain):
        d["operation"] = {"flow": flow, "inlet_temperature": 20.0}
    with_fittings = evaluate(scenario_from_dict(data)).summary
    without = evaluate(scenario_from_dict(plain)).summary
    v = flow / (math.pi * ID_2IN_SCH40 ** 2 / 4)
    re = 1100.0 * v * ID_2IN_SCH40 / mu
    k = fluids.fittings.Hooper2K(Di=ID_2IN_SCH40 / 0.0254, Re=re, K1=800.0, Kinfty=0.25)  # Di in inches
    assert with_fittings.fittings_drop_pa == pytest.approx(5 * k * 1100.0 * v * v / 2, rel=1e-6)
    assert with_fittings.friction_drop_pa == pytest.approx(without.friction_drop_pa, rel=1e-12)


def test_power_law_isothermal_line_matches_metzner_reed():
    # Metzner–Reed laminar: Fanning f = 16/Re_MR; REFERENCES.md values worked by hand from the formula.
    data = base_scenario(product={
        **newtonian_product(mu_pa_s=0.5, density=1000.0),
        "rheology": "power_law", "flow_index": 0.5,
    })
    data["route"]["segments"][0] = {"name": "run", "inside_diameter": "50 mm", "length": 100.0}
    velocity = 1.0
    flow = velocity * math.pi * 0.05 ** 2 / 4
    data["operation"] = {"flow": flow, "inlet_temperature": 20.0}
    result = evaluate(scenario_from_dict(data))
    assert result.summary.friction_drop_pa / 100.0 == pytest.approx(565.7, rel=1e-4)


def test_viscous_heating_warms_an_adiabatic_laminar_line_by_dp_over_rho_cp():
    # Energy balance: all frictional work ends as heat, dT = dp / (rho cp) when no heat leaves.
    data = base_scenario(product=newtonian_product(mu_pa_s=5.0, density=1300.0, cp=2500.0, k=0.3))
    data["route"]["segments"][0].update(
        length=200.0, insulation=[{"conductivity": 1e-4, "thickness": 200}],
        surroundings={"location": "buried", "ambient_temperature": 20.0})
    data["operation"] = {"flow": "4 m3/h", "inlet_temperature": 20.0}
    s = evaluate(scenario_from_dict(data)).summary
    rise = s.outlet_temperature_k - s.inlet_temperature_k
    assert rise == pytest.approx(s.friction_drop_pa / (1300.0 * 2500.0), rel=0.01)
    assert rise > 1.0


def test_product_colder_than_no_flow_temperature_is_reported_as_setting():
    data = base_scenario(product=newtonian_product(mu_pa_s=0.5, density=900.0, cp=2000.0, k=0.15, no_flow_c=30.0))
    data["site"]["ambient_temperature"] = -15.0
    data["site"]["wind_speed"] = 8.0
    data["route"]["segments"][0].update(length=2000.0)
    data["operation"] = {"flow": "0.5 m3/h", "inlet_temperature": 40.0}
    result = evaluate(scenario_from_dict(data))
    s = result.summary
    assert s.status == "product_sets"
    assert 0.0 < s.sets_at_m < 2000.0
    assert result.nodes["x"][-1] == pytest.approx(s.sets_at_m)
    assert s.outlet_temperature_k < 303.15


def test_steam_tracer_runs_at_saturation_temperature():
    # IAPWS-IF97 saturation at 3.5 barg: 148.02 degC (REFERENCES.md, iapws 1.5.5)
    data = base_scenario()
    data["tracing"] = {"kind": "steam", "steam_pressure": "3.5 bar"}
    data["route"]["segments"][0]["insulation"] = [{"material": "calcium_silicate", "thickness": 50}]
    s = evaluate(scenario_from_dict(data)).summary
    assert s.max_sheath_temperature_k - 273.15 == pytest.approx(148.02, abs=0.02)
    assert s.trace_power_w > 0


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_grid_independence_on_every_demo(path):
    # Halving the step changes outlet temperature by < 0.05 K and pressure drop by < 0.2 % (issue floor).
    scenario = load_scenario(path)
    line = line_from_scenario(scenario)
    coarse = evaluate(scenario, line=line).summary
    fine = evaluate(scenario, line=line, step=DEFAULT_STEP_M / 2).summary
    assert abs(coarse.outlet_temperature_k - fine.outlet_temperature_k) < 0.05
    assert abs(coarse.pressure_drop_pa - fine.pressure_drop_pa) < 0.002 * abs(fine.pressure_drop_pa)


@pytest.mark.parametrize("flow", [1e-4, 3e-6, 1e-7])
def test_trickle_flow_settles_at_the_thermostat_instead_of_oscillating(flow):
    # A thermal length far shorter than a step: the product must settle where the thermostat holds the
    # wall (setpoint, heater with capacity to spare), the same with 25 m and 1 m steps.
    data = base_scenario(product=newtonian_product(mu_pa_s=100.0, density=1100.0, cp=2000.0, k=0.2))
    data["site"]["ambient_temperature"] = 0.0
    data["route"]["segments"][0].update(nps="4", length=1500.0,
                                        insulation=[{"material": "mineral_wool", "thickness": 50}])
    data["tracing"] = {"kind": "electric_self_regulating", "setpoint": 28.0, "output": "46 W/m"}
    data["operation"] = {"flow": 1e-3, "inlet_temperature": 1.0}
    scenario = scenario_from_dict(data)
    line = line_from_scenario(scenario)
    coarse = evaluate(scenario, flow=flow, line=line).summary
    fine = evaluate(scenario, flow=flow, line=line, step=1.0).summary
    assert coarse.outlet_temperature_k == pytest.approx(fine.outlet_temperature_k, abs=0.05)
    if flow < 1e-5:
        assert coarse.outlet_temperature_k == pytest.approx(301.15, abs=0.05)
        assert coarse.max_jacket_temperature_k < 301.15


def _wall_held_line(segments: list[dict]) -> dict:
    # a laminar product of constant properties (viscosity ratio 1) in lines whose wall a
    # thermostat holds at 60 degC (three 500 W/m runs, far above the loss); viscous heating is
    # below 1e-3 of the heat taken up
    data = base_scenario(product=newtonian_product(mu_pa_s=0.5, density=900.0, cp=2000.0, k=0.15))
    data["route"]["segments"] = segments
    data["tracing"] = {"kind": "electric_constant", "setpoint": 60.0, "output": "500 W/m", "circuits_per_metre": 3}
    data["site"]["ambient_temperature"] = 20.0
    data["operation"] = {"flow": "0.094 m3/h", "inlet_temperature": 20.0}
    return data


def test_wall_held_laminar_line_follows_the_graetz_series():
    # issue 10 item 1: bulk temperature against the Graetz series (Shah & London 1978 eigenvalues
    # and constants, tests/test_heat_transfer.py) within 2 % of the driving difference at every node
    from test_heat_transfer import graetz_bulk_theta

    seg = {"name": "run", "nps": "2", "schedule": "40", "length": 200.0,
           "insulation": [{"material": "mineral_wool", "thickness": 50}]}
    scenario = scenario_from_dict(_wall_held_line([seg]))
    result = evaluate(scenario)
    s = result.summary
    assert s.laminar_fraction == 1.0 and s.viscous_heating_w < 1e-3 * s.trace_power_w
    assert result.steps["wall_temperature"] == pytest.approx(333.15, abs=1e-9)
    pe = 4.0 * s.mass_flow_kg_s * 2000.0 / (math.pi * ID_2IN_SCH40 * 0.15)   # Re Pr = 4 m cp / (pi D k)
    worst = 0.0
    for x, t in zip(result.nodes["x"], result.nodes["temperature"]):
        theta = (333.15 - t) / 40.0
        worst = max(worst, abs(theta - graetz_bulk_theta(x / (ID_2IN_SCH40 * pe))))
    assert worst < 0.02
    assert result.nodes["x"][-1] / (ID_2IN_SCH40 * pe) > 0.3   # the line reaches fully developed flow


def test_thermal_entrance_starts_again_at_a_diameter_change():
    # documented choice: the entrance restarts at a change of inside diameter (the route inlet
    # and each such change), so the second run follows the series from its own start
    from test_heat_transfer import graetz_bulk_theta

    first = {"name": "small", "nps": "2", "schedule": "40", "length": 20.0,
             "insulation": [{"material": "mineral_wool", "thickness": 50}]}
    second = {"name": "large", "nps": "3", "schedule": "40", "length": 120.0,
              "insulation": [{"material": "mineral_wool", "thickness": 50}]}
    result = evaluate(scenario_from_dict(_wall_held_line([first, second])))
    s = result.summary
    id_3in = 0.07793   # ASME B36.10M NPS 3 Sch 40 inside diameter (fluids.piping)
    pe = 4.0 * s.mass_flow_kg_s * 2000.0 / (math.pi * id_3in * 0.15)
    x, t = result.nodes["x"], result.nodes["temperature"]
    start = int(np.argmin(abs(x - 20.0)))
    t_start = t[start]
    for k in range(start + 1, len(x)):
        theta = (333.15 - t[k]) / (333.15 - t_start)
        assert abs(theta - graetz_bulk_theta((x[k] - 20.0) / (id_3in * pe))) < 0.02


def test_reynolds_2300_is_laminar_everywhere():
    # issue 9: one definition of the bands (planner.correlations.friction): friction, the film, the
    # march's regime record and fractions, and the findings' transitional check agree at Re = 2300
    from planner.correlations.friction import RE_LAMINAR_MAX, darcy_friction, flow_regime
    from planner.correlations.heat_transfer import nu_internal

    assert RE_LAMINAR_MAX == 2300.0 and flow_regime(2300.0) == "laminar"
    assert darcy_friction(2300.0, 1e-4) == pytest.approx(64.0 / 2300.0, rel=1e-15)
    assert nu_internal(2300.0, 50.0, 64.0 / 2300.0) == pytest.approx(3.66, rel=1e-12)   # laminar branch
    # a line running at Re = 2300 exactly: constant viscosity, isothermal
    rho, mu, d = 1000.0, 0.05, ID_2IN_SCH40
    flow = 2300.0 * mu / (rho * d) * math.pi * d * d / 4.0
    data = base_scenario(product=newtonian_product(mu_pa_s=mu, density=rho))
    data["operation"] = {"flow": f"{flow!r} m**3/s", "inlet_temperature": 20.0}
    result = evaluate(scenario_from_dict(data))
    assert result.steps["reynolds"] == pytest.approx(2300.0, rel=1e-9)
    assert result.summary.laminar_fraction == 1.0 and result.summary.transitional_fraction == 0.0
    assert set(result.steps["flow_regime"]) == {0}


def _bare_half_inch_with_ambient_sensing(output_w_m: float, runs: float) -> dict:
    # a bare 1/2" line at a trickle, its heater switched by the ambient only (full output whatever the
    # wall): nothing holds the wall, so the heat the product cannot take up drives it up
    data = base_scenario()
    data["route"]["segments"] = [{"name": "bare", "nps": "1/2", "schedule": "40", "length": 50.0}]
    data["tracing"] = {"kind": "electric_constant", "output": f"{output_w_m} W/m", "circuits_per_metre": runs,
                       "sensing": "ambient", "switch_temperature": 30.0}
    data["operation"] = {"flow": "0.01 m3/h", "inlet_temperature": 20.0}
    return data


def test_a_wall_past_the_temperature_ceiling_is_refused_naming_the_heating():
    # issue 13: 20 kW/m on a bare 1/2" line gave a wall of 4,568 K and a plan marked ok.  Now the
    # input is refused (tests/test_scenario.py) and, within the input limits, a sheath, wall or
    # product past the schema's 773.15 K (500 degC) stops the march with the inputs to change
    from planner.errors import ComputationError
    from planner.scenario.schema import TEMPERATURE_CEILING_K

    assert TEMPERATURE_CEILING_K == 773.15   # scenario.schema.Temperature's upper limit
    with pytest.raises(ComputationError) as caught:
        evaluate(scenario_from_dict(_bare_half_inch_with_ambient_sensing(500.0, 3)))
    text = str(caught.value)
    assert "heater sheath reaches" in text and "past the 500.0 °C" in text and "'bare'" in text
    assert "tracing.output" in text and "tracing.circuits_per_metre" in text and "tracing.sensing" in text
    reached = float(text.split("reaches ")[1].split(" °C")[0].replace(",", ""))
    assert 500.0 < reached < 520.0   # stopped at the first step past the ceiling, not thousands of K on
    # the same line with a tenth of the heat runs: the product takes it up below the ceiling
    result = evaluate(scenario_from_dict(_bare_half_inch_with_ambient_sensing(150.0, 1)))
    assert result.ok and result.summary.max_sheath_temperature_k < TEMPERATURE_CEILING_K


def test_the_command_line_refuses_a_line_past_the_ceiling_with_exit_2(tmp_path, capsys):
    import json

    from planner.cli import main

    path = tmp_path / "hot.json"
    path.write_text(json.dumps(_bare_half_inch_with_ambient_sensing(500.0, 3)), encoding="utf-8")
    assert main(["evaluate", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("error: the heater sheath reaches") and "Traceback" not in err


def test_a_steam_traced_line_past_the_ceiling_is_viscous_heating_and_says_so():
    # steam at the schema's highest 40 bar(g) condenses near 252 degC (IAPWS-IF97 saturation line), far below
    # the 500 degC ceiling: a product past it was heated by its own friction (5 Pa.s at 50 m3/h in a 1" line).
    # The advice was "lower tracing.steam_pressure ... or raise operation.flow", the wrong way round
    from planner.errors import ComputationError

    data = base_scenario(product=newtonian_product(mu_pa_s=5.0))
    data["route"]["segments"] = [{"name": "run", "nps": "1", "schedule": "40", "length": 400.0}]
    data["tracing"] = {"kind": "steam", "steam_pressure": "40 bar"}
    data["operation"] = {"flow": "50 m3/h", "inlet_temperature": 20.0}
    with pytest.raises(ComputationError) as caught:
        evaluate(scenario_from_dict(data))
    text = str(caught.value)
    assert "product reaches" in text and "viscous heating: lower the flow (operation.flow" in text
    assert "raise operation.flow" not in text and "tracing.steam_pressure" not in text
    data["operation"]["flow"] = "5 m3/h"          # a tenth of the flow: about 50 degC at the outlet
    assert evaluate(scenario_from_dict(data)).summary.outlet_temperature_k < 400.0
