"""Compare setpoints (or steam pressures, pump speeds, flow limits) and recommend one.

Each row is a full plan at one value of the lever: transfer time, energy, cost, peak pressure,
hottest jacket, findings by severity.  The recommendation is the row with the lowest total cost
(energy + pump + demurrage) among the rows with no stop-level finding, with the reason in words and
the runner-up.  Sensitivity: the same comparison with the ambient shifted and with the viscosity
scaled by plus or minus a percentage, to show how the choice moves.

Rows run on the caller's executor (``planner.sweeps.executors``), in chunks; without one, here, in order.
"""

from __future__ import annotations

import math
from concurrent.futures import Executor
from dataclasses import dataclass, field

from planner.errors import PlannerError, quoted
from planner.checks.findings import SEVERITY_RANK, assess, count_by_severity, worst_severity
from planner.transfer.changes import with_changes
from planner.transfer.plan import make_plan
from planner.plain import plain
from planner.checks.lever_values import LEVERS, check_values, lever_decimals
from planner.scenario.schema import Scenario
from planner.scenario.wording import Q, Sentence, format_quantity, money_text, render
from planner.sweeps.executors import fan_out


@dataclass
class Comparison:
    lever: str
    quantity: str             # kind of the lever's values (temperature, pressure, ...)
    values: list[float]       # SI
    rows: list[dict]
    recommended: int | None
    runner_up: int | None
    reason: str
    sensitivity: dict = field(default_factory=dict)
    tied: list[int] = field(default_factory=list)      # rows with no clear difference in cost (TIE_BAND)
    end_of_range: str | None = None                     # the note when the recommendation is at an end


MAX_RANGE_TEXT = 2000   # characters of a values text


def _numbers(parts: list[str]) -> list[float] | None:
    try:
        numbers = [float(p) for p in parts]
    except ValueError:
        return None
    return numbers if numbers and all(math.isfinite(v) for v in numbers) else None


def parse_range(text: str, max_values: int | None = None) -> list[float]:
    """'40:70:5' -> [40, 45, ..., 70]; '40,50,65' -> [40, 50, 65] (numbers as written: the caller converts
    them from its unit system to SI); at most ``max_values``
    (default: the work budget's ``comparison_values``) finite values either way."""
    from planner.scenario.budget import active_budget

    max_values = max_values or active_budget().comparison_values
    text = str(text).strip()
    usage = f"give START:STOP:STEP (e.g. 40:70:5) or a list 40,50,65, at most {max_values} finite values"
    if len(text) > MAX_RANGE_TEXT:
        raise ValueError(f"the values are {len(text):,} characters long: {usage}")
    if ":" in text:
        parts = _numbers(text.split(":"))
        if parts is None or len(parts) != 3 or parts[2] <= 0 or parts[1] < parts[0]:
            raise ValueError(f"cannot read the range {quoted(text)}: {usage}")
        start, stop, step = parts
        spans = (stop - start) / step      # may be inf for absurd ranges: compared before any floor()
        count = math.floor(spans + 1e-9) + 1 if spans <= max_values else math.inf
        if count > max_values:
            raise ValueError(f"{quoted(text)} makes {spans + 1:,.0f} values, more than the {max_values} allowed: "
                             "use a coarser step or a shorter range")
        return [round(start + i * step, 10) for i in range(count)]
    values = _numbers([p for p in text.split(",") if p.strip()])
    if values is None:
        raise ValueError(f"cannot read the values {quoted(text)}: {usage}")
    if len(values) > max_values:
        raise ValueError(f"{len(values):,} values given, more than the {max_values} allowed: give fewer values")
    return values


# a row's figures the centrifugal pump's curve makes (its flow and times, and every energy drawn over them)
PUMP_MADE = ("start_flow_m3_s", "transfer_time_s", "total_time_s", "tracing_kwh", "tracing_steam_kg", "pump_kwh",
             "energy_cost", "demurrage")


