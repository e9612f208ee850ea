"""The plan's key figures, defined once (SI): what the dashboard's strip, the HTML report, the saved
results and ``plan --json`` (``key_figures``) show.

A figure whose step cannot be carried out (start-up or transfer impossible) has no value and says
why (``possible`` False, ``why``), never a partial total.  A figure made by a method beyond its range
(a centrifugal pump beyond ANSI/HI 9.6.7: ``pump_withheld``) has no value either (``withheld`` True):
the text, the JSON and the dashboard show the reason instead of a number.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import TYPE_CHECKING

from planner.scenario.wording import Q, Sentence, format_quantity, money_text, render
from planner.transfer.pump_hi import HI_B_MAX
from planner.transfer.operating import OUTCOME_WORDS

if TYPE_CHECKING:             # the record only: the figures' text (``figure_text``) loads none of the transfer's models
    from planner.transfer.plan import Plan


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
    withheld: bool = False       # made by a method beyond its range: not shown (``why`` says which)


# the key figures a centrifugal pump's curve makes (flow, times, pump energy and all that adds it up)
# (its times set every energy drawn over the transfer too)
PUMP_FIGURES = ("transfer_time", "total_time", "start_flow", "electrical_energy", "steam", "total_cost")


def pump_withheld(plan: Plan) -> str:
    """Why the figures the pump's curve makes are not shown ("" when they are): a running point beyond
    ANSI/HI 9.6.7.  One definition for the key figures, the text and the JSON."""
    op = plan.pump_beyond_method
    if op is None:
        return ""
    return Sentence("the centrifugal pump is not rated for this viscosity (ANSI/HI 9.6.7 B = {b}, above {limit}); "
                    "use the maker's viscous data or a PD pump", b=Q(op.hi_b, "dimensionless", 1),
                    limit=Q(HI_B_MAX, "dimensionless"))


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
    push = plan.chosen_push
    if push is not None and not push.hi_in_range:
        return Sentence("start-up: {m}", m=push.message)
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
                  note=Sentence("demurrage {d}", d=money_text(c.demurrage, c.currency)) if c.complete else "",
                  help="energy at the tariffs plus demurrage", possible=c.complete, why=why, unit=c.currency),
    ]


def key_figures(plan: Plan) -> list[KeyFigure]:
    """The plan's key figures (SI), in the order the dashboard shows them; those the pump's curve makes
    have no value when it runs beyond its method (``pump_withheld``)."""
    figures = _times(plan) + _pump(plan) + _energy_and_cost(plan)
    why = pump_withheld(plan)
    if not why:
        return figures
    return [dataclasses.replace(k, value=None, note="", possible=False, why=why, withheld=True)
            if k.key in PUMP_FIGURES else k for k in figures]


def figure_text(k: KeyFigure, system: str = "SI", reason: bool = True) -> str:
    """One key figure as every output shows it (text, HTML report, dashboard), in ``system``: the value with
    its unit, "not possible: <why>" when its step cannot be carried out, "not given: <why>" when a method
    beyond its range made it (``reason=False``: the two words only, the reason shown elsewhere)."""
    if k.withheld or not k.possible:
        words = "not given" if k.withheld else "not possible"
        return f"{words}: {render(k.why, system)}" if reason else words
    if k.value is None:
        return "—"
    if k.quantity == "money":
        return money_text(k.value, k.unit)
    return format_quantity(k.value, k.quantity, system)
