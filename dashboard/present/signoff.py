"""The one-page sign-off sheet: a print-friendly HTML page of the plan on screen and, when it is a saved
revision's, that revision's review trail and the recorded history's chain head (no Streamlit here).

On the page: the outcome and the key figures, the worst findings, the inputs that matter, the range of the
odds (P10/P50/P90 of the revision's stored ``uncertainty``, when it was worked out), the review trail,
the chain head (``planner.records.chain``: keep it somewhere else and compare), the caution deferring to
site procedures, local codes and licensed engineers, and lines to sign.  It prints on one A4 or Letter page
from the browser (``@page`` and print CSS; the Print button is not printed).
"""

from __future__ import annotations

import datetime as _dt
import html
from dataclasses import dataclass, field

import pandas as pd

from planner.checks.finding import MOST_SEVERE_FIRST
from planner.records.revision import Revision
from planner.reports.findings_text import headline
from planner.reports.key_figures import figure_text
from planner.reports.uncertainty_text import figure_rows, percentage
from planner.scenario.schema import Scenario
from planner.scenario.wording import render

from dashboard.compute.record import PlanResults

from .display import SYSTEM_NAMES, caution_text, words
from .report import _inputs_frame
from .saved import STATE_WORDS, trail_frame, when_text

WORST_SHOWN = 6          # findings listed on the sheet, most severe first (the rest counted)
TRAIL_SHOWN = 8          # review steps listed, the latest (the earlier ones counted): the sheet stays one page

SHEET_CSS = """
@page { size: A4; margin: 10mm; }
body { font-family: -apple-system, Segoe UI, Roboto, Helvetica, Arial, sans-serif; font-size: 9.5pt; color: #1b2631;
       max-width: 190mm; margin: 0.5rem auto; line-height: 1.25; }
h1 { font-size: 14pt; margin: 0 0 0.1rem 0; } h2 { font-size: 10.5pt; margin: 0.45rem 0 0.15rem 0;
     border-bottom: 1px solid #aab7b8; }
.meta { color: #566573; font-size: 8.5pt; }
.cols { display: grid; grid-template-columns: 1fr 1fr; gap: 0 0.9rem; }
table { border-collapse: collapse; width: 100%; font-size: 8.5pt; }
th, td { border: 1px solid #d5d8dc; padding: 0.08rem 0.3rem; text-align: left; vertical-align: top; }
th { background: #f4f6f7; }
.state { padding: 0.25rem 0.5rem; border-left: 5px solid #27ae60; background: #eafaf1; }
.state.stop { border-color: #c0392b; background: #fdedec; } .state.warning { border-color: #e67e22; background: #fef5e7; }
.state.caution { border-color: #f1c40f; background: #fefbea; }
.finding { margin: 0.1rem 0; } .finding b { text-transform: uppercase; font-size: 8pt; }
.range-missing { border: 1px dashed #909497; padding: 0.3rem 0.5rem; color: #566573; }
.chain { font-family: ui-monospace, Menlo, Consolas, monospace; font-size: 8pt; word-break: break-all; }
.caution { background: #fdf2e9; border-left: 5px solid #e67e22; padding: 0.3rem 0.5rem; margin-top: 0.4rem; font-size: 8.5pt; }
.sign { display: grid; grid-template-columns: 2fr 2fr 1fr; gap: 0.9rem; margin-top: 0.9rem; }
.sign div { border-top: 1px solid #1b2631; padding-top: 0.1rem; font-size: 8pt; color: #566573; }
.noprint { margin: 0.4rem 0; }
@media print { .noprint { display: none; } body { margin: 0; font-size: 8.5pt; } table { font-size: 7.5pt; }
               h1 { font-size: 12.5pt; } h2 { font-size: 9.5pt; } .caution { font-size: 7.5pt; } }
"""


@dataclass(frozen=True)
class SavedPart:
    """What the sheet shows of a saved revision: the revision, its review trail, the chain head of the
    recorded history and the history check's problems for this revision (empty: it matches)."""

    revision: Revision
    trail: list = field(default_factory=list)
    chain_head: str | None = None
    history_problems: tuple = ()


def _table(frame: pd.DataFrame) -> str:
    return frame.to_html(index=False, na_rep="—", border=0, escape=True)


def _figures_table(results: PlanResults, system: str) -> str:
    rows = [(k.label, figure_text(k, system)) for k in results.key_figures]
    return _table(pd.DataFrame(rows, columns=["Figure", "Value"]))


def _worst_findings(results: PlanResults, system: str) -> str:
    findings = results.findings
    if findings is None:
        return f"<p>{html.escape(results.findings_note or 'Findings are not available.')}</p>"
    ordered = [f for s in MOST_SEVERE_FIRST for f in findings if f.get("severity") == s]
    lines = []
    for f in ordered[:WORST_SHOWN]:
        where = f" ({f['segment']})" if f.get("segment") else ""
        lines.append(f'<div class="finding"><b>{html.escape(f.get("severity", ""))}</b> '
                     f'{html.escape(f.get("title", ""))}{html.escape(where)}: '
                     f'{html.escape(render(f.get("message", ""), system))}</div>')
    rest = ordered[WORST_SHOWN:]
    if rest:
        counts = ", ".join(f"{sum(1 for f in rest if f.get('severity') == s)} {s}" for s in MOST_SEVERE_FIRST
                           if any(f.get("severity") == s for f in rest))
        lines.append(f"<p class=\"meta\">and {len(rest)} more ({html.escape(counts)}): see the plan's report.</p>")
    return "\n".join(lines) or "<p>No findings.</p>"


