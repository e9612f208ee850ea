"""Each finding: a scenario built to cross its limit triggers it (right code, severity and where);
the same scenario just inside the limit does not.  Published tables: ASME B16.5, IEC 60079-0."""

from __future__ import annotations

import copy
import math

import pytest

from conftest import base_scenario, newtonian_product
from planner.checks.findings import assess
from unit_words import assert_speaks, rendered_plan_texts
from planner.transfer.plan import make_plan
from planner.transfer.pumps import hi_parameter_b
from planner.correlations.ratings import flange_rating, temperature_class_limit
from planner.scenario.schema import scenario_from_dict
from planner.correlations.steam import saturation_pressure


def bench(**changes) -> dict:
    """A clean bench: isothermal, untraced, PD pump without slip, constant viscosity, no ratings."""
    data = base_scenario(product=newtonian_product(mu_pa_s=0.5, density=1100.0, cp=2000.0, k=0.2))
    data["route"]["segments"][0] = {"name": "run", "nps": "4", "schedule": "40", "length": 200.0,
                                    "elevation_change": 5.0}
    data["pump"] = {"kind": "positive_displacement", "speed": "300 rpm", "displacement": "1.0 L",
                    "mechanical_efficiency": 0.8}
    data["source"] = {"kind": "tank", "shape": "vertical_cylinder", "diameter": 10.0, "initial_volume": 200.0,
                      "volume_to_move": 100.0, "temperature": 20.0, "heat_loss_coefficient": 0.0}
    data["destination"] = {"diameter": 10.0, "initial_level": 1.0, "inlet": "top"}
    data["schedule"] = {"timeline_steps": 50, "line_start_temperature": 20.0}
    data.update(copy.deepcopy(changes))
    return data


def plan_of(data):
    return make_plan(scenario_from_dict(data))


RENDERED_CODES: set[str] = set()


def found(data) -> dict:
    """The findings of the scenario's plan by code.  Every plan built here is also read in both unit
    systems: the US text has no SI unit word and the SI text no US one (``unit_words``)."""
    plan = plan_of(data)
    findings = assess(plan)
    for system in ("SI", "US"):
        for text in rendered_plan_texts(plan, findings, system):
            assert_speaks(text, system)
    RENDERED_CODES.update(f.code for f in findings)
    return {f.code: f for f in findings}


def test_clean_scenario_has_only_the_standing_caution():
    codes = found(bench())
    assert list(codes) == ["PLANNING-ESTIMATE"]
    assert codes["PLANNING-ESTIMATE"].severity == "info"
    assert "licensed engineer" in codes["PLANNING-ESTIMATE"].message


def straddle(data_for, code, severity, value, rel=0.002, trips_above=False):
    """Build the scenario with its limit just beyond and just inside ``value`` (the computed quantity the
    limit is checked against): the first must trigger ``code``, the second must not.  ``trips_above``:
    the finding trips when the limit is above the value (e.g. NPSH required above NPSH available)."""
    beyond, inside = (1 + rel, 1 - rel) if trips_above else (1 - rel, 1 + rel)
    over = found(data_for(value * beyond))
    under = found(data_for(value * inside))
    assert code in over, list(over)
    assert over[code].severity == severity
    assert code not in under, list(under)
    return over[code]


def hot_bench():
    data = bench()
    data["source"]["temperature"] = 90.0
    data["product"]["max_temperature"] = 150.0
    data["schedule"]["line_start_temperature"] = 90.0
    data["route"]["segments"][0]["jacket_emissivity"] = 0.9
    return data


def test_hot_surface_against_the_touch_limit():
    plan = plan_of(hot_bench())
    jacket = plan.start_profile.summary.max_jacket_temperature_k

    def with_limit(limit):
        d = hot_bench()
        d["limits"] = {"touch_temperature": f"{limit} K"}
        return d

    f = straddle(with_limit, "SURFACE-HOT", "warning", jacket, rel=0.001)
    assert f.line == "discharge" and f.segment == "run" and 0.0 <= f.at_m <= 200.0


