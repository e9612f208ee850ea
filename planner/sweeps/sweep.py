"""A sweep: every plan of a manifest, one row each in a Parquet table, resumable.

The table is a folder of Parquet files (``part-*.parquet``), one per chunk of finished plans, each
written to a temporary name and renamed into place, so a sweep stopped at any moment (a crash,
Ctrl-C, SIGKILL) leaves whole files only.  A re-run reads the keys already in the folder and plans
only the rest: no row is computed twice and none is written twice.  One sweep at a time writes a
folder (an ``flock`` on ``.sweep.lock``, released by the system when the process ends however it ends).

A row's key is the scenario's content hash (``scenario.identity``), the lever, its value and the
ambient: a scenario file edited between runs is a new scenario, and its rows are planned afresh.
Columns: ``ROW_SCHEMA``; figures SI.
"""

from __future__ import annotations

import fcntl
import os
import time
import uuid
from concurrent.futures import Executor
from dataclasses import dataclass, field
from pathlib import Path

import pyarrow as pa
import pyarrow.parquet as pq

from planner.checks.lever_values import LEVERS
from planner.scenario.identity import content_hash
from planner.sweeps.compare import plan_row
from planner.sweeps.executors import chunk_size, iter_chunks, width
from planner.sweeps.manifest import Manifest

ROW_SCHEMA = pa.schema([
    ("key", pa.string()), ("scenario_file", pa.string()), ("scenario_name", pa.string()),
    ("scenario_hash", pa.string()), ("entry", pa.int32()), ("lever", pa.string()), ("lever_value", pa.float64()),
    ("lever_unit", pa.string()), ("ambient_k", pa.float64()), ("ok", pa.bool_()),
    ("total_time_s", pa.float64()), ("transfer_time_s", pa.float64()), ("startup_time_s", pa.float64()),
    ("start_flow_m3_s", pa.float64()), ("tracing_kwh", pa.float64()), ("tracing_steam_kg", pa.float64()),
    ("pump_kwh", pa.float64()), ("energy_cost", pa.float64()), ("demurrage", pa.float64()),
    ("total_cost", pa.float64()), ("currency", pa.string()), ("peak_pressure_pa", pa.float64()),
    ("hottest_jacket_k", pa.float64()), ("fits_window", pa.bool_()), ("has_stop", pa.bool_()),
    ("worst_severity", pa.string()), ("codes", pa.list_(pa.string())), ("stop_codes", pa.list_(pa.string())),
    ("error", pa.string()),
])
FIGURES = ("total_time_s", "transfer_time_s", "startup_time_s", "start_flow_m3_s", "tracing_kwh", "tracing_steam_kg",
           "pump_kwh", "energy_cost", "demurrage", "total_cost", "peak_pressure_pa", "hottest_jacket_k")
LOCK_NAME = ".sweep.lock"   # a dot file: pyarrow and pandas reading the folder as a table skip it


class SweepBusy(OSError):
    """Another sweep is writing the same folder."""


def row_key(scenario_hash: str, lever: str, value: float, ambient_k: float) -> str:
    return f"{scenario_hash}|{lever}|{value!r}|{ambient_k!r}"


@dataclass
class Summary:
    planned: int                 # plans in the manifest
    skipped: int                 # already in the table
    computed: int = 0
    failed: int = 0              # no plan (an error)
    with_stop: int = 0
    fitting: int = 0             # finished within the window with no stop
    seconds: float = 0.0
    first_result_s: float | None = None
    output: str = ""
    notes: list[str] = field(default_factory=list)

    @property
    def rate(self) -> float:
        return self.computed / self.seconds if self.seconds > 0 else 0.0


def _finite(x):
    return None if x is None or x != x or x in (float("inf"), float("-inf")) else float(x)


def plan_record(task: tuple) -> dict:
    """One plan of the sweep as its table row (runs on the executor's worker)."""
    scenario, meta, lever, value, ambient_k = task
    row = plan_row(scenario, lever, value, 1.0, ambient_k - scenario.site.ambient_temperature)
    total = row.get("total_time_s") if row.get("ok") else None
    record = dict(meta, lever=lever, lever_value=value, lever_unit=LEVERS[lever].si_unit, ambient_k=ambient_k,
                  key=row_key(meta["scenario_hash"], lever, value, ambient_k), ok=bool(row.get("ok")),
                  currency=row.get("currency"), has_stop=bool(row.get("has_stop", True)),
                  worst_severity=row.get("worst_severity", "stop"), error=row.get("error"),
                  codes=sorted({f["code"] for f in row.get("findings", [])}), stop_codes=list(row.get("stop_codes", [])))
    record.update({name: _finite(row.get(name)) for name in FIGURES})
    record["fits_window"] = (total is not None and not record["has_stop"]
                             and total <= scenario.schedule.planned_window)
    return record


