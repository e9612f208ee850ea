"""Command line: ``python -m planner <command> ...``.

Each module here adds its sub-commands through ``register(sub)``; ``main`` parses and runs them.
Errors print one message naming the field or the reason and exit with status 2; no traceback.
"""

from __future__ import annotations

import argparse
import os
import re
import sys

from planner.errors import PlannerError

from planner.cli import line_commands
from planner.cli import calibrate_commands
from planner.cli import records_commands
from planner.cli import sweep_commands

# One entry per command module, in the order their commands appear in --help.
COMMAND_MODULES = [line_commands, sweep_commands, calibrate_commands, records_commands]


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="python -m planner", description="Viscous-liquid transfer planner")
    sub = parser.add_subparsers(dest="command", required=True)
    for module in COMMAND_MODULES:
        module.register(sub)
    return parser


# options that take a range or list of numbers, which may start with a minus sign (--ambient -20:30:5):
# argparse would read such a value as an option, so it is joined to its option before parsing
RANGE_OPTIONS = {"--ambient", "--setpoints", "--steam-pressures", "--pump-speeds", "--flow-limits"}
NEGATIVE_START = re.compile(r"^-[0-9.]")


def _joined_ranges(argv: list[str]) -> list[str]:
    out: list[str] = []
    for token in argv:
        if out and out[-1] in RANGE_OPTIONS and NEGATIVE_START.match(token):
            out[-1] = f"{out[-1]}={token}"
        else:
            out.append(token)
    return out


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(_joined_ranges(list(sys.argv[1:] if argv is None else argv)))
    step = getattr(args, "step", None)
    if step is not None and not (0.1 <= step <= 500.0):
        print("error: --step must be between 0.1 m and 500 m", file=sys.stderr)
        return 2
    system = {"us": "US"}.get(getattr(args, "units", "si"), "SI")
    from planner.scenario.derived_units import derived_values_in

    try:
        with derived_values_in(system):   # values a change derived, refused, are said in the user's units
            return args.func(args)
    except (PlannerError, ValueError) as exc:     # a unit error (scenario.units.UnitError) is a ValueError
        print(f"error: {_in_units(exc, system)}", file=sys.stderr)
        return 2
    except BrokenPipeError:
        # the reader went away (``... | head``): nothing more to say, and no traceback (the Python
        # documentation's recipe: point stdout at devnull so the final flush cannot fail again)
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0
    except ArithmeticError as exc:   # e.g. a viscosity law fitted to extreme lab points overflows
        print(f"error: the computation has no answer for these inputs ({type(exc).__name__}: {exc}): they are "
              "beyond what the models can evaluate; check the product's viscosity data (product.viscosity) and the "
              "extreme inputs (temperatures, operation.flow, the route's lengths and diameters)",
              file=sys.stderr)
        return 2
    except Exception as exc:  # noqa: BLE001  (a bug: one line for the user, the traceback with PLANNER_DEBUG=1)
        if os.environ.get("PLANNER_DEBUG"):
            raise
        print(f"internal error: {type(exc).__name__}: {exc} (please report it with the scenario; "
              "PLANNER_DEBUG=1 shows the traceback)", file=sys.stderr)
        return 1


def _in_units(exc: Exception, system: str) -> str:
    """An error's message in the user's unit system (its sentence rendered when it carries one)."""
    from planner.scenario.wording import render

    if len(exc.args) == 1 and isinstance(exc.args[0], str):
        return render(exc.args[0], system)
    return str(exc)