def test_steam_tracer_against_the_area_temperature_class():
    # IEC 60079-0: T4 allows 135 degC surfaces.  Steam at saturation just above / below 135 degC.
    def with_steam(t_celsius):
        d = bench()
        d["tracing"] = {"kind": "steam", "steam_pressure": f"{saturation_pressure(t_celsius + 273.15) - 101325.0} Pa"}
        d["route"]["segments"][0].update(hazardous_area_class="T4",
                                         insulation=[{"material": "calcium_silicate", "thickness": 50}])
        return d

    over, under = found(with_steam(135.5)), found(with_steam(134.5))
    assert over["TCLASS-EXCEEDED"].severity == "stop" and over["TCLASS-EXCEEDED"].segment == "run"
    assert over["TCLASS-EXCEEDED"].limit == pytest.approx(135.0 + 273.15)
    assert "TCLASS-EXCEEDED" not in under


def test_heater_sheath_against_its_exposure_rating():
    def traced(limit=None):
        d = bench()
        d["tracing"] = {"kind": "electric_constant", "setpoint": 40.0, "output": "30 W/m",
                        **({"max_exposure_temperature": f"{limit} K"} if limit else {})}
        d["route"]["segments"][0]["insulation"] = [{"material": "mineral_wool", "thickness": 50}]
        return d

    # Worst case under a thermostat: full output with the pipe at the setpoint; the sheath then sits
    # output / (sheath-to-pipe conductance) above it: 40 degC + 30 W/m / 1.5 W/(m K) = 60 degC (hand calculation)
    assert plan_of(traced()).start_profile.summary.max_sheath_temperature_k < 333.15
    straddle(traced, "HEATER-EXPOSURE", "stop", 333.15, rel=0.001)


def test_pressure_against_the_pipe_rating():
    plan = plan_of(bench())
    peak = plan.start.point.discharge_pressure

    def rated(rating):
        d = bench()
        d["route"]["segments"][0]["pressure_rating"] = f"{rating} Pa"
        return d

    f = straddle(rated, "PRESSURE-RATING", "stop", peak)
    assert f.at_m == pytest.approx(0.0)   # highest at the pump outlet


def test_pressure_against_the_b16_5_flange_rating():
    # Class 150 Group 1.1: 19.6 bar up to 38 degC (ASME B16.5-2009 Table 2-1.1).  Length sets the pressure.
    def flanged(length_m):
        d = bench()
        d["route"]["segments"][0].update(length=length_m, elevation_change=0.0, flange_class=150)
        return d

    per_metre = plan_of(flanged(200.0)).start.point.discharge_pressure / 200.0   # laminar, level: linear in L
    length = 19.6e5 / per_metre
    over, under = found(flanged(length * 1.02)), found(flanged(length * 0.98))
    assert over["FLANGE-RATING"].severity == "stop" and over["FLANGE-RATING"].limit == pytest.approx(19.6e5)
    assert "FLANGE-RATING" not in under


def test_relief_lifting_and_motor_overload():
    plan = plan_of(bench())
    dp = plan.start.point.pump_differential
    # the motor is checked at every running point: the source's level falls, so the pump's differential
    # (and its power) is highest at the last increment
    power = max(plan.timeline.arrays["shaft_power_w"])
    assert power > plan.start.shaft_power * 1.004

    def relief(p):
        d = bench()
        d["pump"]["relief_setting"] = f"{p} Pa"
        return d

    straddle(lambda p: relief(p), "RELIEF-LIFTING", "warning", dp)

    def motor(w):
        d = bench()
        d["pump"]["motor_power"] = f"{w} W"
        return d

    straddle(motor, "MOTOR-OVERLOAD", "stop", power)


def test_product_far_above_its_maximum_is_a_stop():
    # planner choice PRODUCT_FAR_ABOVE_MAX_K = 50 K: so far past its maximum the product is not the
    # liquid its data describe (issue 13: a line at 405 degC with a maximum of 80 degC was a warning)
    from planner.checks.findings import PRODUCT_FAR_ABOVE_MAX_K

    assert PRODUCT_FAR_ABOVE_MAX_K == 50.0
    hottest = 363.15   # the source at 90 degC is the hottest product of hot_bench

    def maximum(t):
        d = hot_bench()
        d["product"]["max_temperature"] = f"{t} K"
        return d

    far, near = found(maximum(hottest - 50.5)), found(maximum(hottest - 49.5))
    assert far["PRODUCT-TOO-HOT"].severity == "stop" and far["PRODUCT-TOO-HOT"].value == pytest.approx(hottest)
    assert near["PRODUCT-TOO-HOT"].severity == "warning"


