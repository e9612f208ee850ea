"""The scenario's line sections: fittings, insulation, surroundings, segments and the route, and the
tracing (electric or steam) along it.
"""

from __future__ import annotations

from typing import Literal, Optional

from pydantic import Field, field_validator, model_validator

from planner.correlations.materials import INSULATION_MATERIALS
from planner.scenario.fields import (Ambient, Conductivity, Diameter, Elevation, HEAT_PER_METRE_MAX_W_M, Length,
                                     LinearConductance, LinearPower, Rating, Roughness, Temperature, Thickness,
                                     WindSpeed, _Model)
from planner.scenario.quantities import Quantity


class Fitting(_Model):
    type: str
    count: int = Field(1, ge=1, le=1000)

    @field_validator("type")
    @classmethod
    def _known(cls, value):
        from planner.correlations.fittings import HOOPER_2K

        if value not in HOOPER_2K:
            raise ValueError(f"unknown fitting {value!r}; known fittings are {', '.join(sorted(HOOPER_2K))}")
        return value


class InsulationLayer(_Model):
    """A layer: a named material (``planner.materials``) or its own conductivity."""

    material: Optional[str] = None
    conductivity: Optional[Conductivity] = None
    thickness: Thickness

    @model_validator(mode="after")
    def _material_or_k(self):
        if self.material is None and self.conductivity is None:
            raise ValueError("give 'material' or 'conductivity'")
        if self.material is not None and self.material not in INSULATION_MATERIALS:
            raise ValueError(f"unknown insulation material {self.material!r}; materials are {', '.join(sorted(INSULATION_MATERIALS))}")
        return self


class Surroundings(_Model):
    """What a run sees outside its jacket; fields left out take the site's values."""

    location: Literal["outdoor", "sheltered", "indoor", "buried"] = "outdoor"
    ambient_temperature: Optional[Ambient] = None
    wind_speed: Optional[WindSpeed] = None
    burial_depth: Quantity("length", gt=0.05, le=20.0, description="depth of the pipe axis below grade") = 1.0
    soil_conductivity: Quantity("conductivity", gt=0.05, le=5.0, description="soil thermal conductivity") = 1.2


class Segment(_Model):
    name: str = Field(min_length=1, max_length=80)
    kind: Literal["pipe", "hose", "loading_arm"] = "pipe"
    nps: Optional[str] = None
    schedule: Optional[str] = None
    inside_diameter: Optional[Diameter] = None
    wall_thickness: Optional[Thickness] = None
    wall_material: Literal["carbon_steel", "stainless_steel", "rubber_hose", "composite_hose"] = "carbon_steel"
    length: Length
    elevation_change: Elevation = 0.0
    roughness: Optional[Roughness] = None
    fittings: list[Fitting] = Field(default_factory=list)
    insulation: list[InsulationLayer] = Field(default_factory=list)
    jacket_emissivity: float = Field(0.15, ge=0.01, le=1.0, description="emissivity of the outer surface [-]")
    traced: bool = True
    untraced_length: Quantity("length", ge=0.0, le=50_000.0, description="untraced gaps (flanges, valves) within the segment") = 0.0
    surroundings: Surroundings = Field(default_factory=Surroundings)
    pressure_rating: Optional[Rating] = Field(None, description="MAWP of pipe, hose or arm (gauge)")
    flange_class: Optional[Literal[150, 300, 600, 900, 1500, 2500]] = None
    hazardous_area_class: Optional[Literal["T1", "T2", "T3", "T4", "T5", "T6"]] = None

    @field_validator("nps", mode="before")
    @classmethod
    def _nps_text(cls, value):
        return None if value is None else str(value)

    @model_validator(mode="after")
    def _size(self):
        from planner.correlations.pipes import pipe_size

        if self.nps is not None:
            if self.inside_diameter is not None:
                raise ValueError("give either nps with schedule, or inside_diameter, not both")
            if self.wall_thickness is not None:
                raise ValueError("wall_thickness: the schedule sets the wall of an nps segment; for another wall "
                                 "give inside_diameter and wall_thickness instead of nps")
            try:
                pipe_size(self.nps, self.schedule or "40")
            except ValueError as exc:
                raise ValueError(str(exc)) from None
        elif self.inside_diameter is None:
            raise ValueError("give nps (with schedule, default 40) or inside_diameter")
        if abs(self.elevation_change) > self.length:
            raise ValueError(f"elevation_change {self.elevation_change:g} m is larger than the length {self.length:g} m")
        if self.untraced_length > self.length:
            raise ValueError("untraced_length is longer than the segment")
        if self.kind in ("hose", "loading_arm") and self.pressure_rating is None:
            raise ValueError(f"a {self.kind} needs its pressure_rating")
        return self


