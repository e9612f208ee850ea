"""A log made by the planner itself: the replay of an invented transfer at known factors, written as
the CSV a historian would export.  Tests fit it back; the demo log and the benchmark use it.

The invented transfer varies what a real one varies — the flow in steps (the operator trims the
rate), the ambient over the day, the source cooling slowly — so that the factors act differently
from row to row and can be told apart.  Noise, if asked for, is Gaussian with the given standard
deviations [SI] per quantity, from a seeded generator.
"""

from __future__ import annotations

import io
import math
from datetime import datetime, timedelta

import numpy as np

from planner.calibration.log import read_log
from planner.calibration.replay import replay, with_factors
from planner.scenario.schema import Scenario
from planner.transfer.system import SystemState, TransferSystem

UNITS = {"time": ("min", 1 / 60.0, 0.0), "flow": ("m3/h", 3600.0, 0.0), "speed": ("rpm", 60.0, 0.0),
         "discharge_pressure": ("bar", 1e-5, 0.0), "suction_pressure": ("bar", 1e-5, 0.0),
         "pump_inlet_temperature": ("degC", 1.0, -273.15), "outlet_temperature": ("degC", 1.0, -273.15),
         "source_temperature": ("degC", 1.0, -273.15), "ambient_temperature": ("degC", 1.0, -273.15)}
MEASURED_OUT = ("discharge_pressure", "suction_pressure", "pump_inlet_temperature", "outlet_temperature")


def invented_inputs(scenario: Scenario, rows: int, duration_s: float, base_flow: float | None = None,
                    flow_swing: float = 0.25, ambient_swing_k: float = 4.0, source_drop_k: float = 2.0) -> dict:
    """Time, flow, source temperature and ambient of an invented transfer [SI arrays]."""
    time = np.linspace(0.0, duration_s, rows)
    if base_flow is None:
        system = TransferSystem(scenario)
        point = system.operating_point(SystemState(scenario.source.temperature, scenario.source.initial_volume))
        base_flow = point.flow if point.moving else scenario.operation.flow
    steps = np.array([1.0, 1.0 - flow_swing, 1.0 + 0.4 * flow_swing, 1.0 - 0.6 * flow_swing, 1.0])
    flow = base_flow * steps[np.minimum((time / duration_s * len(steps)).astype(int), len(steps) - 1)]
    ambient = scenario.site.ambient_temperature + ambient_swing_k * np.sin(2 * math.pi * time / 86400.0 + 0.3)
    source = scenario.source.temperature - source_drop_k * time / duration_s
    return {"time": time, "flow": flow, "source_temperature": source, "ambient_temperature": ambient}


def _csv(columns: dict[str, np.ndarray], start: datetime | None = None) -> str:
    """CSV text; with ``start`` the time column is ISO 8601 timestamps from that moment."""
    names = list(columns)
    out = io.StringIO()
    out.write(",".join("time" if n == "time" and start else f"{n} [{UNITS[n][0]}]" for n in names) + "\n")
    scaled = [columns[n] * UNITS[n][1] + UNITS[n][2] for n in names]
    for seconds, row in zip(columns["time"], zip(*scaled)):
        cells = [f"{v:.6g}" if n != "time" else f"{v:.4f}" for n, v in zip(names, row)]
        if start is not None:
            cells[names.index("time")] = (start + timedelta(seconds=round(float(seconds)))).isoformat()
        out.write(",".join(cells) + "\n")
    return out.getvalue()


def synthetic_log(scenario: Scenario, factors: dict[str, float], rows: int = 100, duration_s: float = 4 * 3600.0,
                  noise: dict[str, float] | None = None, seed: int = 0, measured=MEASURED_OUT,
                  inputs: dict | None = None, start: datetime | None = None) -> str:
    """CSV text of the invented transfer replayed at ``factors``, with optional noise [SI std. dev.];
    ``start``: write the time as ISO 8601 timestamps from then."""
    inputs = inputs or invented_inputs(with_factors(scenario, factors), rows, duration_s)
    columns = {k: np.asarray(v, dtype=float) for k, v in inputs.items()}
    log = read_log(_csv({**columns, "outlet_temperature": np.full(rows, 300.0)}), "inputs.csv")
    modelled = replay(scenario, log, factors).modelled
    if scenario.pump is not None and scenario.pump.kind == "positive_displacement":
        columns["speed"] = _pd_speed(scenario, factors, columns, modelled)
    rng = np.random.default_rng(seed)
    for name in measured:
        sigma = (noise or {}).get(name, 0.0)
        columns[name] = modelled[name] + (rng.normal(0.0, sigma, rows) if sigma > 0 else 0.0)
    return _csv(columns, start)


def _pd_speed(scenario: Scenario, factors: dict, columns: dict, modelled: dict) -> np.ndarray:
    """The PD pump speed that delivers the logged flow at each row: (flow + slip) / displacement."""
    system = TransferSystem(with_factors(scenario, factors))
    pump = system.pump
    speeds = []
    for q, p_out, p_in, t_pump in zip(columns["flow"], modelled["discharge_pressure"],
                                      modelled["suction_pressure"], modelled["pump_inlet_temperature"]):
        slip = pump.slip(p_out - p_in, system.product.viscosity(t_pump), speed=1e9)
        speeds.append((q + slip) / pump.displacement_m3_per_rev)
    return np.array(speeds)
