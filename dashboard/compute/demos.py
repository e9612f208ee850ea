"""The demo scenarios the dashboard offers, in the picker's order; a new session opens the first
(``loading.init_state``), and the server's first worker plans it before any page asks
(``workers.pool(warm=True)``)."""

from __future__ import annotations

from pathlib import Path

DEMO_DIR = Path(__file__).resolve().parents[2] / "demo_scenarios"
DEMO_FILES = sorted(DEMO_DIR.glob("*.toml"))
