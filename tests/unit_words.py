"""Unit words of each system, to check that output in one system never shows the other's units.

SI display units (planner.scenario.units.UNIT_SYSTEMS["SI"]) and US customary ones (["US"]); a
number followed by "m" or "K" counts as SI (metres, kelvin), "ft" as US.  Hours, kWh, rpm, percent and
cSt (kinematic viscosity, = mm²/s) are shown the same in both systems.
"""

from __future__ import annotations

import re

SI_WORDS = re.compile(r"°C|\bbar\b|m³|\bkW\b|\bmm\b|\d m\b|\d K\b|\bkg\b|mPa·s|mm²/s|m/s\b|W/\(m²|\bkJ\b|W/m\b")
US_WORDS = re.compile(r"°F|\bpsi\b|\bgpm\b|\bbbl\b|\d ft\b|\bhp\b|\blb\b|\bcP\b|BTU|ft/s|W/ft")


def assert_speaks(text: str, system: str) -> None:
    """``text`` shows no unit word of the other system."""
    other = SI_WORDS if system == "US" else US_WORDS
    wrong = other.findall(text)
    assert not wrong, f"{system} text shows {wrong}: {text[:400]}"


def rendered_plan_texts(plan, findings, system: str) -> list[str]:
    """Every sentence a user reads about a plan, rendered in ``system``: the CLI text and each finding."""
    from planner.reports.findings_text import finding_details, headline
    from planner.reports.plan_json import plan_text
    from planner.scenario.wording import render

    texts = [plan_text(plan, system, findings), headline(findings, system)]
    for f in findings:
        texts.append(render(f.message, system))
        texts += finding_details(f, system)
    return texts
