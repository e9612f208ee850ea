"""The key figures kept with a saved revision: one definition for ``python -m planner plans save`` and the
dashboard's save (SI, the keys of a revision's stored ``results``).

They are the plan's key figures (``reports/key_figures.key_figures``: a figure whose step cannot be carried
out, or that a method beyond its range made, is stored as None, never as a partial total), the rating at the
pump outlet, the planned window, the outcome at the start and the finding counts by severity.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from planner.checks.finding import MOST_SEVERE_FIRST
from planner.correlations.constants import J_PER_KWH
from planner.reports.key_figures import key_figures, outlet_rating

if TYPE_CHECKING:                     # the record only: reading saved figures loads none of the transfer's models
    from planner.transfer.plan import Plan

# stored key -> (label, display kind); the order of the tables that show a saved revision's figures
SAVED_FIGURES = (
    ("transfer_time_s", "Transfer time", "time"),
    ("total_time_s", "Start-up + transfer", "time"),
    ("planned_window_s", "Planned window", "time"),
    ("start_status", "Outcome at the start", None),
    ("start_flow_m3_s", "Starting flow", "volume_flow"),
    ("peak_discharge_pressure_pa", "Peak discharge pressure", "pressure"),
    ("outlet_rating_pa", "Rating at the pump outlet", "pressure"),
    ("npsh_margin_m", "NPSH margin", "head"),
    ("electrical_energy_kwh", "Electrical energy", "energy_kwh"),
    ("steam_kg", "Steam", "mass"),
    ("total_cost", "Total cost", "money"),
    ("findings_stop", "Findings: stop", "count"),
    ("findings_warning", "Findings: warning", "count"),
    ("findings_caution", "Findings: caution", "count"),
    ("findings_info", "Findings: info", "count"),
    ("plan_error", "No plan", None),
)

# stored key <- key figure (``KeyFigure.key``)
_FROM_KEY_FIGURES = {"transfer_time_s": "transfer_time", "total_time_s": "total_time", "start_flow_m3_s": "start_flow",
                     "peak_discharge_pressure_pa": "peak_pressure", "npsh_margin_m": "npsh_margin",
                     "steam_kg": "steam", "total_cost": "total_cost"}


def saved_figures(plan: Plan, findings: list | None) -> dict:
    """The figures stored with a revision of ``plan`` (SI; energy in kWh); ``findings`` from
    ``checks.findings.assess(plan)``, None when they could not be assessed (counts stored as None)."""
    figures = {k.key: k for k in key_figures(plan)}
    out: dict = {stored: figures[key].value for stored, key in _FROM_KEY_FIGURES.items()}
    energy = figures["electrical_energy"].value
    out.update({
        "planned_window_s": plan.scenario.schedule.planned_window,
        "start_status": plan.start.status,
        "outlet_rating_pa": outlet_rating(plan).value,
        "electrical_energy_kwh": None if energy is None else energy / J_PER_KWH,
        "currency": plan.costs.currency,
    })
    for severity in MOST_SEVERE_FIRST:
        out[f"findings_{severity}"] = (None if findings is None
                                       else sum(1 for f in findings if f.severity == severity))
    return out


def no_plan(reason: str) -> dict:
    """What a revision stores when its scenario gives no plan."""
    return {"plan_error": str(reason)}
