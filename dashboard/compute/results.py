"""Planner calls for the dashboard, run in the worker processes (no Streamlit here).

``plan_results(scenario)`` runs the plan once and keeps what the pages and the report draw
(``compute/record.PlanResults``): the
documented plan JSON (``planner.reports.plan_json.plan_json``, the same document as
``python -m planner plan SCENARIO --json``), the profile along the discharge line at the start,
the segment boundaries, the findings and the product's viscosity curve. Everything is SI.
"""

from __future__ import annotations

import math

import numpy as np

import inspect

from planner.checks.lever_values import LEVERS
from planner.scenario.labels import field_label
from planner.errors import PlannerError
from planner.plain import finite_or_none, plain as _plain
from planner.line.products import Product
from planner.scenario.schema import ProductSpec, Scenario, problems_from

from dashboard.compute.record import PlanResults
from dashboard.compute.kinematic import at_temperature, lab_kinematic, step_kinematic
from dashboard.compute.line_extras import prewarm_suction, pump_chart_data, suction_profiles

# The planner's models (the transfer, its checks, comparisons) are imported where a plan or a comparison is
# worked out: the server imports this module for the Inputs' product preview and the comparison's defaults,
# and a worker loads them before its first job (``load_planner``).


def load_planner() -> None:
    """Import what a plan and a comparison need (a worker calls it before its first job)."""
    import planner.checks.findings  # noqa: F401
    import planner.reports.plan_json  # noqa: F401
    import planner.sweeps.compare  # noqa: F401
    import planner.transfer.plan  # noqa: F401


def segment_table(segments) -> list[dict]:
    return [{
        "index": s.index, "name": s.name, "kind": s.kind, "x_start": s.x_start, "x_end": s.x_end,
        "length": s.length, "inside_diameter": s.inside_diameter, "traced": s.traced,
        "pressure_rating": s.pressure_rating, "flange_class": s.flange_class,
        "hazardous_area_class": s.hazardous_area_class, "location": s.location,
    } for s in segments]


def profile_arrays(plan) -> dict | None:
    """The steady march along the discharge line at the starting operating point.

    ``pressure`` is gauge: the march's pressures are relative to the route inlet, so the pump's
    discharge pressure at the start is added."""
    result = plan.start_profile
    if result is None or not result.nodes:
        return None
    discharge = plan.start.point.discharge_pressure if plan.start.point is not None else 0.0
    nodes = {k: np.asarray(v) for k, v in result.nodes.items()}
    steps = {k: np.asarray(v) for k, v in result.steps.items()}
    return {
        "nodes": {"x": nodes["x"], "temperature": nodes["temperature"], "pressure": nodes["pressure"] + discharge},
        "steps": steps,
        # (x [m], jacket [K]) where each thermal entrance starts: the jacket's highest value there
        "entrance_jackets": sorted(result.entrance_jackets.values()),
        "status": result.summary.status,
        "sets_at_m": result.summary.sets_at_m,
        "summary": _plain(result.summary.as_dict()),
    }


def findings_of(plan) -> tuple[list | None, list[dict] | None, str]:
    """``planner.checks.findings.assess(plan)``: the findings and their dicts (messages are Sentences that
    render in either unit system), or None with the reason."""
    from planner.checks.findings import assess

    try:
        found = assess(plan)
    except (PlannerError, ValueError) as exc:
        return None, None, f"findings could not be assessed: {exc}"
    return found, [_plain(f.as_dict()) for f in found], ""


def node_ratings(segments, nodes: dict | None) -> np.ndarray | None:
    """Pressure rating [Pa gauge] at each node of the start profile: ``LineSegment.rating_at`` (the lower
    of the segment's own rating and its ASME B16.5 flange rating at the product temperature there);
    NaN where neither is known."""
    if nodes is None:
        return None
    x, temps = nodes["x"], nodes["temperature"]
    out = np.full(len(x), np.nan)
    for i, (xi, ti) in enumerate(zip(x, temps)):
        limits = [r for seg in segments if seg.x_start - 1e-9 <= xi <= seg.x_end + 1e-9
                  for r in [seg.rating_at(float(ti))] if r is not None]
        if limits:
            out[i] = min(limits)
    return out


