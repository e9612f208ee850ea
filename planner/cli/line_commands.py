"""Commands on one line and one transfer: ``evaluate``, ``plan``, ``compare``, ``schema``.

Text output follows ``--units si|us``; JSON is always SI.  ``--fail-on stop|warning`` exits with
status 3 when a finding of that severity (or worse) is present; otherwise a computed plan exits 0.
"""

from __future__ import annotations

import json
import sys

from planner.scenario.budget import MARCH_STEP_M, BudgetError


FAIL_EXIT = 3
UNIT_CHOICES = {"si": "SI", "us": "US"}
# the lever options of `compare`: (option, lever); their numbers are in the display unit of --units
# (planner.scenario.units.UNIT_SYSTEMS: °C, bar, rpm, m³/h or °F, psi, rpm, gpm)
LEVER_OPTIONS = [("setpoints", "setpoint"), ("steam_pressures", "steam_pressure"), ("pump_speeds", "pump_speed"),
                 ("flow_limits", "flow_limit")]


def _exit_code(findings: list, fail_on: str | None) -> int:
    from planner.checks.finding import at_least

    if fail_on is None:
        return 0
    return FAIL_EXIT if any(at_least(f.severity, fail_on) for f in findings) else 0


def _option_value(scenario, text: str | None, option: str, section: str, name: str):
    """An option checked like the scenario file's field ``section.name`` (range, unit dimension); a bare
    number is refused: the command line has no default unit."""
    from planner.scenario.option_values import option_quantity

    if text is None:
        return None
    return option_quantity(scenario, text, option, section, name)


def _flows_at(scenario, t_in: float | None) -> None:
    """``--inlet-temperature`` at or below the product's no-flow temperature: refused naming the option (the
    model refuses it too, without knowing which option gave it)."""
    from planner.errors import ComputationError
    from planner.scenario.wording import Q, Sentence

    no_flow = scenario.product.no_flow_temperature
    if t_in is not None and t_in <= no_flow:
        raise ComputationError(Sentence("--inlet-temperature: {t} is at or below the product's no-flow temperature "
                                        "{limit}: it will not flow", t=Q(t_in, "temperature"),
                                        limit=Q(no_flow, "temperature")))


def _evaluate(args) -> int:
    from planner.checks.finding import DISCHARGE
    from planner.checks.one_line import assess_line
    from planner.line.model import evaluate, line_from_scenario
    from planner.reports.text import march_table, march_json
    from planner.scenario.schema import load_scenario

    system = UNIT_CHOICES[args.units]
    scenario = load_scenario(args.scenario)
    flow = _option_value(scenario, args.flow, "--flow", "operation", "flow")
    t_in = _option_value(scenario, args.inlet_temperature, "--inlet-temperature", "operation", "inlet_temperature")
    _flows_at(scenario, t_in)
    line = line_from_scenario(scenario)
    result = evaluate(scenario, flow=flow, inlet_temperature=t_in, step=args.step, line=line)
    findings = assess_line(scenario, line, result, name=DISCHARGE)
    if args.json:
        print(json.dumps(march_json(scenario, result, profiles=args.profiles, line_segments=line.segments,
                                    findings=findings), indent=2, ensure_ascii=False))
    else:
        print(march_table(scenario, result, system, findings))
    return _exit_code(findings, args.fail_on)


def add_weather_option(parser) -> None:
    parser.add_argument("--weather", metavar="FILE.csv",
                        help="ambient and wind over the transfer from a CSV file with 'quantity [unit]' headers: "
                             "time [h] (or timestamps), ambient_temperature [degC], wind_speed [m/s]; it replaces the "
                             "scenario's [weather]")


def plan_scenario(args):
    """The scenario file of ``args.scenario``, with the weather file of ``--weather`` when given."""
    from planner.scenario.schema import load_scenario

    scenario = load_scenario(args.scenario)
    if getattr(args, "weather", None):
        from planner.scenario.weather_file import with_weather_file

        scenario = with_weather_file(scenario, args.weather)
    return scenario


def _plan(args) -> int:
    from planner.checks.findings import assess
    from planner.transfer.plan import make_plan
    from planner.reports.plan_json import plan_json, plan_text

    _sampling_given(args)
    scenario = plan_scenario(args)
    plan = make_plan(scenario)
    findings = assess(plan)
    odds = _plan_odds(args, scenario) if args.uncertainty else None
    if args.json:
        doc = plan_json(plan, findings=findings)
        if odds is not None:
            from planner.reports.uncertainty_text import odds_json

            doc["uncertainty"] = odds_json(odds)
        print(json.dumps(doc, indent=2, ensure_ascii=False))
    else:
        print(plan_text(plan, UNIT_CHOICES[args.units], findings, odds=odds))
    return _exit_code(findings, args.fail_on)


