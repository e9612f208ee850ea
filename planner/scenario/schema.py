"""The scenario: a typed, validated description of one transfer, read from TOML or JSON.

Quantities may be plain numbers (the field's default unit, listed in the JSON Schema: SI, with
temperatures in degC and insulation thickness in mm) or strings with units ("4 in", "55 degC",
"40 m3/h", "1250 ft", "350 cP", "180 cSt").  Inside the model every quantity is an SI float
(kelvin, Pa, m, m3/s ...).  Writing back gives plain numbers in the default units.
"""

from __future__ import annotations

import contextlib
import json
import math
import re
import tomllib
from pathlib import Path
from typing import Literal, Optional

import tomli_w
from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator, model_validator

from planner.errors import ScenarioError
from planner.correlations.materials import INSULATION_MATERIALS
from planner.correlations.viscosity import AndradeLaw, WaltherLaw, fit_viscosity_law, walther_cst_to_z
from planner.scenario.quantities import Quantity, readable_dump
from planner.scenario.units import LongInteger

SCHEMA_VERSION = 1

# The highest temperature the planner's models are meant for (air, insulation, product data): the
# schema's highest input, and a stop wherever a plan computes past it.
TEMPERATURE_CEILING_K = 773.15

# Quantity types with the limits a planner can defend; bounds in SI.
Temperature = Quantity("temperature", gt=0.0, le=TEMPERATURE_CEILING_K, description="temperature")
Length = Quantity("length", ge=0.01, le=50_000.0, description="length along the line")
Elevation = Quantity("length", ge=-500.0, le=500.0, description="rise from segment inlet to outlet (negative: falls)")
Thickness = Quantity("small_length", gt=0.0, le=0.5, description="thickness")
Diameter = Quantity("small_length", gt=0.002, le=2.0, description="diameter")
Roughness = Quantity("small_length", ge=0.0, le=0.01, description="absolute roughness")
Conductivity = Quantity("conductivity", gt=0.0, le=500.0, description="thermal conductivity")
GaugePressure = Quantity("pressure", ge=-1.0e5, le=5.0e7, description="gauge pressure")
Rating = Quantity("pressure", gt=0.0, le=5.0e7, description="pressure rating (gauge)")
Flow = Quantity("volume_flow", ge=1.0e-6, le=2.0, description="volumetric flow rate")
WindSpeed = Quantity("speed", ge=0.0, le=60.0, description="wind speed")
# Electric trace heaters deliver up to a few hundred W per metre of heater run (mineral-insulated series
# cables are the strongest; polymer self-regulating and power-limiting heaters stay below about 100 W/m)
# [common practice, from memory]; all runs together are held to HEAT_PER_METRE_MAX per metre of pipe.
HEATER_OUTPUT_MAX_W_M = 500.0
HEAT_PER_METRE_MAX_W_M = 2000.0
LinearPower = Quantity("linear_power", ge=0.0, le=HEATER_OUTPUT_MAX_W_M, description="heater output per metre of heater run")
LinearConductance = Quantity("linear_conductance", gt=0.0, le=1000.0, description="conductance per metre")
Density = Quantity("density", gt=100.0, le=5000.0, description="density")
DensitySlope = Quantity("density_slope", ge=-10.0, le=10.0, description="change of density per kelvin")
SpecificHeat = Quantity("specific_heat", gt=100.0, le=10_000.0, description="specific heat capacity")
SpecificHeatSlope = Quantity("dimensionless", ge=-50.0, le=50.0, description="change of specific heat per kelvin [J/(kg·K²)]")
ConductivitySlope = Quantity("dimensionless", ge=-0.01, le=0.01, description="change of conductivity per kelvin [W/(m·K²)]")
DynamicViscosity = Quantity("dynamic_viscosity", gt=0.0, le=1.0e7, description="dynamic viscosity")
KinematicViscosity = Quantity("kinematic_viscosity", gt=0.0, le=1.0e4, description="kinematic viscosity")
YieldStress = Quantity("yield_stress", ge=0.0, le=1.0e5, description="yield stress")
# Air or soil around a line: -90 to +70 degC spans the recorded extremes at the Earth's surface
# ([mem] unverified: about -89 and +57 degC); the air and viscosity models are not used beyond it.
COLDEST_K = 183.15     # the lowest ambient temperature a scenario may give: a wall can be that cold
Ambient = Quantity("temperature", ge=COLDEST_K, le=343.15, description="ambient temperature")
VapourPressure = Quantity("pressure", ge=0.0, le=1.0e7, description="vapour pressure (absolute)")


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", validate_assignment=True)


