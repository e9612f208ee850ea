"""A product as the march sees it: properties as fast functions of temperature [K], SI out.

Built from a validated ``ProductSpec``: the viscosity law is fitted from the lab points (or taken
from its coefficients), kinematic laws are turned into dynamic viscosity with the density law, and
the fitted temperature range is kept so that evaluating outside it is reported as extrapolation.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from planner.scenario.product_spec import PROPERTY_REFERENCE_K
from planner.scenario.schema import ProductSpec, Scenario, calibration_of
from planner.correlations.steam import saturation_pressure
from planner.correlations.viscosity import AndradeLaw, VogelFulcherTammannLaw, WaltherLaw
from planner.correlations.viscosity_fit import fit_viscosity_law


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

    Examples
    --------
    Water from two lab points, 1.0016 mPa s at 20 degC and 0.46604 at 60 degC [1], with water
    activity 1: at 40 degC the Andrade law gives 2.1 % above the reference's 0.65273 mPa s [1], and
    the vapour pressure at 373.124 K is one standard atmosphere, 101.325 kPa (IAPWS-IF97 [2]):

    >>> from planner.scenario.schema import scenario_from_dict
    >>> scenario = scenario_from_dict({"schema_version": 1, "name": "example",
    ...     "site": {"name": "bench", "ambient_temperature": 20.0, "wind_speed": 0.0},
    ...     "product": {"name": "water", "density": 998.0, "density_slope": 0.0, "specific_heat": 4184.0,
    ...                 "thermal_conductivity": 0.6, "no_flow_temperature": 1.0, "max_temperature": 95.0,
    ...                 "water_activity": 1.0, "viscosity": {"law": "andrade", "points": [
    ...                     {"temperature": 20.0, "viscosity": "1.0016 mPa s"},
    ...                     {"temperature": 60.0, "viscosity": "0.46604 mPa s"}]}},
    ...     "route": {"segments": [{"name": "run", "nps": "2", "schedule": "40", "length": 100.0}]},
    ...     "tracing": {"kind": "none"}, "operation": {"flow": "5 m3/h", "inlet_temperature": 20.0}})
    >>> water = scenario_product(scenario)
    >>> abs(water.viscosity(313.15) / 0.65273e-3 - 1) < 0.03, round(water.vapour_pressure(373.124) / 1e3, 1)
    (True, 101.3)
    >>> water.is_extrapolation(313.15), water.is_extrapolation(353.15)     # lab points span 20-60 degC
    (False, True)

    References
    ----------
    [1] Huber, M. L., et al., J. Phys. Chem. Ref. Data 38 (2009) 101-125 (IAPWS 2008 viscosity, by
        iapws 1.5.5; ../shared/REFERENCES.md).
    [2] IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997, section 8.
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
        return self._cp + self._cp_slope * (t - PROPERTY_REFERENCE_K)

    def conductivity(self, t: float) -> float:
        return self._k + self._k_slope * (t - PROPERTY_REFERENCE_K)

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
    ``viscosity_factor``, the sensitivity studies' own scaling).

    Examples
    --------
    The oil of ``scenario.examples`` follows Andrade's law mu = exp(a + b / T) with a = b = 0 [1]:
    1 Pa s at every temperature, so twice that with a factor of 2 (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> oil = scenario_product(example_scenario("oil line"), viscosity_factor=2.0)
    >>> oil.viscosity(293.15), oil.viscosity(353.15), oil.density(300.0)
    (2.0, 2.0, 900.0)

    References
    ----------
    [1] Andrade, E. N. da C., The viscosity of liquids, Nature 125 (1930) 309-310 [mem].
    """
    return Product(scenario.product, viscosity_factor=viscosity_factor * calibration_of(scenario).viscosity_factor)