def test_npsh_short_and_small_margin():
    npsh = plan_of(bench()).start.point.npsh_available

    def required(m):
        d = bench()
        d["pump"]["npsh_required"] = f"{m} m"
        return d

    f = straddle(required, "NPSH-SHORT", "stop", npsh, trips_above=True)
    assert f.line == "suction"
    # margin: required + 0.6 m (default) against the available
    over = found(required(npsh - 0.6 + 0.01))
    under = found(required(npsh - 0.6 - 0.01))
    assert over["NPSH-MARGIN-LOW"].severity == "warning" and "NPSH-MARGIN-LOW" not in under


def test_product_above_its_maximum_and_near_its_flash_point():
    hottest = plan_of(hot_bench()).start_profile.summary.max_bulk_temperature_k

    def maximum(t):
        d = hot_bench()
        d["product"]["max_temperature"] = f"{t} K"
        return d

    straddle(maximum, "PRODUCT-TOO-HOT", "warning", hottest, rel=0.0005)

    def flash(t):
        d = hot_bench()
        d["product"]["flash_point"] = f"{t + 10.0} K"   # default margin 10 K
        return d

    straddle(flash, "FLASH-MARGIN", "warning", hottest, rel=0.0005)


def test_product_setting_in_the_line_stops_the_plan():
    def cold(no_flow_c):
        d = bench()
        d["site"].update(ambient_temperature=-20.0, wind_speed=8.0)
        d["route"]["segments"][0].update(length=3000.0, elevation_change=0.0)
        d["source"]["temperature"] = 40.0
        d["schedule"]["line_start_temperature"] = 40.0
        d["product"]["no_flow_temperature"] = no_flow_c
        return d

    over, under = found(cold(39.0)), found(cold(-30.0))
    assert over["PRODUCT-SETS"].severity == "stop" and over["FLOW-NONE"].severity == "stop"
    assert 0 < over["PRODUCT-SETS"].at_m <= 3000.0
    assert "PRODUCT-SETS" not in under and "FLOW-NONE" not in under


def test_velocity_bounds_and_transitional_flow():
    v = plan_of(bench()).start_profile.steps["velocity"].max()

    def vmax(limit):
        d = bench()
        d["limits"] = {"max_velocity": limit}
        return d

    straddle(vmax, "VELOCITY-HIGH", "caution", v)

    def vmin(limit):
        d = bench()
        d["limits"] = {"min_velocity": limit}
        return d

    over, under = found(vmin(v * 1.01)), found(vmin(v * 0.99))
    assert over["VELOCITY-LOW"].severity == "caution" and "VELOCITY-LOW" not in under

    def viscous(mu):
        return bench(product=newtonian_product(mu_pa_s=mu, density=1100.0, cp=2000.0, k=0.2))

    # Re = rho V D / mu = 1100 * 0.609 * 0.10226 / mu: 3000 at mu = 0.0228, 2000 at 0.0342
    assert found(viscous(0.0228))["REGIME-TRANSITIONAL"].severity == "caution"
    assert "REGIME-TRANSITIONAL" not in found(viscous(0.0342))


def test_laminar_flow_with_poor_heat_transfer_is_noted():
    def traced(limit):
        d = bench()
        d["tracing"] = {"kind": "electric_constant", "setpoint": 25.0, "output": "20 W/m"}
        d["route"]["segments"][0]["insulation"] = [{"material": "mineral_wool", "thickness": 50}]
        d["limits"] = {"poor_film_coefficient": limit}
        return d

    film = plan_of(traced(20.0)).start_profile.steps["film_coefficient"].min()
    straddle(traced, "LAMINAR-POOR-HEAT", "info", film, rel=0.01, trips_above=True)


