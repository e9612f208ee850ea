"""``python -m planner``: see planner.cli."""

from planner.cli import main

raise SystemExit(main())
