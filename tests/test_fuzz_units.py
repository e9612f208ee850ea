"""Hostile unit strings through the library (``to_si`` for every quantity kind, as scenario fields) and the
command line (``evaluate --flow`` / ``--inlet-temperature``): each is a finite SI value or a refusal
that starts with the field or option it was given for.  Nothing else: no other exception, no message
without its field, no message quoting more than about 80 characters of the input.

5,000 strings per run (``PLANNER_UNIT_FUZZ``; a fixed seed, so every run sees the same ones): numbers of
every shape (huge integers past Python's 4,300-digit limit, 1e-320, 1e999, NaN), units real and
unknown, unbalanced and nested brackets, operators, byte-order marks, NUL, non-ASCII digits and long
text.  The tally is printed (``pytest -s``).
"""

from __future__ import annotations

import contextlib
import io
import json
import math
import os
import random
from collections import Counter

import pytest

from conftest import base_scenario
from planner.cli import main
from planner.errors import QUOTE_CHARS
from planner.scenario.units import SI_UNITS, UnitError, to_si

pytestmark = pytest.mark.slow  # fuzz: left out of the fast loop (-m "not slow")

COUNT = int(os.environ.get("PLANNER_UNIT_FUZZ", "5000"))
CLI_SHARE = 10            # every 10th string also goes through the command line
NUMBERS = ["5", "-5", "0", "0.5", ".5", "5.", "1e-320", "1e999", "-1e308", "9" * 5000, "1" * 400, "1_000", "nan",
           "inf", "١٢", "²", "5e", "--5", "+5", "0x10", "5,5", ""]
UNITS = ["m", "mm", "in", "ft", "m3/h", "m³/h", "gpm", "degC", "°C", "degF", "K", "delta_degC", "bar", "psi", "cP",
         "mPa*s", "cSt", "kg/m3", "W/m/K", "kW", "rpm", "h", "min", "parsec", "furlong", "kg", "m**99", "m^2",
         "1/0", "m/m*m", "x", "meter", "celsius", "C", "F", "", "m m", "Pa·s", "kg/(m*s)", "%", "dimensionless"]
NOISE = ["(", ")", "((", "))", ")(", "[", "]", "{", "}", "*", "/", "**", "^", " ", "\t", "\ufeff", "\x00", "'", '"',
         "\\", "#", ",", ";", "=", "e", "é", "💧", "\u202e", "__", "..", "-", "+"]
KINDS = sorted(SI_UNITS)
KIND_OF = {"m": "length", "mm": "small_length", "in": "small_length", "ft": "length", "m3/h": "volume_flow",
           "m³/h": "volume_flow", "gpm": "volume_flow", "degC": "temperature", "°C": "temperature",
           "degF": "temperature", "K": "temperature", "bar": "pressure", "psi": "pressure", "cP": "dynamic_viscosity",
           "mPa*s": "dynamic_viscosity", "cSt": "kinematic_viscosity", "kg/m3": "density", "W/m/K": "conductivity",
           "kW": "power", "rpm": "rotational_speed", "h": "time", "min": "time", "kg/(m*s)": "dynamic_viscosity"}


