"""Convergence of the odds: P10/P50/P90 at a small number of samples against a large one, on the demos.

Issue 21 asks that the percentiles at 128 samples lie within 2 % of those at 4,096 on the three demos.
A percentile that is "beyond" (+inf: it reaches samples that did not finish) must be beyond at both
sizes.  Full size (about 12,700 plans; an hour or more on 2 cores):

    python3 -m tests.validation.odds_convergence                     # 128 against 4,096, the three demos
    python3 -m tests.validation.odds_convergence --small 32 --large 256 --demo polyol_tank_transfer

It prints each figure's percentiles at both sizes and the relative difference, and exits 1 when one is
past the tolerance.  ``tests/test_uncertainty_convergence.py`` runs one demo at a small size (slow).
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

DEMOS = ("fuel_oil_barge_discharge", "polyol_tank_transfer", "syrup_railcar_unload")


def differences(small: dict, large: dict) -> list[tuple[str, str, float, float, float, float | None]]:
    """(figure, level, small value, large value, relative difference, the small size's reported standard
    error relative to its value) for every percentile; a percentile beyond at one size only is an infinite
    difference, beyond at both none."""
    rows = []
    for figure, levels in large["percentiles"].items():
        for level, value in levels.items():
            other = small["percentiles"][figure][level]
            if math.isinf(value) and math.isinf(other):
                rel = 0.0
            elif math.isinf(value) or math.isinf(other):
                rel = math.inf
            else:
                rel = abs(other - value) / max(abs(value), 1e-12) if value != other else 0.0
            error = small["sampling_error"][figure][level]
            relative_error = error / abs(other) if error is not None and math.isfinite(other) and other else None
            rows.append((figure, level, other, value, rel, relative_error))
    return rows


def run(demo: str, small: int, large: int, executor, seed: int = 21) -> list[tuple]:
    from planner.scenario.budget import Budget, use_budget
    from planner.scenario.schema import load_scenario
    from planner.sweeps.uncertainty import plan_odds

    scenario = load_scenario(ROOT / "demo_scenarios" / f"{demo}.toml")
    with use_budget(Budget(uncertainty_steps=10 ** 12)):
        a = plan_odds(scenario, samples=small, seed=seed, executor=executor)
        b = plan_odds(scenario, samples=large, seed=seed + 1, executor=executor)
    return differences(a, b)


def main(argv: list[str] | None = None) -> int:
    from planner.sweeps.executors import local_executor

    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--small", type=int, default=128)
    parser.add_argument("--large", type=int, default=4096)
    parser.add_argument("--demo", action="append", choices=DEMOS, help="demo (repeatable; default: all three)")
    parser.add_argument("--tolerance", type=float, default=0.02, help="relative tolerance (default 0.02)")
    parser.add_argument("--workers", type=int, default=2)
    args = parser.parse_args(argv)
    worst = 0.0
    with local_executor(args.workers) as pool:
        for demo in args.demo or DEMOS:
            print(f"== {demo}: {args.small} against {args.large} samples")
            for figure, level, a, b, rel, error in run(demo, args.small, args.large, pool):
                flag = "" if rel <= args.tolerance else "   PAST THE TOLERANCE"
                shown = "      —" if error is None else f"{100 * error:7.3f}"
                print(f"   {figure:26s} {level}  {a:14.6g}  {b:14.6g}  {100 * rel:7.3f} %   (reported error "
                      f"{shown} %){flag}")
                worst = max(worst, rel)
    print(f"worst relative difference {100 * worst:.3f} % (tolerance {100 * args.tolerance:g} %)")
    return 0 if worst <= args.tolerance else 1


if __name__ == "__main__":
    sys.exit(main())
