"""Validation (not a test): a 2,000-plan sweep on the local executor and on a 2-worker dask LocalCluster.

    python3 -m tests.validation.sweep_benchmark [--rounds 1] [--json]

The sweep is the three demo transfers, each at 29 ambients (-20 to 36 °C) x 23 lever values (setpoints of
the syrup and polyol lines, steam pressures of the barge line): 2,001 plans through the real command path
(``read_manifest`` -> ``run_sweep`` -> Parquet parts), once on ``local_executor(2)`` (a pool of 2 forked
processes) and once on ``distributed.LocalCluster(n_workers=2, threads_per_worker=1)`` on 127.0.0.1, each
into a fresh folder.  Reported: plans per second, the time to the first written chunk, the cluster's overhead
against the local executor (the goal: at most 15 %), and that both tables are identical.  Rounds alternate
the order (local first, then cluster first) since this machine is shared; the overhead is the median of
each round's pair (cluster time / local time - 1).
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_scenarios"
ENTRIES = [("syrup_railcar_unload.toml", "setpoints", "30:74:2"),
           ("polyol_tank_transfer.toml", "setpoints", "10:54:2"),
           ("fuel_oil_barge_discharge.toml", "steam_pressures", "1:6.5:0.25")]
AMBIENTS = "-20:36:2"
OVERHEAD_GOAL = 0.15


def write_manifest(folder: Path) -> Path:
    body = 'output = "table"\n' + "".join(
        f'[[entries]]\nscenario = "{DEMO / name}"\n{lever} = "{values}"\nambients = "{AMBIENTS}"\n'
        for name, lever, values in ENTRIES)
    path = folder / "sweep.toml"
    path.write_text(body, encoding="utf-8")
    return path


def timed_sweep(executor, folder: Path) -> dict:
    from planner.sweeps.manifest import read_manifest
    from planner.sweeps.sweep import run_sweep

    manifest = read_manifest(write_manifest(folder))
    start = time.perf_counter()
    summary = run_sweep(manifest, executor)
    seconds = time.perf_counter() - start
    return {"plans": summary.computed, "seconds": seconds, "plans_per_s": summary.computed / seconds,
            "first_result_s": summary.first_result_s, "failed": summary.failed}


def run_local(folder: Path) -> dict:
    from planner.sweeps.executors import local_executor

    with local_executor(2) as pool:
        return timed_sweep(pool, folder)


def run_cluster(folder: Path) -> dict:
    from distributed import LocalCluster

    from planner.sweeps.executors import cluster_executor

    started = time.perf_counter()
    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1",
                      dashboard_address=None) as cluster:
        cluster_start = time.perf_counter() - started
        with cluster_executor(cluster.scheduler_address) as executor:
            figures = timed_sweep(executor, folder)
    figures["cluster_start_s"] = cluster_start
    return figures


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=1)
    parser.add_argument("--json", action="store_true")
    args = parser.parse_args()
    os.environ.setdefault("PLANNER_WORK_BUDGET", "10")       # a batch job: 2,001 plans are past the default sweep budget
    from planner.sweeps.sweep import read_table

    results = {"local": [], "cluster": []}
    identical = True
    for round_ in range(args.rounds):
        order = ["local", "cluster"] if round_ % 2 == 0 else ["cluster", "local"]
        with tempfile.TemporaryDirectory(prefix="planner-bench-") as tmp:
            tables = {}
            for kind in order:
                folder = Path(tmp) / kind
                folder.mkdir()
                results[kind].append((run_local if kind == "local" else run_cluster)(folder))
                tables[kind] = read_table(folder / "table").to_pylist()
            identical = identical and tables["local"] == tables["cluster"]
    local = statistics.median(r["plans_per_s"] for r in results["local"])
    cluster = statistics.median(r["plans_per_s"] for r in results["cluster"])
    # each round's own pair: the load of the shared machine moves both runs of a round less than it moves rounds
    pairs = [c["seconds"] / l["seconds"] - 1.0 for l, c in zip(results["local"], results["cluster"])]
    overhead = statistics.median(pairs)
    report = {"plans": results["local"][0]["plans"], "rounds": args.rounds, "local": results["local"],
              "cluster": results["cluster"], "local_plans_per_s": local, "cluster_plans_per_s": cluster,
              "cluster_overhead": overhead, "overhead_by_round": pairs, "overhead_goal": OVERHEAD_GOAL, "tables_identical": identical,
              "cpu_count": os.cpu_count()}
    if args.json:
        print(json.dumps(report, indent=2))
        return
    print(f"sweep of {report['plans']:,} plans (3 demo transfers x 29 ambients x 23 lever values), {args.rounds} round(s)")
    for kind in ("local", "cluster"):
        for r in results[kind]:
            extra = f", cluster start {r['cluster_start_s']:.1f} s" if "cluster_start_s" in r else ""
            print(f"  {kind:8s} {r['seconds']:7.1f} s  {r['plans_per_s']:6.2f} plans/s  first result "
                  f"{r['first_result_s']:.2f} s{extra}")
    verdict = "meets" if overhead <= OVERHEAD_GOAL else "ABOVE"
    print(f"  median plans/s: local {local:.2f}, cluster {cluster:.2f}")
    print(f"  cluster overhead against the local executor, each round's pair: "
          f"{', '.join(f'{p * 100:+.0f} %' for p in pairs)}; median {overhead * 100:+.1f} % ({verdict} the "
          f"{OVERHEAD_GOAL * 100:.0f} % goal); tables identical: {identical}")


if __name__ == "__main__":
    main()