def test_viscosity_law_used_outside_its_lab_points():
    def lab(high_c):
        d = bench()
        d["product"]["viscosity"] = {"law": "andrade", "points": [
            {"temperature": 5.0, "viscosity": "900 cP"}, {"temperature": high_c, "viscosity": "450 cP"}]}
        return d

    assert found(lab(19.0))["VISCOSITY-EXTRAPOLATED"].severity == "caution"
    assert "VISCOSITY-EXTRAPOLATED" not in found(lab(30.0))


def test_film_correlation_outside_its_prandtl_range():
    # Sieder–Tate (1936) was fitted for Pr up to 16 700: cp mu / k = 2000 mu / 0.2
    def viscous(mu):
        return bench(product=newtonian_product(mu_pa_s=mu, density=1100.0, cp=2000.0, k=0.2))

    assert found(viscous(1.7))["CORRELATION-RANGE"].severity == "caution"
    assert "CORRELATION-RANGE" not in found(viscous(1.6))


def test_centrifugal_viscosity_correction_outside_hi_range():
    curve = [{"flow": 0, "head": 60, "efficiency": 0.0}, {"flow": "40 m3/h", "head": 55, "efficiency": 0.6},
             {"flow": "80 m3/h", "head": 45, "efficiency": 0.72}, {"flow": "120 m3/h", "head": 28, "efficiency": 0.6}]

    def pump_with(nu_m2_s):
        d = bench(product=newtonian_product(mu_pa_s=nu_m2_s * 1000.0, density=1000.0, cp=2000.0, k=0.2))
        d["pump"] = {"kind": "centrifugal", "speed": "2950 rpm", "curve": curve}
        d["route"]["segments"][0].update(nps="6", length=30.0, elevation_change=0.0)
        return d

    plan = plan_of(pump_with(1e-3))
    pump = plan.system.pump
    b_at_1000 = hi_parameter_b(1e-3, pump.bep_head_m, pump.bep_flow_m3_s, 2950 / 60)
    nu_40 = 1e-3 * (40.0 / b_at_1000) ** 2   # B grows as nu^0.5 (ANSI/HI 9.6.7)
    beyond = found(pump_with(nu_40 * 1.05))["PUMP-HI-RANGE"]
    assert beyond.severity == "stop" and beyond.limit == 40.0 and beyond.value == pytest.approx(40.0 * 1.05**0.5, rel=2e-3)
    assert "ANSI/HI 9.6.7" in beyond.message and "not rated for this viscosity" in beyond.message
    assert "maker's viscous performance data or a PD pump" in beyond.action
    assert "PUMP-HI-RANGE" not in found(pump_with(nu_40 * 0.95))


def _overpowered(sensing: str) -> dict:
    """A traced, insulated bench whose line loses a hundredth of the model's heat loss (the schema's
    lowest calibration factor): 40 W/m heats a stagnant metre far past 500 °C at full output."""
    d = bench()
    d["route"]["segments"][0].update(insulation=[{"material": "mineral_wool", "thickness": 50}])
    d["tracing"] = {"kind": "electric_constant", "output": 40.0, "sensing": sensing,
                    **({"switch_temperature": 30.0} if sensing == "ambient" else {"setpoint": 40.0})}
    d["calibration"] = {"heat_loss_factor": 0.01}
    d["schedule"].update(start_mode="prewarm", line_start_temperature=5.0)
    return d


def test_prewarm_past_the_temperature_ceiling_is_a_stop_naming_the_heating_inputs():
    from planner.line.march import TEMPERATURE_CEILING_K

    f = found(_overpowered("ambient"))["TEMPERATURE-CEILING"]
    assert f.severity == "stop" and f.limit == TEMPERATURE_CEILING_K
    assert "run: run" not in f.message and "run" in f.message and "500 °C" in f.message
    assert "tracing.output" in f.action and "calibration.heat_loss_factor" in f.action
    plan = plan_of(_overpowered("ambient"))
    assert plan.prewarm.too_hot == ["discharge: run"]
    assert all(not s.settles_at_k <= TEMPERATURE_CEILING_K for s in plan.prewarm.segments if s.traced)  # NaN


