"""Findings in words for the command line, the dashboard and the report, in either unit system.

``headline(findings, system)`` is the first line of every output: the worst severity in plain words,
and for a stop-level plan the word STOP and why.  ``findings_lines`` groups them by severity with
where, value, limit and what to do.
"""

from __future__ import annotations

from planner.checks.finding import LINES, MOST_SEVERE_FIRST, count_by_severity, worst_severity
from planner.scenario.wording import format_quantity, render
from planner.transfer.operating import OUTCOME_WORDS

HEADINGS = {"stop": "STOP", "warning": "WARNING", "caution": "CAUTION", "info": "INFORMATION"}


def _get(f, key):
    return f[key] if isinstance(f, dict) else getattr(f, key)


def _where(f) -> dict:
    return f["where"] if isinstance(f, dict) else f.where()


def headline(findings: list, system: str = "SI") -> str:
    """The plan's state in one line, following its worst finding."""
    worst = worst_severity(findings)
    counts = count_by_severity(findings)
    of = [f for f in findings if _get(f, "severity") == worst]
    if worst == "stop":
        first: dict[str, list] = {}
        for f in of:
            first.setdefault(_get(f, "code"), []).append(f)
        reasons = []
        for group in list(first.values())[:3]:
            times = f" (×{len(group)})" if len(group) > 1 else ""
            reasons.append(f"{_get(group[0], 'title')}{times}: {render(_get(group[0], 'message'), system)}")
        more = f"; and {len(first) - 3} more" if len(first) > 3 else ""
        return f"STOP: do not start as planned — {'; '.join(reasons)}{more}"
    if worst == "warning":
        titles = "; ".join(_get(f, "title") for f in of)
        return f"WARNING: the plan can run, but {counts['warning']} warning(s) need attention — {titles}"
    if worst == "caution":
        titles = "; ".join(_get(f, "title") for f in of)
        return f"CAUTION: no stop or warning; {counts['caution']} caution(s) to read — {titles}"
    return "OK: no stop, warning or caution findings"


def where_text(f, system: str = "SI") -> str:
    where = _where(f)
    parts = []
    if where.get("line"):
        line = where["line"]
        parts.append(f"{line} line" if line in LINES else str(line))
    if where.get("segment"):
        parts.append(str(where["segment"]))
    if where.get("at_m") is not None:
        parts.append(f"at {format_quantity(where['at_m'], 'length', system, 0)}")
    return ", ".join(parts)


def amount_text(value, quantity: str, system: str = "SI") -> str:
    """A finding's value or limit in the unit system ("" when there is none)."""
    if value is None:
        return ""
    if not quantity:
        return f"{value:.4g}"
    return format_quantity(float(value), quantity, system)


def finding_details(f, system: str = "SI") -> list[str]:
    """The lines under a finding's heading: where, value and limit, what to do."""
    lines = []
    where = where_text(f, system)
    if where:
        lines.append(f"Where: {where}")
    value = amount_text(_get(f, "value"), _get(f, "quantity"), system)
    limit = amount_text(_get(f, "limit"), _get(f, "quantity"), system)
    if value or limit:
        lines.append(f"Value: {value or '—'}" + (f"; limit: {limit}" if limit else ""))
    if _get(f, "action"):
        lines.append(f"What to do: {_get(f, 'action')}")
    return lines


def findings_lines(findings: list, system: str = "SI", indent: str = "  ") -> list[str]:
    """Every finding, grouped by severity (most severe first)."""
    lines = []
    for severity in MOST_SEVERE_FIRST:
        group = [f for f in findings if _get(f, "severity") == severity]
        if not group:
            continue
        lines.append(f"{indent}{HEADINGS[severity]} ({len(group)})")
        for f in group:
            lines.append(f"{indent}  {_get(f, 'code')}: {_get(f, 'title')} — {render(_get(f, 'message'), system)}")
            lines += [f"{indent}      {line}" for line in finding_details(f, system)]
    return lines


def findings_json(findings: list, system: str | None = None) -> list[dict]:
    """Findings as the JSON documents carry them (SI numbers)."""
    return [f if isinstance(f, dict) else f.as_dict(system) for f in findings]


def start_status(status: str, worst: str) -> str:
    """The start's status in words, agreeing with the plan's worst severity ``worst``: a plan with a
    stop-level finding never reads "ok" anywhere (the text's start line, the dashboard's status)."""
    return "STOP (see above)" if worst == "stop" else OUTCOME_WORDS.get(status, status)


def flag_words(flags) -> str:
    """The start's flags (``OperatingPoint.flags``) in words, comma-separated."""
    return ", ".join(OUTCOME_WORDS.get(flag, flag) for flag in flags)