def plan_row(scenario: Scenario, lever: str, value: float, viscosity_factor: float, ambient_shift: float) -> dict:
    """One comparison row (runs in a worker process: the validated scenario in, plain data out; the
    scenario is pickled as it is, so a row never parses or validates it again; ``value`` SI)."""
    keyword, unit = LEVERS[lever].keyword, LEVERS[lever].si_unit
    row = {"value": value, "unit": unit, "ok": False}
    try:
        changed = with_changes(scenario, ambient_shift=ambient_shift, **{keyword: value})
        plan = make_plan(changed, viscosity_factor=viscosity_factor, both_startups=False)
        findings = assess(plan)
    except (PlannerError, ValueError) as exc:
        row.update(error=str(exc), has_stop=True, counts={"stop": 1}, findings=[], total_cost=math.inf)
        return row
    t = plan.timeline.arrays
    jackets = [plan.start_profile.summary.max_jacket_temperature_k] if plan.start_profile else []
    sheaths = [plan.start_profile.summary.max_sheath_temperature_k] if plan.start_profile else []
    if plan.suction_profile is not None:
        jackets.append(plan.suction_profile.summary.max_jacket_temperature_k)
        sheaths.append(plan.suction_profile.summary.max_sheath_temperature_k)
    peak = plan.peak_discharge_pressure_pa
    counts = count_by_severity(findings)
    energy = plan.energy.as_dict()
    row.update(
        ok=True, status=plan.start.status, start_flow_m3_s=plan.start.flow,
        transfer_time_s=plan.timeline.total_time_s, startup_time_s=plan.startup_time_s,
        total_time_s=plan.total_time_s, tracing_kwh=energy["tracing_kwh"],
        tracing_steam_kg=energy["tracing_steam_kg"], pump_kwh=energy["pump_kwh"],
        energy_cost=plan.costs.energy, demurrage=plan.costs.demurrage, total_cost=plan.costs.total,
        currency=plan.costs.currency, peak_pressure_pa=math.nan if peak is None else peak,
        hottest_jacket_k=max(jackets) if jackets else math.nan, hottest_sheath_k=max(sheaths) if sheaths else math.nan,
        counts=counts, has_stop=counts["stop"] > 0, worst_severity=worst_severity(findings),
        findings=[f.as_dict() for f in findings], stop_codes=[f.code for f in findings if f.severity == "stop"],
    )
    if not plan.timeline.completed:       # no transfer time for a transfer that stops (the plan's key figure)
        row["transfer_time_s"] = None
    if plan.pump_beyond_method is not None:
        # beyond ANSI/HI 9.6.7 the pump's curve makes no figure: as the plan withholds them (key_figures)
        row.update({name: None for name in PUMP_MADE})
    if plan.total_time_s is None or plan.pump_beyond_method is not None:
        row["total_cost"] = math.inf  # the plan cannot be carried out as it stands
    return row


def _row_task(task: tuple) -> dict:
    """``_row`` on one ``(scenario, lever, value, viscosity_factor, ambient_shift)`` (a chunk's item)."""
    return plan_row(*task)


def _run_rows(scenario: Scenario, lever: str, values: list[float], viscosity_factor: float, ambient_shift: float,
              progress, executor: Executor | None) -> list[dict]:
    tasks = [(scenario, lever, v, viscosity_factor, ambient_shift) for v in values]
    return fan_out(_row_task, tasks, executor, progress)


# Rows whose total cost is within TIE_BAND of the lowest show no clear difference.  Why 1 %: the plans
# themselves are held to 0.2 % (times, energies and costs against an eight-times finer grid,
# tests/test_plan_grid.py), and the inputs a cost is made of are known far less well (viscosity to tens of
# per cent, the sensitivity's default 20 %; demurrage and energy prices); a difference five times the
# figures' own numerical precision and far inside their input uncertainty is no reason to run hotter,
# harder or faster.  Among tied rows the gentlest setting is recommended: for every lever that is the
# lowest value (lower setpoint or steam pressure: less heat, cooler jackets, further from the product's
# maximum; lower pump speed or flow limit: lower pressures and velocities).
TIE_BAND = 0.01
TIE_FLOOR = 0.005         # [currency] costs are shown to 0.01: a band never narrower than their rounding


def tie_band(lowest_cost: float) -> float:
    """The width [currency] within which a row's total cost is no clear difference from ``lowest_cost``."""
    return max(TIE_BAND * abs(lowest_cost), TIE_FLOOR)


