"""The worked examples in the planner's docstrings run, and every public correlation has one.

Each ``>>>`` example in ``planner/`` is a doctest: this module runs them all (one test per module), so
``python3 -m pytest -q`` fails when an example's value no longer comes out. The expected values come
from outside the project where one exists (a handbook table, a standard's worked example, or a
reference library such as fluids, ht or iapws); the docstring names the source beside the example.

The second half checks coverage: every public function and class of ``planner/correlations/`` and the
model functions of ``planner/line/`` and ``planner/transfer/`` listed in ``MODEL_FUNCTIONS`` carry an
example and a numbered References section.
"""

from __future__ import annotations

import doctest
import importlib
import inspect
import pkgutil
import re
import types

import pytest

import planner

OPTIONS = doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE
SKIPPED = {"planner.__main__"}       # runs the command line when imported


def _module_names() -> list[str]:
    names = [info.name for info in pkgutil.walk_packages(planner.__path__, "planner.")]
    return sorted(n for n in names if n not in SKIPPED)


def _examples(module) -> list[doctest.DocTest]:
    return [t for t in doctest.DocTestFinder(exclude_empty=True).find(module, module.__name__) if t.examples]


def _run(module) -> tuple[int, int, str]:
    """(examples tried, examples failed, the failure report) of a module's docstring examples."""
    runner = doctest.DocTestRunner(optionflags=OPTIONS)
    report: list[str] = []
    for test in _examples(module):
        runner.run(test, out=report.append)
    return runner.tries, runner.failures, "".join(report)


@pytest.mark.parametrize("name", _module_names())
def test_docstring_examples_run(name):
    _, failed, report = _run(importlib.import_module(name))
    assert failed == 0, report


def test_a_wrong_example_fails():
    # the harness itself: an example whose printed value is not what comes out is a failure
    module = types.ModuleType("example_module", """A module with one wrong example.

    >>> round(64 / 1000.0, 3)
    0.065
    """)
    tried, failed, report = _run(module)
    assert (tried, failed) == (1, 1) and "Expected:\n    0.065\nGot:\n    0.064" in report


def _public_correlations():
    """(module, name, object) for each public function and class defined in planner/correlations/."""
    import planner.correlations as package

    for info in pkgutil.iter_modules(package.__path__, "planner.correlations."):
        module = importlib.import_module(info.name)
        for name, obj in vars(module).items():
            if name.startswith("_") or not (inspect.isfunction(obj) or inspect.isclass(obj)):
                continue
            if getattr(obj, "__module__", None) != module.__name__:
                continue                     # imported from elsewhere
            if inspect.isclass(obj) and re.search(r"\b(record|result)\b", (obj.__doc__ or "").split("\n")[0], re.I):
                continue                     # a plain result record, not a correlation
            yield module.__name__, name, obj


# The model functions of line/ and transfer/: each a step of the physics a user may call on its own. A
# module named here carries the example of its one model function in its own docstring, where the
# function is close to the 80-line limit of tests/test_architecture.py.
MODEL_FUNCTIONS = [
    "planner.line.heat_loss.insulation_resistance",
    "planner.line.heat_loss.surface_resistance",
    "planner.line.heat_path.jacket_temperature",
    "planner.line.bulk_step.advance",
    "planner.line.transients.heat_capacity_per_metre",
    "planner.line.transients.evolve",
    "planner.line.transients.gap_warmup",
    "planner.line.tracing.Heater",
    "planner.line.route.build_line",
    "planner.line.products.Product",
    "planner.line.march.march",
    "planner.line.model.evaluate",
    "planner.transfer.vessels.level_from_volume",
    "planner.transfer.vessels.wetted_area",
    "planner.transfer.vessels.cool_contents",
    "planner.transfer.vessels.heat_contents",
    "planner.transfer.vessels.destination_level",
    "planner.transfer.vessels.source_heating",
    "planner.transfer.system.TransferSystem",
    "planner.transfer.timeline",           # run_transfer: its example is the module's (the function is near 80 lines)
    "planner.transfer.startup",            # prewarm and push_cold
    "planner.transfer.hold",               # hold_analysis
    "planner.transfer.pumps.hi_parameter_b",
    "planner.transfer.pumps.hi_correction",
    "planner.transfer.pumps.CentrifugalPump",
    "planner.transfer.pumps.PositiveDisplacementPump",
    "planner.transfer.plan",               # make_plan
]


def _resolve(dotted: str):
    try:
        return importlib.import_module(dotted)
    except ModuleNotFoundError:
        module_name, name = dotted.rsplit(".", 1)
        return getattr(importlib.import_module(module_name), name)


def _documented(obj) -> list[str]:
    """What the docstring of ``obj`` lacks: an example, a numbered References section."""
    doc = inspect.getdoc(obj) or ""
    missing = []
    if ">>>" not in doc:
        missing.append("an example (>>>)")
    if not re.search(r"^References\n-+\n(.*\n)*?\s*\[1\]", doc, re.MULTILINE):
        missing.append("a numbered References section")
    return missing


@pytest.mark.parametrize("module, name, obj", list(_public_correlations()), ids=lambda v: v if isinstance(v, str) else "")
def test_every_public_correlation_has_an_example_and_references(module, name, obj):
    assert not _documented(obj), f"{module}.{name} lacks {' and '.join(_documented(obj))}"


@pytest.mark.parametrize("dotted", MODEL_FUNCTIONS)
def test_every_model_function_has_an_example_and_references(dotted):
    obj = _resolve(dotted)
    assert not _documented(obj), f"{dotted} lacks {' and '.join(_documented(obj))}"
