"""The hottest jacket where a thermal entrance starts (``planner.line.heat_path.entrance_jacket``).

Toward a thermal entrance the local laminar film coefficient grows without bound (Graetz-Leveque:
Nu_x ~ x^(-1/3); Incropera & DeWitt, *Fundamentals of Heat and Mass Transfer*, sec. 8.4) [from
memory], so the pipe wall there is at the product's temperature less only the wall's own tiny
resistance.  The jacket is then what the outward path gives with the wall at the product's
temperature: the surface-temperature calculation of insulation practice, which takes the pipe at
the process temperature (ASTM C680's method; common practice).  The independent check here is
``heat_path.jacket_temperature``, the outward path solved on its own, with the steel wall's conduction
resistance ln(D_o/D_i) / (2 pi k) in series (Fourier's law for a cylinder) between the product and it.
"""

from __future__ import annotations

import pytest

from conftest import DEMO_DIR, base_scenario
from planner.checks.findings import assess_line
from planner.line.heat_path import jacket_temperature
from planner.line.march import march
from planner.line.model import line_from_scenario
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict


def _outward_from_product(seg, t_product: float) -> float:
    """Jacket [K] of the outward path from the product through the wall's own resistance."""
    t_wall = t_product
    for _ in range(50):
        _, q = jacket_temperature(seg, t_wall, tolerance=1e-7)
        t_wall = t_product - q * seg.wall_resistance
    return jacket_temperature(seg, t_wall, tolerance=1e-7)[0]


def _viscous_untraced(bare: bool) -> dict:
    d = base_scenario()
    d["product"]["viscosity"] = {"law": "andrade", "points": [       # a viscous oil: laminar at 10 m3/h
        {"temperature": 40.0, "viscosity": "3 Pa s"}, {"temperature": 80.0, "viscosity": "0.4 Pa s"}]}
    seg = {"name": "first run", "nps": "4", "length": 120.0}
    if not bare:
        seg["insulation"] = [{"material": "mineral_wool", "thickness": 25}]
    d["route"] = {"segments": [seg]}
    d["site"] = {"name": "test", "ambient_temperature": 0.0, "wind_speed": 3.0}
    d["operation"] = {"flow": "10 m3/h", "inlet_temperature": 60.0}
    return d


@pytest.mark.parametrize("bare", [False, True], ids=["insulated", "bare"])
def test_entrance_jacket_is_the_outward_path_with_the_wall_at_the_product(bare):
    scenario = scenario_from_dict(_viscous_untraced(bare))
    line = line_from_scenario(scenario)
    op = scenario.operation
    result = march(line, op.flow, op.inlet_temperature, 0.0)
    seg = line.segments[0]
    expected = _outward_from_product(seg, op.inlet_temperature)
    x, entrance = result.entrance_jackets[seg.index]
    assert x == 0.0
    assert entrance == pytest.approx(expected, abs=0.01)   # both iterate to 1e-3 K
    assert result.summary.max_jacket_temperature_k == entrance and result.summary.max_jacket_at_m == 0.0
    # the mid-step values approach it from below as the grid is refined: it is their bound
    fine = march(line, op.flow, op.inlet_temperature, 0.0, step=1.0)
    assert fine.steps["jacket_temperature"].max() <= entrance + 1e-6
    assert fine.entrance_jackets[seg.index][1] == pytest.approx(entrance, abs=1e-9)


def test_touch_check_takes_the_entrance_value_on_every_grid():
    """The barge demo's bare inlet loading arm: with the touch limit set to 50 degC the hot-surface
    warning fires at the arm's inlet on a coarse and a fine grid alike (mid-step values alone gave
    35 degC at the 100 m default and 41 degC at 25 m, below the limit)."""
    data = scenario_to_dict(load_scenario(DEMO_DIR / "fuel_oil_barge_discharge.toml"))
    data["limits"]["touch_temperature"] = "50 degC"
    scenario = scenario_from_dict(data)
    line = line_from_scenario(scenario)
    op = scenario.operation
    arm = line.segments[0]
    expected = _outward_from_product(arm, op.inlet_temperature)
    values = []
    for step in (100.0, 12.5):
        result = march(line, op.flow, op.inlet_temperature, op.inlet_pressure, step=step)
        hot = [f for f in assess_line(scenario, line, result, name="route") if f.code == "SURFACE-HOT"]
        assert [f.segment for f in hot][:1] == [arm.name]
        assert hot[0].at_m == 0.0
        values.append(hot[0].value)
    assert values[0] == pytest.approx(values[1], abs=1e-6)
    assert values[0] == pytest.approx(expected, abs=0.01)
