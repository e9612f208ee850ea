"""Commands on one line and one transfer: ``evaluate``, ``plan``, ``compare``, ``schema``."""

from __future__ import annotations

import argparse
import json
import sys

from planner.errors import PlannerError
from planner.scenario.budget import BudgetError
from planner.scenario.units import UnitError, to_si


def _evaluate(args) -> int:
    from planner.line.model import evaluate
    from planner.reports.text import march_table, march_json
    from planner.scenario.schema import load_scenario

    scenario = load_scenario(args.scenario)
    flow = to_si(args.flow, "volume_flow", "--flow") if args.flow is not None else None
    if flow is not None and not flow > 0:
        raise UnitError(f"--flow: {args.flow!r} must be greater than 0")
    t_in = to_si(args.inlet_temperature, "temperature", "--inlet-temperature") if args.inlet_temperature is not None else None
    if t_in is not None and t_in <= 0:
        raise UnitError(f"--inlet-temperature: {args.inlet_temperature!r} is below absolute zero")
    result = evaluate(scenario, flow=flow, inlet_temperature=t_in, step=args.step)
    if args.json:
        print(json.dumps(march_json(scenario, result, profiles=args.profiles), indent=2))
    else:
        print(march_table(scenario, result))
    return 0


def _plan(args) -> int:
    from planner.transfer.plan import make_plan
    from planner.reports.plan_json import plan_json, plan_text
    from planner.scenario.schema import load_scenario

    scenario = load_scenario(args.scenario)
    plan = make_plan(scenario)
    if args.json:
        print(json.dumps(plan_json(plan), indent=2, ensure_ascii=False))
    else:
        print(plan_text(plan))
    return 0


def _compare(args) -> int:
    from planner.checks.compare import compare, comparison_json, comparison_table, parse_range, shutdown_pool
    from planner.scenario.schema import load_scenario

    scenario = load_scenario(args.scenario)
    choices = [("setpoint", args.setpoints), ("steam_pressure", args.steam_pressures),
               ("pump_speed", args.pump_speeds), ("flow_limit", args.flow_limits)]
    given = [(lever, text) for lever, text in choices if text]
    if len(given) != 1:
        raise ValueError("give exactly one of --setpoints, --steam-pressures, --pump-speeds, --flow-limits")
    lever, text = given[0]
    option = "--" + {"setpoint": "setpoints", "steam_pressure": "steam-pressures", "pump_speed": "pump-speeds",
                      "flow_limit": "flow-limits"}[lever]
    try:
        values = parse_range(text)
    except ValueError as exc:
        raise ValueError(f"{option}: {exc}") from None

    def progress(done, total):
        if not args.json and sys.stderr.isatty():
            print(f"\r  {done}/{total} plans", end="", file=sys.stderr, flush=True)

    try:
        result = compare(scenario, lever, values, progress=progress, sensitivity=args.sensitivity,
                         ambient_shift=args.ambient_shift, viscosity_uncertainty=args.viscosity_uncertainty / 100.0)
    except BudgetError as exc:   # name the option the values came from
        raise BudgetError([(option if field == "values" else field, message) for field, message in exc.problems]) from None
    finally:
        shutdown_pool()
    if args.json:
        print(json.dumps(comparison_json(result), indent=2, ensure_ascii=False))
    else:
        print(scenario.name)
        print(comparison_table(result))
    return 0


def _schema(args) -> int:
    from planner.scenario.schema import json_schema

    print(json.dumps(json_schema(), indent=2, ensure_ascii=False))
    return 0


def register(sub) -> None:
    """Add this module's sub-commands to the top-level parser's sub-parsers."""

    ev = sub.add_parser("evaluate", help="steady march along the line at one flow and inlet temperature")
    ev.add_argument("scenario", help="scenario file (.toml or .json)")
    ev.add_argument("--flow", help="volume flow, e.g. '40 m3/h' or '176 gpm' (plain number: m3/s); default: the scenario's")
    ev.add_argument("--inlet-temperature", help="e.g. '55 degC' (plain number: degC); default: the scenario's")
    ev.add_argument("--step", type=float, default=25.0, help="march step [m] (default 25)")
    ev.add_argument("--json", action="store_true", help="print JSON (SI units, keys documented in README)")
    ev.add_argument("--profiles", action="store_true", help="with --json: include the profiles along the line")
    ev.set_defaults(func=_evaluate)

    pl = sub.add_parser("plan", help="transfer plan: operating point, start-up, timeline, stop/restart, energy and cost")
    pl.add_argument("scenario", help="scenario file with [pump], [source] and [destination]")
    pl.add_argument("--json", action="store_true", help="print JSON (SI units, keys documented in README)")
    pl.set_defaults(func=_plan)

    cp = sub.add_parser("compare", help="compare setpoints (or steam pressures, pump speeds, flow limits); recommend one")
    cp.add_argument("scenario", help="scenario file with [pump], [source] and [destination]")
    cp.add_argument("--setpoints", help="trace setpoints in °C: START:STOP:STEP or a list, e.g. 40:70:5")
    cp.add_argument("--steam-pressures", help="steam pressures in bar(g), e.g. 2:8:1")
    cp.add_argument("--pump-speeds", help="pump speeds in rpm, e.g. 100:200:20")
    cp.add_argument("--flow-limits", help="flow limits in m³/h, e.g. 10:40:5")
    cp.add_argument("--sensitivity", action="store_true", help="also rerun with the ambient shifted and the viscosity scaled")
    cp.add_argument("--ambient-shift", type=float, default=10.0, help="sensitivity: ambient shift in K (default 10)")
    cp.add_argument("--viscosity-uncertainty", type=float, default=20.0, help="sensitivity: viscosity ± percent (default 20)")
    cp.add_argument("--json", action="store_true", help="print JSON")
    cp.set_defaults(func=_compare)

    sc = sub.add_parser("schema", help="print the scenario JSON Schema")
    sc.set_defaults(func=_schema)