def test_a_thermostat_holds_the_prewarmed_line_at_its_setpoint():
    # the same heater held by a pipe-wall thermostat settles at the setpoint; before, the pre-warm reported
    # where full output would head (thousands of kelvin) as where the line settles
    plan = plan_of(_overpowered("pipe_wall"))
    assert [s.settles_at_k for s in plan.prewarm.segments if s.traced] == [pytest.approx(313.15, abs=1e-9)]
    assert "TEMPERATURE-CEILING" not in found(_overpowered("pipe_wall"))


def test_tracing_that_cannot_hold_its_setpoint_at_design_ambient():
    from planner.line.heat_path import jacket_temperature

    def traced(output):
        d = bench()
        d["site"]["design_ambient_temperature"] = -10.0
        d["tracing"] = {"kind": "electric_constant", "setpoint": 50.0, "output": f"{output} W/m"}
        d["route"]["segments"][0]["insulation"] = [{"material": "mineral_wool", "thickness": 25}]
        return d

    seg = plan_of(traced(30.0)).system.discharge_line.segments[0]
    import dataclasses
    _, loss = jacket_temperature(dataclasses.replace(seg, ambient_temperature=263.15), 323.15)
    over, under = found(traced(loss * 0.99)), found(traced(loss * 1.01))
    assert over["TRACING-SHORT"].severity == "warning" and over["TRACING-SHORT"].segment == "run"
    assert "TRACING-SHORT" not in under


def test_times_longer_than_the_window():
    total = plan_of(bench()).total_time_s

    def window(seconds):
        d = bench()
        d["schedule"]["planned_window"] = f"{seconds} s"
        return d

    straddle(window, "TIME-OVER-WINDOW", "warning", total)


def test_stop_longer_than_the_line_can_stand():
    def standing(stop_s, traced=False):
        d = bench()
        d["site"]["ambient_temperature"] = -10.0
        d["source"]["temperature"] = 40.0
        d["schedule"].update(line_start_temperature=40.0, stop_duration=f"{stop_s} s")
        d["product"]["no_flow_temperature"] = 15.0
        d["route"]["segments"][0]["insulation"] = [{"material": "mineral_wool", "thickness": 50}]
        if traced:
            d["tracing"] = {"kind": "electric_constant", "setpoint": 40.0, "output": "40 W/m"}
            d["route"]["segments"].append({"name": "valve station", "nps": "4", "schedule": "40", "length": 5.0,
                                           "traced": False})
        return d

    t_failed = plan_of(standing(3600.0)).hold.time_to_limit_failed_s
    straddle(standing, "HOLD-SHORT-FAILED", "caution", t_failed, trips_above=True)
    t_on = plan_of(standing(3600.0, traced=True)).hold.time_to_limit_traced_s
    over = found(standing(t_on * 1.01, traced=True))
    assert over["HOLD-SHORT"].segment == "discharge: valve station" and over["HOLD-SHORT"].severity == "warning"
    assert "HOLD-SHORT" not in found(standing(t_on * 0.99, traced=True))


def test_gelled_line_beyond_the_pump():
    def gel(relief):
        d = bench()
        d["product"] = {**newtonian_product(mu_pa_s=2.0, density=1300.0), "rheology": "herschel_bulkley",
                        "flow_index": 0.7, "yield_stress": "25 Pa"}
        d["pump"]["relief_setting"] = f"{relief} Pa"
        return d

    gelled = 4 * 25.0 * 200.0 / 0.10226   # 4 tau_y L / D
    over, under = found(gel(gelled * 0.99)), found(gel(gelled * 1.01))
    assert over["RESTART-GELLED"].severity == "warning" and "RESTART-GELLED" not in under


def test_destination_overfill_and_pressure():
    final = 1.0 + 100.0 / (math.pi * 25.0)

    def tank(max_level):
        d = bench()
        d["destination"]["max_level"] = max_level
        return d

    over, under = found(tank(final * 0.999)), found(tank(final * 1.001))
    assert over["OVERFILL"].severity == "stop" and "OVERFILL" not in under

    def pressurised(p):
        d = bench()
        d["destination"].update(pressure="0.2 bar", max_pressure=f"{p} bar")
        return d

    assert found(pressurised(0.19))["VESSEL-PRESSURE"].severity == "stop"
    assert "VESSEL-PRESSURE" not in found(pressurised(0.21))


