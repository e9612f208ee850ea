"""A scenario's identity: the SHA-256 of its canonical JSON (``schema.scenario_to_json``), its content hash.

Two scenarios with the same content hash plan alike, whatever file, name of a file or formatting of its
units they came from: the saved plans keep the canonical JSON of each revision, and a sweep's table keys
each row by the hash so a re-run knows the rows it already has.
"""

from __future__ import annotations

import hashlib

from planner.scenario.schema import Scenario, scenario_to_json


def content_hash(scenario: Scenario) -> str:
    """SHA-256 of the scenario's canonical JSON (``schema.scenario_to_json``), 64 lowercase hex digits."""
    return hashlib.sha256(scenario_to_json(scenario).encode("utf-8")).hexdigest()
