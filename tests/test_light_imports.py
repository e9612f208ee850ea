"""Start-up by structure, not by time (issues "a CLI that starts in a blink" and "Dashboard: first page under
3 s"): each probe runs in a fresh interpreter and lists ``sys.modules`` afterwards, so a heavy package that
creeps back into a path that does not need it fails here, whatever the machine's speed.  The speed itself is
measured in the benchmarks (DEVELOPERS.md, "Start-up").

What each path may load, and why the rest stays out:
- ``--help``: the parser only (no numpy, pydantic, pint, SQLAlchemy, SciPy, Streamlit);
- ``plan``: numpy and the scenario's models, but not SQLAlchemy or Argon2 (the records), SciPy's optimizers
  or statistics (Brent's method is ``planner/line/brent.py``; the odds load ``scipy.stats`` only with
  ``--uncertainty``), pint (the units a plan meets are ``scenario/unit_factors.py``), pandas or Streamlit;
- the records commands: SQLAlchemy when they run, and only then;
- the dashboard's first page (the server process): Streamlit and the scenario's models, but none of
  the transfer's or the line's models (the worker plans), no records layer, SciPy, pint or the Inputs' and
  the report's modules (loaded when their tab is opened or the report downloaded); no pandas
  (the Plan view's tables are markdown; ``st.table`` and ``st.dataframe`` convert through pandas and
  pyarrow; pyarrow itself loads: Streamlit's custom-component call imports it, for the Plan view's
  page-shown signal) and no
  ``streamlit.emojis`` (message boxes carry a Material icon or an empty one, so Streamlit does not look
  for an emoji in their text);
- the dashboard's worker: the planner, but no pint, SciPy optimizers, pandas or Streamlit for a demo plan.
"""

from __future__ import annotations

import os
import subprocess
import sys

import pytest

from conftest import ROOT

PROBE_END = "\nimport sys\nprint(' '.join(sorted(sys.modules)))"


def _modules_after(code: str, env: dict | None = None) -> set[str]:
    out = subprocess.run([sys.executable, "-c", code + PROBE_END], cwd=ROOT, capture_output=True, text=True,
                         timeout=240, env=dict(os.environ, **(env or {})))
    assert out.returncode == 0, out.stderr[-3000:]
    return set(out.stdout.splitlines()[-1].split())


def _cli(*args: str) -> str:
    return ("import contextlib, io\nfrom planner.cli import main\n"
            f"with contextlib.redirect_stdout(io.StringIO()):\n    code = main({list(args)!r})\n"
            "assert code == 0, code")


def _loaded(modules: set[str], names) -> set[str]:
    """Those of ``names`` (a package or a module) that are loaded."""
    return {name for name in names if name in modules}


NEVER_IN_A_PLAN = ("sqlalchemy", "argon2", "scipy.optimize", "scipy.stats", "scipy.linalg", "pint", "pandas",
                   "streamlit", "plotly")


def test_help_builds_the_parser_only():
    out = subprocess.run([sys.executable, "-c", "import runpy, sys\nsys.argv = ['planner', '--help']\n"
                          "try:\n    runpy.run_module('planner', run_name='__main__')\nexcept SystemExit:\n    pass"
                          + PROBE_END], cwd=ROOT, capture_output=True, text=True, timeout=120)
    assert "usage: python -m planner" in out.stdout              # the probe did print the help
    modules = set(out.stdout.splitlines()[-1].split())
    assert not _loaded(modules, ("numpy", "scipy", "pint", "pydantic", "sqlalchemy", "argon2", "fluids",
                                 "streamlit", "pandas"))


@pytest.mark.parametrize("demo", ["syrup_railcar_unload", "fuel_oil_barge_discharge"])
@pytest.mark.parametrize("units", ["si", "us"])
def test_a_plan_loads_neither_records_nor_optimizers_nor_pint(demo, units):
    modules = _modules_after(_cli("plan", f"demo_scenarios/{demo}.toml", "--units", units))
    assert {"numpy", "pydantic", "planner.transfer.plan", "planner.line.brent"} <= modules   # the probe did plan
    assert not _loaded(modules, NEVER_IN_A_PLAN)


