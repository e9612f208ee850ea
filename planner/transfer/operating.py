"""The transfer system's points and outcomes: the state of one flow through both lines (``SystemPoint``),
where pump and system agree (``OperatingPoint``), what changes while the transfer runs (``SystemState``),
and the outcomes' codes in words (``OUTCOME_WORDS``); ``transfer.system`` computes them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

if TYPE_CHECKING:             # annotations only: the outcomes' words load none of the line's models
    from planner.line.march import MarchSummary

# The outcomes and flags (transfer.system) in words (what a page, a report or a key figure shows for each code).
OUTCOME_WORDS = {"ok": "ok", "no_flow": "no flow", "relief_lifting": "relief valve lifting",
                 "rate_not_reachable": "flow setpoint not reachable", "beyond_curve": "beyond the pump curve",
                 "product_sets": "product sets", "motor_overloaded": "motor overloaded",
                 "suction_starved": "suction starved"}


@dataclass
class SystemPoint:
    flow: float                  # m3/s at the source temperature
    mass_flow: float
    source_temperature: float
    pump_inlet_temperature: float
    suction_pressure: float      # gauge at the pump inlet
    discharge_pressure: float    # gauge needed at the pump outlet
    pump_differential: float
    npsh_available: float
    outlet_temperature: float
    suction: MarchSummary | None
    discharge: MarchSummary
    sets: bool                   # product falls below its no-flow temperature somewhere
    where: str = ""
    discharge_result: object = field(default=None, repr=False)  # the recorded MarchResult, when asked for
    suction_result: object = field(default=None, repr=False)    # the suction line's, likewise

    @property
    def line_pressure_drop(self) -> float:
        return self.discharge.pressure_drop_pa + (self.suction.pressure_drop_pa if self.suction else 0.0)


@dataclass
class OperatingPoint:
    status: str
    flow: float
    message: str
    point: SystemPoint | None
    flags: list[str] = field(default_factory=list)
    speed: float | None = None          # rev/s
    shaft_power: float = 0.0            # W
    pump_head: float | None = None      # m (centrifugal)
    npsh_required: float = 0.0
    npsh_limited_flow: float | None = None
    relief_flow: float = 0.0            # m3/s recirculating through the relief valve
    hi_b: float | None = None           # ANSI/HI 9.6.7 parameter B (centrifugal)
    hi_in_range: bool = True
    # the solver's best estimate of the exact root (a Newton step past the accepted flow); only for
    # extrapolating the next guess, never reported: ``flow`` is the evaluated point
    flow_estimate: float | None = None

    @property
    def moving(self) -> bool:
        return self.status != "no_flow" and self.flow > 0.0


@dataclass
class SystemState:
    """What changes while the transfer runs."""

    source_temperature: float
    source_volume: float
    destination_volume_added: float = 0.0
