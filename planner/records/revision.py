"""The saved records as the store returns them: a revision (its scenario as the canonical JSON text),
a plan's row in a listing, one step of the review trail; and the difference of two revisions' inputs.
No database here: ``planner.records.store`` reads and writes them.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from datetime import datetime, timezone

from planner.scenario.schema import Scenario, scenario_from_dict


@dataclass(frozen=True)
class Revision:
    id: int
    plan_id: int
    plan_name: str
    site: str
    number: int
    scenario_json: str
    results: dict
    product: str
    author: str
    note: str
    created_at: str
    state: str
    content_hash: str
    author_id: int | None = None

    @property
    def scenario(self) -> Scenario:
        return scenario_from_dict(json.loads(self.scenario_json))

    @property
    def read_only(self) -> bool:
        return self.state == "approved"


@dataclass(frozen=True)
class PlanRow:
    id: int
    name: str
    site: str
    product: str
    latest: int
    state: str
    updated_at: str
    author: str


@dataclass(frozen=True)
class Review:
    action: str
    by: str
    comment: str
    at: str
    by_id: int | None = None
    by_role: str = ""


def _now() -> str:
    return datetime.now(timezone.utc).isoformat(timespec="seconds")


def diff_values(old, new, path: str = "") -> list[tuple[str, object, object]]:
    """(path, old, new) for every leaf that differs between two JSON-like values."""
    if isinstance(old, dict) and isinstance(new, dict):
        out = []
        for key in sorted(set(old) | set(new)):
            out.extend(diff_values(old.get(key), new.get(key), f"{path}.{key}" if path else str(key)))
        return out
    if isinstance(old, list) and isinstance(new, list) and len(old) == len(new):
        out = []
        for i, (x, y) in enumerate(zip(old, new)):
            out.extend(diff_values(x, y, f"{path}[{i}]"))
        return out
    return [] if old == new else [(path, old, new)]
