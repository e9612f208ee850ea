"""Command line: ``python -m planner evaluate|schema ...``.

Errors print one message naming the field or the reason and exit with status 2; no traceback.
"""

from __future__ import annotations

import argparse
import json
import sys

from .errors import PlannerError
from .units import UnitError, to_si


def _evaluate(args) -> int:
    from .model import evaluate
    from .report_text import march_table, march_json
    from .scenario import load_scenario

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
    from .plan import make_plan
    from .plan_report import plan_json, plan_text
    from .scenario import load_scenario

    scenario = load_scenario(args.scenario)
    plan = make_plan(scenario)
    if args.json:
        print(json.dumps(plan_json(plan), indent=2, ensure_ascii=False))
    else:
        print(plan_text(plan))
    return 0


def _schema(args) -> int:
    from .scenario import json_schema

    print(json.dumps(json_schema(), indent=2, ensure_ascii=False))
    return 0


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="python -m planner", description="Viscous-liquid transfer planner")
    sub = parser.add_subparsers(dest="command", required=True)

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

    sc = sub.add_parser("schema", help="print the scenario JSON Schema")
    sc.set_defaults(func=_schema)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if getattr(args, "step", 25.0) is not None and not (0.1 <= getattr(args, "step", 25.0) <= 500.0):
        print("error: --step must be between 0.1 m and 500 m", file=sys.stderr)
        return 2
    try:
        return args.func(args)
    except PlannerError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 2
    except (UnitError, ValueError) as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 2