def recommend(rows: list[dict], quantity: str) -> tuple[int | None, int | None, str]:
    """The row with the lowest total cost among those with no stop-level finding (the gentlest, i.e. lowest
    value, of the rows within ``tie_band`` of it), the runner-up and the reason (a Sentence: values render
    in either unit system)."""
    allowed = [i for i, r in enumerate(rows) if r.get("ok") and not r["has_stop"] and math.isfinite(r["total_cost"])]
    if not allowed:
        codes = sorted({c for r in rows for c in r.get("stop_codes", [])} | {"ERROR" for r in rows if not r.get("ok")})
        return None, None, ("no value can be recommended: every row has a stop-level finding "
                            f"({', '.join(codes) or 'plan cannot be completed'})")
    ranked = sorted(allowed, key=lambda i: (rows[i]["total_cost"], rows[i]["total_time_s"] or math.inf))
    tied = tied_rows(rows, allowed)
    best = min(tied, key=lambda i: rows[i]["value"])
    others = [i for i in ranked if i != best]
    runner = others[0] if others else None
    r = rows[best]
    excluded = len(rows) - len(allowed)
    decimals = lever_decimals(quantity, [row["value"] for row in rows])
    choice = Sentence("{v}: lowest total cost {cost}", v=Q(r["value"], quantity, decimals),
                      cost=money_text(r["total_cost"], r["currency"]))
    if len(tied) > 1:
        cheapest = rows[ranked[0]]
        choice = Sentence("{v}: no clear difference in total cost among {k} values ({low} to {high} {cur}, within "
                          "{band} % of the lowest): the gentlest, {v}, is recommended at {cost}",
                          v=Q(r["value"], quantity, decimals), k=len(tied), low=money_text(cheapest["total_cost"]),
                          high=money_text(max(rows[i]["total_cost"] for i in tied)), cur=r["currency"],
                          band=f"{TIE_BAND * 100:g}", cost=money_text(r["total_cost"], r["currency"]))
    reason = Sentence("{choice} (energy {energy} + demurrage {dem}, {t}) among {n} of "
                      "{total} values with no stop-level finding{excluded}{runner}", choice=choice,
                      energy=money_text(r["energy_cost"]), dem=money_text(r["demurrage"]),
                      t=Q(r["total_time_s"], "time"), n=len(allowed), total=len(rows),
                      excluded=f"; {excluded} value(s) excluded for stop-level findings" if excluded else "",
                      runner="" if runner is None else Sentence(
                          "; runner-up {v} at {cost}", v=Q(rows[runner]["value"], quantity, decimals),
                          cost=money_text(rows[runner]["total_cost"], rows[runner]["currency"])))
    return best, runner, reason


def tied_rows(rows: list[dict], allowed: list[int] | None = None) -> list[int]:
    """Indices of the allowed rows whose total cost is within ``tie_band`` of the lowest (in value order)."""
    if allowed is None:
        allowed = [i for i, r in enumerate(rows) if r.get("ok") and not r["has_stop"] and math.isfinite(r["total_cost"])]
    if not allowed:
        return []
    lowest = min(rows[i]["total_cost"] for i in allowed)
    return sorted((i for i in allowed if rows[i]["total_cost"] - lowest <= tie_band(lowest)), key=lambda i: rows[i]["value"])


def end_of_range_note(values: list[float], best: int | None, quantity: str, tied: bool = False,
                      extendable=lambda value: True) -> Sentence | None:
    """A note when the recommended value is the lowest or highest of the values given: the best may lie
    beyond the range, so the user should extend it.  None inside the range, for a single value, or when
    ``extendable(value one step beyond)`` says the lever's field takes nothing beyond."""
    if best is None or len(values) < 2:
        return None
    ordered = sorted(values)
    value = values[best]
    if value == ordered[-1]:
        end, way, beyond = "highest", "above", 2 * ordered[-1] - ordered[-2]
    elif value == ordered[0]:
        end, way, beyond = "lowest", "below", 2 * ordered[0] - ordered[1]
    else:
        return None
    if not extendable(beyond):
        return None
    better = "do as well" if tied else "be better still"
    return Sentence("{v} is at the end of the range you gave (its {end} value): a value {way} it may {better}; extend "
                    "the range {way} {v} to see", v=Q(value, quantity, lever_decimals(quantity, values)), end=end, way=way,
                    better=better)


