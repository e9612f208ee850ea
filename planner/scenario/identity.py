"""A scenario's identity: its canonical JSON and the SHA-256 of it (its content hash).

Two scenarios with the same content hash plan alike, whatever file, name of a file or formatting of its
units they came from: the saved plans keep the canonical JSON of each revision, and a sweep's table keys
each row by the hash so a re-run knows the rows it already has.
"""

from __future__ import annotations

import hashlib
import json

from planner.scenario.schema import Scenario, scenario_to_dict


def canonical_json(scenario: Scenario) -> str:
    """The scenario's plain numbers (SI) as JSON with sorted keys and no spaces."""
    return json.dumps(scenario_to_dict(scenario), sort_keys=True, separators=(",", ":"), ensure_ascii=False)


def content_hash(scenario: Scenario) -> str:
    """SHA-256 of ``canonical_json(scenario)``, 64 lowercase hex digits."""
    return hashlib.sha256(canonical_json(scenario).encode("utf-8")).hexdigest()
