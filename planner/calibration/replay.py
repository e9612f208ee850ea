"""Replaying a logged transfer through the planner: the model's pressures and temperatures at each
logged row, for a given set of calibration factors.

Each row is taken as a steady state of the transfer system (``TransferSystem.at_flow``) at the
logged flow, with the source temperature and the ambient of that row where the log gives them
(else the scenario's; a logged ambient replaces the site's ambient, not a segment's own), and the source and destination volumes moved by the logged flow integrated
over time (trapezoids).  The model gives the pump's discharge and suction pressures (gauge), the
pump inlet temperature and the line outlet temperature.  For a positive-displacement pump with a
logged speed it also gives the delivered flow at that speed — displacement x speed minus slip at the
differential and viscosity of that row (the logged pressures and pump inlet temperature where given,
else the modelled ones) — which is what makes the slip factor visible in the log.

The replay is steady: rows while the line is still warming up after a start, or while the flow is
changing fast, are not steady states, and show up as large residuals.
"""

from __future__ import annotations

import math
from concurrent.futures import Executor
from dataclasses import dataclass, field

import numpy as np

from planner.line.tracing import HEATER_HOLDING
from planner.calibration.log import TransferLog
from planner.errors import ComputationError
from planner.scenario.schema import Calibration, Scenario, calibration_of
from planner.transfer.system import SystemState, TransferSystem
from planner.scenario.wording import Q, Sentence

FACTOR_NAMES = ("viscosity_factor", "heat_loss_factor", "slip_factor")
PARALLEL_MIN_ROWS = 40       # below this a log is replayed in one piece: splitting costs more than it saves
REPLAY_PARTS = 4             # pieces of a longer log, whatever runs them: a piece's marches start afresh (no warm
                             # start from the row before), so the pieces, not the executor, decide the figures


@dataclass
class Replay:
    """Modelled values at each readable row of a log [SI], NaN where the model gives none."""

    factors: dict[str, float]
    modelled: dict[str, np.ndarray]
    sets: np.ndarray                      # the product sets somewhere in the line at that row
    notes: list[str] = field(default_factory=list)


def with_factors(scenario: Scenario, factors: dict[str, float]) -> Scenario:
    """The scenario with the given calibration factors (the others kept from its calibration)."""
    current = calibration_of(scenario).model_dump()
    current.update({k: float(v) for k, v in factors.items()})
    return scenario.model_copy(update={"calibration": Calibration(**current)})


def moved_volume(log: TransferLog) -> np.ndarray:
    """Volume moved since the first row [m3]: the logged flow integrated over time (trapezoids)."""
    t, q = log.values["time"], log.values["flow"]
    steps = 0.5 * (q[1:] + q[:-1]) * np.diff(t)
    return np.concatenate([[0.0], np.cumsum(steps)])


def input_notes(scenario: Scenario, log: TransferLog) -> list[str]:
    """What the replay takes from the scenario because the log does not give it."""
    notes = []
    if not log.has("source_temperature"):
        notes.append(Sentence("source_temperature not logged: the scenario's {t} is used at every row",
                              t=Q(scenario.source.temperature, "temperature")))
    if not log.has("ambient_temperature"):
        notes.append(Sentence("ambient_temperature not logged: the site's {t} is used at every row",
                              t=Q(scenario.site.ambient_temperature, "temperature")))
    elif any(s.surroundings.ambient_temperature is not None for r in (scenario.route, scenario.suction) if r
             for s in r.segments):
        notes.append("segments with an ambient of their own (e.g. indoor) keep it; the logged ambient replaces "
                     "the site's elsewhere")
    return notes


def pd_slip_applies(scenario: Scenario, log: TransferLog) -> bool:
    """True when the log shows the slip: a positive-displacement pump with its speed logged."""
    return scenario.pump is not None and scenario.pump.kind == "positive_displacement" and log.has("speed")


def _inputs(scenario: Scenario, log: TransferLog) -> dict[str, np.ndarray]:
    """Per-row inputs of the replay: flow, source temperature, ambient, volumes."""
    n = log.rows
    source = scenario.source
    t_source = log.values.get("source_temperature", np.full(n, np.nan)).copy()
    t_source[~np.isfinite(t_source)] = source.temperature
    ambient = log.values.get("ambient_temperature", np.full(n, np.nan)).copy()
    ambient[~np.isfinite(ambient)] = scenario.site.ambient_temperature
    moved = moved_volume(log)
    return {"flow": log.values["flow"], "source_temperature": t_source, "ambient_shift": ambient - scenario.site.ambient_temperature,
            "source_volume": np.maximum(source.initial_volume - moved, 1e-3 * source.initial_volume), "moved": moved}


def _segments(system: TransferSystem) -> list:
    """The segments that see the site's ambient (those with an ambient of their own keep it)."""
    lines = [system.discharge_line] + ([system.suction_line] if system.suction_line is not None else [])
    return [seg for line in lines for seg in line.segments if seg.spec.surroundings.ambient_temperature is None]


