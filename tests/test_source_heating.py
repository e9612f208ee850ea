"""Issue 10 item 7: heating the source while unloading is limited by its medium.

Sources:
- IAPWS-IF97 saturation line (the planner's own ``planner.correlations.steam``, checked against the release
  in tests/test_steam.py), here cross-checked with the ``iapws`` package (test-only reference): steam at
  3.5 bar gauge (4.51325 bar absolute) condenses at 421.17 K (148.0 degC).
- The lumped capacitance balance m cp dT/dt = -UA (T - T_amb) + P (Incropera & DeWitt, ch. 5): its exact
  solution is checked against an independent fine explicit integration (here, in the test), energy
  included.
- A steam coil passes heat in proportion to the steam-to-contents difference (any heat-exchanger text:
  Q = UA (T_sat - T)); the contents can never pass the condensing temperature [common practice].
"""

from __future__ import annotations

import pytest

from conftest import base_scenario, newtonian_product, plan_scenario
from planner.scenario.schema import scenario_from_dict
from planner.transfer.plan import make_plan
from planner.transfer.vessels import SourceHeating, heat_contents, source_heating

C0 = 273.15


def _euler(t, mcp, ua, t_amb, power_of, dt, n=200_000):
    """Independent fine explicit integration: temperature and delivered heat."""
    h, delivered = dt / n, 0.0
    for _ in range(n):
        p = power_of(t)
        delivered += p * h
        t += (p - ua * (t - t_amb)) * h / mcp
    return t, delivered


def test_iapws_places_the_coil_limit():
    iapws = pytest.importorskip("iapws")
    data = plan_scenario()
    data["source"].update(heating_power="180 kW", heating_medium="steam", heating_steam_pressure="3.5 bar")
    heat = source_heating(scenario_from_dict(data))
    assert heat.limit_k == pytest.approx(iapws.IAPWS97(P=0.451325, x=1).T, abs=0.02)


@pytest.mark.parametrize("t0, ua", [(55.0 + C0, 0.0), (55.0 + C0, 800.0), (140.0 + C0, 300.0)])
def test_steam_coil_step_matches_a_fine_integration(t0, ua):
    heat = SourceHeating("steam", 180e3, 148.0 + C0, 180e3 / (148.0 + C0 - (55.0 + C0)))
    mass, cp, t_amb, dt = 200_000.0, 1900.0, 5.0 + C0, 6 * 3600.0
    t_new, energy = heat_contents(t0, mass, cp, ua, t_amb, heat, dt)
    ref_t, ref_e = _euler(t0, mass * cp, ua, t_amb, lambda t: heat.coil_ua * (heat.limit_k - t), dt)
    assert t_new == pytest.approx(ref_t, abs=1e-3)
    assert energy == pytest.approx(ref_e, rel=1e-4)


def test_steam_coils_never_take_the_contents_past_saturation():
    heat = SourceHeating("steam", 5e6, 148.0 + C0, 5e6 / 93.0)   # a coil ten times too large
    t, _ = heat_contents(55.0 + C0, 20_000.0, 1900.0, 0.0, 5.0 + C0, heat, 30 * 24 * 3600.0)
    assert t <= heat.limit_k and t == pytest.approx(heat.limit_k, abs=1e-6)


@pytest.mark.parametrize("t0", [40.0 + C0, 80.0 + C0, 95.0 + C0])
def test_electric_heating_stops_at_its_cut_out(t0):
    heat = SourceHeating("electric", 60e3, 80.0 + C0)
    mass, cp, ua, t_amb, dt = 30_000.0, 2000.0, 150.0, 0.0 + C0, 20 * 3600.0

    def thermostat(t):        # full power below the cut-out, off above it (a fine-step on/off controller)
        return heat.rated_power if t < heat.limit_k else 0.0

    t_new, energy = heat_contents(t0, mass, cp, ua, t_amb, heat, dt)
    ref_t, ref_e = _euler(t0, mass * cp, ua, t_amb, thermostat, dt)
    assert t_new == pytest.approx(ref_t, abs=0.01)
    assert energy == pytest.approx(ref_e, rel=2e-3)
    assert t_new <= max(t0, heat.limit_k) + 1e-9


def _barge(route_m: float, power: str) -> dict:
    data = plan_scenario()
    data["product"] = newtonian_product(mu_pa_s=0.05, density=980.0, cp=1900.0, k=0.12)
    data["product"]["max_temperature"] = 400.0
    data["route"]["segments"][0]["length"] = route_m
    data["source"].update(temperature=55.0, heating_power=power, heating_medium="steam",
                          heating_steam_pressure="3.5 bar", heat_loss_coefficient=0.5)
    return data


def test_a_plan_with_oversized_coils_keeps_the_source_below_the_steam_temperature():
    plan = make_plan(scenario_from_dict(_barge(2000.0, "2 MW")))
    limit = source_heating(plan.scenario).limit_k
    source_t = plan.timeline.arrays["source_temperature_k"]
    assert source_t.max() > 120.0 + C0                # the coils do heat it strongly
    assert source_t.max() <= limit + 1e-9
    # the energy bought is what the coils delivered, not the rated power times the time
    assert plan.energy.vessel_heating_j < 2e6 * plan.timeline.total_time_s


def test_calibrated_heat_loss_scales_the_source_shell_too():
    def cooled(factor):
        data = plan_scenario()
        data["site"]["ambient_temperature"] = 0.0
        data["source"].update(temperature=60.0, heat_loss_coefficient=5.0)
        data["product"]["no_flow_temperature"] = -40.0
        data["calibration"] = {"heat_loss_factor": factor}
        return 60.0 + C0 - make_plan(scenario_from_dict(data)).timeline.arrays["source_temperature_k"][-1]

    # lumped cooling towards 0 degC: dT = 60 (1 - e^-x) with x = UA t / (m cp), so doubling UA gives
    # dT2 / dT1 = 1 + e^-x = 2 - dT1 / 60 (mass and wetted area change little over the transfer)
    once = cooled(1.0)
    assert 0.5 < once < 10.0
    assert cooled(2.0) / once == pytest.approx(2.0 - once / 60.0, rel=2e-3)
