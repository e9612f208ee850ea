"""The Inputs view: widgets that edit the working scenario dict, and the messages beside them.

The working scenario lives in ``st.session_state["work"]`` as a plain scenario dict (the form
``planner.scenario.schema.scenario_to_dict`` writes: numbers in the field's default unit, or strings with
a unit). Each widget shows its field in the chosen unit system and, when the operator changes it,
writes the new value back as an SI string with its unit (``"333.15 K"``) through an ``on_change``
callback, so that only edited fields change and every edit survives switching tabs or units.
The planner validates the dict; its ``ScenarioError.problems`` paths (``route.segments[0].length``)
are matched to the widgets and tables, and each message is shown beside its field.
"""

from __future__ import annotations

import streamlit as st

from dashboard.present.plaintext import escaped

from ..page import Page
from .fields import Problems, _under

NEEDS_RESULTS = False


def draw(page: Page) -> None:
    render_inputs(st.container(), page.problems)


SECTIONS = [
    # (tab title, problem prefixes, renderer: its name in ``sections``)
    ("Product", ("product",), "product_section"),
    ("Route", ("route", "suction"), "route_section"),
    ("Tracing", ("tracing",), "tracing_section"),
    ("Pump", ("pump",), "pump_section"),
    ("Source & destination", ("source", "destination"), "vessels_section"),
    ("Site & limits", ("site", "limits"), "site_section"),
    ("Costs & schedule", ("costs", "schedule"), "costs_section"),
]


def _renderer(name: str):
    """The section's renderer; ``sections`` (its tables, plots and product preview) loads when the Inputs view
    is first drawn, not with the page (``app.py`` imports ``Problems`` from here)."""
    from . import sections

    return getattr(sections, name)


SECTION_KEY = "input_section"


def _section_label(title: str, problems: Problems, prefixes: tuple) -> str:
    n = sum(problems.count(p) for p in prefixes)
    return f"⚠️ {title} ({n})" if n else title


def _open_section() -> str:
    """The title of the sub-tab open in the last run (its label may have gained or lost a warning)."""
    shown = str(st.session_state.get(SECTION_KEY) or "")
    for title, _, _ in SECTIONS:
        if shown == title or shown.startswith(f"⚠️ {title} ("):
            return title
    return SECTIONS[0][0]


def render_inputs(container, problems: Problems) -> None:
    """The input sections as sub-tabs (only the open one runs); a sub-tab whose fields have problems
    carries a warning sign and the count.  The open sub-tab stays open when its label changes (an
    invalid value adds the warning), so the message stays in view beside its field."""
    labels = [_section_label(title, problems, prefixes) for title, prefixes, _ in SECTIONS]
    current = _open_section()
    default = labels[[title for title, _, _ in SECTIONS].index(current)]
    tabs = container.tabs(labels, key=SECTION_KEY, default=default, on_change="rerun")
    for tab, (_, _, renderer) in zip(tabs, SECTIONS):
        if tab.open is not False:
            _renderer(renderer)(tab, problems)
    prefixes = [prefix for _, section_prefixes, _ in SECTIONS for prefix in section_prefixes]
    rest = [(p, m) for p, m in problems.rest() if not any(_under(p, prefix) for prefix in prefixes)]
    if rest:
        container.error("Other problems in the scenario:  \n" + "  \n".join(
            f"{escaped(p or '(file)')}: {escaped(m)}" for p, m in rest))
