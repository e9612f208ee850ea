"""The plan as one self-contained HTML file: inputs, results, charts, findings and cautions.

Plotly's JavaScript is inlined once in the page head, so the file opens offline (about 5 MB).
No Streamlit here: ``build_report_html(scenario, results, system)`` works from a script too::

    from planner.scenario.schema import load_scenario
    from dashboard.compute.results import plan_results
    from dashboard.present.report import build_report_html
    s = load_scenario("demo_scenarios/syrup_railcar_unload.toml")
    open("plan.html", "w").write(build_report_html(s, plan_results(s), "SI"))
"""

from __future__ import annotations

import datetime as _dt
import html

import pandas as pd
from plotly.offline import get_plotlyjs

from planner.checks.finding import MOST_SEVERE_FIRST
from planner.reports.findings_text import headline
from planner.reports.key_figures import figure_text
from planner.scenario.schema import Scenario, scenario_to_toml
from planner.scenario.wording import render

from dashboard.compute.record import PlanResults

from . import figures, tables
from .pump_figure import pump_figure
from .suction_figure import suction_figure
from .display import SYSTEM_NAMES, caution_text, fmt, words

CSS = """
body { font-family: -apple-system, Segoe UI, Roboto, Helvetica, Arial, sans-serif; margin: 2rem auto; max-width: 1200px;
       color: #1b2631; line-height: 1.4; padding: 0 1rem; }
h1 { margin-bottom: 0.2rem; } h2 { border-bottom: 2px solid #d5d8dc; padding-bottom: 0.2rem; margin-top: 2rem; }
.caution { background: #fdf2e9; border-left: 6px solid #e67e22; padding: 0.8rem 1rem; margin: 1rem 0; }
.meta { color: #566573; font-size: 0.9rem; }
table { border-collapse: collapse; margin: 0.5rem 0 1rem 0; font-size: 0.9rem; }
th, td { border: 1px solid #d5d8dc; padding: 0.25rem 0.6rem; text-align: left; vertical-align: top; }
th { background: #f4f6f7; }
.figures { display: grid; grid-template-columns: repeat(4, minmax(0, 1fr)); gap: 0.6rem; }
.figure { border: 1px solid #d5d8dc; border-radius: 6px; padding: 0.5rem 0.7rem; }
.figure .label { color: #566573; font-size: 0.85rem; } .figure .value { font-size: 1.4rem; font-weight: 600; }
.figure .note { color: #566573; font-size: 0.8rem; }
.finding { border-left: 6px solid #aab7b8; padding: 0.4rem 0.8rem; margin: 0.4rem 0; background: #fbfcfc; }
.finding.stop { border-color: #c0392b; background: #fdedec; } .finding.warning { border-color: #e67e22; background: #fef5e7; }
.finding.caution { border-color: #f1c40f; } .finding.info { border-color: #5dade2; }
.headline { padding: 0.6rem 1rem; border-left: 6px solid #27ae60; background: #eafaf1; }
.headline.stop { border-color: #c0392b; background: #fdedec; } .headline.warning { border-color: #e67e22; background: #fef5e7; }
.headline.caution { border-color: #f1c40f; background: #fefbea; }
pre { background: #f4f6f7; padding: 0.8rem; overflow-x: auto; font-size: 0.8rem; }
"""


def _table(frame: pd.DataFrame) -> str:
    """A results table at the decimals the frame keeps for each column (``tables.with_decimals``), else 3."""
    decimals = frame.attrs.get("decimals", {})
    formatters = {column: (lambda v, d=digits: f"{v:,.{d}f}") for column, digits in decimals.items()}
    return frame.to_html(index=False, na_rep="—", float_format=lambda v: f"{v:,.3f}", formatters=formatters, border=0,
                         escape=True)


