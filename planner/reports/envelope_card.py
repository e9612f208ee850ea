"""The operating envelope as a printable one-page card (HTML, no script): pinned by the line, it lets an
operator pick a setpoint (or steam pressure, speed, flow limit) for the day's ambient without a computer.

Big print: per ambient, the lowest value that finishes within the planned window with no stop-level
finding.  Small print: the whole grid (total time and worst severity of every cell), the window, where
the figures came from, and the standing caution.  Units: the display units of ``system``.
"""

from __future__ import annotations

import datetime as _dt
import html

from planner.checks.caution import STANDING_CAUTION
from planner.scenario.units import unit_label
from planner.scenario.wording import format_quantity
from planner.checks.lever_values import lever_decimals
from planner.sweeps.envelope import SEVERITY_MARKS, Envelope

LEVER_WORDS = {"setpoint": "trace setpoint", "steam_pressure": "steam pressure", "pump_speed": "pump speed",
               "flow_limit": "flow limit"}
PAGE_CSS = """
@page { size: A4 portrait; margin: 12mm; }
body { font-family: sans-serif; color: #111; max-width: 186mm; margin: 0 auto; }
"""
CARD_CSS = """
section.envelope-card { break-before: page; break-inside: avoid; }
.envelope-card h1 { font-size: 18pt; margin: 0 0 2mm 0; } .envelope-card .meta { font-size: 8pt; color: #444; margin: 0 0 4mm 0; }
.envelope-card table.line { border-collapse: collapse; width: 100%; margin-bottom: 5mm; }
.envelope-card table.line td, .envelope-card table.line th { border: 1px solid #333; padding: 2mm 3mm; font-size: 15pt; text-align: center; }
.envelope-card table.line th { background: #eee; }
.envelope-card table.grid { border-collapse: collapse; width: 100%; font-size: 7.5pt; }
.envelope-card table.grid td, .envelope-card table.grid th { border: 1px solid #999; padding: 0.8mm; text-align: center; }
.envelope-card td.fits { background: #d8f0d8; } .envelope-card td.stop { background: #f4c7c3; } .envelope-card td.late { background: #fbe9c0; }
.envelope-card td.none { color: #a00; font-weight: bold; }
.envelope-card .caution { font-size: 7.5pt; border-top: 1px solid #999; margin-top: 4mm; padding-top: 2mm; }
"""


def _cell_class(cell: dict) -> str:
    if cell["fits"]:
        return "fits"
    return "stop" if cell["has_stop"] else "late"


def _line_rows(result: Envelope, system: str) -> str:
    decimals = lever_decimals(result.quantity, result.values, system=system)
    ambient_decimals = lever_decimals("temperature", result.ambients, least=0, system=system)
    rows = []
    for ambient, value in zip(result.ambients, result.line):
        shown = (f'<td class="none">none of the values planned: do not start</td>' if value is None
                 else f"<td><b>{html.escape(format_quantity(value, result.quantity, system, decimals))}</b></td>")
        rows.append(f"<tr><td>{html.escape(format_quantity(ambient, 'temperature', system, ambient_decimals))}</td>{shown}</tr>")
    return "".join(rows)


def _grid(result: Envelope, system: str) -> str:
    decimals = lever_decimals(result.quantity, result.values, system=system)
    ambient_decimals = lever_decimals("temperature", result.ambients, least=0, system=system)
    head = "".join(f"<th>{html.escape(format_quantity(v, result.quantity, system, decimals))}</th>" for v in result.values)
    rows = []
    for ambient, row in zip(result.ambients, result.cells):
        cells = "".join(
            f'<td class="{_cell_class(c)}">'
            f'{html.escape(format_quantity(c["total_time_s"], "time", system, 1) if c["total_time_s"] is not None else "—")}'
            f'<br>{html.escape(SEVERITY_MARKS.get(c["worst_severity"], c["worst_severity"]))}</td>' for c in row)
        rows.append(f"<tr><th>{html.escape(format_quantity(ambient, 'temperature', system, ambient_decimals))}</th>{cells}</tr>")
    return f'<table class="grid"><tr><th>ambient</th>{head}</tr>{"".join(rows)}</table>'


def envelope_card_section(result: Envelope, system: str = "SI", generated_at: _dt.datetime | None = None) -> str:
    """The card as one ``<section class="envelope-card">`` (styled by CARD_CSS; a page of its own in print),
    for a page of its own or the end of the plan report."""
    when = (generated_at or _dt.datetime.now()).strftime("%Y-%m-%d %H:%M")
    lever = LEVER_WORDS.get(result.lever, result.lever)
    window = format_quantity(result.window_s, "time", system, 1)
    title = f"Operating envelope — {result.scenario}"
    units = ", ".join(dict.fromkeys(unit_label(kind, system) for kind in ("temperature", result.quantity, "time")))
    return f"""<section class="envelope-card">
<h1>{html.escape(title)}</h1>
<p class="meta">Lowest {html.escape(lever)} that finishes the transfer within its planned window ({html.escape(window)})
with no stop-level finding, by ambient temperature. Viscous Transfer Planner · generated {html.escape(when)} ·
<code>python -m planner envelope</code> · units {html.escape(units)}</p>
<table class="line"><tr><th>ambient</th><th>lowest {html.escape(lever)}</th></tr>{_line_rows(result, system)}</table>
<p class="meta">Every plan of the grid: total time and worst finding (ok, caut = caution, warn = warning, STOP).
Green: within the window, no stop. Amber: past the window. Red: a stop-level finding.</p>
{_grid(result, system)}
<div class="caution"><b>Caution.</b> {html.escape(STANDING_CAUTION)} Between the ambients listed, use the
colder one's value.</div>
</section>"""


def envelope_card_html(result: Envelope, system: str = "SI", generated_at: _dt.datetime | None = None) -> str:
    """One printable page: the envelope line in large print, the grid below, the caution at the foot."""
    title = f"Operating envelope — {result.scenario}"
    return (f"<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>{html.escape(title)}</title>"
            f"<style>{PAGE_CSS}{CARD_CSS}</style></head><body>{envelope_card_section(result, system, generated_at)}"
            "</body></html>")
