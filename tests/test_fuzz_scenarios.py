"""Hostile scenarios through the command line: every one ends in a plan or in exit 2, quickly.

1,000 scenarios per run (``PLANNER_FUZZ_EXAMPLES``), mutated from the demos and a small generated line (hostile numbers,
unit strings, types, deleted keys, long routes, many segments, many timeline steps) or built from
scratch, go through ``planner.cli.main`` in this process (``plan``, ``evaluate`` or ``compare``, the
last with hostile values and sensitivity options too).  Each must end in exit 0 with JSON free of
NaN and infinity, or in exit 2 with a one-line-per-field message and no traceback, within 10 s of
computing (process time: the wall clock of a machine shared by other jobs is not the planner's; the
wall time is held to 30 s and the slowest of both is printed).
The tally (accepted / refused by field / refused otherwise) is printed (``pytest -s``); a refusal
counts as naming its field when a line of it starts ``Label (field.path): ``, ``field.path: `` or
``--option: ``, or when its words name the inputs to change (``lower tracing.output ...``); refusals
naming no field must be none (they are printed: fix the planner's message, not the pattern).

Each case's work is capped through the work budget (``planner.scenario.budget.use_budget``), so the
whole search stays well under two minutes on a loaded 2-core machine; the default budget is tested
on its own in ``tests/test_budget.py``.  Hypothesis runs derandomized without a database, so every
run (and CI) sees the same cases.
"""

from __future__ import annotations

import contextlib
import copy
import io
import json
import math
import os
import re
import sys
import time
import zlib
from collections import Counter

import pytest
from hypothesis import HealthCheck, Phase, given, settings
from hypothesis import strategies as st

from conftest import DEMO_FILES, base_scenario
from planner.cli import main
from planner.scenario.budget import Budget, use_budget
from planner.scenario.schema import load_scenario, scenario_to_dict

pytestmark = pytest.mark.slow  # fuzz: left out of the fast loop (-m "not slow")

EXAMPLES = int(os.environ.get("PLANNER_FUZZ_EXAMPLES", "1000"))
CASE_SECONDS = 10.0          # process (CPU) time of one case
CASE_WALL_SECONDS = 30.0     # wall time of one case on a shared machine
FUZZ_BUDGET = Budget(pass_steps=5_000, plan_steps=20_000, comparison_steps=40_000, comparison_values=5)


def _bases() -> list[dict]:
    bases = []
    for path in DEMO_FILES:
        data = scenario_to_dict(load_scenario(path))
        data["schedule"]["timeline_steps"] = 10          # small plans: most mutated ones still run
        bases.append(data)
    bases.append(base_scenario())                         # a line without pump or vessels (evaluate)
    return bases


BASES = _bases()
LONG_UNIT = "45 " + "m/m*" * 500 + "m"
HOSTILE = [0, -1, 1, 0.5, 1e-300, 1e308, -1e308, 10**400, math.nan, math.inf, -math.inf, True, None, [], {},
           [1, 2], {"a": 1}, "", " ", "nan", "inf K", "-inf", "1e999 m", "55 delta_degC", "10 degC", "-300 degC",
           "0 K", "4 in", "40 m3/h", "350 cP", "1e-12 m", LONG_UNIT, "45 m/m*m/m*m", "x" * 5000, "\x00", "²",
           "55 °C", "5 furlong", "3 parsec", "12 kg", "1 m**99", "1/0 m", "1 m m", "١٢ m", "50 km", "200 km",
           # issue 20: unbalanced brackets (pint's TokenError), integers past Python's 4,300-digit limit,
           # byte-order marks inside values (whole files also start with one, see _run_case), 1e-320
           "5 m)", "15 m3/h)", "(5 m", "5 kg/(m*s", "40 (degC", 10**5000, -(10**4400), "9" * 5000 + " m", "\ufeff5 m",
           "5 m\ufeff", 1e-320, "1e-320 m3/h"]
