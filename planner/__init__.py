"""Viscous-liquid transfer planner (SI inside; see DEVELOPERS.md)."""

__version__ = "0.9.0"      # written into exports (the timeline CSV header); raise it with each release