def test_no_flow_when_static_head_beats_the_relief():
    d = bench()
    # rise 5 m = 0.54 bar against a source head of 2.55 m = 0.275 bar: the pump must make 0.26 bar at a trickle
    d["pump"]["relief_setting"] = "0.2 bar"
    assert found(d)["FLOW-NONE"].severity == "stop"
    d["pump"]["relief_setting"] = "0.3 bar"
    assert "FLOW-NONE" not in found(d)


def test_pre_warm_that_cannot_reach_its_target_is_a_stop():
    d = bench()
    d["site"]["ambient_temperature"] = -10.0
    d["source"]["temperature"] = 60.0
    d["schedule"]["line_start_temperature"] = -10.0
    d["tracing"] = {"kind": "electric_constant", "setpoint": 60.0, "output": "5 W/m"}
    d["route"]["segments"][0]["insulation"] = [{"material": "mineral_wool", "thickness": 25}]
    assert found(d)["PREWARM-IMPOSSIBLE"].severity == "stop"


# --- published tables ---------------------------------------------------------------------------
@pytest.mark.parametrize("celsius, bar", [(38, 19.6), (50, 19.2), (100, 17.7), (150, 15.8), (200, 13.8)])
def test_b16_5_class_150_group_1_1(celsius, bar):
    # ASME B16.5-2009 Table 2-1.1, Group 1.1, Class 150 [pub, REFERENCES.md]
    assert flange_rating(150, celsius + 273.15) == pytest.approx(bar * 1e5, rel=1e-9)


def test_b16_5_interpolates_and_refuses_outside_the_table():
    assert flange_rating(150, 75 + 273.15) == pytest.approx((19.2 + 17.7) / 2 * 1e5)   # linear, as B16.5 allows
    assert flange_rating(150, -40 + 273.15) is None
    with pytest.raises(ValueError, match="not in ASME B16.5"):
        flange_rating(175, 300.0)


@pytest.mark.parametrize("cls, celsius", [("T1", 450), ("T2", 300), ("T3", 200), ("T4", 135), ("T5", 100), ("T6", 85)])
def test_iec_60079_temperature_classes(cls, celsius):
    # IEC 60079-0 maximum surface temperatures [pub, REFERENCES.md]
    assert temperature_class_limit(cls) == pytest.approx(celsius + 273.15)


CURVE = [{"flow": 0, "head": 60, "efficiency": 0.0}, {"flow": "40 m3/h", "head": 55, "efficiency": 0.6},
         {"flow": "80 m3/h", "head": 45, "efficiency": 0.72}, {"flow": "120 m3/h", "head": 28, "efficiency": 0.6}]


def centrifugal_bench(**pump):
    d = bench(product=newtonian_product(mu_pa_s=1e-3, density=1000.0, cp=4000.0, k=0.6))
    d["pump"] = {"kind": "centrifugal", "speed": "2950 rpm", "curve": CURVE, **pump}
    d["route"]["segments"][0].update(nps="6", length=30.0, elevation_change=0.0)
    return d


def test_centrifugal_beyond_its_curve_and_a_setpoint_out_of_reach():
    falling = centrifugal_bench()
    falling["route"]["segments"][0]["elevation_change"] = -29.0      # the line falls: no head needed at any rate
    assert found(falling)["PUMP-BEYOND-CURVE"].severity == "warning"
    longer = centrifugal_bench()
    longer["route"]["segments"][0].update(nps="3", length=200.0)     # friction meets the curve before its end
    assert "PUMP-BEYOND-CURVE" not in found(longer)

    def held(rate):
        d = centrifugal_bench(control="fixed_flow", flow_setpoint=rate)
        d["route"]["segments"][0].update(nps="3", length=200.0)
        return d

    assert found(held("100 m3/h"))["FLOW-SETPOINT-SHORT"].severity == "warning"   # above the 55-60 m curve
    assert "FLOW-SETPOINT-SHORT" not in found(held("20 m3/h"))


