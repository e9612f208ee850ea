"""A sweep's manifest: which scenario files, which lever values and ambients, where the table goes.

```toml
output = "sweep-out"          # folder of the Parquet table (relative to the manifest)
units = "si"                  # numbers below in si (°C, bar(g), rpm, m³/h) or us (°F, psig, rpm, gpm)

[[entries]]
scenario = "../demo_scenarios/syrup_railcar_unload.toml"     # one file, or
# folder = "../demo_scenarios"                               # every .toml and .json in it
setpoints = "40:70:5"         # one lever, named as compare's options: setpoints, steam_pressures,
                              # pump_speeds or flow_limits (START:STOP:STEP or a list)
ambients = "-20:30:5"         # default: the scenario's own ambient
```

Everything is checked before any plan runs, and a problem is refused (``ManifestError``, exit 2) naming
the entry and its key: ``entries[2].setpoints``.  Each value is checked as its field takes it
(``lever_values.typed_values``), each ambient as the shifted scenario takes it, and the whole sweep
against the work budget (``sweep_steps``, raised for batch use by ``PLANNER_WORK_BUDGET``).
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from pathlib import Path

from planner.errors import PlannerError, ScenarioError, quoted

LEVER_KEYS = {"setpoints": "setpoint", "steam_pressures": "steam_pressure", "pump_speeds": "pump_speed",
              "flow_limits": "flow_limit"}
ENTRY_KEYS = {"scenario", "folder", "ambients", "samples", *LEVER_KEYS}
TOP_KEYS = {"output", "units", "entries", "chunk"}
MAX_MANIFEST_BYTES = 1_000_000
MAX_FOLDER_FILES = 1_000
UNITS = {"si": "SI", "us": "US"}


class ManifestError(ScenarioError):
    """A manifest that cannot be swept; ``problems`` name the entry and key."""

    def __init__(self, problems: list[tuple[str, str]]):
        super().__init__(problems)
        self.args = ("the sweep manifest is not valid:\n  " + "\n  ".join(f"{f}: {m}" if f else m for f, m in problems),)

    def __str__(self) -> str:
        return self.args[0]


@dataclass
class Job:
    """One scenario of an entry, with its lever values [SI] and ambients [K]."""

    entry: int
    path: str                 # the scenario file as the manifest resolves it
    scenario: object          # the validated Scenario
    lever: str
    values: list[float]
    ambients: list[float]

    @property
    def plans(self) -> int:
        return len(self.values) * len(self.ambients)


@dataclass
class Manifest:
    path: Path
    output: Path
    jobs: list[Job]
    chunk: int | None = None

    @property
    def plans(self) -> int:
        return sum(job.plans for job in self.jobs)


def read_manifest(path: str | Path) -> Manifest:
    """The manifest at ``path``, every entry checked (ManifestError naming the first problems)."""
    path = Path(path)
    try:
        raw = path.read_bytes()[:MAX_MANIFEST_BYTES + 1]
        data = tomllib.loads(raw.decode("utf-8"))
    except OSError as exc:
        raise ManifestError([("", f"cannot open the manifest {quoted(str(path))}: {exc.strerror or exc}")]) from None
    except (UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
        raise ManifestError([("", f"cannot read the manifest {quoted(str(path))} as TOML: {exc}")]) from None
    if len(raw) > MAX_MANIFEST_BYTES:
        raise ManifestError([("", f"the manifest is longer than {MAX_MANIFEST_BYTES:,} bytes")])
    problems = [(key, f"unknown key; keys are {', '.join(sorted(TOP_KEYS))}") for key in data if key not in TOP_KEYS]
    output, units, chunk = data.get("output"), data.get("units", "si"), data.get("chunk")
    if not isinstance(output, str) or not output.strip():
        problems.append(("output", "give the folder of the table, e.g. output = \"sweep-out\""))
    if units not in UNITS:
        problems.append(("units", f"{quoted(units)}: give \"si\" or \"us\""))
    if chunk is not None and not (isinstance(chunk, int) and not isinstance(chunk, bool) and 1 <= chunk <= 1000):
        problems.append(("chunk", f"{quoted(chunk)}: give plans per task as a whole number from 1 to 1000"))
    entries = data.get("entries")
    if not isinstance(entries, list) or not entries or not all(isinstance(e, dict) for e in entries):
        problems.append(("entries", "give at least one [[entries]] table with a scenario (or folder) and a lever"))
        entries = []
    if problems:
        raise ManifestError(problems)
    jobs: list[Job] = []
    for i, entry in enumerate(entries, start=1):
        jobs += _entry_jobs(path.parent, i, entry, UNITS[units])
    manifest = Manifest(path, (path.parent / output).resolve(), jobs, chunk)
    _check_work(manifest)
    return manifest


def _entry_jobs(base: Path, i: int, entry: dict, system: str) -> list[Job]:
    name = f"entries[{i}]"
    problems = [(f"{name}.{key}", f"unknown key; keys are {', '.join(sorted(ENTRY_KEYS))}")
                for key in entry if key not in ENTRY_KEYS]
    if "samples" in entry:
        problems.append((f"{name}.samples", "sampled uncertainty is not available yet (issue 21): leave it out"))
    levers = [key for key in LEVER_KEYS if key in entry]
    if len(levers) != 1:
        problems.append((name, f"give exactly one lever of {', '.join(LEVER_KEYS)} (given: {', '.join(levers) or 'none'})"))
    if ("scenario" in entry) == ("folder" in entry):
        problems.append((name, "give either scenario = \"FILE\" or folder = \"FOLDER\""))
    if problems:
        raise ManifestError(problems)
    files = _files(base, name, entry)
    return [_job(i, name, file, entry, levers[0], system) for file in files]


def _files(base: Path, name: str, entry: dict) -> list[Path]:
    key = "scenario" if "scenario" in entry else "folder"
    given = entry[key]
    if not isinstance(given, str) or not given.strip():
        raise ManifestError([(f"{name}.{key}", f"{quoted(given)}: give a path as text")])
    path = (base / given).resolve()
    if key == "scenario":
        if not path.is_file():
            raise ManifestError([(f"{name}.scenario", f"{quoted(given)}: no such file (paths are relative to the manifest)")])
        return [path]
    if not path.is_dir():
        raise ManifestError([(f"{name}.folder", f"{quoted(given)}: no such folder (paths are relative to the manifest)")])
    files = sorted(p for p in path.iterdir() if p.is_file() and p.suffix.lower() in (".toml", ".json"))
    if not files or len(files) > MAX_FOLDER_FILES:
        raise ManifestError([(f"{name}.folder", f"{quoted(given)} holds {len(files)} scenario files (.toml, .json): "
                                                f"give a folder with 1 to {MAX_FOLDER_FILES:,}")])
    return files


def _job(i: int, name: str, file: Path, entry: dict, key: str, system: str) -> Job:
    from planner.checks.lever_values import typed_values
    from planner.scenario.schema import load_scenario
    from planner.sweeps.compare import check_lever, parse_range
    from planner.sweeps.envelope import typed_ambients

    lever = LEVER_KEYS[key]
    try:
        scenario = load_scenario(file)
    except ScenarioError as exc:
        raise ManifestError([(f"{name} ({file.name})", f"{f + ': ' if f else ''}{m}") for f, m in exc.problems[:5]]) from None
    try:
        check_lever(scenario, lever)
        numbers = parse_range(str(entry[key]))
        values = typed_values(scenario, lever, numbers, system, f"{name}.{key} ({file.name})")
        if "ambients" in entry:
            option = f"{name}.ambients ({file.name})"
            try:
                given = parse_range(str(entry["ambients"]))
            except ValueError as exc:
                raise ManifestError([(option, str(exc))]) from None
            ambients = typed_ambients(scenario, given, system, option)
        else:
            ambients = [scenario.site.ambient_temperature]
    except ScenarioError as exc:
        raise ManifestError(list(exc.problems)) from None
    except (ValueError, PlannerError) as exc:
        raise ManifestError([(f"{name}.{key} ({file.name})", str(exc))]) from None
    return Job(i, str(file), scenario, lever, values, ambients)


def _check_work(manifest: Manifest) -> None:
    from planner.scenario.budget import plan_problems, plan_work, sweep_problems

    work, biggest = 0, None
    for job in manifest.jobs:
        problems = plan_problems(job.scenario)
        if problems:
            raise ManifestError([(f"entries[{job.entry}] ({Path(job.path).name}): {f}", m) for f, m in problems])
        each = plan_work(job.scenario) * job.plans
        work += each
        if biggest is None or each > biggest[0]:
            biggest = (each, job)
    problems = sweep_problems(work, manifest.plans)
    if problems:
        _, job = biggest
        raise ManifestError([(f"entries[{job.entry}]", f"{problems[0][1]} (the largest entry: {job.plans:,} plans of "
                                                       f"{Path(job.path).name}, {len(job.values)} lever values x "
                                                       f"{len(job.ambients)} ambients)")])