def _curve(viscosity, temps) -> list[float]:
    values = []
    for t in temps:
        try:
            values.append(viscosity(float(t)))
        except (ValueError, OverflowError, ZeroDivisionError):
            values.append(math.nan)
    return values


def product_curve(spec: ProductSpec, points: int = 121, product: Product | None = None) -> dict:
    """Viscosity (or consistency) against temperature for the product, with its lab points and the
    fitted range (``Product.fit``: law, t_min, t_max and residuals).  ``product``: the plan's own
    product object (built from ``spec`` only when there is no plan, e.g. the Inputs tab's preview); its
    calibrated ``viscosity_factor`` scales the curve, and the law as fitted is kept beside it."""
    product = product or Product(spec)
    fit = product.fit
    lab_t = [p.temperature for p in spec.viscosity.points]
    lab_mu = []
    for p in spec.viscosity.points:
        if p.viscosity is not None:
            lab_mu.append(p.viscosity)
        else:
            lab_mu.append(p.kinematic_viscosity * product.density(p.temperature))
    finite_range = [t for t in (fit.t_min, fit.t_max) if math.isfinite(t)]
    low = min([spec.no_flow_temperature] + finite_range) - 5.0
    high = max([spec.max_temperature] + finite_range) + 5.0
    temps = np.linspace(low, high, points)
    values = _curve(product.viscosity, temps)
    factor = product.viscosity_factor
    # the law as fitted to the lab points, when the plan's product carries a calibration factor
    as_fitted = _curve(Product(spec).viscosity, temps) if factor != 1.0 else None
    return {
        "name": spec.name, "law": fit.law, "parameters": dict(fit.parameters),
        "rms_log_residual": fit.rms_log_residual, "max_relative_residual": fit.max_relative_residual,
        "t_min": finite_or_none(fit.t_min),
        "t_max": finite_or_none(fit.t_max),
        "n_points": fit.n_points, "temperature": temps, "viscosity": np.asarray(values),
        "viscosity_factor": factor, "viscosity_as_fitted": None if as_fitted is None else np.asarray(as_fitted),
        "lab_temperature": lab_t, "lab_viscosity": lab_mu, "lab_kinematic": lab_kinematic(spec, product),
        "kinematic_viscosity": np.asarray(_curve(product.kinematic_viscosity, temps)),
        "no_flow_temperature": spec.no_flow_temperature, "max_temperature": spec.max_temperature,
        "newtonian": spec.rheology == "newtonian", "rheology": spec.rheology, "illustrative": spec.illustrative,
        "density_at_20c": product.density(293.15), "specific_heat_at_20c": product.specific_heat(293.15),
        "conductivity_at_20c": product.conductivity(293.15),
    }


def product_preview(product_data: dict) -> tuple[dict | None, list[tuple[str, str]]]:
    """Validate only the product section and draw its curve; problems carry ``product.`` paths."""
    try:
        spec = ProductSpec.model_validate(product_data)
    except Exception as exc:  # pydantic ValidationError
        if hasattr(exc, "errors"):
            return None, [(("product." + p) if p else "product", m) for p, m in problems_from(exc)]
        return None, [("product", str(exc))]
    try:
        return product_curve(spec), []
    except (PlannerError, ValueError) as exc:
        return None, [("product.viscosity", str(exc))]


def plan_results(scenario: Scenario) -> PlanResults:
    """Everything the pages show for one scenario (SI). Raises PlannerError/ValueError."""
    from planner.reports.key_figures import key_figures, outlet_rating
    from planner.reports.plan_json import plan_json
    from planner.reports.saved_figures import saved_figures
    from planner.transfer.plan import make_plan

    plan = make_plan(scenario)
    found, findings, findings_note = findings_of(plan)
    doc = plan_json(plan, findings=found) if found is not None else plan_json(plan, findings=[])
    transfer = plan.system
    discharge = transfer.discharge_line.segments
    suction = transfer.suction_line.segments if transfer.suction_line is not None else []
    profile = profile_arrays(plan)
    if profile is not None:
        profile["rating"] = node_ratings(discharge, profile["nodes"])
        profile["steps"]["kinematic_viscosity"] = step_kinematic(profile["nodes"], profile["steps"], transfer.product.density)
    rating = outlet_rating(plan)
    product = product_curve(scenario.product, product=transfer.product)
    product["at_pump_inlet"] = at_temperature(transfer.product, doc["start"].get("pump_inlet_temperature_k"))
    return PlanResults(
        scenario_name=scenario.name, plan=doc, key_figures=key_figures(plan), saved=saved_figures(plan, found),
        profile=profile, outlet_rating={"value": rating.value, "where": rating.where},
        touch_limit_k=scenario.limits.touch_temperature,
        segments=segment_table(discharge), suction_segments=segment_table(suction),
        push_cold_rows=_plain(plan.push_cold.rows or {}), findings=findings, findings_note=findings_note,
        product=product,
        destination_max_level=scenario.destination.max_level if scenario.destination else None,
        tracing_kind=scenario.tracing.kind, setpoint=scenario.tracing.setpoint,
        steam_pressure=scenario.tracing.steam_pressure,
        suction_profiles=suction_profiles(plan), prewarm_suction=prewarm_suction(plan), pump_chart=pump_chart_data(plan),
    )


