"""Issue 10 item 5: where the thermostat senses, each mode against a hand calculation of the wall balance.

The wall node balance q_trace = g_in (T_wall - T_bulk) + g_out (T_wall - T_amb) per metre (the planner's
model, ``planner.line.tracing``; the heat-balance form any heat-tracing design guide uses, e.g. IEEE 515
practice of sizing the heater to the loss at the maintain temperature) is solved by hand below for a
constant-wattage heater of 50 W/m, g_in = 1.0 W/(m K) (a slow laminar film), g_out = 0.3 W/(m K).
"""

from __future__ import annotations

import pytest

from planner.line.tracing import Heater
from planner.scenario.schema import Tracing

C0 = 273.15
G_IN, G_OUT = 1.0, 0.3


def heater(sensing: str) -> Heater:
    # a bare number in a scenario field is in the display unit (degC); strings say their unit
    spec = Tracing(kind="electric_constant", output="50 W/m", circuits_per_metre=1.0, sensing=sensing,
                   setpoint="60 degC")
    assert spec.setpoint == pytest.approx(60.0 + C0)
    return Heater(spec, 1.0, None)


def test_pipe_wall_sensing_holds_the_wall_at_the_setpoint():
    # bulk 40 degC, air 0 degC: holding the wall at 60 needs 1.0 * 20 + 0.3 * 60 = 38 W/m (< 50 W/m)
    wall = heater("pipe_wall").balance(40.0 + C0, G_IN, G_OUT, 0.0 + C0)
    assert wall.t_wall == pytest.approx(60.0 + C0, abs=1e-9)
    assert wall.q_trace == pytest.approx(38.0, rel=1e-12)


def test_pipe_wall_sensing_past_its_capacity_runs_flat_out():
    # bulk 0 degC: 60 + 18 = 78 W/m needed > 50: full output, T_wall = (50 + 1.0 * 273.15 + 0.3 * 273.15) / 1.3
    wall = heater("pipe_wall").balance(0.0 + C0, G_IN, G_OUT, 0.0 + C0)
    assert wall.q_trace == pytest.approx(50.0)
    assert wall.t_wall == pytest.approx((50.0 + 1.3 * C0) / 1.3, rel=1e-12)


def test_product_sensing_delivers_the_loss_less_the_viscous_heating():
    # product held at 60 degC with 5 W/m of viscous heating: the film must take 5 W/m out, so
    # T_wall = 60 - 5 / 1.0 = 55 degC and the heater gives the wall's loss 0.3 * 55 = 16.5 W/m less the
    # 5 W/m the film brings from the product: 11.5 W/m
    wall = heater("product").balance(60.0 + C0, G_IN, G_OUT, 0.0 + C0, viscous=5.0)
    assert wall.t_wall == pytest.approx(55.0 + C0, abs=1e-9)
    assert wall.q_trace == pytest.approx(11.5, rel=1e-12)
    # the wall-sensing thermostat at the same bulk holds the wall at 60: 0.3 * 60 = 18 W/m, 57 % more
    wall_sensed = heater("pipe_wall").balance(60.0 + C0, G_IN, G_OUT, 0.0 + C0, viscous=5.0)
    assert wall_sensed.q_trace == pytest.approx(18.0, rel=1e-12)


def test_product_sensing_switches_off_above_the_setpoint():
    wall = heater("product").balance(70.0 + C0, G_IN, G_OUT, 0.0 + C0)
    assert wall.q_trace == 0.0
    assert wall.t_wall == pytest.approx((1.0 * (70.0 + C0) + 0.3 * C0) / 1.3, rel=1e-12)   # passive wall


@pytest.mark.parametrize("air_c, on", [(5.0, True), (15.0, False)])
def test_ambient_sensing_runs_flat_out_below_its_switch_temperature(air_c, on):
    spec = Tracing(kind="electric_constant", output="50 W/m", circuits_per_metre=1.0, sensing="ambient",
                   switch_temperature="10 degC")
    h = Heater(spec, 1.0, air_c + C0)
    wall = h.balance(40.0 + C0, G_IN, G_OUT, air_c + C0)
    if on:
        # no setpoint: 50 = 1.0 (T - 40) + 0.3 (T - 5)  ->  T = (50 + 40 + 1.5) / 1.3
        assert wall.q_trace == pytest.approx(50.0)
        assert wall.t_wall == pytest.approx((50.0 + 1.0 * (40.0 + C0) + 0.3 * (air_c + C0)) / 1.3, rel=1e-12)
    else:
        assert wall.q_trace == 0.0 and not h.active


# ------------------------------------------------------------------------- the heater laws themselves
@pytest.mark.parametrize("barg", [1.0, 3.0, 10.0])
def test_a_steam_tracer_runs_at_the_saturation_temperature_of_its_supply(barg):
    # IAPWS-IF97 saturation line via iapws 1.5.5 (test-time reference) at the gauge pressure plus 1 atm;
    # bare tracer 0.6 W/(m K) [mem]: output C (T_sat - T_wall), nothing above T_sat
    from iapws.iapws97 import _TSat_P

    h = Heater(Tracing(kind="steam", steam_pressure=f"{barg} bar"))
    t_sat = _TSat_P((barg * 1e5 + 101325.0) / 1e6)
    assert h.steam_temperature == pytest.approx(t_sat, rel=1e-7)
    assert h.capacity(t_sat - 40.0) == pytest.approx(0.6 * 40.0, rel=1e-6)
    assert h.capacity(t_sat + 5.0) == 0.0


def test_a_self_regulating_heater_falls_linearly_to_zero():
    # rated 30 W/m at 10 degC pipe temperature, zero at 120 degC (the planner's linear default [trade]):
    # at 65 degC, halfway, 15 W/m; two runs give twice that
    spec = Tracing(kind="electric_self_regulating", output="30 W/m", zero_output_temperature="120 degC",
                   setpoint="60 degC", circuits_per_metre=2.0)
    h = Heater(spec)
    assert h.capacity(65.0 + C0) == pytest.approx(2 * 15.0, rel=1e-9)
    assert h.capacity(10.0 + C0) == pytest.approx(2 * 30.0, rel=1e-9)
    assert h.capacity(130.0 + C0) == 0.0