def test_flange_table_range_below_minus_29_c():
    # ASME B16.5-2009 Table 2-1.1 starts at -29 degC; below it the rating depends on impact-tested material
    def cold(celsius):
        d = bench()
        d["source"]["temperature"] = celsius
        d["site"]["ambient_temperature"] = celsius
        d["schedule"]["line_start_temperature"] = celsius
        d["route"]["segments"][0]["flange_class"] = 150
        return d

    assert found(cold(-35.0))["FLANGE-TEMP-RANGE"].severity == "warning"
    assert "FLANGE-TEMP-RANGE" not in found(cold(-25.0))


def cold_start(**pump) -> dict:
    """Viscosity rising as the product cools (Andrade, b = 3000 K; 0.5 Pa s at 20 degC); the line's
    contents at -10 degC are pushed out at the start."""
    d = bench()
    d["product"]["viscosity"] = {"law": "andrade", "coefficients": {"a": math.log(0.5) - 3000.0 / 293.15, "b": 3000.0}}
    d["schedule"].update(start_mode="push_cold", line_start_temperature=-10.0)
    d["site"]["ambient_temperature"] = -10.0
    d["pump"].update(pump)
    return d


def test_start_up_push_against_ratings_and_the_relief():
    push = plan_of(cold_start()).startup_push
    peak = push.peak_discharge_pressure_pa

    def rated(rating):
        d = cold_start()
        d["route"]["segments"][0]["pressure_rating"] = f"{rating} Pa"
        return d

    f = straddle(rated, "PRESSURE-START", "stop", peak)
    assert f.value == pytest.approx(peak, rel=1e-9) and f.quantity == "pressure"
    assert "RELIEF-LIFTING-START" in found(cold_start(relief_setting=f"{0.6 * peak} Pa"))
    assert "RELIEF-LIFTING-START" not in found(cold_start(relief_setting=f"{1.3 * peak} Pa"))


def test_contents_below_their_no_flow_temperature_cannot_be_pushed_out():
    def standing(line_c):
        d = bench()
        d["product"]["no_flow_temperature"] = 10.0
        d["schedule"].update(start_mode="push_cold", line_start_temperature=line_c)
        return d

    assert found(standing(5.0))["COLD-START-IMPOSSIBLE"].severity == "stop"
    assert "COLD-START-IMPOSSIBLE" not in found(standing(15.0))


def test_a_bare_line_far_colder_than_the_product_leaves_the_film_correlations_range():
    # Sieder & Tate (1936) property correction, range 0.0044 < mu/mu_w < 9.75 (Incropera & DeWitt, conditions
    # of eq. 8.57) [from memory]; Andrade b = 12000 K: with the product at 60 degC cooling towards a bare wall
    # near 0 degC, mu/mu_w falls to about exp(12000 (1/333 - 1/273)) ~ 4e-4
    def bare(b):
        d = bench()
        d["product"]["viscosity"] = {"law": "andrade", "coefficients": {"a": math.log(0.5) - b / 333.15, "b": b}}
        d["source"]["temperature"] = 60.0
        d["site"].update(ambient_temperature=-20.0, wind_speed=8.0)
        d["route"]["segments"][0].update(length=30.0, elevation_change=0.0)
        return d

    f = found(bare(12000.0))["FILM-VISCOSITY-RATIO"]
    assert f.severity == "caution" and f.value < f.limit == 0.0044
    assert "FILM-VISCOSITY-RATIO" not in found(bare(300.0))


def test_contents_left_set_after_the_prewarm_stop_the_plan():
    # an untraced hose whose contents start below the no-flow temperature never warms: nothing can move
    # (issue 10 item 6; the pre-warm model is tested in tests/test_prewarm_gaps.py)
    def line(hose_traced):
        d = bench()
        d["product"]["no_flow_temperature"] = 10.0
        d["tracing"] = {"kind": "electric_constant", "setpoint": 40.0, "output": "40 W/m"}
        d["route"]["segments"][0]["insulation"] = [{"material": "mineral_wool", "thickness": 50}]
        d["route"]["segments"].append({"name": "hose", "kind": "hose", "inside_diameter": "100 mm", "length": 6.0,
                                       "pressure_rating": "16 bar", "traced": hose_traced,
                                       "insulation": [{"material": "mineral_wool", "thickness": 50}]})
        d["schedule"].update(start_mode="prewarm", line_start_temperature=5.0)
        return d

    f = found(line(False))["PREWARM-CONTENTS-STUCK"]
    assert f.severity == "stop" and "hose" in f.message
    assert "PREWARM-CONTENTS-STUCK" not in found(line(True))