def test_a_plan_as_json_loads_no_pint_either():
    modules = _modules_after(_cli("plan", "demo_scenarios/syrup_railcar_unload.toml", "--json"))
    assert "planner.reports.plan_json" in modules and not _loaded(modules, NEVER_IN_A_PLAN)


def test_the_records_commands_load_sqlalchemy_when_they_run(tmp_path):
    """Building the parser (which names them) loads no database layer; ``plans list`` loads it."""
    parser_only = _modules_after("from planner.cli import build_parser\nbuild_parser().format_help()")
    assert "planner.cli.records_commands" in parser_only and "sqlalchemy" not in parser_only
    listed = _modules_after(_cli("plans", "list", "--db", f"sqlite:///{tmp_path / 'plans.sqlite'}"))
    assert "sqlalchemy" in listed and "planner.records.store" in listed


def test_the_light_helpers_load_none_of_the_transfer_models():
    """Key figures' text, saved figures, hours in words and the outcomes' words: what pages and tables import
    to show a plan, without the models that compute one."""
    modules = _modules_after("import planner.reports.key_figures, planner.reports.saved_figures, "
                             "planner.transfer.hold_words, planner.transfer.operating")
    assert not _loaded(modules, ("planner.transfer.plan", "planner.transfer.system", "planner.transfer.hold",
                                 "planner.line.march", "numpy", "pydantic", "pint", "scipy"))


@pytest.mark.slow
def test_the_dashboards_first_page_loads_only_what_it_shows(tmp_path):
    """The first page of a new session (the first demo's Plan view), drawn by Streamlit's AppTest in a fresh
    interpreter: the server process holds Streamlit and the scenario's models; the plan comes from a
    worker process.  Its tables are markdown, from the same rows as the report's tables.  The Plan view's
    pump chart waits for the browser's page-shown signal (``views/deferred``), which AppTest never gives:
    its figures module is not needed for this first run.  The signal is a custom component, and Streamlit's
    component call imports pyarrow whatever its arguments (about 0.1 s once per server process, quiet
    machine): pyarrow is allowed here since then, pandas still is not."""
    code = ("from streamlit.testing.v1 import AppTest\n"
            "at = AppTest.from_file('dashboard/app.py', default_timeout=120).run()\n"
            "assert not at.exception, at.exception\n"
            "assert [m.value for m in at.metric], 'no key figures on the page'\n"
            "assert any('Start-up and stops' in m.value for m in at.markdown), 'no Plan view'")
    modules = _modules_after(code, env={"PLANNER_DB_PATH": str(tmp_path / "plans.sqlite"),
                                        "PLANNER_DRAFTS_DIR": str(tmp_path / "drafts")})
    assert {"streamlit", "planner.scenario.schema", "dashboard.views.plan", "dashboard.present.tables"} <= modules
    assert not _loaded(modules, ("planner.transfer.plan", "planner.transfer.system", "planner.transfer.hold",
                                 "planner.line.march", "planner.checks.findings", "planner.sweeps.compare",
                                 "dashboard.compute.results", "dashboard.present.report",
                                 "dashboard.views.inputs.sections", "dashboard.present.pump_figure",
                                 "sqlalchemy", "argon2", "scipy", "pint", "pandas",
                                 "streamlit.emojis"))


@pytest.mark.slow
def test_the_dashboards_worker_plans_a_demo_without_pint_or_optimizers():
    code = ("from dashboard.compute.workers import plan_job\n"
            "from planner.scenario.schema import load_scenario, scenario_to_json\n"
            "result = plan_job(scenario_to_json(load_scenario('demo_scenarios/fuel_oil_barge_discharge.toml')))\n"
            "assert 'results' in result, result")
    modules = _modules_after(code)
    assert "dashboard.compute.results" in modules
    assert not _loaded(modules, ("pint", "scipy.optimize", "scipy.stats", "pandas", "streamlit", "sqlalchemy"))
