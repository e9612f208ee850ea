"""What every view is given: one record of the run, built once by ``app.py``."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

from dashboard.compute.record import PlanResults


@dataclass(frozen=True)
class Page:
    scenario: object | None          # the validated planner.scenario.schema.Scenario, None while the inputs have problems
    scenario_json: str | None        # its canonical JSON (the cache key), None while the inputs have problems
    results: PlanResults | None      # what the result views draw (the last good plan, greyed, while ``stale``)
    stale: bool                      # the results are not of the inputs on screen
    problems: object                 # views.inputs.Problems: the problems of the inputs, by field
    unit_system: str                 # "SI" or "US"
    set_work: Callable[[dict, str], None]   # loads another scenario into the session (loading.set_work)
