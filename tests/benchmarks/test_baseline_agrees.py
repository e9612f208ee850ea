"""The fast steady march and the straightforward baseline agree within the grid tolerance.

The baseline (tests/benchmarks/baseline_march.py) computes friction, fittings, the inside film and
the outside surface coefficient with fluids 1.3.1 and ht 1.2.0 at every evaluation, solves the
jacket with scipy's brentq and integrates with scipy's adaptive RK45; the march under test uses the
planner's own correlations and its exponential midpoint step.  Shared between the two (and so not
checked here): the product property laws, planner.air, the insulation k(T) table and the
heater law planner.line.tracing.Heater.balance.

Tolerance: outlet temperature 0.05 K and pressure drop 0.2 %, the accuracy the planner promises
for its default 10 m step (planner choice: the accuracy target of the steady march).
"""

from __future__ import annotations

import contextlib
import io
import json
import tomllib

import pytest

pytest.importorskip("fluids")
pytest.importorskip("ht")
pytest.importorskip("scipy")

from conftest import DEMO_DIR, DEMO_FILES  # noqa: E402
from planner.line.march import march  # noqa: E402
from planner.line.model import line_from_scenario  # noqa: E402
from planner.scenario.schema import load_scenario, scenario_from_dict  # noqa: E402
from tests.benchmarks.baseline_march import baseline_march  # noqa: E402

TOL_T_K = 0.05
TOL_DP_REL = 2e-3


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_baseline_and_fast_march_agree_on_demo(path):
    # Reference: baseline built on fluids 1.3.1 (Colebrook via friction_factor, Hooper2K/Darby3K) and
    # ht 1.2.0 (Sieder-Tate, Gnielinski, Churchill-Chu, Churchill-Bernstein), scipy solve_ivp RK45.
    scenario = load_scenario(path)
    line = line_from_scenario(scenario)
    op = scenario.operation
    base = baseline_march(line, op.flow, op.inlet_temperature, op.inlet_pressure,
                          fitting_method=scenario.route.fitting_method)
    fast = march(line, op.flow, op.inlet_temperature, op.inlet_pressure).summary
    assert base["status"] == fast.status == "ok"
    assert base["outlet_temperature_k"] == pytest.approx(fast.outlet_temperature_k, abs=TOL_T_K)
    assert base["pressure_drop_pa"] == pytest.approx(fast.pressure_drop_pa, rel=TOL_DP_REL)
    # the line really changes the product (so the comparison is not merely of the inlet values)
    assert abs(fast.outlet_temperature_k - op.inlet_temperature) > 2 * TOL_T_K
    assert fast.pressure_drop_pa > 1e4


@pytest.mark.parametrize("path", DEMO_FILES, ids=[p.stem for p in DEMO_FILES])
def test_fitting_method_recovered_from_segments_matches_the_route(path):
    # The baseline recovers the route's fitting method from the segments when not told it: the
    # answer must be the same as when told (fluids 1.3.1 Hooper2K/Darby3K either way).
    scenario = load_scenario(path)
    line = line_from_scenario(scenario)
    op = scenario.operation
    told = baseline_march(line, op.flow, op.inlet_temperature, op.inlet_pressure,
                          fitting_method=scenario.route.fitting_method)
    inferred = baseline_march(line, op.flow, op.inlet_temperature, op.inlet_pressure)
    assert inferred["pressure_drop_pa"] == pytest.approx(told["pressure_drop_pa"], rel=1e-12)


def test_both_find_where_an_untraced_thin_insulated_syrup_line_sets():
    # Invented variant of the syrup demo: tracing off, 10 mm insulation, 0.5 m3/h at 18 degC against a
    # 15 degC no-flow temperature in -4 degC air.  The march reports the end of the step in which the
    # product fell below its no-flow temperature; the baseline's solve_ivp event finds the crossing.
    data = tomllib.loads((DEMO_DIR / "syrup_railcar_unload.toml").read_text(encoding="utf-8"))
    data["tracing"] = {"kind": "none"}
    data["operation"] = {"flow": "0.5 m3/h", "inlet_temperature": "18 degC"}
    for seg in data["route"]["segments"]:
        if "insulation" in seg:
            seg["insulation"] = [{"material": "mineral_wool", "thickness": "10 mm"}]
    scenario = scenario_from_dict(data)
    line = line_from_scenario(scenario)
    op = scenario.operation
    base = baseline_march(line, op.flow, op.inlet_temperature, op.inlet_pressure)
    assert base["status"] == "product_sets"
    assert base["outlet_temperature_k"] == pytest.approx(scenario.product.no_flow_temperature, abs=1e-6)
    for step in (10.0, 1.0):
        fast = march(line, op.flow, op.inlet_temperature, op.inlet_pressure, step=step).summary
        assert fast.status == "product_sets"
        assert fast.sets_at_m == pytest.approx(base["sets_at_m"], abs=step)   # within one step


@pytest.mark.slow
def test_benchmark_json_reports_a_1000_m_line_at_equal_accuracy():
    from tests.benchmarks import bench

    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert bench.main(["--json", "--fast-repeats", "1", "--baseline-repeats", "1"]) == 0
    fig = json.loads(out.getvalue())["steady_march_1km"]
    assert fig["line_length_m"] == pytest.approx(1000.0, abs=1e-9)
    assert fig["segments"] == 4
    for key in ("fast_vs_reference", "baseline_vs_reference", "baseline_vs_fast"):
        assert abs(fig[key]["outlet_temperature_diff_k"]) <= TOL_T_K
        assert abs(fig[key]["pressure_drop_diff_pct"]) <= 100 * TOL_DP_REL
    assert fig["fast_seconds"] > 0.0 and fig["baseline_seconds"] > 0.0