# ------------------------------------------------------------------------------------------
# Product


class LabPoint(_Model):
    """One measured viscosity: give ``viscosity`` (dynamic) or ``kinematic_viscosity``."""

    temperature: Temperature
    viscosity: Optional[DynamicViscosity] = None
    kinematic_viscosity: Optional[KinematicViscosity] = None

    @model_validator(mode="after")
    def _one_value(self):
        if (self.viscosity is None) == (self.kinematic_viscosity is None):
            raise ValueError("give exactly one of 'viscosity' (dynamic, e.g. '350 cP') or 'kinematic_viscosity' (e.g. '180 cSt')")
        return self


class ViscositySpec(_Model):
    """A viscosity-temperature law, fitted from lab points or given by its coefficients."""

    law: Literal["andrade", "vft", "walther"] = "andrade"
    points: list[LabPoint] = Field(default_factory=list)
    coefficients: Optional[dict[str, float]] = None

    @field_validator("points")
    @classmethod
    def _falling_with_temperature(cls, points):
        """Viscosity falls as the temperature rises, for every liquid the planner is for: a lab point
        that is not below the one at the next lower temperature is a typing or unit error."""
        for kind in ("viscosity", "kinematic_viscosity"):
            measured = sorted((p.temperature, getattr(p, kind), i) for i, p in enumerate(points)
                              if getattr(p, kind) is not None)
            for (t1, v1, i1), (t2, v2, i2) in zip(measured, measured[1:]):
                if t2 > t1 and not v2 < v1:
                    raise ValueError(
                        f"lab point {i2 + 1} (the warmer) has a {kind.replace('_', ' ')} not below that of lab "
                        f"point {i1 + 1}: viscosity must fall as the temperature rises; check the values and "
                        "their units")
        return points

    @model_validator(mode="after")
    def _points_or_coefficients(self):
        needed = {"andrade": 2, "vft": 3, "walther": 2}[self.law]
        if self.coefficients is None:
            if len(self.points) < needed:
                raise ValueError(f"law '{self.law}' needs at least {needed} lab points (got {len(self.points)}) or its coefficients")
            temperatures = [p.temperature for p in self.points]
            if len(set(round(t, 6) for t in temperatures)) != len(temperatures):
                raise ValueError("lab points must be at different temperatures")
        else:
            names = {"andrade": {"a", "b"}, "vft": {"a", "b", "c"}, "walther": {"a", "b"}}[self.law]
            if set(self.coefficients) != names:
                raise ValueError(f"law '{self.law}' takes coefficients {sorted(names)}, got {sorted(self.coefficients)}")
            if not all(math.isfinite(v) for v in self.coefficients.values()):
                raise ValueError("coefficients must be finite numbers")
        return self


def _point_value(point: LabPoint, density: float, kinematic: bool) -> float:
    """A lab point's viscosity as the law takes it: kinematic [m2/s] for walther, dynamic [Pa s] otherwise."""
    if kinematic:
        return point.kinematic_viscosity if point.kinematic_viscosity is not None else point.viscosity / density
    return point.viscosity if point.viscosity is not None else point.kinematic_viscosity * density


