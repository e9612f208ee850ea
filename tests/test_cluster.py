"""The same work on a dask.distributed cluster: a real LocalCluster on 127.0.0.1 with two worker processes,
started and stopped here, gives results identical to the local executor's; without a scheduler the
command line never imports Dask."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from conftest import DEMO_DIR, ROOT
from planner.cli import main
from planner.errors import PlannerError
from planner.scenario.schema import load_scenario
from planner.sweeps.envelope import envelope, envelope_json
from planner.sweeps.executors import cluster_executor, local_executor
from planner.sweeps.sweep import read_table

SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"
BARGE = DEMO_DIR / "fuel_oil_barge_discharge.toml"
SETPOINTS = [313.15, 333.15, 343.15]
AMBIENTS = [253.15, 273.15, 293.15]


@pytest.fixture(scope="module")
def cluster():
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1",
                                  dashboard_address=None) as local_cluster:
        yield local_cluster


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_an_envelope_on_the_cluster_equals_the_local_one(cluster):
    scenario = load_scenario(SYRUP)
    with cluster_executor(cluster.scheduler_address) as executor:
        remote = envelope(scenario, "setpoint", SETPOINTS, AMBIENTS, executor=executor)
    with local_executor(2) as pool:
        local = envelope(scenario, "setpoint", SETPOINTS, AMBIENTS, executor=pool)
    assert envelope_json(remote) == envelope_json(local)          # every figure, bit for bit
    assert any(c["fits"] for row in remote.cells for c in row) and any(not c["fits"] for row in remote.cells for c in row)


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_the_command_line_sends_envelopes_and_sweeps_to_the_scheduler(cluster, capsys, monkeypatch, tmp_path):
    args = ["envelope", str(BARGE), "--ambient", "-10,10", "--steam-pressures", "3,5", "--json"]
    assert main(args + ["--scheduler", cluster.scheduler_address]) == 0
    remote = json.loads(capsys.readouterr().out)
    assert main(args) == 0
    assert remote == json.loads(capsys.readouterr().out)

    entry = f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40,60"\nambients = "-10,20"\n'
    (tmp_path / "cluster.toml").write_text('output = "on-cluster"\n' + entry)
    (tmp_path / "local.toml").write_text('output = "on-this-machine"\n' + entry)
    monkeypatch.setenv("PLANNER_DASK_SCHEDULER", cluster.scheduler_address)     # the environment's way
    assert main(["sweep", str(tmp_path / "cluster.toml"), "--quiet"]) == 0
    monkeypatch.delenv("PLANNER_DASK_SCHEDULER")
    assert main(["sweep", str(tmp_path / "local.toml"), "--quiet"]) == 0
    assert read_table(tmp_path / "on-cluster").to_pylist() == read_table(tmp_path / "on-this-machine").to_pylist()


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_an_unreachable_scheduler_is_refused_naming_the_option():
    # (the command line waits 30 s for a scheduler, and exits 2 with this message; here 2 s)
    with pytest.raises(PlannerError, match=r"--scheduler: cannot reach the dask scheduler at 'tcp://127.0.0.1:9' within 2 s"):
        with cluster_executor("tcp://127.0.0.1:9", timeout_s=2.0):
            pass


def test_without_a_scheduler_the_command_line_imports_no_dask():
    """The start-up must not grow: ``python -X importtime -m planner --help`` loads none of dask, distributed,
    pyarrow or tqdm (they load inside the commands that use them)."""
    run = subprocess.run([sys.executable, "-X", "importtime", "-m", "planner", "--help"], cwd=ROOT,
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 0
    loaded = {line.rsplit("|", 1)[-1].strip().split(".")[0] for line in run.stderr.splitlines() if "|" in line}
    assert not loaded & {"dask", "distributed", "pyarrow", "tqdm"}