# ---------------------------------------------------------------------------------------------
# Setpoint (or other lever) comparison

def lever_label(lever: str) -> str:
    """The words for a lever: its field's label (``scenario/labels``) of the one lever table
    (``checks/lever_values.LEVERS``)."""
    spec = LEVERS[lever]
    return field_label(f"{spec.section}.{spec.field}") or lever


def sensitivity_defaults() -> tuple[float, float]:
    """The comparison's own default shifts (``compare``'s ``ambient_shift`` [K], ``viscosity_uncertainty``)."""
    from planner.sweeps.compare import compare

    parameters = inspect.signature(compare).parameters
    return parameters["ambient_shift"].default, parameters["viscosity_uncertainty"].default


def run_comparison(scenario: Scenario, lever: str, values_si: list[float], progress=None,
                   sensitivity=False, executor=None) -> dict:
    """``planner.sweeps.compare.compare`` as plain data (lever values SI: K, Pa, rev/s, m3/s), its rows on
    ``executor`` (the dashboard worker's; None: in this process).  ``sensitivity``: False, True (the
    comparison's default shifts) or ``(ambient shift [K], viscosity fraction)``."""
    from planner.sweeps.compare import compare

    kind = LEVERS[lever].kind
    shift, fraction = sensitivity if isinstance(sensitivity, (list, tuple)) else sensitivity_defaults()
    comparison = compare(scenario, lever=lever, values=list(values_si), progress=progress, sensitivity=bool(sensitivity),
                         executor=executor, ambient_shift=float(shift), viscosity_uncertainty=float(fraction))
    rows = [_plain(dict(r)) for r in comparison.rows]
    cases = [{"case": name, "recommended_value": case.get("recommended_value"), "reason": case.get("reason", ""),
              "total_costs": _plain(case.get("total_costs", []))}
             for name, case in (comparison.sensitivity or {}).items()]
    return {
        "lever": lever, "lever_label": lever_label(lever), "kind": kind, "rows": rows,
        "recommended": comparison.recommended, "runner_up": comparison.runner_up,
        "reason": comparison.reason or "", "sensitivity": cases, "tied": list(comparison.tied),
        "end_of_range": comparison.end_of_range,
        "touch_limit_k": scenario.limits.touch_temperature, "currency": scenario.costs.currency,
    }


def default_comparison_values(scenario: Scenario, lever: str) -> list[float]:
    """A sensible first range (SI) around the scenario's present value, inside the product's limits."""
    tracing = scenario.tracing
    if lever == "setpoint":
        centre = tracing.setpoint or scenario.source.temperature
        top = scenario.product.max_temperature
        values = [centre + d for d in (-15.0, -10.0, -5.0, 0.0, 5.0, 10.0, 15.0)]
        values = [v for v in values if v <= top + 1e-9 and v > scenario.product.no_flow_temperature]
        return values or [centre]
    if lever == "steam_pressure":
        return [p * 1e5 for p in (1.0, 2.0, 3.0, 4.0, 5.0, 6.0)]
    if lever == "pump_speed":
        base = scenario.pump.speed
        return [base * f for f in (0.6, 0.8, 1.0)] + ([base * 1.2] if scenario.pump.max_speed and scenario.pump.max_speed >= base * 1.2 else [])
    base = scenario.operation.flow
    return [base * f for f in (0.5, 0.75, 1.0)]
