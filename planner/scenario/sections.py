"""The scenario's other sections: site and operation, pump, source and destination vessels, costs, schedule,
limits and the calibration factors.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Literal, Optional

from pydantic import Field, field_validator, model_validator

from planner.scenario.budget import HOLD_HORIZON_S
from planner.scenario.fields import (Ambient, Duration, DynamicViscosity, Flow, GaugePressure, Head, Power, Speed,
                                     Temperature, Volume, WindSpeed, _Model)
from planner.scenario.quantities import Quantity
from planner.scenario.weather_spec import timestamp

if TYPE_CHECKING:                     # the root model holds these sections
    from planner.scenario.root import Scenario


class Site(_Model):
    name: str = Field("", max_length=120)
    ambient_temperature: Ambient
    wind_speed: WindSpeed = 0.0
    design_ambient_temperature: Optional[Ambient] = Field(None, description="coldest ambient the plan must hold at; default: ambient")


class Operation(_Model):
    flow: Flow
    inlet_temperature: Temperature
    inlet_pressure: GaugePressure = Field(0.0, description="gauge pressure at the route inlet (pump discharge)")


class CurvePoint(_Model):
    flow: Quantity("volume_flow", ge=0.0, le=2.0, description="flow on water")
    head: Head
    efficiency: float = Field(ge=0.0, le=1.0, description="pump efficiency on water [-]")
    npsh_required: Optional[Quantity("length", ge=0.0, le=100.0, description="NPSH required at this flow")] = None


class PumpSpec(_Model):
    """The transfer pump. Positive-displacement: displacement, speed, slip, relief.
    Centrifugal: the water curve (first point at zero flow), speed."""

    kind: Literal["positive_displacement", "centrifugal"]
    name: str = Field("", max_length=120)
    control: Literal["fixed_speed", "fixed_flow"] = Field("fixed_speed", description="fixed_flow: a VFD or flow controller holds flow_setpoint")
    flow_setpoint: Optional[Flow] = None
    speed: Speed
    max_speed: Optional[Speed] = None
    displacement: Optional[Quantity("displacement", gt=0.0, le=1.0, description="displacement per revolution")] = None
    slip_flow: Quantity("volume_flow", ge=0.0, le=2.0, description="slip at the reference pressure and viscosity") = 0.0
    slip_reference_pressure: Quantity("pressure", gt=0.0, le=5.0e7, description="differential pressure of the slip figure") = 5.0e5
    slip_reference_viscosity: Quantity("dynamic_viscosity", gt=0.0, le=1.0e5, description="viscosity of the slip figure") = 1.0
    slip_viscosity_exponent: float = Field(1.0, ge=0.0, le=2.0)
    relief_setting: Optional[Quantity("pressure", gt=0.0, le=5.0e7, description="relief valve setting (differential across the pump)")] = None
    mechanical_efficiency: float = Field(0.85, gt=0.05, le=1.0)
    motor_power: Optional[Power] = None
    motor_efficiency: float = Field(0.92, gt=0.3, le=1.0)
    npsh_required: Quantity("length", ge=0.0, le=100.0, description="NPSH required (PD: net inlet pressure required as head)") = 3.0
    curve: list[CurvePoint] = Field(default_factory=list)
    stages: int = Field(1, ge=1, le=20)

    @field_validator("curve")
    @classmethod
    def _water_curve(cls, curve: list[CurvePoint]):
        """What the pump model (transfer.pumps.CentrifugalPump) needs of the water curve, said at the curve."""
        if not curve:
            return curve
        flows = [point.flow for point in curve]
        if flows[0] != 0.0:
            raise ValueError(f"the first point's flow is {flows[0]!r} m3/s: the water curve starts at zero flow (shut-off)")
        for i in range(1, len(curve)):
            if not flows[i] > flows[i - 1]:
                raise ValueError(f"point {i + 1}'s flow is not above point {i}'s: give the points in order of "
                                 "strictly increasing flow")
            if not curve[i].efficiency > 0.0:
                raise ValueError(f"point {i + 1}'s efficiency is 0: only the shut-off point (the first) may have 0; "
                                 "give the others above 0 and at most 1")
        if max(range(len(curve)), key=lambda i: curve[i].efficiency) == 0:
            raise ValueError("the highest efficiency is at shut-off: it must be at a flow above 0 (point 2 or later)")
        return curve

    @model_validator(mode="after")
    def _complete(self):
        if self.kind == "positive_displacement" and self.displacement is None:
            raise ValueError("a positive_displacement pump needs its displacement (e.g. '1.2 L' per revolution)")
        if self.kind == "centrifugal" and len(self.curve) < 3:
            raise ValueError("a centrifugal pump needs a water curve of at least 3 points, the first at zero flow")
        if self.control == "fixed_flow" and self.flow_setpoint is None:
            raise ValueError("control 'fixed_flow' needs flow_setpoint")
        given = [p.npsh_required is not None for p in self.curve]
        if any(given) and not all(given):
            raise ValueError("curve: give npsh_required at every curve point or at none (then the pump's "
                             "single npsh_required applies)")
        if self.max_speed is not None and self.max_speed < self.speed:
            raise ValueError("max_speed is below speed")
        return self


class Vessel(_Model):
    """The source: railcar, truck, barge compartment or tank."""

    kind: Literal["railcar", "truck", "barge", "tank"] = "tank"
    name: str = Field("", max_length=120)
    shape: Literal["horizontal_cylinder", "vertical_cylinder", "box"] = "vertical_cylinder"
    diameter: Optional[Quantity("length", gt=0.1, le=100.0, description="diameter")] = None
    length: Optional[Quantity("length", gt=0.1, le=200.0, description="length (horizontal cylinder, box)")] = None
    width: Optional[Quantity("length", gt=0.1, le=100.0, description="width (box)")] = None
    initial_volume: Volume
    volume_to_move: Volume
    outlet_height: Quantity("length", ge=-50.0, le=100.0, description="height of the vessel's bottom above the suction route inlet") = 0.0
    pressure: Quantity("pressure", ge=-0.9e5, le=1.0e6, description="gas pressure above the liquid (gauge)") = 0.0
    temperature: Temperature
    heat_loss_coefficient: Quantity("heat_transfer_coefficient", ge=0.0, le=100.0, description="overall U of the shell to ambient") = 1.0
    heating_power: Quantity("power", ge=0.0, le=1.0e7, description="heating coil or jacket power while unloading") = 0.0
    heating_medium: Literal["steam", "electric"] = "steam"
    heating_steam_pressure: Optional[Quantity("pressure", ge=0.0, le=4.0e6, description="steam coils: supply pressure (gauge); empty: the tracing's steam, else 3.5 bar")] = None
    heating_limit_temperature: Optional[Temperature] = Field(
        None, description="electric heating: contents temperature at which its controller switches off; empty: the product's maximum")

    @model_validator(mode="after")
    def _geometry(self):
        need = {"horizontal_cylinder": ("diameter", "length"), "vertical_cylinder": ("diameter",),
                "box": ("length", "width")}[self.shape]
        missing = [n for n in need if getattr(self, n) is None]
        if missing:
            raise ValueError(f"a {self.shape} needs {', '.join(missing)}")
        if self.volume_to_move > self.initial_volume:
            raise ValueError("volume_to_move is more than the initial_volume")
        capacity = vessel_capacity(self)
        if capacity is not None and self.initial_volume > capacity * 1.0001:
            raise ValueError(f"initial_volume {self.initial_volume:g} m³ does not fit the vessel ({capacity:.1f} m³)")
        return self


def vessel_capacity(v: "Vessel") -> float | None:
    """Full volume of a closed shape; None where the height is open (vertical cylinder, box)."""
    if v.shape == "horizontal_cylinder":
        return math.pi * v.diameter ** 2 / 4.0 * v.length
    return None


class Destination(_Model):
    """The receiving tank (vertical cylinder)."""

    name: str = Field("", max_length=120)
    diameter: Quantity("length", gt=0.5, le=150.0, description="tank diameter")
    initial_level: Quantity("length", ge=0.0, le=60.0, description="liquid level at the start")
    max_level: Optional[Quantity("length", gt=0.0, le=60.0, description="highest allowed level (overfill)")] = None
    inlet: Literal["top", "bottom"] = Field("bottom", description="bottom entry pushes against the level; top entry does not")
    pressure: Quantity("pressure", ge=-0.05e5, le=1.0e6, description="gas pressure in the tank (gauge)") = 0.0
    max_pressure: Optional[Quantity("pressure", gt=0.0, le=1.0e6, description="tank design pressure (gauge)")] = None


class Costs(_Model):
    currency: str = Field("EUR", max_length=8)
    electricity_per_kwh: float = Field(0.15, ge=0.0, le=100.0)
    steam_per_tonne: float = Field(30.0, ge=0.0, le=10_000.0)
    demurrage_per_hour: float = Field(0.0, ge=0.0, le=1.0e6)


class Schedule(_Model):
    planned_window: Duration = 8 * 3600.0
    start_mode: Literal["prewarm", "push_cold"] = Field("prewarm", description="how the plan starts: pre-warm the line first, or push the cold contents out")
    line_start_temperature: Optional[Temperature] = Field(None, description="temperature of the product left in the line; default the design ambient")
    stop_duration: Quantity("time", gt=0.0, le=HOLD_HORIZON_S, description="a stop to check restart for (at most "
                            "the 14 days a stop is followed)") = 3600.0
    limiting_viscosity: Optional[DynamicViscosity] = Field(None, description="viscosity above which the line counts as unable to restart")
    timeline_steps: int = Field(24, ge=10, le=1000, description="volume increments of the transfer timeline (trapezoidal rule)")
    start: Optional[str] = Field(None, max_length=40, description="planned start of the start-up (ISO 8601 with its "
                                                                  "offset, e.g. '2026-01-14T18:00+01:00'); empty: "
                                                                  "times run from 0")

    @field_validator("start")
    @classmethod
    def _start(cls, value):
        if value is not None:
            timestamp(value, "start")
            value = value.strip()
        return value


class Limits(_Model):
    """Thresholds of the checks; defaults are common practice and can be set per site."""

    touch_temperature: Temperature = Field(333.15, description="hottest metal jacket a person may touch (60 degC: common practice, ASTM C1055 5 s contact basis)")
    max_velocity: Quantity("speed", gt=0.0, le=20.0, description="highest sensible line velocity") = 3.0
    min_velocity: Quantity("speed", ge=0.0, le=5.0, description="lowest sensible line velocity") = 0.05
    npsh_margin: Quantity("length", ge=0.0, le=20.0, description="NPSH margin wanted above the pump's requirement") = 0.6
    flash_point_margin: Quantity("temperature_difference", ge=0.0, le=100.0, description="keep the product this far below its flash point") = 10.0
    poor_film_coefficient: Quantity("heat_transfer_coefficient", ge=0.0, le=1000.0, description="inner film coefficient below which laminar heat transfer counts as poor") = 20.0
    confidence: Optional[float] = Field(None, ge=0.5, le=0.99, description="the chance a plan must reach to finish in "
                                        "the planned window with no stop (`--uncertainty`); empty: 0.9, nine times out of ten")

    @model_validator(mode="after")
    def _velocities(self):
        if self.min_velocity >= self.max_velocity:   # every velocity would be both too low and too high
            raise ValueError(f"min_velocity {self.min_velocity:g} m/s is not below max_velocity {self.max_velocity:g} "
                             "m/s: give a lowest sensible velocity below the highest")
        return self


class CalibrationSource(_Model):
    """The log a calibration was fitted to: its file name and SHA-256 of its bytes."""

    file: str = Field(min_length=1, max_length=260)
    sha256: str = Field(pattern=r"^[0-9a-f]{64}$", description="SHA-256 of the log file, 64 lowercase hex digits")


class Calibration(_Model):
    """Site factors fitted to logged transfers (``python -m planner calibrate``); every plan applies
    them.  Each multiplies one model estimate; 1 leaves the model as it is."""

    viscosity_factor: float = Field(1.0, ge=0.05, le=20.0, description="multiplies the product's viscosity at every temperature [-]")
    heat_loss_factor: float = Field(1.0, ge=0.01, le=20.0, description="multiplies the line's heat loss to the surroundings [-]")
    slip_factor: float = Field(1.0, ge=0.0, le=20.0, description="multiplies a positive-displacement pump's slip [-]")
    viscosity_factor_standard_error: Optional[float] = Field(None, ge=0.0, le=20.0, description="the fit's standard error of viscosity_factor [-]")
    heat_loss_factor_standard_error: Optional[float] = Field(None, ge=0.0, le=20.0, description="the fit's standard error of heat_loss_factor [-]")
    slip_factor_standard_error: Optional[float] = Field(None, ge=0.0, le=20.0, description="the fit's standard error of slip_factor [-]")
    source: Optional[CalibrationSource] = None
    fitted_at: Optional[str] = Field(None, max_length=40, description="when the factors were fitted (ISO 8601, UTC)")

    @field_validator("fitted_at")
    @classmethod
    def _iso(cls, value):
        if value is not None:
            from datetime import datetime

            try:
                datetime.fromisoformat(value)
            except ValueError:
                raise ValueError(f"fitted_at {value!r} is not an ISO 8601 date and time (e.g. '2026-01-31T14:05:00+00:00')") from None
        return value

    @property
    def in_use(self) -> bool:
        return (self.viscosity_factor, self.heat_loss_factor, self.slip_factor) != (1.0, 1.0, 1.0) or self.source is not None


def calibration_of(scenario: "Scenario") -> Calibration:
    """The scenario's calibration, or the neutral one (all factors 1) when it has none."""
    return scenario.calibration if scenario.calibration is not None else Calibration()
