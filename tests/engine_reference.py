"""Figures of the steady march and of whole plans, kept as recorded reference values.

The engine was rewritten for speed (one heat-path solver, per-line constants, memoised surface
coefficients); its results must not move.  ``tests/reference/engine_reference.json`` holds what the
engine of the commit named in the file computed for the three demos'
plans (as given, and started by pushing contents at 15 degC out) and for 200 generated lines marched at the default step; ``tests/test_engine_reference.py``
compares the engine of today with it: temperatures within 0.05 K, pressures, flows, times and
energies within 0.2 % (the planner's accuracy target for the steady march, planner choice).

Record again (only for a deliberate change of the physics, naming the commit in the file):

    python -m tests.engine_reference --record COMMIT
    python -m tests.engine_reference --record COMMIT --plans-only    # a change of the plan, not the march

The lines are from ``commit`` (0338bc3, the developing laminar entrance); the plans from ``plans_commit``
(68647b7: the timeline by the trapezoidal rule, 24 increments; 25efb09: the push-cold start likewise, from the flow
once the suction's contents are through, which also raised the polyol's peak pressure 0.6 %; c6ae861: the heater's
energy over a transient step by the step's linearisation: deliberate changes),
so that a march that drifts is still measured against the first record.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
for path in (ROOT, ROOT / "tests"):
    if str(path) not in sys.path:
        sys.path.insert(0, str(path))

REFERENCE_FILE = ROOT / "tests" / "reference" / "engine_reference.json"
GENERATED_LINES = 200
DEMO_DIR = ROOT / "demo_scenarios"

from planner.scenario.schema import load_scenario, scenario_from_dict, scenario_to_dict, scenario_to_json  # noqa: E402

# figure -> kind: "temperature" (absolute tolerance in K) or "relative"
MARCH_FIGURES = {"outlet_temperature_k": "temperature", "min_bulk_temperature_k": "temperature",
                 "max_bulk_temperature_k": "temperature", "max_jacket_temperature_k": "temperature",
                 "max_sheath_temperature_k": "temperature", "pressure_drop_pa": "relative",
                 "friction_drop_pa": "relative", "trace_power_w": "relative", "heat_loss_w": "relative"}
# (the total time is left out: a start-up past a method's range is now withheld, a rule, not the engine)
PLAN_FIGURES = {"start_flow_m3_s": "relative", "transfer_time_s": "relative",
                "peak_discharge_pressure_pa": "relative", "tracing_energy_j": "relative",
                "pump_energy_j": "relative", "start_outlet_temperature_k": "temperature",
                "start_pump_inlet_temperature_k": "temperature", "hottest_jacket_k": "temperature",
                "coolest_product_k": "temperature"}


def march_figures(seed: int) -> dict | None:
    """The summary of a generated line (tests/test_march_grid.py's generator) at the default step;
    None where the line is no transfer anyone would run (over 300 bar) or the product sets."""
    from planner.line.march import march
    from planner.line.model import line_from_scenario
    from planner.scenario.schema import scenario_from_dict
    from test_march_grid import generated_scenario

    scenario = scenario_from_dict(generated_scenario(seed))
    line = line_from_scenario(scenario)
    op = scenario.operation
    s = march(line, op.flow, op.inlet_temperature, 0.0, record=False).summary
    if s.status != "ok" or s.pressure_drop_pa > 3.0e7:
        return None
    return {name: getattr(s, name) for name in MARCH_FIGURES}


def push_cold_variant(path: Path):
    """A demo started by pushing line contents at 15 degC out (the start-up the grid must not miss)."""
    data = scenario_to_dict(load_scenario(path))
    data["schedule"]["start_mode"] = "push_cold"
    data["schedule"]["line_start_temperature"] = "15 degC"
    return scenario_from_dict(data)


def plan_figures(scenario) -> dict:
    from planner.transfer.plan import make_plan

    plan = make_plan(scenario)
    energy = plan.energy
    return {"start_flow_m3_s": plan.start.flow, "transfer_time_s": plan.timeline.total_time_s,
            "total_time_s": plan.total_time_s, "peak_discharge_pressure_pa": plan.peak_discharge_pressure_pa,
            "tracing_energy_j": energy.tracing_j, "pump_energy_j": energy.pump_j,
            "start_outlet_temperature_k": plan.start.point.outlet_temperature,
            "start_pump_inlet_temperature_k": plan.start.point.pump_inlet_temperature,
            "hottest_jacket_k": plan.start_profile.summary.max_jacket_temperature_k,
            "coolest_product_k": plan.start_profile.summary.min_bulk_temperature_k}


def record(commit: str) -> dict:
    lines, seed = {}, 0
    while len(lines) < GENERATED_LINES:
        figures = march_figures(seed)
        if figures is not None:
            lines[str(seed)] = figures
        seed += 1
    plans = {}
    for path in sorted(DEMO_DIR.glob("*.toml")):
        for name, scenario in ((path.stem, load_scenario(path)), (path.stem + "-push-cold-15C", push_cold_variant(path))):
            # the scenario is kept beside its figures: a later edit of a demo does not move the reference
            plans[name] = {"scenario": json.loads(scenario_to_json(scenario)), "figures": plan_figures(scenario)}
    return {"commit": commit, "lines": lines, "plans": plans}


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Record the engine's reference figures.")
    parser.add_argument("--record", metavar="COMMIT", required=True, help="the commit whose engine computes them")
    parser.add_argument("--plans-only", action="store_true", help="record the plans again, keep the lines")
    args = parser.parse_args(argv)
    REFERENCE_FILE.parent.mkdir(parents=True, exist_ok=True)
    figures = record(args.record)
    if args.plans_only:
        kept = json.loads(REFERENCE_FILE.read_text(encoding="utf-8"))
        figures = {"commit": kept["commit"], "lines": kept["lines"], "plans": figures["plans"],
                   "plans_commit": args.record}
    else:
        figures["plans_commit"] = args.record
    REFERENCE_FILE.write_text(json.dumps(figures, indent=1, sort_keys=True) + "\n", encoding="utf-8")
    print(f"wrote {REFERENCE_FILE}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
