"""The views, one module per tab, in the order ``planner.records.links.VIEWS`` names them.

Each view module has ``NEEDS_RESULTS`` (True: drawn only when there is a plan
to show, greyed while the inputs have problems) and ``draw(page)`` (``views/page.Page``).  A new view is a
new module here, named as in ``planner.records.links.VIEWS``; the app and the links read ``VIEWS``.
"""

from __future__ import annotations

from importlib import import_module

from planner.records.links import VIEWS as VIEW_NAMES


def view_module(name: str):
    """The module ``dashboard/views/<name>`` that draws view ``name`` (imported on first use: only the open
    tab's module loads)."""
    if name not in VIEW_NAMES:
        raise KeyError(f"no view {name!r}")
    return import_module(f"dashboard.views.{name}")


# Tab title of each view (here, so that reading the titles imports no view)
VIEW_TITLES = {"plan": "Plan", "inputs": "Inputs", "line": "Along the line", "time": "Over time",
               "compare": "Setpoint comparison", "odds": "Odds", "product": "Product", "calibration": "Calibration",
               "review": "Review"}
TAB_TITLES = [VIEW_TITLES[view] for view in VIEW_NAMES]
VIEW_OF_TITLE = {title: view for view, title in VIEW_TITLES.items()}