def _progress(args, what: str = "plans"):
    def progress(done, total):
        if not args.json and sys.stderr.isatty():
            print(f"\r  {done}/{total} {what}", end="\n" if done == total else "", file=sys.stderr, flush=True)
    return progress


def _sampling_given(args) -> None:
    """``--samples`` or ``--seed`` without ``--uncertainty``: refused (they would do nothing)."""
    if not args.uncertainty and (args.samples is not None or args.seed is not None):
        raise ValueError("--samples/--seed: they set the sampling of --uncertainty; add --uncertainty or leave them out")


def _plan_odds(args, scenario) -> dict:
    """The plan's odds (``--uncertainty``) on the command's executor."""
    from planner.sweeps.executors import executor_for
    from planner.sweeps.uncertainty import plan_odds

    with executor_for(args.scheduler) as executor:
        return plan_odds(scenario, samples=args.samples, seed=args.seed, executor=executor,
                         progress=_progress(args, "samples"))


def _sampling_options(parser) -> None:
    parser.add_argument("--uncertainty", action="store_true",
                        help="also plan at sampled inputs ([uncertainty] of the scenario, else the defaults): P10/P50/P90, "
                             "the chance to finish in the window with no stop, what drives the spread")
    parser.add_argument("--samples", type=int, default=None,
                        help="with --uncertainty: plans at sampled inputs, a power of two from 16 to 4096 (default: the "
                             "scenario's uncertainty.samples, else 128)")
    parser.add_argument("--seed", type=int, default=None,
                        help="with --uncertainty: seed of the sampling (default: uncertainty.seed, else 21)")


def _lever_values(args, scenario, system: str):
    from planner.sweeps.compare import parse_range
    from planner.checks.lever_values import typed_values

    given = [(option, lever) for option, lever in LEVER_OPTIONS if getattr(args, option)]
    if len(given) != 1:
        from planner.scenario.budget import active_budget

        named = ", ".join("--" + option.replace("_", "-") for option, _ in given) or "none"
        raise ValueError(f"give exactly one of --setpoints, --steam-pressures, --pump-speeds or --flow-limits (given: "
                         f"{named}), as a list (--setpoints 40,50,60) or a range START:STOP:STEP (--setpoints 40:70:5), "
                         f"at most {active_budget().comparison_values} values")
    option, lever = given[0]
    flag = "--" + option.replace("_", "-")
    try:
        numbers = parse_range(getattr(args, option))
    except ValueError as exc:
        raise ValueError(f"{flag}: {exc}") from None
    return lever, typed_values(scenario, lever, numbers, system, flag), flag


def _compare(args) -> int:
    from planner.checks.finding import at_least
    from planner.sweeps.compare import compare, comparison_json, comparison_table
    from planner.sweeps.executors import executor_for

    system = UNIT_CHOICES[args.units]
    scenario = plan_scenario(args)
    lever, values, option = _lever_values(args, scenario, system)

    def progress(done, total):
        if not args.json and sys.stderr.isatty():
            print(f"\r  {done}/{total} plans", end="", file=sys.stderr, flush=True)

    odds = None
    _sampling_given(args)
    if args.uncertainty:              # refuse the samples before any plan runs
        from planner.sweeps.odds_inputs import sampling_of
        from planner.sweeps.uncertainty import check_work

        check_work(scenario, sampling_of(scenario, args.samples, args.seed)[0], len(values))
    try:
        with executor_for(args.scheduler) as executor:
            result = compare(scenario, lever, values, progress=progress, executor=executor,
                             sensitivity=args.sensitivity, ambient_shift=args.ambient_shift,
                             viscosity_uncertainty=args.viscosity_uncertainty / 100.0)
            if args.uncertainty:
                from planner.sweeps.compare_odds import compare_odds

                odds = compare_odds(scenario, lever, values, executor, _progress(args, "sampled plans"),
                                    samples=args.samples, seed=args.seed)
    except BudgetError as exc:   # name the option the values came from
        raise BudgetError([(option if field == "values" else field, message) for field, message in exc.problems]) from None
    if args.json:
        doc = comparison_json(result)
        if odds is not None:
            from planner.sweeps.compare_odds import comparison_odds_json

            doc["uncertainty"] = comparison_odds_json(odds)
        print(json.dumps(doc, indent=2, ensure_ascii=False))
    else:
        print(scenario.name)
        print(comparison_table(result, system))
        if odds is not None:
            from planner.reports.uncertainty_text import comparison_odds_table

            print()
            print(comparison_odds_table(odds, system))
    if args.fail_on is None:
        return 0
    hit = any(at_least(f["severity"], args.fail_on) for r in result.rows for f in r.get("findings", []))
    return FAIL_EXIT if hit else 0


