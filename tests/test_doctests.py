"""The worked examples in the planner's docstrings run, and every public correlation has one.

Each ``>>>`` example in ``planner/`` is a doctest: this module runs them all (one test per module), so
``python3 -m pytest -q`` fails when an example's value no longer comes out. The expected values come
from outside the project where one exists (a handbook table, a standard's worked example, or a
reference library such as fluids, ht or iapws); the docstring names the source beside the example.

The second half checks coverage: every public function and class of ``planner/correlations/`` and the
model functions of ``planner/line/`` and ``planner/transfer/`` listed in ``MODEL_FUNCTIONS`` carry an
example and a numbered References section (``REFERENCES_IN_MODULE``: the few whose module docstring
works their case out by hand, with the references), and every public function of ``planner/line/`` and
``planner/transfer/`` carries an example in its own docstring (``EXAMPLE_IN_MODULE``: the few at the
80-line limit of tests/test_architecture.py, whose example is in the module docstring).
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
from tests.test_architecture import MAX_FUNCTION_LINES

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


# The model functions of line/ and transfer/: each a step of the physics a user may call on its own. Each
# carries an example in its own docstring (or, if in EXAMPLE_IN_MODULE, in its module's) and a numbered
# References section in its own docstring (or, if in REFERENCES_IN_MODULE, in its module's).
MODEL_FUNCTIONS = [
    "planner.line.brent.brentq",
    "planner.line.heat_loss.insulation_resistance",
    "planner.line.heat_loss.surface_resistance",
    "planner.line.heat_path.jacket_temperature",
    "planner.line.heat_path.settle",
    "planner.line.heat_path.entrance_jacket",
    "planner.line.coefficients.evaluate",
    "planner.line.coefficients.entrance_mean_conductance",
    "planner.line.bulk_step.advance",
    "planner.line.bulk_step.step_across_states",
    "planner.line.transients.heat_capacity_per_metre",
    "planner.line.transients.evolve",
    "planner.line.transients.gap_warmup",
    "planner.line.transients.gap_centre_after",
    "planner.line.tracing.Heater",
    "planner.line.route.build_line",
    "planner.line.route.build_segment",
    "planner.line.products.Product",
    "planner.line.products.scenario_product",
    "planner.line.march.march",
    "planner.line.march.march_plugged",
    "planner.line.model.evaluate",
    "planner.line.model.line_from_scenario",
    "planner.transfer.vessels.level_from_volume",
    "planner.transfer.vessels.wetted_area",
    "planner.transfer.vessels.cool_contents",
    "planner.transfer.vessels.heat_contents",
    "planner.transfer.vessels.destination_level",
    "planner.transfer.vessels.source_heating",
    "planner.transfer.vessels.coil_steam_pressure",
    "planner.transfer.system.TransferSystem",
    "planner.transfer.flow_roots.flow_root",
    "planner.transfer.suction.npsh_available",
    "planner.transfer.suction.check_suction",
    "planner.transfer.timeline.run_transfer",
    "planner.transfer.startup.prewarm",
    "planner.transfer.startup.push_cold",
    "planner.transfer.hold.limit_temperature",
    "planner.transfer.hold.hold_analysis",
    "planner.transfer.pumps.hi_parameter_b",
    "planner.transfer.pumps.hi_correction",
    "planner.transfer.pumps.CentrifugalPump",
    "planner.transfer.pumps.PositiveDisplacementPump",
    "planner.transfer.pump_chart.pump_chart",
    "planner.transfer.plan.make_plan",
]

# Public functions whose example is in their module's docstring, with the reason: each within a few lines
# of MAX_FUNCTION_LINES (checked below, so an entry goes when the function shrinks).
EXAMPLE_IN_MODULE = {
    "planner.line.heat_path.settle": "79 lines: no room for an example in its own docstring",
}
NEAR_LIMIT_LINES = 8
# Model functions whose module docstring works their example out by hand and holds the references it cites.
REFERENCES_IN_MODULE = {
    "planner.line.heat_path.settle",
    "planner.transfer.timeline.run_transfer",
    "planner.transfer.startup.prewarm",
    "planner.transfer.startup.push_cold",
    "planner.transfer.hold.hold_analysis",
    "planner.transfer.plan.make_plan",
}


def _resolve(dotted: str):
    try:
        return importlib.import_module(dotted)
    except ModuleNotFoundError:
        module_name, name = dotted.rsplit(".", 1)
        return getattr(importlib.import_module(module_name), name)


def _has_references(doc: str) -> bool:
    return bool(re.search(r"^References\n-+\n(.*\n)*?\s*\[1\]", doc, re.MULTILINE))


def _documented(obj, module_doc: str = "", example_in_module: bool = False,
                references_in_module: bool = False) -> list[str]:
    """What the docstring of ``obj`` lacks: an example, a numbered References section (either may be in
    ``module_doc``, the docstring of its module, where ``example_in_module`` or ``references_in_module``)."""
    doc = inspect.getdoc(obj) or ""
    missing = []
    if not _has_example(obj, module_doc if example_in_module else ""):
        missing.append("an example (>>>)")
    if not (_has_references(doc) or (references_in_module and _has_references(module_doc))):
        missing.append("a numbered References section")
    return missing


def _has_example(obj, module_doc: str = "") -> bool:
    """An example in the docstring of ``obj`` or, given ``module_doc``, one there that calls ``obj``."""
    if ">>>" in (inspect.getdoc(obj) or ""):
        return True
    name = getattr(obj, "__name__", "")
    lines = [line.strip() for line in module_doc.splitlines()]
    return any(line.startswith((">>>", "...")) and re.search(rf"\b{re.escape(name)}\(", line) for line in lines)


def _public_functions(package_name: str):
    """(dotted name, function) of every public function defined in a module of ``package_name``."""
    package = importlib.import_module(package_name)
    for info in pkgutil.iter_modules(package.__path__, package_name + "."):
        module = importlib.import_module(info.name)
        for name, obj in vars(module).items():
            if not name.startswith("_") and inspect.isfunction(obj) and obj.__module__ == module.__name__:
                yield f"{module.__name__}.{name}", obj


def _missing_examples(functions) -> list[str]:
    """The dotted names among ``functions`` with no example where ``EXAMPLE_IN_MODULE`` allows one."""
    missing = []
    for dotted, obj in functions:
        module_doc = (inspect.getmodule(obj).__doc__ or "") if dotted in EXAMPLE_IN_MODULE else ""
        if not _has_example(obj, module_doc):
            missing.append(dotted)
    return missing


@pytest.mark.parametrize("module, name, obj", list(_public_correlations()), ids=lambda v: v if isinstance(v, str) else "")
def test_every_public_correlation_has_an_example_and_references(module, name, obj):
    assert not _documented(obj), f"{module}.{name} lacks {' and '.join(_documented(obj))}"


@pytest.mark.parametrize("dotted", MODEL_FUNCTIONS)
def test_every_model_function_has_an_example_and_references(dotted):
    obj = _resolve(dotted)
    module_doc = inspect.getmodule(obj).__doc__ or ""
    missing = _documented(obj, module_doc, dotted in EXAMPLE_IN_MODULE, dotted in REFERENCES_IN_MODULE)
    assert not missing, f"{dotted} lacks {' and '.join(missing)}"


LINE_AND_TRANSFER = sorted(dict(_public_functions("planner.line")) | dict(_public_functions("planner.transfer")))


@pytest.mark.parametrize("dotted", LINE_AND_TRANSFER)
def test_every_public_function_of_line_and_transfer_has_an_example(dotted):
    obj = _resolve(dotted)
    assert not _missing_examples([(dotted, obj)]), f"{dotted} has no example (>>>) in its docstring"


def test_the_function_list_is_the_whole_of_line_and_transfer():
    # the parametrised list above comes from the packages themselves: it is not empty, and holds the
    # functions named in the list (a module renamed would otherwise drop out silently)
    assert len(LINE_AND_TRANSFER) >= 50
    assert {"planner.line.brent.brentq", "planner.transfer.weather.evaluations_of"} <= set(LINE_AND_TRANSFER)


def test_a_missing_example_is_found():
    # the coverage check itself: a public function without an example is named, one with one is not
    def bare(x):
        """Twice ``x``."""
        return 2 * x

    def shown(x):
        """Twice ``x``.

        >>> shown(2)
        4
        """
        return 2 * x

    assert _missing_examples([("m.bare", bare), ("m.shown", shown)]) == ["m.bare"]


@pytest.mark.parametrize("dotted", sorted(EXAMPLE_IN_MODULE))
def test_an_example_in_the_module_is_only_for_a_function_at_the_limit(dotted):
    obj = _resolve(dotted)
    length = len(inspect.getsourcelines(obj)[0])
    assert length > MAX_FUNCTION_LINES - NEAR_LIMIT_LINES, (
        f"{dotted} is {length} lines: room for its example in its own docstring; drop it from EXAMPLE_IN_MODULE")
    assert ">>>" not in (inspect.getdoc(obj) or ""), f"{dotted} has its own example: drop it from EXAMPLE_IN_MODULE"
