"""Operating point, timeline, start-up and hold checks against closed forms and hand calculations."""

from __future__ import annotations

import json
import math
import subprocess
import sys

import pytest

from conftest import DEMO_FILES, ROOT, base_scenario, newtonian_product
from planner.transfer.plan import make_plan, with_changes
from planner.scenario.schema import load_scenario, scenario_from_dict
from planner.transfer.system import SystemState, TransferSystem
from planner.transfer.timeline import run_transfer
from planner.scenario.units import ATMOSPHERE_PA, GRAVITY
from planner.transfer.vessels import cool_contents, level_from_volume

ID_4IN_SCH40 = 0.10226  # ASME B36.10M via fluids.piping (REFERENCES.md)


def plan_scenario(**pump) -> dict:
    """An isothermal test bench: ambient = product temperature, constant viscosity and density."""
    data = base_scenario(product=newtonian_product(mu_pa_s=0.5, density=1100.0, cp=2000.0, k=0.2))
    data["route"]["segments"][0] = {"name": "run", "nps": "4", "schedule": "40", "length": 200.0,
                                    "elevation_change": 5.0}
    data["pump"] = {"kind": "positive_displacement", "speed": "300 rpm", "displacement": "1.0 L",
                    "mechanical_efficiency": 0.8, **pump}
    data["source"] = {"kind": "tank", "shape": "vertical_cylinder", "diameter": 10.0, "initial_volume": 200.0,
                      "volume_to_move": 100.0, "temperature": 20.0, "heat_loss_coefficient": 0.0}
    data["destination"] = {"diameter": 10.0, "initial_level": 1.0, "inlet": "top"}
    data["schedule"] = {"timeline_steps": 50, "line_start_temperature": 20.0}
    return data


def test_pd_pump_without_slip_delivers_displacement_times_speed():
    # The defining property of a positive-displacement pump (any pump handbook): Q = D N with no slip.
    scenario = scenario_from_dict(plan_scenario())
    system = TransferSystem(scenario)
    op = system.operating_point(SystemState(293.15, 200.0))
    assert op.status == "ok"
    assert op.flow == pytest.approx(1.0e-3 * 300 / 60, rel=1e-5)


def test_pd_slip_lowers_the_flow_by_the_slip_law():
    # slip = slip_ref (dp/p_ref)(mu_ref/mu): with the differential found, the flow is D N minus that slip
    scenario = scenario_from_dict(plan_scenario(slip_flow="0.6 m3/h", slip_reference_pressure="4 bar",
                                                slip_reference_viscosity="1 Pa*s"))
    op = TransferSystem(scenario).operating_point(SystemState(293.15, 200.0))
    dp = op.point.pump_differential
    expected = 1.0e-3 * 5.0 - 0.6 / 3600 * (dp / 4e5) * (1.0 / 0.5)
    assert op.flow == pytest.approx(expected, rel=1e-4)


def test_constant_flow_transfer_takes_volume_over_flow():
    scenario = scenario_from_dict(plan_scenario())
    timeline = run_transfer(TransferSystem(scenario))
    assert timeline.completed
    assert timeline.total_time_s == pytest.approx(100.0 / (1.0e-3 * 5.0), rel=1e-5)
    assert timeline.moved_m3 == pytest.approx(100.0)
    assert len(timeline.arrays["time_s"]) == 50


def test_source_vessel_cools_by_the_lumped_exponential_law():
    # Newton cooling, lumped capacitance: T = Ta + (T0 - Ta) exp(-U A t / (m cp)) (Incropera, ch. 5).
    t = cool_contents(353.15, 50_000.0, 2000.0, 400.0, 283.15, 0.0, 7200.0)
    assert t == pytest.approx(283.15 + 70.0 * math.exp(-400.0 * 7200.0 / (50_000.0 * 2000.0)), rel=1e-12)
    # with heating the balance heads to Ta + P/UA
    assert cool_contents(283.15, 1.0, 1.0, 10.0, 283.15, 500.0, 1e9) == pytest.approx(333.15)
    # and inside the timeline: a nearly full source barely changes mass or wetted area
    data = plan_scenario()
    data["site"]["ambient_temperature"] = 20.0
    data["source"].update(temperature=60.0, heat_loss_coefficient=5.0, initial_volume=500.0, volume_to_move=5.0)
    data["product"]["no_flow_temperature"] = -40.0
    scenario = scenario_from_dict(data)
    timeline = run_transfer(TransferSystem(scenario))
    area = math.pi * 10.0 * level_from_volume(scenario.source, 500.0) + math.pi * 25.0
    mass = 1100.0 * 500.0
    expected = 293.15 + 40.0 * math.exp(-5.0 * area * timeline.total_time_s / (mass * 2000.0))
    assert timeline.arrays["source_temperature_k"][-1] == pytest.approx(expected, abs=0.02)


