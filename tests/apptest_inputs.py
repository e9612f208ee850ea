"""Finding input fields in an AppTest run: only the open Inputs sub-tab is drawn, so a field is looked
for in each sub-tab in turn (the Inputs tab itself must be open)."""

from __future__ import annotations

from typing import Callable

from dashboard.views.inputs import SECTION_KEY, SECTIONS


def open_section(at, title: str):
    at.session_state[SECTION_KEY] = title
    return at.run()


def find_in_sections(at, pick: Callable, what: str):
    """``pick(at)`` -> a list; the first hit of the open sub-tab, else of the next sub-tab that has one."""
    found = pick(at)
    if found:
        return found[0]
    for title, _, _ in SECTIONS:
        open_section(at, title)
        found = pick(at)
        if found:
            return found[0]
    raise AssertionError(f"no {what} in any Inputs sub-tab")


def number_field(at, label_start: str):
    return find_in_sections(at, lambda a: [w for w in a.number_input if w.label.startswith(label_start)],
                            f"number field {label_start!r}")


def editor_with_column(at, column: str):
    return find_in_sections(at, lambda a: [e for e in a.get("data_editor") if column in e.value.columns],
                            f"table with a column {column!r}")
