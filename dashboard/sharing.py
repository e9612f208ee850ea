"""Save / share / review — the place reserved for it (not built yet).

Planned here, and only here:
- saved plans: the scenario JSON text, the plan JSON and who/when in an embedded SQLite database
  (SQLAlchemy, ``data/plans.sqlite``; ``data/`` is gitignored), listed for reloading;
- share links: ``st.query_params`` carrying a saved plan's id, so that a supervisor opening the
  link sees the same inputs and results;
- review: a supervisor's sign-off (name, time, remarks) stored with the saved plan.

``app.py`` calls :func:`save_share_review` once per run in the sidebar with everything those
features need; today it only says that the feature is coming.
"""

from __future__ import annotations


def save_share_review(container, scenario_json: str | None, bundle: dict | None) -> None:
    """Render the Save / share / review controls (placeholder)."""
    del scenario_json, bundle  # used once saving is built
    container.caption("Saving plans, share links and supervisor review will be added here.")