def range_html(saved: SavedPart | None, system: str) -> str:
    """P10/P50/P90 of the revision's stored odds (``results['uncertainty']``), or where they would be."""
    odds = saved.revision.results.get("uncertainty") if saved is not None else None
    if not odds:
        return ('<div class="range-missing">Range (P10 / P50 / P90): not worked out for this revision. Work out the '
                'odds (<code>[uncertainty]</code>, <code>plans save --uncertainty</code>) and save a revision to show '
                'the range the plan is signed with here.</div>')
    rows = [(r["label"], r["p10"], r["p50"], r["p90"]) for r in figure_rows(odds, system)]
    text = _table(pd.DataFrame(rows, columns=["Figure", "P10", "P50", "P90"]))
    chance = odds.get("probability_in_window")
    if chance is not None:
        text += f'<p class="meta">Chance of finishing in the planned window: {html.escape(percentage(chance))}; ' \
                f'{html.escape(str(odds.get("samples", "")))} plans at sampled inputs.</p>'
    return text


def _trail_html(saved: SavedPart | None) -> str:
    """The review trail, the latest ``TRAIL_SHOWN`` steps (the earlier ones counted)."""
    if saved is None:
        return "<p class=\"meta\">No review trail: not a saved revision.</p>"
    steps = list(saved.trail)
    trail = _table(trail_frame(steps[-TRAIL_SHOWN:])) if steps else "<p class=\"meta\">No review steps yet.</p>"
    if len(steps) > TRAIL_SHOWN:
        trail = (f"<p class=\"meta\">{len(steps) - TRAIL_SHOWN} earlier review steps are in the Review view; the "
                 f"latest {TRAIL_SHOWN}:</p>") + trail
    return trail


def _saved_html(saved: SavedPart | None) -> str:
    """The revision, its content hash, the chain head and the history check."""
    if saved is None:
        return ("<p><b>Not a saved revision.</b> The inputs on screen are not those of a saved revision: there is no "
                "review trail or history entry to sign against. Save the plan and submit it for review first.</p>")
    r = saved.revision
    check = ("this revision and its review trail match the recorded history" if not saved.history_problems else
             "DOES NOT MATCH the recorded history: " + "; ".join(saved.history_problems))
    head = saved.chain_head or "not available"
    return (f"<p>Revision {r.number} of plan id {r.plan_id} — <b>{html.escape(STATE_WORDS.get(r.state, r.state))}</b>; "
            f"saved by {html.escape(r.author)} at {html.escape(when_text(r.created_at))}; content hash "
            f"<span class=\"chain\">{html.escape(r.content_hash)}</span><br>"
            f"Chain head of the recorded history: <span class=\"chain\">{html.escape(head)}</span><br>"
            f"<span class=\"meta\">History check: {html.escape(check)}. Keep the chain head apart from the database "
            f"and compare it with <code>python -m planner plans verify</code>.</span></p>")


def build_signoff_html(scenario: Scenario, results: PlanResults, system: str = "SI", saved: SavedPart | None = None,
                       generated_at: _dt.datetime | None = None) -> str:
    """The sheet as one HTML page (display units of ``system``)."""
    when = (generated_at or _dt.datetime.now()).strftime("%Y-%m-%d %H:%M")
    plan = results.plan
    worst = plan.get("worst_severity", "info")
    start = plan.get("start", {})
    title = f"Sign-off sheet — {scenario.name}"
    body = f"""
<div class="noprint"><button onclick="window.print()">Print this sheet</button></div>
<h1>{html.escape(title)}</h1>
<p class="meta">Viscous Transfer Planner · printed {html.escape(when)} · units: {html.escape(SYSTEM_NAMES.get(system, system))}</p>
<p class="state {html.escape(worst)}"><b>{html.escape(headline(results.findings or [], system))}</b> — at the start:
 {html.escape(words(start.get('status', '')))}, {html.escape(render(start.get('message', ''), system))}</p>
<div class="cols"><div>
<h2>Key figures</h2>{_figures_table(results, system)}
<h2>Range of the odds</h2>{range_html(saved, system)}
<h2>Review trail</h2>{_trail_html(saved)}
</div><div>
<h2>Worst findings</h2>{_worst_findings(results, system)}
<h2>Inputs that matter</h2>{_table(_inputs_frame(scenario, system))}
</div></div>
<h2>Revision and recorded history</h2>{_saved_html(saved)}
<div class="caution"><b>Caution.</b> {html.escape(caution_text(system, results.touch_limit_k))}</div>
<div class="sign"><div>Reviewed by (name, role)</div><div>Signature</div><div>Date</div></div>
"""
    return (f"<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>{html.escape(title)}</title>"
            f"<style>{SHEET_CSS}</style></head><body>{body}</body></html>")