def test_a_calibrated_plan_says_so():
    d = bench()
    d["calibration"] = {"viscosity_factor": 1.2}
    assert found(d)["CALIBRATION-IN-USE"].severity == "info"
    assert "CALIBRATION-IN-USE" not in found(bench())


def test_every_finding_code_was_read_in_both_unit_systems():
    """Run last in this file: the generated scenarios above triggered (and rendered) every code."""
    import re
    from pathlib import Path

    import planner.checks.bounds as bounds
    import planner.checks.findings as module

    if len(RENDERED_CODES) < 5:
        pytest.skip("run the whole file: the codes are collected by the tests above")
    source = "".join(Path(m.__file__).read_text(encoding="utf-8") for m in (module, bounds))
    codes = set(re.findall(r'Finding\(\s*"([A-Z0-9-]+)"', source))
    # PLAN-BOUNDS guards against defects: no valid scenario may trigger it (tests/test_plan_bounds.py
    # triggers it on doctored plans and checks that generated scenarios never do)
    missing = codes - RENDERED_CODES - {"PLAN-BOUNDS"}
    assert not missing, f"codes no generated scenario triggered: {sorted(missing)}"


def _poiseuille_line(rating_pa: float) -> dict:
    # 100 m of 1" sch 40 (26.64 mm inside), level, untraced, at 20 degC throughout (ambient and inlet), a
    # 1 Pa.s liquid at 1 m3/h: Re ~ 13, laminar; the drop is close to 128 mu L Q / (pi D^4) (Hagen-Poiseuille,
    # White, Fluid Mechanics, section 6.4) plus the developing entrance (about 1 %)
    data = base_scenario(product=newtonian_product(mu_pa_s=1.0))
    data["route"]["segments"] = [{"name": "run", "nps": "1", "schedule": "40", "length": 100.0,
                                  "pressure_rating": f"{rating_pa!r} Pa"}]
    data["operation"] = {"flow": "1 m3/h", "inlet_temperature": 20.0}
    return data


def test_evaluate_checks_the_rating_at_the_pressure_that_pushes_the_flow():
    # evaluate's pressures fall from operation.inlet_pressure (0 by default), so a line needing 1,357 bar
    # was checked at 0 down to -1,357 bar and never passed a rating; now at the pressure that pushes the flow
    from planner.checks.finding import DISCHARGE
    from planner.checks.one_line import assess_line
    from planner.line.model import evaluate, line_from_scenario

    def codes(rating_pa):
        scenario = scenario_from_dict(_poiseuille_line(rating_pa))
        line = line_from_scenario(scenario)
        result = evaluate(scenario, line=line)
        return result, {f.code: f for f in assess_line(scenario, line, result, name=DISCHARGE)}

    result, _ = codes(1e7)
    drop = result.summary.pressure_drop_pa
    d = 0.02664
    assert drop == pytest.approx(128 * 1.0 * 100.0 * (1 / 3600) / (math.pi * d ** 4), rel=0.03)   # ~7.0 bar
    _, over = codes(drop * 0.998)
    assert "PRESSURE-RATING" in over and over["PRESSURE-RATING"].severity == "stop"
    assert over["PRESSURE-RATING"].value == pytest.approx(drop, rel=1e-9) and over["PRESSURE-RATING"].at_m == 0.0
    _, under = codes(drop * 1.002)
    assert "PRESSURE-RATING" not in under
    # an inlet pressure given is the pressure there (here 2 bar above what the flow needs: 2 bar at the outlet)
    data = _poiseuille_line(drop * 1.002)
    data["operation"]["inlet_pressure"] = f"{drop + 2e5!r} Pa"
    scenario = scenario_from_dict(data)
    line = line_from_scenario(scenario)
    assert "PRESSURE-RATING" in {f.code for f in assess_line(scenario, line, evaluate(scenario, line=line))}
