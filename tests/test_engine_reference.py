"""The engine computes what it computed when its figures were recorded (tests/reference/engine_reference.json,
by ``python -m tests.engine_reference --record COMMIT``, the commit named in the file).  First recorded
from ead602d, the last commit before the speed rewrite, which the rewrite matched to 0.005 K and
0.005 %; recorded again from 0338bc3, which added the developing laminar entrance (Shah 1978: pressure
drops of short laminar lines up to 64 % higher on the generated lines, 0.8 % on the demos) and the
untraced steps' energy closure (heat loss up to 1.6 %), temperatures within 0.005 K of ead602d: temperatures within 0.05 K; pressures, flows, times, powers and energies
within 0.2 % (the planner's accuracy target for the steady march, planner choice; the same as the
grid tests tests/test_march_grid.py and tests/test_plan_grid.py)."""

from __future__ import annotations

import json
import math

import pytest

from engine_reference import MARCH_FIGURES, PLAN_FIGURES, REFERENCE_FILE, march_figures, plan_figures
from planner.scenario.schema import scenario_from_dict

TOL_T_K = 0.05
TOL_REL = 2e-3
TOL_HEAT_W = 1.0   # floor for heat flows: a line near ambient has a net loss near zero (gains less losses)
REFERENCE = json.loads(REFERENCE_FILE.read_text(encoding="utf-8"))


def _agree(kinds: dict, now: dict, then: dict, where: str) -> None:
    for name, kind in kinds.items():
        a, b = now[name], then[name]
        if a is None or b is None:
            assert a is b, (where, name, a, b)
        elif kind == "temperature":
            assert abs(a - b) <= TOL_T_K, (where, name, a, b)
        else:
            floor = TOL_HEAT_W if name.endswith("_w") else 1e-9
            assert math.isclose(a, b, rel_tol=TOL_REL, abs_tol=floor), (where, name, a, b)


def test_the_reference_names_its_commit_and_holds_200_lines():
    assert REFERENCE["commit"] and len(REFERENCE["lines"]) == 200 and len(REFERENCE["plans"]) == 6


@pytest.mark.parametrize("block", range(4))
def test_generated_lines_march_as_recorded(block):
    seeds = sorted(REFERENCE["lines"], key=int)[block::4]
    for seed in seeds:
        now = march_figures(int(seed))
        assert now is not None, seed
        _agree(MARCH_FIGURES, now, REFERENCE["lines"][seed], f"line {seed}")


@pytest.mark.parametrize("name", sorted(REFERENCE["plans"]))
def test_demo_plans_as_recorded(name):
    recorded = REFERENCE["plans"][name]
    _agree(PLAN_FIGURES, plan_figures(scenario_from_dict(recorded["scenario"])), recorded["figures"], name)
