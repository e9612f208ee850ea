"""Grid independence of whole plans: every march of a plan (operating points, timeline, push-cold
front positions, hold) runs at the march's default longest step, the one figure single passes use
(``planner.line.march.DEFAULT_STEP_M``).  Each plan below is made again on a grid eight times finer
(``make_plan(..., march_step=DEFAULT_STEP_M / 8)``: the step control's targets scale with the step)
and the figures a supervisor signs must agree: temperatures within 0.05 K, flows, times, pressures
and energies within 0.2 % (the planner's accuracy target for the steady march, planner choice; the
same figures as tests/test_march_grid.py).  Measured: at most 0.13 % (the syrup's tracing energy in
its push-cold variant, where a thermostat holds the wall just below the product's temperature and the
heater's output is the small difference of the outward loss and what the film gives), 0.011 % on
everything else, 1e-3 K.

Besides the demos as given, each is planned with a push-cold start against line contents at 15 °C,
where the cold plug's viscosity sets the start-up pressure (the start-up the grid must not miss).
"""

from __future__ import annotations

import math

import pytest

from conftest import DEMO_FILES
from planner.line.march import DEFAULT_STEP_M
from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict
from planner.transfer.plan import make_plan

pytestmark = pytest.mark.slow  # grid: left out of the fast loop (-m "not slow")

TOL_T_K = 0.05
TOL_REL = 2e-3


def _push_cold_variant(path):
    data = scenario_to_dict(load_scenario(path))
    data["schedule"]["start_mode"] = "push_cold"
    data["schedule"]["line_start_temperature"] = "15 degC"
    return scenario_from_dict(data)


CASES = [(p.stem, lambda p=p: load_scenario(p)) for p in DEMO_FILES] + \
        [(f"{p.stem}-push-cold-15C", lambda p=p: _push_cold_variant(p)) for p in DEMO_FILES]


def _figures(plan) -> tuple[dict, dict]:
    """(relative figures, temperatures [K]) of a plan."""
    cold, energy = plan.push_cold, plan.energy
    relative = {"start flow": plan.start.flow, "transfer time": plan.timeline.total_time_s,
                "peak discharge pressure": plan.peak_discharge_pressure_pa or 0.0,
                "tracing energy": energy.tracing_j, "pump energy": energy.pump_j,
                "vessel heating energy": energy.vessel_heating_j, "start-up time": plan.startup_time_s or 0.0}
    if cold.possible:
        relative.update({"push-cold peak pressure": cold.peak_discharge_pressure_pa,
                         "push-cold front time": cold.front_time_s, "push-cold first flow": cold.initial_flow_m3_s})
    temperatures = {"outlet at start": plan.start.point.outlet_temperature,
                    "pump inlet at start": plan.start.point.pump_inlet_temperature,
                    "hottest jacket": plan.start_profile.summary.max_jacket_temperature_k,
                    "coolest product": plan.start_profile.summary.min_bulk_temperature_k}
    return relative, temperatures


@pytest.mark.parametrize("make", [c[1] for c in CASES], ids=[c[0] for c in CASES])
def test_a_plan_on_the_default_grid_agrees_with_one_eight_times_finer(make):
    scenario = make()
    coarse, fine = make_plan(scenario), make_plan(scenario, march_step=DEFAULT_STEP_M / 8.0)
    assert coarse.start.moving and fine.start.moving
    assert coarse.push_cold.possible == fine.push_cold.possible
    assert (coarse.total_time_s is None) == (fine.total_time_s is None)
    (rel_c, temp_c), (rel_f, temp_f) = _figures(coarse), _figures(fine)
    for name, value in rel_f.items():
        assert math.isclose(rel_c[name], value, rel_tol=TOL_REL, abs_tol=1e-9), (name, rel_c[name], value)
    for name, value in temp_f.items():
        assert abs(temp_c[name] - value) <= TOL_T_K, (name, temp_c[name], value)


def test_a_fine_grid_plan_is_not_stalled_by_the_wall_solve():
    """On a 2 m grid the syrup demo's plan used to stop at its step meter (5,080 steps at 35 m of a
    127 m line): the wall viscosity was taken up to 0.3 K from the wall the evaluation ended with, G
    jittered by 0.2 % from step to step and the step control, whose G target is 0.2 % per step at
    that grid, kept halving the step.  Now mu_w is taken within 0.02 K of the final wall
    (``heat_path.WALL_VISCOSITY_BAND_K``); the fine plan runs and agrees with the default one."""
    scenario = load_scenario(next(p for p in DEMO_FILES if p.stem == "syrup_railcar_unload"))
    coarse, fine = make_plan(scenario), make_plan(scenario, march_step=2.0)
    # 955 steps measured (every target is 50 times tighter than at the default 100 m); the meter allows 5,080
    assert fine.start_profile.summary.steps < 2_000
    assert math.isclose(coarse.timeline.total_time_s, fine.timeline.total_time_s, rel_tol=TOL_REL)
    assert math.isclose(coarse.energy.tracing_j, fine.energy.tracing_j, rel_tol=TOL_REL)