class ProductSpec(_Model):
    """A liquid product. ``preset`` names an entry of ``planner.scenario.presets.PRODUCT_PRESETS``;
    fields given beside it override the preset's."""

    preset: Optional[str] = None
    name: str = Field(min_length=1, max_length=120)
    illustrative: bool = False
    density: Density
    density_reference_temperature: Temperature = 288.15
    density_slope: DensitySlope = -0.6
    specific_heat: SpecificHeat
    specific_heat_slope: SpecificHeatSlope = 0.0
    thermal_conductivity: Conductivity
    conductivity_slope: ConductivitySlope = 0.0
    viscosity: ViscositySpec
    rheology: Literal["newtonian", "power_law", "herschel_bulkley"] = "newtonian"
    flow_index: float = Field(1.0, gt=0.1, le=2.0, description="power-law flow index n [-]")
    yield_stress: YieldStress = 0.0
    no_flow_temperature: Temperature = Field(description="pour, setting or crystallisation temperature")
    max_temperature: Temperature = Field(description="highest temperature the product may be held at")
    flash_point: Optional[Temperature] = None
    vapour_pressure: VapourPressure = 1000.0
    water_activity: Optional[float] = Field(None, gt=0.0, le=1.0, description="water-based products: vapour pressure = activity x water's")

    @model_validator(mode="before")
    @classmethod
    def _apply_preset(cls, data):
        if isinstance(data, dict) and data.get("preset"):
            from planner.scenario.presets import PRODUCT_PRESETS

            name = data["preset"]
            if not isinstance(name, str) or name not in PRODUCT_PRESETS:
                raise ValueError(f"unknown product preset {name!r}; presets are {', '.join(sorted(PRODUCT_PRESETS))}")
            merged = json.loads(json.dumps(PRODUCT_PRESETS[name]))
            merged.update(data)
            return merged
        return data

    @model_validator(mode="after")
    def _consistent(self):
        if self.max_temperature <= self.no_flow_temperature:
            raise ValueError("max_temperature must be above no_flow_temperature")
        if self.rheology == "newtonian" and (self.flow_index != 1.0 or self.yield_stress != 0.0):
            raise ValueError("a newtonian product takes flow_index 1 and yield_stress 0; choose rheology 'power_law' or 'herschel_bulkley'")
        if self.rheology == "power_law" and self.yield_stress != 0.0:
            raise ValueError("a power_law product has no yield stress; choose 'herschel_bulkley'")
        if self.rheology != "newtonian" and self.viscosity.law == "walther":
            raise ValueError("the walther law is for kinematic viscosity of Newtonian oils; use andrade or vft for the consistency")
        if self.viscosity.law == "vft":
            self._vft_domain()
        else:
            self._law_has_values()
        return self

    def _law_has_values(self) -> None:
        """An Andrade or Walther law must give a finite viscosity from the coldest temperature a scenario
        allows anywhere (``COLDEST_K``: a wall at the coldest ambient) to the product's maximum; a Walther
        fit needs every lab point inside the ASTM D341 range (Z > 1, about 0.11 cSt and up)."""
        v = self.viscosity
        if v.coefficients is not None:
            law = {"andrade": AndradeLaw, "walther": WaltherLaw}[v.law](v.coefficients["a"], v.coefficients["b"])
            given = f"the {v.law} law with a = {v.coefficients['a']:.6g}, b = {v.coefficients['b']:.6g}"
        else:
            kinematic = v.law == "walther"
            values = [_point_value(p, self.density_at(p.temperature), kinematic) for p in v.points]
            for i, value in enumerate(values):
                if kinematic and not walther_cst_to_z(value * 1e6) > 1.0:
                    raise ValueError(f"viscosity.points[{i}]: lab point {i + 1} has a kinematic viscosity of "
                                     f"{value * 1e6:.3g} cSt, below the ASTM D341 range of the walther law (Z > 1: "
                                     "about 0.11 cSt and up); use the andrade law for so thin a liquid")
            law = fit_viscosity_law(v.law, [p.temperature for p in v.points], values).law
            given = f"the {v.law} law fitted to the lab points"
        for t in (COLDEST_K, self.max_temperature):
            try:
                value = law.value(t)
            except (ValueError, ArithmeticError):
                value = math.nan
            if not (math.isfinite(value) and value > 0.0):
                raise ValueError(f"viscosity: {given} has no finite viscosity at {t - 273.15:.6g} °C (the planner "
                                 f"needs one from {COLDEST_K - 273.15:g} °C, the coldest ambient, to the product's "
                                 "max_temperature); check the coefficients or lab points and their units")

    def density_at(self, t: float) -> float:
        """Density [kg/m3] at ``t`` [K] (linear in temperature about the reference)."""
        return self.density + self.density_slope * (t - self.density_reference_temperature)

    def _vft_domain(self) -> None:
        """A VFT law ln mu = a + b/(T - c) is a viscosity law only for b > 0 (falling with temperature)
        and T > c; the planner asks for it down to the product's no-flow temperature."""
        v = self.viscosity
        if v.coefficients is not None:
            b, c = v.coefficients["b"], v.coefficients["c"]
        else:
            values = [_point_value(p, self.density_at(p.temperature), False) for p in v.points]
            law = fit_viscosity_law("vft", [p.temperature for p in v.points], values).law
            b, c = law.b, law.c
        if not b > 0.0:
            raise ValueError(f"viscosity: the VFT constant b = {b:.6g} K must be > 0 (viscosity falling as the "
                             "temperature rises)")
        if not c < self.no_flow_temperature:
            raise ValueError(f"viscosity: the VFT constant c = {c:.6g} K must be below the no_flow_temperature "
                             f"({self.no_flow_temperature:.6g} K): the law has no value at or below c; add a lab point "
                             "nearer the no-flow temperature or use the andrade law")


