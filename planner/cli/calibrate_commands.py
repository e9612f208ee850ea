"""Command ``calibrate``: fit the scenario's ``[calibration]`` factors to a logged transfer."""

from __future__ import annotations

import json
import sys
from pathlib import Path

from planner.errors import PlannerError, quoted
from planner.cli.line_commands import UNIT_CHOICES, add_scheduler_option


class WriteRefused(PlannerError):
    """``--write`` would overwrite a file or store a calibration the log does not support."""


def _write(args, result) -> str:
    from planner.calibration.fit import calibrated_scenario
    from planner.scenario.schema import save_scenario

    out = Path(args.write)
    try:
        exists, same = out.exists(), out.resolve() == Path(args.scenario).resolve()
    except (OSError, RuntimeError) as exc:     # a name too long, a loop of links
        raise WriteRefused(f"--write: cannot use {quoted(args.write)}: {getattr(exc, 'strerror', None) or exc}") from None
    if exists and not args.overwrite:
        raise WriteRefused(f"--write: {quoted(str(out))} exists; choose another name or add --overwrite")
    if same:
        raise WriteRefused("--write: give a new file name; the scenario the fit was made on is kept as it is")
    blocking = [f.name for f in result.factors.values() if f.at_bound]
    if (result.mismatch or blocking) and not args.force:
        raise WriteRefused("--write: not written: the model does not reproduce this log (see the warnings); "
                           "add --force to write the factors anyway")
    if not any(f.identifiable for f in result.factors.values()):
        raise WriteRefused("--write: not written: none of the fitted factors is identifiable from this log")
    try:
        save_scenario(calibrated_scenario(result), out)
    except OSError as exc:     # a full disk, a folder that is not there or not writable
        raise WriteRefused(f"--write: cannot write {quoted(str(out))}: {exc.strerror or exc}; nothing was written "
                           "(an existing file is left as it was)") from None
    return str(out)


def _calibrate(args) -> int:
    from planner.calibration.fit import fit_calibration
    from planner.calibration.log import read_log_file
    from planner.calibration.report import fit_json, fit_text
    from planner.scenario.schema import load_scenario
    from planner.sweeps.executors import executor_for

    scenario = load_scenario(args.scenario)
    log = read_log_file(args.log, args.columns)
    names = [n.strip() for n in args.fit.split(",") if n.strip()] if args.fit else None
    with executor_for(args.scheduler) as executor:
        result = fit_calibration(scenario, log, names, executor=executor)
    written = None
    refused = None
    if args.write:
        try:
            written = _write(args, result)
        except WriteRefused as exc:
            refused = str(exc)
    if args.json:
        data = fit_json(result)
        data["written"] = written
        data["write_refused"] = refused
        print(json.dumps(data, indent=2, ensure_ascii=False))
    else:
        print(fit_text(result, UNIT_CHOICES[args.units]))
        if written:
            print(f"\nwritten: {written} (the scenario with the fitted [calibration])")
    if refused:
        print(f"error: {refused}", file=sys.stderr)
        return 2
    return 0


def register(sub) -> None:
    """Add ``calibrate`` to the top-level parser's sub-parsers."""
    cal = sub.add_parser("calibrate", help="fit viscosity, heat-loss and PD slip factors to a logged transfer (CSV)")
    cal.add_argument("scenario", help="scenario file with [pump], [source] and [destination] (.toml or .json)")
    cal.add_argument("log", help="CSV log; header cells 'quantity [unit]', e.g. 'time [min]', 'flow [m3/h]'")
    cal.add_argument("--fit", help="factors to fit, comma-separated: viscosity_factor, heat_loss_factor, slip_factor "
                                   "(default: viscosity_factor,heat_loss_factor, and slip_factor for a PD pump with speed logged)")
    cal.add_argument("--columns", help="TOML file with a [columns] table mapping the log's headers to 'quantity [unit]'")
    cal.add_argument("--json", action="store_true", help="print JSON (SI units)")
    cal.add_argument("--units", choices=sorted(UNIT_CHOICES), default="si",
                     help="unit system of the text output: si (bar, K differences, m³/h) or us (psi, °F differences, "
                          "gpm); JSON is always SI")
    cal.add_argument("--write", metavar="OUT.toml", help="write the scenario with the fitted [calibration] to a new file")
    cal.add_argument("--overwrite", action="store_true", help="with --write: replace OUT if it exists")
    cal.add_argument("--force", action="store_true", help="with --write: write even when the log does not fit the model")
    add_scheduler_option(cal)
    cal.set_defaults(func=_calibrate)