def unit_strings(count: int, seed: int = 20) -> list[tuple[str, str]]:
    """(text, kind): the kind of the unit the text was made from when it has one, else any kind."""
    rng = random.Random(seed)
    out = []
    while len(out) < count:
        number, unit = rng.choice(NUMBERS), rng.choice(UNITS)
        kind = KIND_OF.get(unit) or rng.choice(KINDS)
        shape = rng.randrange(7)
        if shape == 0:
            text = f"{number} {unit}"
        elif shape == 1:                                   # a bracket or operator put in anywhere
            text = f"{number} {unit}"
            at = rng.randrange(len(text) + 1)
            text = text[:at] + rng.choice(NOISE) + text[at:]
        elif shape == 2:                                   # unbalanced or nested brackets around the unit
            text = f"{number} " + rng.choice(["(", ")", "((", "", "[("]) + unit + rng.choice([")", "(", "))", "", ")]"])
        elif shape == 3:                                   # a byte-order mark or other noise at the ends
            text = rng.choice(["\ufeff", "\x00", " ", "\ufeff\ufeff"]) + f"{number} {unit}" + rng.choice(["", "\ufeff", "\n"])
        elif shape == 4:                                   # several units and operators
            text = f"{number} " + "".join(rng.choice(UNITS + NOISE) for _ in range(rng.randrange(1, 8)))
        elif shape == 5:                                   # long text
            text = f"{number} " + rng.choice(UNITS + NOISE) * rng.choice([30, 200, 5000])
        else:
            text = "".join(rng.choice(NOISE + NUMBERS[:6]) for _ in range(rng.randrange(1, 12)))
        out.append((text, kind))
    return out


def _named(message: str, field: str) -> bool:
    return message.startswith(f"{field}: ")


def _library(text: str, kind: str, tally: Counter, unnamed: list, internal: list) -> None:
    field = f"fuzz.{kind}"
    try:
        value = to_si(text, kind, field)
    except UnitError as exc:
        message = str(exc)
        if _named(message, field) and len(message) < 400:
            tally["named refusal"] += 1
        else:
            tally["unnamed refusal"] += 1
            unnamed.append((text[:60], message[:200]))
        return
    except Exception as exc:  # noqa: BLE001  (what the test is looking for)
        tally["internal error"] += 1
        internal.append((text[:60], f"{type(exc).__name__}: {exc}"[:200]))
        return
    assert math.isfinite(value), (text, value)
    tally["accepted"] += 1


def _command_line(path: str, text: str, tally: Counter, unnamed: list, internal: list) -> None:
    option = "--flow" if len(text) % 2 else "--inlet-temperature"
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = main(["evaluate", path, option, text, "--json"])
        except SystemExit as exc:
            code = exc.code
    message = err.getvalue()
    if code == 0:
        tally["cli accepted"] += 1
    elif code == 2 and (message.startswith(f"error: {option}: ") or message.startswith("usage: ")) \
            and len(message) < 400 + (len(message) if message.startswith("usage: ") else 0):
        tally["cli named refusal"] += 1
    elif code == 2:
        tally["cli unnamed refusal"] += 1
        unnamed.append((text[:60], message[:200]))
    else:
        tally["cli internal error"] += 1
        internal.append((text[:60], message[:200]))


def test_hostile_unit_strings_are_values_or_named_refusals(tmp_path):
    path = tmp_path / "line.json"
    path.write_text(json.dumps(base_scenario()), encoding="utf-8")
    tally, unnamed, internal = Counter(), [], []
    cases = unit_strings(COUNT)
    strings = [text for text, _ in cases]
    for i, (text, kind) in enumerate(cases):
        _library(text, kind, tally, unnamed, internal)
        if i % CLI_SHARE == 0:
            _command_line(str(path), text, tally, unnamed, internal)
    print(f"\nunit fuzz: {len(strings)} strings ({len(strings) // CLI_SHARE} also on the command line): "
          + ", ".join(f"{k} {v}" for k, v in sorted(tally.items())))
    for kind, items in (("unnamed", unnamed), ("internal", internal)):
        for text, message in items[:10]:
            print(f"  {kind}: {text!r} -> {message}")
    assert len(strings) >= 5000 or COUNT < 5000
    assert sum(1 for s in strings if s.count("(") != s.count(")")) >= 500          # unbalanced brackets
    assert sum(1 for s in strings if "\ufeff" in s) >= 200 and sum(1 for s in strings if "9" * 4400 in s) >= 100
    assert tally["accepted"] >= 200 and tally["named refusal"] >= 2000               # both outcomes exercised
    assert not unnamed and not internal
    assert QUOTE_CHARS == 80
