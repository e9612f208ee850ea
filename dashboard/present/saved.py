"""A saved revision's figures and review trail as tables (no Streamlit here): the stored ``results``
(``planner.reports.saved_figures``, SI) in the display system, the trail, and the difference of two revisions."""

from __future__ import annotations

import json
from typing import TYPE_CHECKING

from planner.reports.saved_figures import SAVED_FIGURES
from planner.records.revision import Revision
from planner.scenario.wording import money_text
from planner.correlations.constants import J_PER_KWH

from .display import fmt, number_text

if TYPE_CHECKING:
    import pandas as pd             # imported where a frame is built: the header (``lock_text``) needs none
from .odds_tables import odds_diff_row


def result_text(key: str, value, unit_system: str, currency: str = "") -> str:
    kind = next((k for name, _, k in SAVED_FIGURES if name == key), None)
    if value is None:
        return "—"
    if kind == "energy_kwh":
        return fmt(float(value) * J_PER_KWH, "energy", unit_system)
    if kind == "money":
        return money_text(float(value), currency)
    if kind == "count":
        return str(value)
    if kind is None or not isinstance(value, (int, float)) or isinstance(value, bool):
        return str(value)
    return fmt(float(value), kind, unit_system)


def when_text(iso: str) -> str:
    """``2025-12-01T21:34:05+00:00`` -> ``2025-12-01 21:34 UTC``."""
    text = str(iso or "")
    if len(text) >= 16 and text[10] == "T":
        return f"{text[:10]} {text[11:16]} UTC" if text.endswith("+00:00") else f"{text[:10]} {text[11:16]}"
    return text


def trail_frame(trail: list) -> pd.DataFrame:
    import pandas as pd

    words = {"submit": "submitted", "approve": "approved", "return": "returned for changes"}
    return pd.DataFrame([(when_text(r.at), words.get(r.action, r.action), r.by, r.comment) for r in trail],
                        columns=["When", "Step", "By", "Comment"])


def results_frame(results: dict, unit_system: str) -> pd.DataFrame:
    import pandas as pd

    currency = results.get("currency", "")
    rows = [(label, result_text(key, results.get(key), unit_system, currency))
            for key, label, _ in SAVED_FIGURES if key in results]
    return pd.DataFrame(rows, columns=["Figure", "Value"])


def value_text(value) -> str:
    if value is None:
        return "—"
    if isinstance(value, str):
        return value
    return json.dumps(value, ensure_ascii=False)


def diff_frames(diff: dict, a: int, b: int, unit_system: str, currency_a: str = "", currency_b: str = "")\
        -> tuple[pd.DataFrame, pd.DataFrame]:
    """``PlanStore.diff`` as two tables: the inputs that changed, the figures that changed as shown (a figure
    whose stored value differs below the shown precision is not listed)."""
    import pandas as pd

    inputs = pd.DataFrame([(path, value_text(old), value_text(new)) for path, old, new in diff.get("inputs", [])],
                          columns=["Input", f"Revision {a}", f"Revision {b}"])
    labels = {key: label for key, label, _ in SAVED_FIGURES}
    rows = []
    for key, old, new in diff.get("results", []):
        if key == "uncertainty" or key.startswith("uncertainty."):       # the odds kept with the revision
            row = odds_diff_row(key, old, new, unit_system, currency_a, currency_b)
            if row is not None and row[1] != row[2]:
                rows.append(row)
            continue
        if key == "currency":
            if value_text(old) != value_text(new):
                rows.append(("Currency", value_text(old), value_text(new)))
            continue
        before, after = result_text(key, old, unit_system, currency_a), result_text(key, new, unit_system, currency_b)
        if before != after:         # compared at the precision shown: 4.331 m and 4.329 m are both "4.33 m"
            rows.append((labels.get(key, key), before, after))
    results = pd.DataFrame(rows, columns=["Figure", f"Revision {a}", f"Revision {b}"])
    return inputs, results


STATE_WORDS = {"draft": "draft", "submitted": "submitted for review", "approved": "approved",
               "returned": "returned for changes"}


def lock_text(revision: Revision, trail: list) -> str:
    approval = next((r for r in reversed(trail) if r.action == "approve"), None)
    who = f"approved by {approval.by} at {when_text(approval.at)}" if approval else "approved"
    return (f"Revision {revision.number} of “{revision.plan_name}” is {who} — read-only; "
            "save a new revision to change it.")