def _inputs_frame(s: Scenario, system: str) -> pd.DataFrame:
    t, p, src, dst = s.tracing, s.pump, s.source, s.destination
    rows = [
        ("Product", s.product.name + (" — illustrative preset" if s.product.illustrative
                                      and "illustrative" not in s.product.name.lower() else "")),
        ("Product no-flow / highest temperature", f"{fmt(s.product.no_flow_temperature, 'temperature', system)} / "
                                                  f"{fmt(s.product.max_temperature, 'temperature', system)}"),
        ("Viscosity law", f"{s.product.viscosity.law}, {len(s.product.viscosity.points)} lab points"),
        ("Ambient / wind", f"{fmt(s.site.ambient_temperature, 'temperature', system)} / {fmt(s.site.wind_speed, 'speed', system)}"),
        ("Design ambient", fmt(s.site.design_ambient_temperature, "temperature", system)),
        ("Tracing", t.kind.replace("_", " ")),
        ("Setpoint", fmt(t.setpoint, "temperature", system)),
        ("Heater output", fmt(t.output, "linear_power", system) if t.kind.startswith("electric") else "—"),
        ("Steam pressure (gauge)", fmt(t.steam_pressure, "pressure", system) if t.kind == "steam" else "—"),
    ]
    if p is not None:
        rows += [("Pump", f"{p.name} ({p.kind.replace('_', ' ')}), {p.speed * 60:.0f} rpm"),
                 ("Motor power", fmt(p.motor_power, "power", system)),
                 ("Relief setting", fmt(p.relief_setting, "pressure", system))]
    if src is not None:
        rows += [("Source", f"{src.name} ({src.kind})"),
                 ("Volume to move / in the source", f"{fmt(src.volume_to_move, 'volume', system)} / "
                                                    f"{fmt(src.initial_volume, 'volume', system)}"),
                 ("Source temperature", fmt(src.temperature, "temperature", system)),
                 ("Source heating", fmt(src.heating_power, "power", system))]
    if dst is not None:
        rows += [("Destination", dst.name),
                 ("Destination level at start / highest", f"{fmt(dst.initial_level, 'length', system)} / "
                                                          f"{fmt(dst.max_level, 'length', system)}")]
    c, sch = s.costs, s.schedule
    rows += [("Tariffs", f"electricity {c.electricity_per_kwh:g} {c.currency}/kWh, steam {c.steam_per_tonne:g} "
                         f"{c.currency}/t, demurrage {c.demurrage_per_hour:g} {c.currency}/h"),
             ("Planned window", fmt(sch.planned_window, "time", system)),
             ("Start-up", sch.start_mode.replace("_", " ")),
             ("Line contents at the start", fmt(sch.line_start_temperature, "temperature", system)),
             ("Stop checked", fmt(sch.stop_duration, "time", system))]
    return pd.DataFrame(rows, columns=["Input", "Value"])


def _findings_html(results: PlanResults, system: str) -> str:
    findings = results.findings
    if findings is None:
        return f"<p>{html.escape(results.findings_note or 'Findings are not available.')}</p>"
    parts = []
    for severity in MOST_SEVERE_FIRST:
        for f in (x for x in findings if x.get("severity") == severity):
            lines = [f"<b>{html.escape(severity.upper())}: {html.escape(f.get('title', ''))}</b> — "
                     f"{html.escape(render(f.get('message', ''), system))}"]
            lines += [html.escape(line) for line in tables.finding_details(f, system)]
            lines.append(f"<code>{html.escape(f.get('code', ''))}</code>")
            parts.append(f'<div class="finding {html.escape(severity)}">' + "<br>".join(lines) + "</div>")
    return "\n".join(parts) or "<p>No findings.</p>"


def _figure_html(fig) -> str:
    return fig.to_html(full_html=False, include_plotlyjs=False, config={"displaylogo": False})


def _envelope_card(envelope: dict | None, system: str) -> tuple[str, str]:
    """The printable envelope card (its own page at the end) and its style, when an envelope was worked out."""
    if not envelope or "error" in envelope:
        return "", ""
    from planner.reports.envelope_card import CARD_CSS, envelope_card_section
    from planner.sweeps.envelope import envelope_from_json

    return envelope_card_section(envelope_from_json(envelope), system), CARD_CSS


def _odds_section(odds: tuple[dict, str] | None, scenario: Scenario, system: str) -> str:
    if not odds:
        return ""
    from .odds_tables import report_section, restored

    summary, where = odds
    return report_section(restored(summary, scenario.costs.currency), system, where)