def test_npsh_of_a_short_cold_suction_line_matches_a_hand_calculation():
    # Hand calculation (ANSI/HI 9.6.1 definition): NPSHa = (p_atm + p_gas + rho g h - dp_friction
    # - rho g dz - p_vapour) / (rho g) + V^2 / 2g, laminar friction by Hagen–Poiseuille plus the
    # developing entrance's excess (Shah 1978: 4 x+ f_app Re velocity heads from the tank outlet).
    mu, rho, level_height = 0.5, 1100.0, 3.0
    data = plan_scenario()
    data["suction"] = {"segments": [{"name": "suction", "nps": "4", "schedule": "40", "length": 6.0,
                                     "elevation_change": -1.0}]}
    data["product"]["vapour_pressure"] = "2 kPa"
    data["source"].update(shape="vertical_cylinder", diameter=10.0, initial_volume=level_height * math.pi * 25.0,
                          volume_to_move=10.0)
    scenario = scenario_from_dict(data)
    system = TransferSystem(scenario)
    q = 5.0e-3
    point = system.at_flow(q, SystemState(293.15, level_height * math.pi * 25.0))
    area = math.pi * ID_4IN_SCH40 ** 2 / 4
    v = q / area
    re = rho * v * ID_4IN_SCH40 / mu                                 # 1100 * 0.61 * 0.102 / 0.5 = 137: laminar
    x_plus = 6.0 / ID_4IN_SCH40 / re
    shah = 3.44 / math.sqrt(x_plus) + (1.25 / (4 * x_plus) + 16 - 3.44 / math.sqrt(x_plus)) / (1 + 0.00021 / x_plus ** 2)
    friction = 4 * x_plus * shah * rho * v * v / 2
    assert friction == pytest.approx(128 * mu * 6.0 * q / (math.pi * ID_4IN_SCH40 ** 4) + 1.25 * rho * v * v / 2,
                                     rel=2e-3)   # far along the entrance: Hagen–Poiseuille plus K(inf) = 1.25
    p_abs = ATMOSPHERE_PA + rho * GRAVITY * level_height - friction + rho * GRAVITY * 1.0
    npsh_hand = (p_abs - 2000.0) / (rho * GRAVITY) + v * v / (2 * GRAVITY)
    assert point.npsh_available == pytest.approx(npsh_hand, rel=1e-6)


def test_static_head_beyond_shut_off_gives_no_flow():
    data = plan_scenario()
    data["route"]["segments"][0].update(length=100.0, elevation_change=80.0)
    data["pump"] = {"kind": "centrifugal", "speed": "2950 rpm", "curve": [
        {"flow": 0, "head": 50, "efficiency": 0.0}, {"flow": "30 m3/h", "head": 45, "efficiency": 0.6},
        {"flow": "60 m3/h", "head": 30, "efficiency": 0.65}]}
    data["product"] = newtonian_product(mu_pa_s=0.01, density=900.0)
    op = TransferSystem(scenario_from_dict(data)).operating_point(SystemState(293.15, 200.0))
    assert op.status == "no_flow"
    assert "static head" in op.message


def test_low_relief_setting_reports_relief_lifting():
    data = plan_scenario(relief_setting="1 bar")
    op = TransferSystem(scenario_from_dict(data)).operating_point(SystemState(293.15, 200.0))
    assert op.status == "relief_lifting"
    assert op.point.pump_differential == pytest.approx(1e5, rel=1e-4)
    assert op.relief_flow > 0.0
    assert op.flow + op.relief_flow == pytest.approx(5.0e-3, rel=1e-4)   # no slip: the rest recirculates


