"""Commands of many plans: ``envelope`` (ambients x lever values of one scenario) and ``sweep`` (a manifest of
scenario files to a Parquet table).

Both run their plans on one executor opened for the command (``planner.sweeps.executors.executor_for``):
a pool of this machine's cores, or the dask cluster of ``--scheduler`` / ``PLANNER_DASK_SCHEDULER``.
Dask is imported only then.
"""

from __future__ import annotations

import json
import os
import sys

from planner.cli.line_commands import (LEVER_OPTIONS, UNIT_CHOICES, _lever_values, add_scheduler_option, add_weather_option,
                                       plan_scenario)
from planner.errors import PlannerError
from planner.scenario.budget import BudgetError


def ambients_si(scenario, text: str, system: str, option: str = "--ambient") -> list[float]:
    """The ambients of ``--ambient`` (a range or a list in °C, °F with --units us) in K, each checked."""
    from planner.sweeps.compare import parse_range
    from planner.sweeps.envelope import typed_ambients

    try:
        numbers = parse_range(text)
    except ValueError as exc:
        raise ValueError(f"{option}: {exc}") from None
    return typed_ambients(scenario, numbers, system, option)


def _progress(args):
    def progress(done, total):
        if not (args.json or args.csv) and sys.stderr.isatty():
            print(f"\r  {done}/{total} plans", end="", file=sys.stderr, flush=True)
    return progress


def _write_card(path: str, result, system: str) -> None:
    """The printable card to a new file (never over an existing one)."""
    from planner.errors import quoted
    from planner.reports.envelope_card import envelope_card_html

    try:
        with open(path, "x", encoding="utf-8") as handle:
            handle.write(envelope_card_html(result, system))
    except FileExistsError:
        raise PlannerError(f"--card: {quoted(path)} exists; give a new file name (the card was not written)") from None
    except OSError as exc:
        raise PlannerError(f"--card: cannot write {quoted(path)}: {exc.strerror or exc}") from None


def _envelope(args) -> int:
    from planner.sweeps.envelope import envelope, envelope_csv, envelope_json, envelope_table
    from planner.sweeps.executors import executor_for

    if args.uncertainty or args.samples is not None:
        raise PlannerError("--uncertainty/--samples: sampled uncertainty is not available yet (issue 21); the "
                           "envelope is computed at the scenario's own values: leave both options out")
    system = UNIT_CHOICES[args.units]
    if args.card and os.path.exists(args.card):       # before the plans run, not after
        raise PlannerError(f"--card: {args.card!r} exists; give a new file name (the card is never written over a file)")
    scenario = plan_scenario(args)
    lever, values, option = _lever_values(args, scenario, system)
    ambients = ambients_si(scenario, args.ambient, system)
    try:
        with executor_for(args.scheduler) as executor:
            result = envelope(scenario, lever, values, ambients, executor=executor, progress=_progress(args))
    except BudgetError as exc:
        raise BudgetError([(option if field == "values" else field, message) for field, message in exc.problems]) from None
    if sys.stderr.isatty() and not (args.json or args.csv):
        print(file=sys.stderr)
    if args.card:
        _write_card(args.card, result, system)
    if args.json:
        print(json.dumps(envelope_json(result), indent=2, ensure_ascii=False))
    elif args.csv:
        sys.stdout.write(envelope_csv(result))
    else:
        print(scenario.name)
        print(envelope_table(result, system))
    return 0


def _sweep(args) -> int:
    from tqdm import tqdm

    from planner.sweeps.executors import executor_for
    from planner.sweeps.manifest import read_manifest
    from planner.sweeps.sweep import SweepBusy, done_keys, run_sweep, summary_text

    manifest = read_manifest(args.manifest)
    try:
        already = len(done_keys(manifest.output)) if manifest.output.is_dir() else 0
        with executor_for(args.scheduler) as executor, \
                tqdm(total=manifest.plans, initial=min(already, manifest.plans), unit="plan", file=sys.stderr,
                     disable=args.quiet or None, dynamic_ncols=True) as bar:
            summary = run_sweep(manifest, executor, progress=bar.update)
    except SweepBusy as exc:
        raise PlannerError(str(exc)) from None
    print(summary_text(summary))
    return 0


def register(sub) -> None:
    """Add ``envelope`` and ``sweep`` to the top-level parser's sub-parsers."""
    en = sub.add_parser("envelope", help="operating envelope: ambients x setpoints (or another lever); the lowest value "
                                         "that finishes within the window with no stop, per ambient")
    en.add_argument("scenario", help="scenario file with [pump], [source] and [destination]")
    en.add_argument("--ambient", required=True,
                    help="ambients in °C (°F with --units us): START:STOP:STEP or a list, e.g. -20:30:5")
    for option, _ in LEVER_OPTIONS:
        en.add_argument("--" + option.replace("_", "-"),
                        help="lever values as for `compare` (in the display unit of --units): START:STOP:STEP or a list")
    output = en.add_mutually_exclusive_group()
    output.add_argument("--json", action="store_true", help="print JSON of every cell and the envelope line (SI)")
    output.add_argument("--csv", action="store_true", help="print CSV, one line per cell (SI: K, s, the lever's unit)")
    en.add_argument("--units", choices=sorted(UNIT_CHOICES), default="si",
                    help="unit system of the text table, the card and the numbers given: si or us; JSON and CSV are SI")
    en.add_argument("--card", metavar="CARD.html",
                    help="also write the printable one-page envelope card (HTML) to this new file")
    en.add_argument("--uncertainty", action="store_true", help="not available yet (issue 21): refused")
    en.add_argument("--samples", type=int, default=None, help="not available yet (issue 21): refused")
    add_scheduler_option(en)
    add_weather_option(en)
    en.set_defaults(func=_envelope)

    sw = sub.add_parser("sweep", help="plan every scenario x lever value x ambient of a manifest into a Parquet table "
                                      "(resumes: rows already in the table are skipped)")
    sw.add_argument("manifest", help="manifest (TOML): output folder and [[entries]] of scenario files or folders with "
                                     "a lever and ambients (see README)")
    sw.add_argument("--quiet", action="store_true", help="no progress bar (it shows only on a terminal anyway)")
    add_scheduler_option(sw)
    sw.set_defaults(func=_sweep)