def replay(scenario: Scenario, log: TransferLog, factors: dict[str, float] | None = None,
           rows: slice | None = None) -> Replay:
    """The model at every readable row of ``log`` (or ``rows`` of them) with ``factors`` applied."""
    calibrated = with_factors(scenario, factors or {})
    system = TransferSystem(calibrated)
    inputs = _inputs(scenario, log)
    index = range(log.rows)[rows] if rows is not None else range(log.rows)
    segments = _segments(system)
    base_ambient = [seg.ambient_temperature for seg in segments]
    names = ("discharge_pressure", "suction_pressure", "pump_inlet_temperature", "outlet_temperature", "flow")
    out = {name: np.full(len(index), np.nan) for name in names}
    sets = np.zeros(len(index), dtype=bool)
    slip = pd_slip_applies(scenario, log)
    speed = log.values.get("speed")
    for k, i in enumerate(index):
        if not inputs["flow"][i] > 0.0:
            continue                 # pump stopped: nothing to replay, NaN stays
        shift = float(inputs["ambient_shift"][i])
        for seg, base in zip(segments, base_ambient):
            seg.ambient_temperature = base + shift
        state = SystemState(float(inputs["source_temperature"][i]), float(inputs["source_volume"][i]),
                            float(inputs["moved"][i]))
        point = system.at_flow(float(inputs["flow"][i]), state)
        sets[k] = point.sets
        out["discharge_pressure"][k] = point.discharge_pressure
        out["suction_pressure"][k] = point.suction_pressure
        out["pump_inlet_temperature"][k] = point.pump_inlet_temperature
        out["outlet_temperature"][k] = point.outlet_temperature
        if slip and math.isfinite(speed[i]) and speed[i] > 0.0:
            out["flow"][k] = _pd_flow(system, log, i, point, float(speed[i]))
    used = {name: float(getattr(calibration_of(calibrated), name)) for name in FACTOR_NAMES}
    return Replay(used, out, sets)


def _measured_or(log: TransferLog, quantity: str, i: int, modelled: float) -> float:
    values = log.values.get(quantity)
    if values is not None and math.isfinite(values[i]):
        return float(values[i])
    return modelled


def _pd_flow(system: TransferSystem, log: TransferLog, i: int, point, speed: float) -> float:
    """Delivered flow of the PD pump at the logged speed, at that row's differential and viscosity."""
    dp = (_measured_or(log, "discharge_pressure", i, point.discharge_pressure)
          - _measured_or(log, "suction_pressure", i, point.suction_pressure))
    t_pump = _measured_or(log, "pump_inlet_temperature", i, point.pump_inlet_temperature)
    mu = system.product.viscosity(t_pump)
    return system.pump.delivered_flow(dp, mu, speed)


def heater_holding_fraction(scenario: Scenario, log: TransferLog) -> float:
    """Share of the discharge line's traced length where the thermostat holds its setpoint, at the
    log's middle running row: there the heat loss is made up by the heater and hardly shows in temperatures."""
    system = TransferSystem(scenario)
    inputs = _inputs(scenario, log)
    moving = np.flatnonzero(log.running)
    i = int(moving[moving.size // 2])
    for seg in _segments(system):
        seg.ambient_temperature += float(inputs["ambient_shift"][i])
    state = SystemState(float(inputs["source_temperature"][i]), float(inputs["source_volume"][i]),
                        float(inputs["moved"][i]))
    steps = system.at_flow(float(inputs["flow"][i]), state, record=True).discharge_result.steps
    if not len(steps.get("heater_state", [])):
        return 0.0
    lengths = np.gradient(steps["x"]) if len(steps["x"]) > 1 else np.ones(1)
    return float(np.sum(lengths[steps["heater_state"] == HEATER_HOLDING]) / np.sum(lengths))


def _replay_part(scenario: Scenario, log: TransferLog, factors: dict[str, float], rows: slice) -> Replay:
    """One task of a ``Replayer``: a slice of the rows (runs on the executor's worker)."""
    return replay(scenario, log, factors, rows)


class Replayer:
    """Repeated replays of one log at different factors, the rows of a log of at least PARALLEL_MIN_ROWS in
    REPLAY_PARTS pieces sent to ``executor`` (any ``concurrent.futures.Executor``, owned by the caller;
    None: the same pieces in this process, so the figures do not depend on where they ran).  Each call
    counts against ``max_evaluations``."""

    def __init__(self, scenario: Scenario, log: TransferLog, executor: Executor | None = None,
                 max_evaluations: int | None = None):
        self.scenario, self.log = scenario, log
        self.max_evaluations = max_evaluations   # the work budget was checked for this many replays
        self.executor = executor
        self.parts = REPLAY_PARTS if log.rows >= PARALLEL_MIN_ROWS else 1
        self.evaluations = 0

    def __call__(self, factors: dict[str, float]) -> Replay:
        self.evaluations += 1
        if self.max_evaluations is not None and self.evaluations > self.max_evaluations:
            raise ComputationError(f"the fit asked for more than the {self.max_evaluations} replays of the log its "
                                   "work budget was checked for; fit fewer factors (--fit)")
        if self.parts <= 1:
            return replay(self.scenario, self.log, factors)
        n = self.log.rows
        edges = [round(i * n / self.parts) for i in range(self.parts + 1)]
        pieces = [slice(a, b) for a, b in zip(edges, edges[1:])]
        if self.executor is None:
            parts = [_replay_part(self.scenario, self.log, factors, rows) for rows in pieces]
        else:
            futures = [self.executor.submit(_replay_part, self.scenario, self.log, factors, rows) for rows in pieces]
            parts = [f.result() for f in futures]
        modelled = {k: np.concatenate([p.modelled[k] for p in parts]) for k in parts[0].modelled}
        return Replay(parts[0].factors, modelled, np.concatenate([p.sets for p in parts]))