SETPOINT_TEXTS = ["40:70:5", "0:inf:1", "40,50", "50", ",".join(["45"] * 500), "nan", "1e308:1.7e308:1e300", "70:40:5",
                  "40:41:0.001", "", "40;50", "²", "-inf,1", "40, 60, 80"]
SHIFTS = [10.0, 0.0, math.nan, math.inf, -5.0, 1e6, 60.0]
UNCERTAINTIES = [20.0, 0.0, 100.0, 150.0, -10.0, math.nan, 90.0, 99.9]


def _leaves(data, path=()):
    """Every (path, value) in nested dicts and lists, containers included."""
    yield path, data
    if isinstance(data, dict):
        for key, value in data.items():
            yield from _leaves(value, path + (key,))
    elif isinstance(data, list):
        for i, value in enumerate(data):
            yield from _leaves(value, path + (i,))


def _set(data, path, value):
    target = data
    for part in path[:-1]:
        target = target[part]
    target[path[-1]] = value


def _delete(data, path):
    target = data
    for part in path[:-1]:
        target = target[part]
    del target[path[-1]]


def _mutate(data: dict, choice: int, pick: int, value, factor: float) -> None:
    leaves = [p for p, _ in _leaves(data) if p]
    path = leaves[pick % len(leaves)]
    current = dict(_leaves(data))[path]
    kind = choice % 7
    whole = int(abs(factor)) if math.isfinite(factor) else 0
    if kind in (0, 1):
        _set(data, path, value)
    elif kind == 2 and isinstance(current, (int, float)) and not isinstance(current, bool):
        with contextlib.suppress(OverflowError):       # an integer past the float range stays as it is
            _set(data, path, current * factor)
    elif kind == 3 and isinstance(path[-1], str):
        _delete(data, path)
    else:
        with contextlib.suppress(TypeError, KeyError, AttributeError, ValueError):  # an earlier edit broke the shape
            _reshape(data, kind, whole, factor)


def _reshape(data: dict, kind: int, whole: int, factor: float) -> None:
    if kind == 4:
        segments = data["route"]["segments"]
        data["route"]["segments"] = (segments * (1 + whole % 200))[:200]
    elif kind == 5:
        for segment in data["route"]["segments"]:
            segment["length"] = min(50_000.0, abs(float(segment.get("length", 1.0)) * abs(factor)) or 1.0)
            segment["elevation_change"] = 0.0
    else:
        data.setdefault("schedule", {})["timeline_steps"] = whole % 1200


def _generated(count: int, length: float, nps: str, flow: str) -> dict:
    data = base_scenario()
    data["route"]["segments"] = [{"name": f"run {i}", "nps": nps, "length": length} for i in range(count)]
    data["operation"]["flow"] = flow
    return data


mutations = st.lists(st.tuples(st.integers(0, 1000), st.integers(0, 10_000), st.sampled_from(HOSTILE),
                               st.sampled_from([0.0, -1.0, 0.001, 1.5, 10.0, 1000.0, 1e9, math.nan, 199.0])),
                     min_size=1, max_size=3)
mutated = st.builds(lambda base, edits: ("mutated", base, edits), st.integers(0, len(BASES) - 1), mutations)
generated = st.builds(lambda n, length, nps, flow: ("generated", _generated(n, length, nps, flow), []),
                      st.sampled_from([1, 2, 5, 20, 200]), st.sampled_from([0.01, 1.0, 25.0, 500.0, 5000.0, 50_000.0]),
                      st.sampled_from(["1", "2", "4", "12"]), st.sampled_from(["0.5 m3/h", "5 m3/h", "400 m3/h"]))
commands = st.tuples(st.sampled_from(["plan", "plan", "evaluate", "compare"]), st.sampled_from(SETPOINT_TEXTS),
                     st.booleans(), st.sampled_from(SHIFTS), st.sampled_from(UNCERTAINTIES))

