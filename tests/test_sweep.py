"""``python -m planner sweep MANIFEST``: the Parquet table, resuming after SIGKILL, refused manifests."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time

import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from conftest import DEMO_DIR, ROOT
from planner.cli import main
from planner.sweeps.executors import local_executor
from planner.sweeps.manifest import read_manifest
from planner.sweeps.sweep import read_table, run_sweep

BARGE = DEMO_DIR / "fuel_oil_barge_discharge.toml"
SYRUP = DEMO_DIR / "syrup_railcar_unload.toml"


def _manifest(folder, body: str, output: str = "out") -> str:
    path = folder / "sweep.toml"
    path.write_text(f'output = "{output}"\n' + body, encoding="utf-8")
    return str(path)


BARGE_ENTRY = f'chunk = 2\n[[entries]]\nscenario = "{BARGE}"\nsteam_pressures = "2:7:1"\nambients = "-10,0,10"\n'


@pytest.mark.slow  # over 1.5 s (AppTest page, Chromium or a cluster): out of the fast loop
def test_a_sweep_killed_halfway_resumes_to_the_same_table(tmp_path):
    """SIGKILL mid-sweep (the command and its worker processes), then the same command again: the table equals
    an uninterrupted run's, row for row, with no key twice.  18 plans of the barge in chunks of 2."""
    killed = tmp_path / "killed"
    killed.mkdir()
    manifest = _manifest(killed, BARGE_ENTRY)
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    process = subprocess.Popen([sys.executable, "-m", "planner", "sweep", manifest, "--quiet"], cwd=ROOT, env=env,
                               start_new_session=True, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    out = killed / "out"
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline and len(list(out.glob("part-*.parquet"))) < 2:
        time.sleep(0.01)
    os.killpg(process.pid, signal.SIGKILL)                  # the command and its pool: no clean-up runs
    process.wait(timeout=30)
    parts = len(list(out.glob("part-*.parquet")))
    assert process.returncode == -signal.SIGKILL, process.stderr.read()
    assert 2 <= parts < 9, f"the sweep was not stopped halfway ({parts} of 9 parts)"
    rows_before = read_table(out).num_rows

    resumed = subprocess.run([sys.executable, "-m", "planner", "sweep", manifest, "--quiet"], cwd=ROOT, env=env,
                             capture_output=True, text=True, timeout=120)
    assert resumed.returncode == 0, resumed.stderr
    assert f"{rows_before} already in the table, {18 - rows_before} planned now" in resumed.stdout

    whole = tmp_path / "whole"
    whole.mkdir()
    with local_executor(2) as pool:
        run_sweep(read_manifest(_manifest(whole, BARGE_ENTRY)), pool)
    table, reference = read_table(out), read_table(whole / "out")
    keys = table.column("key").to_pylist()
    assert len(keys) == len(set(keys)) == 18
    assert table.to_pylist() == reference.to_pylist()


def test_rows_carry_the_scenario_its_hash_the_inputs_and_the_figures(tmp_path, capsys):
    manifest = _manifest(tmp_path, f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40,60"\nambients = "-10,20"\n')
    assert main(["sweep", manifest]) == 0
    first = capsys.readouterr().out
    assert "4 plans in the manifest; 0 already in the table, 4 planned now" in first and "plans/s" in first
    rows = read_table(tmp_path / "out").to_pylist()
    assert {(r["lever_value"], r["ambient_k"]) for r in rows} == {(313.15, 263.15), (333.15, 263.15),
                                                                 (313.15, 293.15), (333.15, 293.15)}
    assert len({r["scenario_hash"] for r in rows}) == 1 and len(rows[0]["scenario_hash"]) == 64
    assert all(r["ok"] and r["total_time_s"] > 0 and r["worst_severity"] in ("info", "caution", "warning", "stop")
               for r in rows)
    # the folder reads as a table the way the README says (the lock file was 'sweep.lock', 0 bytes, and
    # pyarrow refused the folder: "Parquet file size is 0 bytes"); a dot file is skipped
    import pandas as pd
    import pyarrow.parquet as pq

    assert pq.read_table(tmp_path / "out").num_rows == len(pd.read_parquet(tmp_path / "out")) == 4
    assert pq.read_schema(next((tmp_path / "out").glob("part-*.parquet"))).field("codes").type == pa.list_(pa.string())
    assert main(["sweep", manifest]) == 0                 # nothing left to do
    assert "4 already in the table, 0 planned now" in capsys.readouterr().out


@pytest.mark.parametrize("body, words", [
    ('[[entries]]\nscenario = "nowhere.toml"\nsetpoints = "40"\n', "entries[1].scenario: 'nowhere.toml': no such file"),
    (f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40"\n[[entries]]\nscenario = "{SYRUP}"\nsetpiont = "40"\n',
     "entries[2].setpiont: unknown key"),
    (f'[[entries]]\nscenario = "{SYRUP}"\n', "entries[1]: give exactly one lever of setpoints"),
    (f'[[entries]]\nscenario = "{SYRUP}"\nsteam_pressures = "3"\n', "entries[1].steam_pressures (syrup_railcar_unload.toml)"),
    (f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40:200:1"\n', "entries[1].setpoints (syrup_railcar_unload.toml)"),
    (f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40"\nambients = "-95"\n', "entries[1].ambients"),
    (f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40"\nsamples = 128\n', "entries[1].samples: sampled uncertainty"),
    (f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40"\nambients = "cold"\n',
     "entries[1].ambients (syrup_railcar_unload.toml): cannot read the values 'cold'"),
    (f'[[entries]]\nfolder = "{SYRUP}"\nsetpoints = "40"\n', "entries[1].folder"),
    ('[[entries]]\nscenario = 3\nsetpoints = "40"\n', "entries[1].scenario: 3: give a path as text"),
    (f'[[entries]\nscenario = "{SYRUP}"\n', "cannot read the manifest"),
    ('', "entries: give at least one [[entries]] table"),
])
def test_bad_manifests_are_refused_with_exit_2_naming_the_entry(tmp_path, capsys, body, words):
    code = main(["sweep", _manifest(tmp_path, body)])
    _, err = capsys.readouterr()
    assert code == 2 and words in err and "Traceback" not in err, err
    assert not (tmp_path / "out").exists()                 # refused before any plan ran


def test_too_much_work_is_refused_naming_the_largest_entry(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("PLANNER_WORK_BUDGET", "0.1")       # 10,000,000 steps: the 1,582 syrup plans are 23 million
    body = (f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40"\n'
            f'[[entries]]\nscenario = "{SYRUP}"\nsetpoints = "40:70:1"\nambients = "-20:30:1"\n')
    code = main(["sweep", _manifest(tmp_path, body)])
    err = capsys.readouterr().err
    assert code == 2 and "entries[2]: the sweep is 1,582 plans" in err and "PLANNER_WORK_BUDGET" in err
    assert "the largest entry: 1,581 plans of syrup_railcar_unload.toml, 31 lever values x 51 ambients" in err