def _schema(args) -> int:
    from planner.scenario.schema import json_schema

    print(json.dumps(json_schema(), indent=2, ensure_ascii=False))
    return 0


def add_scheduler_option(parser) -> None:
    parser.add_argument("--scheduler", default=None,
                        help="run the plans on a dask.distributed cluster, e.g. tcp://10.0.0.5:8786 (default: "
                             "PLANNER_DASK_SCHEDULER if set, else a pool of this machine's cores)")


def _common(parser, json_help: str) -> None:
    parser.add_argument("--json", action="store_true", help=json_help)
    parser.add_argument("--units", choices=sorted(UNIT_CHOICES), default="si",
                        help="unit system of the text output: si (°C, bar, m³/h, m) or us (°F, psi, gpm, ft); "
                             "JSON is always SI")
    parser.add_argument("--fail-on", choices=["stop", "warning"], default=None,
                        help=f"exit with status {FAIL_EXIT} when a finding of this severity (or worse) is present; "
                             "default: exit 0 for any computed result")


def register(sub) -> None:
    """Add this module's sub-commands to the top-level parser's sub-parsers."""

    ev = sub.add_parser("evaluate", help="steady march along the line at one flow and inlet temperature")
    ev.add_argument("scenario", help="scenario file (.toml or .json)")
    ev.add_argument("--flow", help="volume flow with its unit, e.g. '40 m3/h' or '176 gpm'; default: the scenario's")
    ev.add_argument("--inlet-temperature", help="with its unit, e.g. '55 degC' or '131 degF'; default: the scenario's")
    ev.add_argument("--step", type=float, default=MARCH_STEP_M,
                    help=f"longest march step [m] (default {MARCH_STEP_M:g}, as plans use; refined where the product "
                         "changes fast)")
    _common(ev, "print JSON (SI units, keys documented in README) with the findings")
    ev.add_argument("--profiles", action="store_true", help="with --json: include the profiles along the line")
    ev.set_defaults(func=_evaluate)

    pl = sub.add_parser("plan", help="transfer plan: operating point, start-up, timeline, stop/restart, energy and cost")
    pl.add_argument("scenario", help="scenario file with [pump], [source] and [destination]")
    _common(pl, "print JSON (SI units, keys documented in README) with the findings")
    add_weather_option(pl)
    _sampling_options(pl)
    add_scheduler_option(pl)
    pl.set_defaults(func=_plan)

    cp = sub.add_parser("compare", help="compare setpoints (or steam pressures, pump speeds, flow limits); recommend one")
    cp.add_argument("scenario", help="scenario file with [pump], [source] and [destination]")
    cp.add_argument("--setpoints", help="trace setpoints in °C (°F with --units us): START:STOP:STEP or a list, e.g. 40:70:5")
    cp.add_argument("--steam-pressures", help="steam pressures in bar(g) (psig with --units us), e.g. 2:8:1")
    cp.add_argument("--pump-speeds", help="pump speeds in rpm, e.g. 100:200:20")
    cp.add_argument("--flow-limits", help="flow limits in m³/h (gpm with --units us), e.g. 10:40:5")
    cp.add_argument("--sensitivity", action="store_true", help="also rerun with the ambient shifted and the viscosity scaled")
    cp.add_argument("--ambient-shift", type=float, default=10.0, help="sensitivity: ambient shift in K (default 10)")
    cp.add_argument("--viscosity-uncertainty", type=float, default=20.0, help="sensitivity: viscosity ± percent (default 20)")
    _common(cp, "print JSON (SI: lever values in K, Pa, rev/s, m3/s) with each row's findings")
    _sampling_options(cp)
    add_scheduler_option(cp)
    add_weather_option(cp)
    cp.set_defaults(func=_compare)

    sc = sub.add_parser("schema", help="print the scenario JSON Schema")
    sc.set_defaults(func=_schema)
