"""The plan's key figures, defined once (SI): what the dashboard's strip, the HTML report, the saved
results and ``plan --json`` (``key_figures``) show.

A figure whose step cannot be carried out (start-up or transfer impossible) has no value and says
why (``possible`` False, ``why``), never a partial total.
"""

from __future__ import annotations

from dataclasses import dataclass

from planner.scenario.wording import Q, Sentence
from planner.transfer.plan import Plan
from planner.transfer.system import OUTCOME_WORDS


@dataclass(frozen=True)
class KeyFigure:
    key: str
    label: str
    value: float | None          # SI (s, m3/s, Pa gauge, m, J, kg) or money in ``unit``
    quantity: str                # kind for the unit systems, or "money"
    note: str = ""               # a Sentence or plain words
    help: str = ""
    possible: bool = True
    why: str = ""                # when not possible: the reason in words (a Sentence or plain words)
    unit: str = ""               # money: the currency


@dataclass(frozen=True)
class OutletRating:
    """The rating where the discharge pressure acts: the first discharge segment at the pump outlet."""

    value: float | None
    where: str


def outlet_rating(plan: Plan) -> OutletRating:
    segments = plan.system.discharge_line.segments if plan.system is not None else []
    if not segments:
        return OutletRating(None, "")
    first = segments[0]
    profile = plan.start_profile
    temperature = float(profile.nodes["temperature"][0]) if profile is not None and profile.nodes else \
        plan.scenario.source.temperature
    value = first.rating_at(temperature)
    if value is None:
        return OutletRating(None, first.name)
    return OutletRating(value, f"{first.name}, {first.rating_source_at(temperature)}")


def _not_started_reason(plan: Plan) -> str:
    """Why the start-up (or the whole plan) cannot be carried out, or "" when it can."""
    if not plan.start.moving:
        return plan.start.message
    if plan.start_mode == "prewarm" and not plan.prewarm.possible:
        return Sentence("pre-warm: {m}", m=plan.prewarm.message)
    if plan.prewarm_stuck:
        return Sentence("pre-warm: {m}", m=plan.prewarm_stuck)
    if plan.start_mode == "push_cold" and not plan.push_cold.possible:
        return Sentence("push-cold start: {m}", m=plan.push_cold.message)
    if plan.startup_time_s is None:
        return "the start-up cannot be carried out"
    return ""


def _times(plan: Plan) -> list[KeyFigure]:
    t = plan.timeline
    window = plan.scenario.schedule.planned_window
    transfer_why = "" if t.completed else Sentence("transfer stops after {v}: {why}", v=Q(t.moved_m3, "volume"),
                                                 why=t.stop_reason)
    startup_why = _not_started_reason(plan)
    total_why = startup_why or transfer_why
    return [
        KeyFigure("transfer_time", "Transfer time", t.total_time_s if t.completed else None, "time",
                  help="pumping time from the first to the last increment (start-up not included)",
                  possible=t.completed, why=transfer_why),
        KeyFigure("total_time", "Start-up + transfer", None if total_why else plan.total_time_s, "time",
                  note=Sentence("window {w}", w=Q(window, "time")),
                  help="start-up (pre-warm or push-cold) plus transfer, against the planned window",
                  possible=not total_why, why=total_why),
    ]


def _pump(plan: Plan) -> list[KeyFigure]:
    op = plan.start
    flow = op.flow if op.status != "no_flow" else 0.0
    peak = plan.peak_discharge_pressure_pa
    rating = outlet_rating(plan)
    if rating.value is not None:
        share = f" ({100.0 * peak / rating.value:.0f} %)" if peak is not None else ""
        note = Sentence("rating {r}{share}", r=Q(rating.value, "pressure"), share=share)
    else:
        note = "no rating known at the pump outlet"
    margin = op.point.npsh_available - op.npsh_required if op.point is not None else None
    return [
        KeyFigure("start_flow", "Starting flow", flow, "volume_flow", note=OUTCOME_WORDS.get(op.status, op.status),
                  help="pump and line agree at this flow at the start"),
        KeyFigure("peak_pressure", "Peak discharge pressure", peak, "pressure", note=note,
                  help="highest gauge pressure at the pump discharge over the transfer and the push-out that "
                       "starts it, against the rating at the pump outlet"
                       + (f" ({rating.where})" if rating.value is not None and rating.where else "")),
        KeyFigure("npsh_margin", "NPSH margin", margin, "head",
                  note=Sentence("required {r}", r=Q(op.npsh_required, "head")) if op.npsh_required is not None else "",
                  help="NPSH available minus required at the start"),
    ]


def _energy_and_cost(plan: Plan) -> list[KeyFigure]:
    e, c = plan.energy, plan.costs
    why = "" if c.complete else (_not_started_reason(plan) or Sentence(
        "transfer stops: {why}", why=plan.timeline.stop_reason))
    return [
        KeyFigure("electrical_energy", "Electrical energy", e.electrical_j, "energy",
                  note="tracing + pump + vessel heating"),
        KeyFigure("steam", "Steam", e.steam_kg, "mass", note="tracing + vessel heating"),
        KeyFigure("total_cost", "Total cost", c.total if c.complete else None, "money",
                  note=Sentence("demurrage {d} {cur}", d=f"{c.demurrage:,.2f}", cur=c.currency) if c.complete else "",
                  help="energy at the tariffs plus demurrage", possible=c.complete, why=why, unit=c.currency),
    ]


def key_figures(plan: Plan) -> list[KeyFigure]:
    """The plan's key figures (SI), in the order the dashboard shows them."""
    return _times(plan) + _pump(plan) + _energy_and_cost(plan)