TALLY: Counter = Counter()
REFUSED_BY_FIELD: Counter = Counter()
SLOWEST = [0.0, 0.0]         # process time, wall time [s]
SLOW_CASES: list = []        # (process time, wall time, command, routes) of the slowest cases
# a refusal names its field as "Label (field.path): ...", "field.path: ..." or "--option: ..." at the
# start of a line (ScenarioError, BudgetError, the options), or names the inputs to change inside its
# words ("lower tracing.output or ...": a ComputationError); a scenario section alone ("tracing: ...")
# counts as a field too
SECTIONS = ("schema_version", "name", "description", "site", "product", "route", "tracing", "operation", "suction",
            "pump", "source", "destination", "costs", "schedule", "limits", "calibration", "values", "log")
_PATH = r"(?:--[a-z][a-z-]*|(?:%s)(?:\[\d+\])?(?:\.[A-Za-z_]\w*(?:\[\d+\])?)*)" % "|".join(SECTIONS)
FIELD_LINE = re.compile(r"^\s*(?:[^\n:]*?\()?(%s)\)?: \S" % _PATH, re.M)
FIELD_NAMED = re.compile(r"(?<![\w.-])(%s)(?![\w-])" % _PATH)
UNNAMED_MAX_SHARE = 0.0      # refusals naming no field: none (each names its field and its limit)
UNNAMED: list = []           # (command, first line of the message) of refusals naming no field
INTERNAL: list = []          # (command, exit status, message) of cases ending otherwise (an internal error)


def _no_non_finite(text: str) -> None:
    def refuse(token):
        raise AssertionError(f"non-finite number {token} in the JSON output")

    json.loads(text, parse_constant=refuse)


def _argv(path: str, command: tuple) -> list[str]:
    name, setpoints, sensitivity, shift, uncertainty = command
    if name != "compare":
        return [name, path, "--json"]
    argv = ["compare", path, f"--setpoints={setpoints}", "--json", f"--ambient-shift={shift!r}",
            f"--viscosity-uncertainty={uncertainty!r}"]
    return argv + (["--sensitivity"] if sensitivity else [])


def _shape(data) -> str:
    try:
        segments = data["route"]["segments"]
        return (f"{len(segments)} segments, {sum(float(s.get('length', 0)) for s in segments):.0f} m, "
                f"{data.get('schedule', {}).get('timeline_steps')} timeline steps")
    except Exception:  # noqa: BLE001  (a mutated scenario may have no route to describe)
        return "no readable route"


def _file_text(data) -> str:
    """The case as JSON; integers past Python's digit limit written out in full; every fourth file (by
    its text) starts with a UTF-8 byte-order mark, as some editors save."""
    limit = sys.get_int_max_str_digits()
    sys.set_int_max_str_digits(0)
    try:
        text = json.dumps(data, allow_nan=True)
    finally:
        sys.set_int_max_str_digits(limit)
    if zlib.crc32(text.encode("utf-8", "surrogatepass")) % 4 == 0:
        TALLY["with a byte-order mark"] += 1
        return "\ufeff" + text
    return text


def _run_case(tmp_path, data, command) -> None:
    path = tmp_path / "case.json"
    path.write_text(_file_text(data), encoding="utf-8", errors="surrogatepass")
    out, err = io.StringIO(), io.StringIO()
    started, started_cpu = time.perf_counter(), time.process_time()
    with use_budget(FUZZ_BUDGET), contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = main(_argv(str(path), command))
        except SystemExit as exc:          # argparse's own refusal of an option: exit 2 naming it
            code = exc.code
    cpu, wall = time.process_time() - started_cpu, time.perf_counter() - started
    SLOWEST[:] = [max(SLOWEST[0], cpu), max(SLOWEST[1], wall)]
    SLOW_CASES.append((round(cpu, 2), round(wall, 2), command[0], _shape(data), code))
    SLOW_CASES.sort(reverse=True)
    del SLOW_CASES[5:]
    message = err.getvalue()
    assert cpu < CASE_SECONDS and wall < CASE_WALL_SECONDS, f"{command[0]} took {cpu:.1f} s ({wall:.1f} s wall)"
    if "Traceback" in message or "Traceback" in out.getvalue() or code not in (0, 2):   # counted, listed at the end
        TALLY["internal error"] += 1
        INTERNAL.append((command[0], code, message.strip()[:200]))
        return
    if code == 0:
        _no_non_finite(out.getvalue())
        TALLY["accepted"] += 1
        return
    if message.startswith("usage: "):
        assert "error: argument --" in message
        TALLY["refused by field"] += 1
        REFUSED_BY_FIELD[message.split("error: argument ")[1].split(":")[0]] += 1
        return
    assert message.startswith("error: ") and message.strip() != "error:"
    text = message.strip()
    fields = FIELD_LINE.findall(text.split("\n", 1)[1] if "\n" in text else text[len("error: "):])
    fields = fields or [f for f in FIELD_NAMED.findall(text) if "." in f or f.startswith("--")]
    if fields:
        TALLY["refused by field"] += 1
        REFUSED_BY_FIELD[re.sub(r"\[\d+\]", "[]", fields[0]).split(".")[0]] += 1
    else:
        TALLY["refused otherwise"] += 1
        REFUSED_BY_FIELD["(no field) " + message.splitlines()[0][7:47]] += 1
        UNNAMED.append((command[0], message.splitlines()[0][:200]))