def _extendable(scenario: Scenario, lever: str):
    """Whether the lever's field takes a value (SI) at all: the range can be extended to it."""

    def takes(value: float) -> bool:
        try:
            check_values(scenario, lever, [value])
        except PlannerError:
            return False
        return True

    return takes


def check_lever(scenario: Scenario, lever: str) -> None:
    """Refuse a lever the scenario does not have (ValueError naming the field and what to do instead)."""
    if lever not in LEVERS:
        raise ValueError(f"unknown lever {lever!r}; levers are {', '.join(LEVERS)}")
    if lever == "setpoint" and scenario.tracing.kind in ("none",):
        raise ValueError("tracing.kind is 'none': the scenario has no tracing, so there is no setpoint to compare; "
                         "compare pump speeds or flow limits, or give the scenario tracing (tracing.kind "
                         "'electric_constant', 'electric_self_regulating' or 'steam')")
    if lever == "steam_pressure" and scenario.tracing.kind != "steam":
        raise ValueError(f"tracing.kind is {scenario.tracing.kind!r}: steam pressures are compared only on steam "
                         "tracing (tracing.kind 'steam'); compare setpoints instead")


def compare(scenario: Scenario, lever: str = "setpoint", values: list[float] | None = None, progress=None,
            executor: Executor | None = None, sensitivity: bool = False, ambient_shift: float = 10.0,
            viscosity_uncertainty: float = 0.2) -> Comparison:
    """Rows for each of ``values`` (SI: K, Pa gauge, rev/s, m3/s) of ``lever``, run on ``executor`` (any
    ``concurrent.futures.Executor``, owned by the caller; None: in this process)."""
    check_lever(scenario, lever)
    if not values:
        from planner.scenario.budget import active_budget

        raise ValueError(f"values: give at least one value to compare (at most {active_budget().comparison_values})")
    _check_work(scenario, lever, values, sensitivity, ambient_shift, viscosity_uncertainty)
    quantity = LEVERS[lever].kind
    cases = [(1.0, 0.0, "as given")]
    if sensitivity:
        shifted = lambda sign: Sentence("ambient {s}{d}", s=sign, d=Q(abs(ambient_shift), "temperature_difference"))  # noqa: E731
        cases += [(1.0, -ambient_shift, shifted("-")), (1.0, ambient_shift, shifted("+")),
                  (1.0 - viscosity_uncertainty, 0.0, f"viscosity {-viscosity_uncertainty * 100:+g} %"),
                  (1.0 + viscosity_uncertainty, 0.0, f"viscosity {viscosity_uncertainty * 100:+g} %")]
    total = len(values) * len(cases)
    offset = [0]

    def step_progress(done, _n):
        if progress:
            progress(offset[0] + done, total)

    results = {}
    for factor, shift, label in cases:
        rows = _run_rows(scenario, lever, values, factor, shift, step_progress, executor)
        offset[0] += len(values)
        results[label] = (rows, *recommend(rows, quantity))
    rows, best, runner, reason = results["as given"]
    tied = tied_rows(rows) if best is not None else []
    tied = tied if len(tied) > 1 else []
    comparison = Comparison(lever, quantity, list(values), rows, best, runner, reason, tied=tied,
                            end_of_range=end_of_range_note(list(values), best, quantity, bool(tied),
                                                           _extendable(scenario, lever)))
    for label, (r, b, _, why) in results.items():
        if label != "as given":
            comparison.sensitivity[label] = {"recommended_value": None if b is None else r[b]["value"], "reason": why,
                                             "total_costs": [x["total_cost"] for x in r]}
    return comparison


