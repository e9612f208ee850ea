"""Plain-text tables and JSON documents of results, for the command line."""

from __future__ import annotations

import math

import numpy as np

from planner.line.march import MarchResult
from planner.scenario.schema import Scenario

STANDING_CAUTION = (
    "Planning estimate only. Follow site procedures, hazardous-area rules and the pressure and "
    "temperature ratings of the equipment, and the advice of a licensed engineer. Hot jackets, "
    "tracers and product can burn; pressurised hoses can burst."
)


def _c(kelvin: float) -> float:
    return kelvin - 273.15


def segment_rows(result: MarchResult, line_segments) -> list[dict]:
    """Per-segment figures at each segment's outlet (SI)."""
    rows = []
    if not result.nodes:
        return rows
    x = result.nodes["x"]
    steps = result.steps
    for seg in line_segments:
        inside = (steps["segment"] == seg.index)
        if not inside.any():
            break
        end = min(int(np.searchsorted(x, seg.x_end - 1e-9)), len(x) - 1)
        rows.append({
            "segment": seg.name,
            "x_end_m": float(x[end]),
            "outlet_temperature_k": float(result.nodes["temperature"][end]),
            "pressure_pa": float(result.nodes["pressure"][end]),
            "max_viscosity_pa_s": float(steps["viscosity"][inside].max()),
            "min_reynolds": float(steps["reynolds"][inside].min()),
            "max_jacket_temperature_k": float(steps["jacket_temperature"][inside].max()),
            "max_sheath_temperature_k": float(steps["sheath_temperature"][inside].max()),
            "heat_loss_w": float((steps["heat_loss"][inside]).sum() * seg.length / inside.sum()),
            "trace_power_w": float((steps["trace_power"][inside]).sum() * seg.length / inside.sum()),
        })
    return rows


def _finite(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def march_json(scenario: Scenario, result: MarchResult, profiles: bool = False, line_segments=None) -> dict:
    from planner.line.model import line_from_scenario

    segments = line_segments or line_from_scenario(scenario).segments
    doc = {
        "scenario": scenario.name,
        "units": "SI: K, Pa (gauge), m, m3/s, kg/s, W, Pa s",
        "summary": {k: _finite(v) for k, v in result.summary.as_dict().items()},
        "segments": segment_rows(result, segments),
        "caution": STANDING_CAUTION,
    }
    if profiles:
        doc["profiles"] = {
            "nodes": {k: v.tolist() for k, v in result.nodes.items()},
            "steps": {k: v.tolist() for k, v in result.steps.items()},
        }
    return doc


def march_table(scenario: Scenario, result: MarchResult) -> str:
    from planner.line.model import line_from_scenario

    s = result.summary
    segments = line_from_scenario(scenario).segments
    lines = [f"{scenario.name}", ""]
    lines.append(f"  flow                 {s.flow_m3_s * 3600:10.2f} m3/h   ({s.mass_flow_kg_s:.2f} kg/s)")
    lines.append(f"  inlet temperature    {_c(s.inlet_temperature_k):10.2f} °C")
    if s.status == "product_sets":
        lines.append(f"  PRODUCT SETS at {s.sets_at_m:.0f} m: it falls below its no-flow temperature "
                     f"({_c(scenario.product.no_flow_temperature):.1f} °C); figures below stop there")
    lines.append(f"  outlet temperature   {_c(s.outlet_temperature_k):10.2f} °C")
    lines.append(f"  min / max bulk       {_c(s.min_bulk_temperature_k):10.2f} / {_c(s.max_bulk_temperature_k):.2f} °C")
    lines.append(f"  pressure drop        {s.pressure_drop_pa / 1e5:10.3f} bar")
    lines.append(f"    friction           {s.friction_drop_pa / 1e5:10.3f} bar")
    lines.append(f"    fittings           {s.fittings_drop_pa / 1e5:10.3f} bar")
    lines.append(f"    static head        {s.static_drop_pa / 1e5:10.3f} bar")
    lines.append(f"  viscosity range      {s.min_viscosity_pa_s * 1e3:10.1f} – {s.max_viscosity_pa_s * 1e3:.1f} mPa·s"
                 + ("   (law extrapolated beyond its lab points)" if s.viscosity_extrapolated else ""))
    lines.append(f"  laminar share        {s.laminar_fraction * 100:10.0f} %")
    lines.append(f"  hottest jacket       {_c(s.max_jacket_temperature_k):10.1f} °C at {s.max_jacket_at_m:.0f} m")
    lines.append(f"  hottest heater       {_c(s.max_sheath_temperature_k):10.1f} °C at {s.max_sheath_at_m:.0f} m")
    lines.append(f"  trace power          {s.trace_power_w / 1e3:10.2f} kW")
    lines.append(f"  heat lost            {s.heat_loss_w / 1e3:10.2f} kW")
    lines.append(f"  viscous heating      {s.viscous_heating_w / 1e3:10.2f} kW")
    lines.append("")
    header = f"  {'segment':32s} {'end m':>7s} {'T out °C':>9s} {'p bar':>8s} {'max mPa·s':>10s} {'min Re':>8s} {'jacket °C':>9s}"
    lines.append(header)
    for row in segment_rows(result, segments):
        lines.append(f"  {row['segment'][:32]:32s} {row['x_end_m']:7.0f} {_c(row['outlet_temperature_k']):9.2f} "
                     f"{row['pressure_pa'] / 1e5:8.3f} {row['max_viscosity_pa_s'] * 1e3:10.1f} {row['min_reynolds']:8.1f} "
                     f"{_c(row['max_jacket_temperature_k']):9.1f}")
    lines.append("")
    lines.append("  pressures are gauge relative to the route inlet pressure; " + STANDING_CAUTION)
    return "\n".join(lines)