def test_small_motor_and_starved_suction_are_flagged():
    data = plan_scenario(motor_power="0.5 kW", npsh_required="30 m")
    op = TransferSystem(scenario_from_dict(data)).operating_point(SystemState(293.15, 200.0))
    assert "motor_overloaded" in op.flags
    assert "suction_starved" in op.flags
    # the shaft power is D N dp / eta (the PD power law in the pump module)
    assert op.shaft_power == pytest.approx(5.0e-3 * op.point.pump_differential / 0.8, rel=1e-9)


def test_gelled_restart_pressure_matches_the_plug_force_balance():
    # A plug of Bingham/Herschel–Bulkley product at rest yields when dp pi D^2/4 = tau_y pi D L.
    data = plan_scenario()
    data["product"] = {**newtonian_product(mu_pa_s=2.0, density=1300.0), "rheology": "herschel_bulkley",
                       "flow_index": 0.7, "yield_stress": "25 Pa"}
    plan = make_plan(scenario_from_dict(data))
    assert plan.hold.gelled_restart_pressure_pa == pytest.approx(4 * 25.0 * 200.0 / ID_4IN_SCH40, rel=1e-9)


def test_cold_line_with_tracing_failed_cools_by_the_lumped_law():
    # Untraced stagnant line, buried with fixed-k insulation: C dT/dt = -U' (T - Ta), exponential decay.
    data = plan_scenario()
    data["route"]["segments"][0].update(
        insulation=[{"conductivity": 0.04, "thickness": 50}],
        surroundings={"location": "buried", "ambient_temperature": 0.0, "burial_depth": 1.0, "soil_conductivity": 1.0})
    data["product"]["no_flow_temperature"] = 10.0
    data["source"]["temperature"] = 40.0
    plan = make_plan(scenario_from_dict(data))
    seg = plan.hold.segments[0]
    r1, r2 = 0.1143 / 2, 0.1143 / 2 + 0.05
    u = 1 / (math.log(r2 / r1) / (2 * math.pi * 0.04) + math.acosh(1.0 / r2) / (2 * math.pi * 1.0)
             + math.log(0.1143 / ID_4IN_SCH40) / (2 * math.pi * 45))
    c = 1100.0 * 2000.0 * math.pi * ID_4IN_SCH40 ** 2 / 4 + 7850 * 490 * math.pi / 4 * (0.1143 ** 2 - ID_4IN_SCH40 ** 2)
    expected = c / u * math.log((seg.start_temperature_k - 273.15) / 10.0)
    assert seg.time_to_limit_failed_s == pytest.approx(expected, rel=5e-3)


def test_lever_changes_are_validated_copies():
    scenario = load_scenario(DEMO_FILES[0])
    changed = with_changes(scenario, steam_pressure=7e5, ambient_shift=-5.0)
    assert changed.tracing.steam_pressure == pytest.approx(7e5)
    assert changed.site.ambient_temperature == pytest.approx(scenario.site.ambient_temperature - 5.0)
    assert changed.route == scenario.route


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_plan_json_on_every_demo(path):
    out = subprocess.run([sys.executable, "-m", "planner", "plan", str(path), "--json"], cwd=ROOT,
                         capture_output=True, text=True, timeout=180)
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["start"]["status"] in ("ok", "relief_lifting", "rate_not_reachable", "beyond_curve", "no_flow")
    arrays = doc["timeline"]["arrays"]
    assert len(arrays["time_s"]) >= 50
    assert doc["timeline"]["total_time_s"] > 0
    assert doc["costs"]["total"] == pytest.approx(doc["costs"]["energy"] + doc["costs"]["demurrage"])


def test_push_cold_leaves_the_shared_system_unchanged():
    # issue 9: pushing the cold plug out works on a copy (TransferSystem.with_plug); the system the
    # timeline and hold use afterwards gives the same operating point as before
    from planner.transfer.startup import push_cold

    scenario = scenario_from_dict(plan_scenario())
    system = TransferSystem(scenario)
    state = SystemState(scenario.source.temperature, scenario.source.initial_volume)
    before = system.at_flow(0.002, state)
    push = push_cold(system, scenario.source.temperature - 15.0)
    assert push.rows or not push.possible
    assert system.plug is None
    after = system.at_flow(0.002, state)
    assert after.discharge_pressure == before.discharge_pressure
    assert after.outlet_temperature == before.outlet_temperature