# ------------------------------------------------------------------------------------------
# Route


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

        known = fitting_names(self.fitting_method)
        for i, seg in enumerate(self.segments):
            for fitting in seg.fittings:
                if fitting.type not in known:
                    raise ValueError(
                        f"segments[{i}] ({seg.name}): fitting {fitting.type!r} has no row in the "
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


class Site(_Model):
    name: str = Field("", max_length=120)
    ambient_temperature: Ambient
    wind_speed: WindSpeed = 0.0
    design_ambient_temperature: Optional[Ambient] = Field(None, description="coldest ambient the plan must hold at; default: ambient")


class Operation(_Model):
    flow: Flow
    inlet_temperature: Temperature
    inlet_pressure: GaugePressure = Field(0.0, description="gauge pressure at the route inlet (pump discharge)")


# ------------------------------------------------------------------------------------------
# Pump, vessels, costs and schedule (used by `plan`; `evaluate` needs only the sections above)

Head = Quantity("length", gt=0.0, le=2000.0, description="pump head")
Volume = Quantity("volume", gt=0.0, le=1.0e6, description="volume")
Power = Quantity("power", gt=0.0, le=1.0e7, description="power")
Speed = Quantity("rotational_speed", gt=0.0, le=500.0, description="rotational speed")
Duration = Quantity("time", gt=0.0, le=30 * 86400.0, description="duration")


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
    stop_duration: Duration = Field(3600.0, description="a stop to check restart for")
    limiting_viscosity: Optional[DynamicViscosity] = Field(None, description="viscosity above which the line counts as unable to restart")
    timeline_steps: int = Field(60, ge=10, le=1000)


class Limits(_Model):
    """Thresholds of the checks; defaults are common practice and can be set per site."""

    touch_temperature: Temperature = Field(333.15, description="hottest metal jacket a person may touch (60 degC: common practice, ASTM C1055 5 s contact basis)")
    max_velocity: Quantity("speed", gt=0.0, le=20.0, description="highest sensible line velocity") = 3.0
    min_velocity: Quantity("speed", ge=0.0, le=5.0, description="lowest sensible line velocity") = 0.05
    npsh_margin: Quantity("length", ge=0.0, le=20.0, description="NPSH margin wanted above the pump's requirement") = 0.6
    flash_point_margin: Quantity("temperature_difference", ge=0.0, le=100.0, description="keep the product this far below its flash point") = 10.0
    poor_film_coefficient: Quantity("heat_transfer_coefficient", ge=0.0, le=1000.0, description="inner film coefficient below which laminar heat transfer counts as poor") = 20.0


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


class Scenario(_Model):
    schema_version: int = SCHEMA_VERSION
    name: str = Field(min_length=1, max_length=160)
    description: str = Field("", max_length=4000)
    site: Site
    product: ProductSpec
    route: Route
    tracing: Tracing = Field(default_factory=Tracing)
    operation: Operation
    suction: Optional[Route] = Field(None, description="route from the source outlet to the pump; none: pump at the outlet")
    pump: Optional[PumpSpec] = None
    source: Optional[Vessel] = None
    destination: Optional[Destination] = None
    costs: Costs = Field(default_factory=Costs)
    schedule: Schedule = Field(default_factory=Schedule)
    limits: Limits = Field(default_factory=Limits)
    calibration: Optional[Calibration] = Field(None, description="site factors fitted to logged transfers; none: all 1")

    @field_validator("schema_version")
    @classmethod
    def _version(cls, value):
        if value > SCHEMA_VERSION:
            raise ValueError(f"schema_version {value} is newer than this planner reads ({SCHEMA_VERSION}); update the planner")
        if value < 1:
            raise ValueError("schema_version must be at least 1")
        return value


# ------------------------------------------------------------------------------------------
# Reading and writing


def _loc(loc: tuple) -> str:
    text = ""
    for part in loc:
        if isinstance(part, int):
            text += f"[{part}]"
        else:
            text += ("." if text else "") + str(part)
    return text


def problems_from(error: ValidationError) -> list[tuple[str, str]]:
    problems = []
    for item in error.errors(include_url=False):
        loc = tuple(p for p in item["loc"] if not (isinstance(p, str) and ("function-" in p or p.startswith("Annotated"))))
        message = item["msg"]
        for prefix in ("Value error, ", "Assertion failed, "):
            if message.startswith(prefix):
                message = message[len(prefix):]
        if item["type"] == "extra_forbidden":
            message = "unknown field (check the spelling; see `python -m planner schema`)"
        if item["type"] == "missing":
            message = "required field is missing"
        problems.append((_loc(loc), message))
    return problems


def scenario_from_dict(data: dict) -> Scenario:
    """Validate a plain dict into a Scenario; raise ScenarioError naming every bad field."""
    if not isinstance(data, dict):
        raise ScenarioError([("", "a scenario must be a table/object at the top level")])
    try:
        scenario = Scenario.model_validate(data)
    except ValidationError as exc:
        raise ScenarioError(problems_from(exc)) from None
    except RecursionError:
        raise ScenarioError([("", "the scenario is nested too deeply to read")]) from None
    from planner.scenario.budget import check_plan

    check_plan(scenario)   # the work budget: a scenario that asks for too much is refused here
    return scenario


MAX_SCENARIO_CHARS = 2_000_000   # a scenario file or text longer than this is refused unread


LONG_INTEGER_DIGITS = 4000      # below Python's int-to-str limit (4,300 digits)
_LONG_INTEGER_MARK = "\x00long integer:"
_LONG_TOML_INTEGER = re.compile(r"(?<![\w.\"'])[+-]?[0-9][0-9_]{%d,}(?![\w.\"'])" % LONG_INTEGER_DIGITS)


def json_integer(digits: str):
    """``json.loads``'s ``parse_int``: a LongInteger past ``LONG_INTEGER_DIGITS`` digits (never Python's
    int-to-str ValueError, which names no field)."""
    return int(digits) if len(digits) <= LONG_INTEGER_DIGITS else LongInteger(len(digits.lstrip("+-")))


def _toml_with_long_integers(text: str) -> object:
    """TOML whose integers may be too long for Python: each such integer is read as a LongInteger,
    so that the field it was given for is refused by name (tomllib has no integer hook)."""
    marked = _LONG_TOML_INTEGER.sub(lambda m: json.dumps(f"{_LONG_INTEGER_MARK}{len(m.group(0).lstrip('+-'))}"), text)
    return _unmark(tomllib.loads(marked))


def _unmark(data):
    if isinstance(data, dict):
        return {k: _unmark(v) for k, v in data.items()}
    if isinstance(data, list):
        return [_unmark(v) for v in data]
    if isinstance(data, str) and data.startswith(_LONG_INTEGER_MARK):
        return LongInteger(int(data[len(_LONG_INTEGER_MARK):]))
    return data


def read_scenario_data(text: str, fmt: str) -> object:
    """The plain data of a TOML or JSON text, or ScenarioError saying why it cannot be read.  A leading
    byte-order mark is dropped; an integer too long for Python is kept as a ``LongInteger`` (refused by
    its field's validator, which names the field)."""
    if len(text) > MAX_SCENARIO_CHARS:
        raise ScenarioError([("", f"the {fmt.upper()} text is {len(text):,} characters, more than a scenario "
                                  f"needs (at most {MAX_SCENARIO_CHARS:,})")])
    text = text.removeprefix("\ufeff")
    try:
        if fmt == "json":
            return json.loads(text, parse_int=json_integer)
        try:
            return tomllib.loads(text)
        except ValueError as exc:
            if isinstance(exc, tomllib.TOMLDecodeError) or not _LONG_TOML_INTEGER.search(text):
                raise
            return _toml_with_long_integers(text)
    except (tomllib.TOMLDecodeError, json.JSONDecodeError) as exc:
        raise ScenarioError([("", f"cannot read the {fmt.upper()} file: {exc}")]) from None
    except RecursionError:
        raise ScenarioError([("", f"cannot read the {fmt.upper()} file: it is nested too deeply")]) from None


def parse_scenario_text(text: str, fmt: str) -> Scenario:
    return scenario_from_dict(read_scenario_data(text, fmt))


def load_scenario(path: str | Path) -> Scenario:
    path = Path(path)
    try:
        with path.open("r", encoding="utf-8") as handle:
            text = handle.read(MAX_SCENARIO_CHARS + 1)
    except OSError as exc:
        raise ScenarioError([("", f"cannot open {path}: {exc.strerror}")]) from None
    except UnicodeDecodeError:
        raise ScenarioError([("", f"cannot read {path}: it is not UTF-8 text")]) from None
    fmt = "json" if path.suffix.lower() == ".json" else "toml"
    return parse_scenario_text(text, fmt)


def scenario_to_dict(scenario: Scenario) -> dict:
    """Plain numbers in the default units; optional fields left unset are dropped."""
    return scenario.model_dump(mode="json", exclude_none=True)


def scenario_to_readable_dict(scenario: Scenario, system: str = "SI") -> dict:
    """The scenario as a person writes it: quantities with their units in ``system`` ("10 bar",
    "55 degC"; "145 psi", "131 degF"), reading back to exactly the same scenario."""
    return readable_dump(scenario, system)


def scenario_to_toml(scenario: Scenario, system: str = "SI") -> str:
    """A TOML scenario file with every quantity written with its unit in ``system``."""
    return tomli_w.dumps(scenario_to_readable_dict(scenario, system))


def scenario_to_json(scenario: Scenario) -> str:
    """The scenario's one canonical JSON text: keys sorted, no spaces, not ASCII-escaped.  Saved revisions
    store it (``records.store``), the dashboard keys its caches and compares revisions with it; two
    scenarios with the same fields give the same text."""
    return json.dumps(scenario_to_dict(scenario), sort_keys=True, separators=(",", ":"), ensure_ascii=False)


def save_scenario(scenario: Scenario, path: str | Path, system: str = "SI") -> None:
    """Write the scenario file (JSON or TOML by the suffix) with its quantities in units of ``system``."""
    path = Path(path)
    if path.suffix.lower() == ".json":
        text = json.dumps(scenario_to_readable_dict(scenario, system), indent=2, ensure_ascii=False)
    else:
        text = scenario_to_toml(scenario, system)
    _write_whole(path, text.encode("utf-8"))


def _write_whole(path: Path, data: bytes) -> None:
    """Write ``data`` to ``path`` whole or not at all: a temporary file beside it, then renamed over it, so a
    full disk never leaves a file cut short (OSError is raised and the old file, if any, is unchanged)."""
    import os
    import tempfile

    if path.exists() and not path.is_file():   # a device or pipe (/dev/stdout, /dev/full): written in place,
        with path.open("wb") as out:           # never replaced by a file
            out.write(data)
        return
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name[:40]}.", suffix=".part", dir=path.parent)
    try:
        with os.fdopen(handle, "wb") as out:
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
        os.chmod(temporary, path.stat().st_mode & 0o777 if path.exists() else 0o644)   # mkstemp makes it 0600
        os.replace(temporary, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise


def json_schema() -> dict:
    return Scenario.model_json_schema()


def field_choices(model: type[BaseModel], field: str) -> tuple:
    """The allowed values of a choice field (its ``Literal[...]``, also inside ``Optional``), in the
    order the schema lists them: ``field_choices(Tracing, "kind")`` -> ``("none", "electric_constant", ...)``.
    Raises ValueError for a field that is not a choice."""
    from typing import get_args, get_origin

    pending = [model.model_fields[field].annotation]
    while pending:
        annotation = pending.pop(0)
        if get_origin(annotation) is Literal:
            return tuple(get_args(annotation))
        pending.extend(a for a in get_args(annotation) if a is not type(None))
    raise ValueError(f"{model.__name__}.{field} is not a choice field")