def _check_work(scenario: Scenario, lever: str, values, sensitivity: bool, ambient_shift: float,
                viscosity_uncertainty: float) -> None:
    """Refuse before computing: values the lever's field refuses or given twice, bad sensitivity options, or
    work past the budget."""
    from planner.scenario.budget import BudgetError, comparison_problems, sensitivity_problems

    if not all(isinstance(v, (int, float)) and math.isfinite(v) for v in values):
        raise BudgetError([("values", "every value to compare must be a finite number")])
    problems = sensitivity_problems(ambient_shift, viscosity_uncertainty) if sensitivity else []
    problems += comparison_problems(scenario, len(values), 5 if sensitivity else 1)
    if problems:
        raise BudgetError(problems)
    check_values(scenario, lever, values)      # each value as its field takes it, none twice


def comparison_json(comparison: Comparison) -> dict:
    """The comparison as JSON: lever values and every figure in SI, each row's findings."""
    return plain({
        "lever": comparison.lever, "quantity": comparison.quantity, "unit": LEVERS[comparison.lever].si_unit,
        "values": comparison.values, "rows": comparison.rows,
        "recommended_index": comparison.recommended, "recommended_value":
            None if comparison.recommended is None else comparison.rows[comparison.recommended]["value"],
        "runner_up_index": comparison.runner_up, "reason": comparison.reason,
        "no_clear_difference": bool(comparison.tied), "tied_indices": comparison.tied,
        "tie_band": {"relative": TIE_BAND, "at_least": TIE_FLOOR}, "end_of_range": comparison.end_of_range,
        "sensitivity": comparison.sensitivity,
    })


def _row_line(mark: str, r: dict, quantity: str, system: str, decimals: int) -> str:
    cell = lambda v, kind, d: format_quantity(v, kind, system, d).rsplit(" ", 1)[0]  # noqa: E731
    k = r["counts"]
    figure = lambda v, kind, d: "—" if v is None else cell(v, kind, d)  # noqa: E731
    money = lambda v: "—" if v is None or not math.isfinite(v) else f"{v:.1f}"  # noqa: E731
    return (f"{mark} {cell(r['value'], quantity, decimals):>8}   "
            f"{figure(r['start_flow_m3_s'], 'volume_flow', 1):>9}   {figure(r['transfer_time_s'], 'time', 2):>10}   "
            f"{figure(r['total_time_s'], 'time', 2):>7}   {money(r['energy_cost']):>6}   {money(r['demurrage']):>9}   "
            f"{money(r['total_cost']):>6}   "
            f"{cell(r['peak_pressure_pa'], 'pressure', 2):>8}   {cell(r['hottest_jacket_k'], 'temperature', 1):>9}   "
            f"{k['stop']}/{k['warning']}/{k['caution']}")


def comparison_table(comparison: Comparison, system: str = "SI") -> str:
    """The comparison as a text table in ``system``, with each row's warnings and stops."""
    from planner.scenario.units import unit_label

    c = comparison
    u = lambda kind: unit_label(kind, system)  # noqa: E731
    lines = [f"  {c.lever} [{u(c.quantity)}]   flow {u('volume_flow')}   transfer h   total h   energy   demurrage"
             f"    total   peak {u('pressure')}   jacket {u('temperature')}   stop/warn/caut"]
    decimals = lever_decimals(c.quantity, [r["value"] for r in c.rows], system=system)
    for i, r in enumerate(c.rows):
        mark = " *" if i == c.recommended else ("  " if i != c.runner_up else " 2")
        if not r.get("ok"):
            lines.append(f"{mark} {format_quantity(r['value'], c.quantity, system, decimals)}   error: "
                         f"{render(r.get('error', ''), system)}")
            continue
        lines.append(_row_line(mark, r, c.quantity, system, decimals))
        severe = [f for f in r["findings"] if SEVERITY_RANK[f["severity"]] >= SEVERITY_RANK["warning"]]
        for f in severe:
            lines.append(f"             {f['severity']:7s} {f['code']}: {render(f['message'], system)}")
    lines.append("")
    lines.append(f"  recommendation: {render(c.reason, system)}")
    if c.end_of_range:
        lines.append(f"  note: {render(c.end_of_range, system)}")
    for label, s in c.sensitivity.items():
        value = "none" if s["recommended_value"] is None else format_quantity(s["recommended_value"], c.quantity, system,
                                                                               decimals)
        lines.append(f"  with {render(label, system)}: {value}")
    return "\n".join(lines)