def build_report_html(scenario: Scenario, results: PlanResults, system: str = "SI", generated_at: _dt.datetime | None = None,
                      envelope: dict | None = None, odds: tuple[dict, str] | None = None) -> str:
    """The whole report as one HTML string (display units of ``system``); with ``envelope`` (the JSON of
    ``planner.sweeps.envelope`` for this scenario) its printable card as the last page; with ``odds`` (the
    summary of ``planner.sweeps.uncertainty`` for this scenario, or the one a saved revision keeps, and where
    it comes from in words) the range after the key figures."""
    when = (generated_at or _dt.datetime.now()).strftime("%Y-%m-%d %H:%M")
    plan = results.plan
    start = plan["start"]
    caution = f'<div class="caution"><b>Caution.</b> {html.escape(caution_text(system, results.touch_limit_k))}</div>'
    figs = "".join(
        f'<div class="figure"><div class="label">{html.escape(k.label)}</div>'
        f'<div class="value">{html.escape(figure_text(k, system))}</div>'
        f'<div class="note">{html.escape(render(k.note, system))}</div></div>'
        for k in results.key_figures)
    charts = []
    if results.profile is not None:
        charts.append(_figure_html(figures.line_figure(results.profile, results.segments, system,
                                                       touch_limit_k=results.touch_limit_k)))
    if results.suction_profiles:
        charts.append(_figure_html(suction_figure(results.suction_profiles, results.suction_segments, system,
                                                  no_flow_k=results.product.get("no_flow_temperature"))))
    if results.pump_chart is not None and "error" not in results.pump_chart:
        charts.append(_figure_html(pump_figure(results.pump_chart, system)))
    charts.append(_figure_html(figures.timeline_figure(plan, system, results.destination_max_level)))
    rows = results.push_cold_rows or {}
    if rows.get("time_s"):
        charts.append(_figure_html(figures.push_cold_figure(rows, system)))
    charts.append(_figure_html(figures.viscosity_figure(results.product, system)))
    timeline_note = "" if plan["timeline"].get("completed") else (
        f"<p><b>The transfer stops:</b> {html.escape(render(plan['timeline'].get('stop_reason') or '', system))}</p>")
    push_table = _table(tables.push_cold_frame(rows, system)) if rows.get("time_s") else "<p>—</p>"
    body = f"""
<h1>Transfer plan — {html.escape(scenario.name)}</h1>
<p class="meta">Viscous Transfer Planner · generated {html.escape(when)} · units: {html.escape(SYSTEM_NAMES.get(system, system))}
 · the numbers equal <code>python -m planner plan SCENARIO --json</code> for the scenario in the appendix</p>
{caution}
<p class="headline {html.escape(plan.get('worst_severity', 'info'))}"><b>{html.escape(headline(results.findings or [], system))}</b></p>
<p>At the start: <b>{html.escape(words(start.get('status', '')))}</b> — {html.escape(render(start.get('message', ''), system))}</p>
{timeline_note}
<h2>Key figures</h2>
<div class="figures">{figs}</div>
{_odds_section(odds, scenario, system)}
<h2>Findings</h2>
{_findings_html(results, system)}
<h2>Inputs</h2>
{_table(_inputs_frame(scenario, system))}
<h3>Discharge route</h3>
{_table(tables.segments_frame(results.segments, system))}
<h2>Results</h2>
<h3>Start-up and stops</h3>
{_table(tables.startup_hold_frame(plan, system))}
<h3>Energy and cost</h3>
{_table(tables.energy_cost_frame(plan, system))}
<h3>Push-cold start-up</h3>
{push_table}
<h2>Charts</h2>
{''.join(charts)}
<h2>Appendix: the scenario file (TOML, for <code>python -m planner plan</code>)</h2>
<pre>{html.escape(scenario_to_toml(scenario, system))}</pre>
{caution}
"""
    card, card_css = _envelope_card(envelope, system)
    return (f"<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            f"<title>Transfer plan — {html.escape(scenario.name)}</title><style>{CSS}{card_css}</style>"
            f"<script type=\"text/javascript\">{get_plotlyjs()}</script></head><body>{body}{card}</body></html>")
