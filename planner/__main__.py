"""``python -m planner``: see planner.cli."""

from .cli import main

raise SystemExit(main())