class Route(_Model):
    segments: list[Segment] = Field(min_length=1, max_length=200)
    fitting_method: Literal["hooper", "darby"] = "hooper"

    @model_validator(mode="after")
    def _fittings_in_method(self):
        from planner.correlations.fittings import fitting_names
        from planner.errors import shortened

        known = fitting_names(self.fitting_method)
        for i, seg in enumerate(self.segments):
            for fitting in seg.fittings:
                if fitting.type not in known:
                    raise ValueError(
                        f"segments[{i}] ({shortened(seg.name)}): fitting {fitting.type!r} has no row in the "
                        f"{self.fitting_method} table; known there: {', '.join(known)}")
        return self


# ------------------------------------------------------------------------------------------
# Heating


class SelfRegulatingPoint(_Model):
    temperature: Temperature
    output: LinearPower


class Tracing(_Model):
    """The line's heat tracing: one system with one setpoint for the traced segments."""

    kind: Literal["none", "electric_constant", "electric_self_regulating", "steam"] = "none"
    setpoint: Optional[Temperature] = Field(None, description="thermostat setpoint on the pipe wall (electric); optional for steam")
    output: LinearPower = Field(0.0, description="constant-wattage output, or self-regulating output at 10 degC pipe temperature")
    zero_output_temperature: Temperature = Field(393.15, description="self-regulating: pipe temperature at which output falls to zero (linear default)")
    output_curve: list[SelfRegulatingPoint] = Field(default_factory=list, description="self-regulating: user curve of output against pipe temperature")
    circuits_per_metre: float = Field(1.0, ge=0.1, le=10.0, description="heater runs (or steam tracers) per metre of pipe [-]")
    heater_to_pipe_conductance: LinearConductance = Field(1.5, description="sheath-to-pipe conductance per run [W/(m·K)] (typical taped-on heater [mem])")
    max_exposure_temperature: Optional[Temperature] = None
    steam_pressure: Quantity("pressure", ge=0.0, le=4.0e6, description="steam supply pressure (gauge)") = 3.5e5
    heat_transfer_cement: bool = False
    tracer_conductance: Optional[LinearConductance] = Field(None, description="steam tracer-to-pipe conductance per tracer; default from cement choice")
    sensing: Literal["pipe_wall", "product", "ambient"] = Field(
        "pipe_wall", description="where the thermostat senses: the pipe wall (holds the wall at the setpoint), the "
        "product (holds the product at the setpoint) or the ambient (full output below switch_temperature, else off)")
    switch_temperature: Optional[Temperature] = Field(None, description="ambient sensing: the heater runs below this ambient temperature")

    @field_validator("circuits_per_metre")
    @classmethod
    def _heat_per_metre(cls, runs: float, info):
        """All runs together: at most HEAT_PER_METRE_MAX_W_M per metre of pipe (the output fields are
        validated before this one)."""
        if info.data.get("kind") not in ("electric_constant", "electric_self_regulating"):
            return runs
        curve = info.data.get("output_curve") or []
        per_run = max([info.data.get("output") or 0.0] + [point.output for point in curve])
        if runs * per_run > HEAT_PER_METRE_MAX_W_M:
            raise ValueError(f"{runs:g} runs x {per_run:g} W/m = {runs * per_run:,.0f} W per metre of pipe, above the "
                             f"{HEAT_PER_METRE_MAX_W_M:,.0f} W/m electric tracing can put into a pipe: give at most "
                             f"{HEAT_PER_METRE_MAX_W_M / per_run:.3g} runs per metre, or lower tracing.output")
        return runs

    @model_validator(mode="after")
    def _complete(self):
        if self.sensing == "ambient" and self.switch_temperature is None:
            raise ValueError("ambient sensing needs switch_temperature (the heater runs below it)")
        if self.kind in ("electric_constant", "electric_self_regulating"):
            if self.setpoint is None and self.sensing != "ambient":
                raise ValueError(f"{self.kind} tracing needs a setpoint")
            if self.kind == "electric_constant" and self.output <= 0:
                raise ValueError("electric_constant tracing needs its output (W/m) above 0")
            if self.kind == "electric_self_regulating" and self.output <= 0 and not self.output_curve:
                raise ValueError("self-regulating tracing needs output (W/m at 10 degC) or an output_curve")
            if len(self.output_curve) == 1:
                raise ValueError("an output_curve needs at least two points")
        return self