def _case_runner(tmp_path):
    # no shrinking: a failing case is reported as generated (derandomized, so the same in every run)
    @settings(max_examples=EXAMPLES, deadline=None, derandomize=True, database=None, print_blob=True,
              suppress_health_check=list(HealthCheck), phases=[Phase.explicit, Phase.generate])
    @given(st.one_of(mutated, mutated, generated), commands)
    def run(case, command):
        kind, base, edits = case
        data = copy.deepcopy(BASES[base]) if kind == "mutated" else base
        for choice, pick, value, factor in edits:
            _mutate(data, choice, pick, copy.deepcopy(value), factor)
        TALLY["cases"] += 1
        _run_case(tmp_path, data, command)

    return run


def test_hostile_scenarios_end_in_a_plan_or_exit_2(tmp_path):
    with contextlib.redirect_stdout(io.StringIO()):       # imports and unit registry: not a case's time
        assert main(["plan", str(DEMO_FILES[0]), "--json"]) == 0
    TALLY.clear()
    REFUSED_BY_FIELD.clear()
    UNNAMED.clear()
    INTERNAL.clear()
    SLOWEST[:] = [0.0, 0.0]
    started, started_cpu = time.perf_counter(), time.process_time()
    _case_runner(tmp_path)()
    total, total_cpu = time.perf_counter() - started, time.process_time() - started_cpu
    print(f"\nscenario fuzz: {TALLY['cases']} cases in {total:.0f} s ({total_cpu:.0f} s process time; slowest {SLOWEST[0]:.2f} s process time, "
          f"{SLOWEST[1]:.2f} s wall): accepted "
          f"{TALLY['accepted']}, refused by field {TALLY['refused by field']}, refused otherwise "
          f"{TALLY['refused otherwise']}, internal errors {TALLY['internal error']} "
          f"({TALLY['with a byte-order mark']} files started with a byte-order mark)")
    for field, count in REFUSED_BY_FIELD.most_common():
        print(f"  {count:5d}  {field}")
    print("  slowest cases (process s, wall s, command, route, exit):", *SLOW_CASES, sep="\n    ")
    assert TALLY["cases"] >= 1000
    assert not INTERNAL, INTERNAL[:10]
    assert TALLY["accepted"] + TALLY["refused by field"] + TALLY["refused otherwise"] == TALLY["cases"]
    assert TALLY["with a byte-order mark"] >= TALLY["cases"] // 8
    assert TALLY["accepted"] >= 50 and TALLY["refused by field"] >= 300    # both outcomes really exercised
    refused = TALLY["refused by field"] + TALLY["refused otherwise"]
    if UNNAMED:
        print("  refusals naming no field:", *sorted(set(UNNAMED)), sep="\n    ")
    assert TALLY["refused otherwise"] <= UNNAMED_MAX_SHARE * refused, sorted(set(UNNAMED))
