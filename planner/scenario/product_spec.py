"""The scenario's product section: lab points, the viscosity law (given or fitted) and the product's
properties and limits.
"""

from __future__ import annotations

import json
import math
from typing import Literal, Optional

from pydantic import Field, field_validator, model_validator

from planner.correlations.viscosity import AndradeLaw, WaltherLaw, walther_cst_to_z
from planner.correlations.viscosity_fit import fit_viscosity_law
from planner.scenario.units import unit_label
from planner.scenario.fields import (COLDEST_K, Conductivity, ConductivitySlope, Density, DensitySlope,
                                     DynamicViscosity, KinematicViscosity, SpecificHeat, SpecificHeatSlope,
                                     Temperature, VapourPressure, YieldStress, _Model)


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


PROPERTY_REFERENCE_K = 293.15   # specific heat and conductivity are given at 20 degC, their slopes about it


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
        self._properties_positive()
        if self.viscosity.law == "vft":
            self._vft_domain()
        else:
            self._law_has_values()
        return self

    def _properties_positive(self) -> None:
        """Density, specific heat and conductivity are linear in temperature; each must stay above zero from the
        coldest temperature a scenario allows (``COLDEST_K``) to the product's maximum, or the march divides
        by zero (a slope of -50 J/(kg K^2) on 2,000 J/(kg K) reaches zero 40 K below 20 degC)."""
        laws = (("density_slope", "density", self.density, self.density_slope, self.density_reference_temperature,
                 "density"),
                ("specific_heat_slope", "specific heat", self.specific_heat, self.specific_heat_slope,
                 PROPERTY_REFERENCE_K, "specific_heat"),
                ("conductivity_slope", "thermal conductivity", self.thermal_conductivity, self.conductivity_slope,
                 PROPERTY_REFERENCE_K, "conductivity"))
        for name, what, value, slope, t_ref, kind in laws:
            for t in (COLDEST_K, self.max_temperature):
                at = value + slope * (t - t_ref)
                if not at > 0.0:
                    raise ValueError(f"{name}: with a slope of {slope:.6g} the {what} falls to {at:.4g} {unit_label(kind, 'SI')} at "
                                     f"{t - 273.15:.6g} °C; it must stay above zero from {COLDEST_K - 273.15:g} °C (the "
                                     "coldest ambient) to the product's max_temperature: check the slope and its units")

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
        return self.density_function()(t)

    def density_function(self):
        """The density law rho(T) [kg/m3, T in K] as a plain function (the march calls it ~10^5 times a plan)."""
        rho0, slope, t_ref = self.density, self.density_slope, self.density_reference_temperature
        return lambda t: rho0 + slope * (t - t_ref)

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
