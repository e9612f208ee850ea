"""A product as the march sees it: properties as fast functions of temperature [K], SI out.

Built from a validated ``ProductSpec``: the viscosity law is fitted from the lab points (or taken
from its coefficients), kinematic laws are turned into dynamic viscosity with the density law, and
the fitted temperature range is kept so that evaluating outside it is reported as extrapolation.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from planner.scenario.schema import ProductSpec, Scenario, calibration_of
from planner.correlations.steam import saturation_pressure
from planner.correlations.viscosity import AndradeLaw, VogelFulcherTammannLaw, WaltherLaw, fit_viscosity_law


@dataclass
class ViscosityFitInfo:
    law: str
    parameters: dict
    rms_log_residual: float
    max_relative_residual: float
    t_min: float
    t_max: float
    n_points: int

# A lab point's temperature is known to a few tenths of a kelvin [common practice: a calibrated bath
# thermometer]; within 1 K of the outermost point the law is read as measured, not extrapolated.
EXTRAPOLATION_TOLERANCE = 1.0    # K


class Product:
    """Temperature-dependent properties of one product.

    ``density(T)`` [kg/m3] and ``viscosity(T)`` [Pa s] are functions of temperature [K].  For
    non-Newtonian products ``viscosity`` is the consistency K(T) [Pa s^n] of the power law or
    Herschel–Bulkley model; ``flow_index`` and ``yield_stress`` complete the model.
    """

    def __init__(self, spec: ProductSpec, viscosity_factor: float = 1.0):
        """``viscosity_factor`` scales the viscosity law (sensitivity studies: lab uncertainty)."""
        if not viscosity_factor > 0.0:
            raise ValueError(f"viscosity_factor must be greater than 0, got {viscosity_factor!r}")
        self.spec = spec
        self.viscosity_factor = viscosity_factor
        self.name = spec.name
        self.rheology = spec.rheology
        self.flow_index = spec.flow_index
        self.yield_stress = spec.yield_stress
        self.no_flow_temperature = spec.no_flow_temperature
        self.max_temperature = spec.max_temperature
        self.flash_point = spec.flash_point
        self._cp = spec.specific_heat
        self._cp_slope = spec.specific_heat_slope
        self._k = spec.thermal_conductivity
        self._k_slope = spec.conductivity_slope
        # the laws are bound as plain functions: the march calls them ~10^5 times per plan
        self.density = spec.density_function()      # density(T) [kg/m3]
        self._law, self.fit = self._build_law(spec)
        self._kinematic = self._law.quantity == "kinematic"
        self._law_value = self._law.value
        if viscosity_factor != 1.0:
            law_value = self._law.value
            self._law_value = lambda t: viscosity_factor * law_value(t)
        density = self.density
        if not self._kinematic:   # (a kinematic law times the density)
            self.viscosity = self._law_value
        else:
            kinematic = self._law_value
            self.viscosity = lambda t: kinematic(t) * density(t)

    # -- construction ---------------------------------------------------------------------
    def _build_law(self, spec: ProductSpec):
        v = spec.viscosity
        if v.coefficients is not None:
            c = v.coefficients
            law = {
                "andrade": lambda: AndradeLaw(c["a"], c["b"]),
                "vft": lambda: VogelFulcherTammannLaw(c["a"], c["b"], c["c"]),
                "walther": lambda: WaltherLaw(c["a"], c["b"]),
            }[v.law]()
            info = ViscosityFitInfo(v.law, law.parameters(), 0.0, 0.0, -math.inf, math.inf, 0)
            return law, info
        temperatures = [p.temperature for p in v.points]
        values = []
        for point in v.points:
            if v.law == "walther":
                values.append(point.kinematic_viscosity if point.kinematic_viscosity is not None
                              else point.viscosity / self.density(point.temperature))
            else:
                values.append(point.viscosity if point.viscosity is not None
                              else point.kinematic_viscosity * self.density(point.temperature))
        fit = fit_viscosity_law(v.law, temperatures, values)
        info = ViscosityFitInfo(v.law, fit.law.parameters(), fit.rms_log_residual, fit.max_relative_residual,
                                fit.t_min, fit.t_max, fit.n_points)
        return fit.law, info

    # -- properties -------------------------------------------------------------------------
    def specific_heat(self, t: float) -> float:
        return self._cp + self._cp_slope * (t - 293.15)

    def conductivity(self, t: float) -> float:
        return self._k + self._k_slope * (t - 293.15)

    def kinematic_viscosity(self, t: float) -> float:
        if self._kinematic:
            return self._law_value(t)
        return self._law_value(t) / self.density(t)

    def vapour_pressure(self, t: float) -> float:
        """Absolute vapour pressure [Pa]: water activity x water's (IF97) for water-based products."""
        if self.spec.water_activity is not None:
            t_clamped = min(max(t, 273.16), 640.0)
            return self.spec.water_activity * saturation_pressure(t_clamped)
        return self.spec.vapour_pressure

    def is_extrapolation(self, t: float) -> bool:
        """``t`` [K] more than EXTRAPOLATION_TOLERANCE outside the lab points' temperatures."""
        return t < self.fit.t_min - EXTRAPOLATION_TOLERANCE or t > self.fit.t_max + EXTRAPOLATION_TOLERANCE

    @property
    def newtonian(self) -> bool:
        return self.rheology == "newtonian"


def scenario_product(scenario: Scenario, viscosity_factor: float = 1.0) -> Product:
    """The scenario's product with its ``[calibration]`` viscosity factor applied (times
    ``viscosity_factor``, the sensitivity studies' own scaling)."""
    return Product(scenario.product, viscosity_factor=viscosity_factor * calibration_of(scenario).viscosity_factor)