def done_keys(folder: Path) -> set[str]:
    """Keys of the rows already in the table (whole part files only; temporary files are ignored)."""
    keys: set[str] = set()
    for part in sorted(folder.glob("part-*.parquet")):
        keys.update(pq.read_table(part, columns=["key"]).column("key").to_pylist())
    return keys


def read_table(folder: str | Path) -> pa.Table:
    """The whole table, rows in key order."""
    parts = sorted(Path(folder).glob("part-*.parquet"))
    if not parts:
        return ROW_SCHEMA.empty_table()
    table = pa.concat_tables([pq.read_table(p, schema=ROW_SCHEMA) for p in parts])
    return table.sort_by([("scenario_file", "ascending"), ("key", "ascending")])


def _write_part(folder: Path, records: list[dict]) -> None:
    name = f"part-{time.time_ns():020d}-{uuid.uuid4().hex[:8]}.parquet"
    temporary = folder / f".{name}.tmp"
    pq.write_table(pa.Table.from_pylist(records, schema=ROW_SCHEMA), temporary)
    with open(temporary, "rb") as handle:
        os.fsync(handle.fileno())
    os.replace(temporary, folder / name)


def _tasks(manifest: Manifest, done: set[str]) -> list[tuple]:
    tasks = []
    for job in manifest.jobs:
        digest = content_hash(job.scenario)
        meta = {"scenario_file": job.path, "scenario_name": job.scenario.name, "scenario_hash": digest,
                "entry": job.entry}
        for ambient in job.ambients:
            for value in job.values:
                if row_key(digest, job.lever, value, ambient) not in done:
                    tasks.append((job.scenario, meta, job.lever, value, ambient))
    return tasks


def _lock(folder: Path):
    handle = open(folder / LOCK_NAME, "a")
    try:
        fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except BlockingIOError:
        handle.close()
        raise SweepBusy(f"another sweep is writing {folder}: wait for it to finish (or stop it) and run again") from None
    return handle


def run_sweep(manifest: Manifest, executor: Executor | None = None, progress=None) -> Summary:
    """Plan every row of ``manifest`` not yet in its output folder, on ``executor`` (the caller's; None:
    here), writing each finished chunk as a part file.  ``progress(plans)`` after each chunk."""
    folder = manifest.output
    folder.mkdir(parents=True, exist_ok=True)
    lock = _lock(folder)
    try:
        for stale in folder.glob(".part-*.tmp"):       # left by a sweep stopped while writing
            stale.unlink()
        tasks = _tasks(manifest, done_keys(folder))
        summary = Summary(manifest.plans, manifest.plans - len(tasks), output=str(folder))
        size = manifest.chunk or chunk_size(len(tasks), width(executor))
        start = time.perf_counter()
        for _, records in iter_chunks(plan_record, tasks, executor, size):
            _write_part(folder, records)
            if summary.first_result_s is None:
                summary.first_result_s = time.perf_counter() - start
            summary.computed += len(records)
            summary.failed += sum(not r["ok"] for r in records)
            summary.with_stop += sum(r["ok"] and r["has_stop"] for r in records)
            summary.fitting += sum(r["fits_window"] for r in records)
            if progress:
                progress(len(records))
        summary.seconds = time.perf_counter() - start
        return summary
    finally:
        lock.close()


def summary_text(summary: Summary) -> str:
    lines = [f"sweep: {summary.planned:,} plans in the manifest; {summary.skipped:,} already in the table, "
             f"{summary.computed:,} planned now"]
    if summary.computed:
        lines.append(f"  {summary.seconds:.1f} s, {summary.rate:.1f} plans/s; first result after "
                     f"{summary.first_result_s:.2f} s")
        lines.append(f"  {summary.fitting:,} finish within their window with no stop, {summary.with_stop:,} have a "
                     f"stop-level finding, {summary.failed:,} could not be planned (see the error column)")
    lines.append(f"  table: {summary.output} (part-*.parquet; one row a plan)")
    return "\n".join(lines)
