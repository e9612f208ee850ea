"""The line as the march sees it: segments resolved to diameters, layers, fittings and surroundings.

``build_line`` turns the validated route of a scenario into plain-float ``LineSegment`` objects
(SI), so the hot loop does no lookups.  Segment boundaries keep their distance from the inlet.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

from planner.correlations.fittings import fitting_coefficients
from planner.correlations.materials import INSULATION_MATERIALS, ROUGHNESS, WALL_CONDUCTIVITY
from planner.correlations.pipes import parse_nps, pipe_size
from planner.correlations.ratings import flange_rating
from planner.scenario.schema import Route, Segment, Site

HOSE_DEFAULT_WALL_M = 0.012  # reinforced hose wall, for the thermal path only [mem]
ARM_DEFAULT_WALL_M = 0.006


@dataclass
class Layer:
    inner_radius: float
    outer_radius: float
    conductivity: float | None   # fixed k [W/m K], or None to use the material's k(T)
    material: str | None

    def conductivity_at(self, mean_temperature: float) -> float:
        if self.conductivity is not None:
            return self.conductivity
        return INSULATION_MATERIALS[self.material].conductivity_at(mean_temperature)

    @cached_property
    def log_ratio(self) -> float:
        return math.log(self.outer_radius / self.inner_radius)


@dataclass
class LineSegment:
    index: int
    name: str
    kind: str
    x_start: float
    length: float
    inside_diameter: float
    outside_diameter: float
    nominal_diameter_in: float
    relative_roughness: float
    elevation_change: float
    fitting_a: float          # total fittings K = fitting_a / Re + fitting_b
    fitting_b: float
    wall_resistance: float    # K m / W, conduction through the wall
    layers: list[Layer]
    jacket_diameter: float
    emissivity: float
    location: str
    ambient_temperature: float
    wind_speed: float
    soil_resistance: float    # K m / W, buried runs only
    traced: bool
    traced_fraction: float
    pressure_rating: float | None
    flange_class: int | None
    hazardous_area_class: str | None
    spec: Segment = field(repr=False)
    heat_loss_factor: float = 1.0  # [calibration]: divides every outward resistance (layers, surface, soil)

    @property
    def area(self) -> float:
        return math.pi * self.inside_diameter ** 2 / 4.0

    @property
    def x_end(self) -> float:
        return self.x_start + self.length

    def flange_rating_at(self, temperature: float) -> float | None:
        """ASME B16.5 Group 1.1 rating of the segment's flanges at ``temperature`` [K] -> [Pa gauge];
        None without a flange class or outside the table's temperatures."""
        return flange_rating(self.flange_class, temperature) if self.flange_class is not None else None

    def rating_at(self, temperature: float) -> float | None:
        """The pressure the segment may carry with product at ``temperature`` [K]: the lower of its own
        rating (pipe, hose or arm) and its flange rating there [Pa gauge]; None when neither is known."""
        limits = [r for r in (self.pressure_rating, self.flange_rating_at(temperature)) if r is not None]
        return min(limits) if limits else None

    def rating_source_at(self, temperature: float) -> str:
        """Which rating ``rating_at`` took, in words ("own rating", "ASME B16.5 class 150"), or ""."""
        rating = self.rating_at(temperature)
        if rating is None:
            return ""
        if self.pressure_rating is not None and rating == self.pressure_rating:
            return "own rating"
        return f"ASME B16.5 class {self.flange_class}"


def _diameters(seg: Segment) -> tuple[float, float, float]:
    """Inside and outside diameter [m] and nominal size [in] of a segment."""
    if seg.nps is not None:
        size = pipe_size(seg.nps, seg.schedule or "40")
        return size.inside_diameter_m, size.outside_diameter_m, parse_nps(seg.nps)
    inside = seg.inside_diameter
    default_wall = {"hose": HOSE_DEFAULT_WALL_M, "loading_arm": ARM_DEFAULT_WALL_M}.get(seg.kind, 0.005)
    wall = seg.wall_thickness if seg.wall_thickness is not None else default_wall
    return inside, inside + 2.0 * wall, inside / 0.0254


def _default_roughness(seg: Segment) -> float:
    if seg.kind == "hose":
        return ROUGHNESS["smooth_hose"]
    if seg.kind == "loading_arm":
        return ROUGHNESS["loading_arm"]
    return ROUGHNESS["stainless_steel" if seg.wall_material == "stainless_steel" else "commercial_steel"]


def build_segment(seg: Segment, index: int, x_start: float, site: Site, fitting_method: str,
                  heat_loss_factor: float = 1.0) -> LineSegment:
    """One scenario segment as a ``LineSegment`` starting at ``x_start`` [m] (``build_line`` builds all).

    Examples
    --------
    The oil line of ``scenario.examples`` buried with its axis 1 m deep in soil of 1 W/(m K): the
    jacket's radius is 80.15 mm, and the conduction shape factor of a buried cylinder [1] gives
    acosh(1 / 0.08015) / (2 pi x 1) = 0.5117 K m/W (by hand); buried, it sees no wind:

    >>> import copy
    >>> from planner.scenario.examples import EXAMPLES
    >>> from planner.scenario.schema import scenario_from_dict
    >>> doc = copy.deepcopy(EXAMPLES["oil line"])
    >>> doc["route"]["segments"][0]["surroundings"] = {"location": "buried", "burial_depth": "1 m",
    ...                                               "soil_conductivity": 1.0}
    >>> scenario = scenario_from_dict(doc)
    >>> seg = build_segment(scenario.route.segments[0], 0, 0.0, scenario.site, "hooper")
    >>> round(seg.soil_resistance, 4), seg.wind_speed
    (0.5117, 0.0)

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, Table 4.1,
        case 2 (cylinder of length L buried in a semi-infinite medium).
    """
    inside, outside, nominal_in = _diameters(seg)
    roughness = seg.roughness if seg.roughness is not None else _default_roughness(seg)
    fitting_a, fitting_b = fitting_coefficients(
        [(f.type, f.count) for f in seg.fittings], fitting_method, inside, nominal_in)
    wall_material = seg.wall_material
    if seg.kind == "hose" and wall_material in ("carbon_steel", "stainless_steel"):
        wall_material = "rubber_hose"
    wall_resistance = math.log(outside / inside) / (2.0 * math.pi * WALL_CONDUCTIVITY[wall_material])
    layers = []
    radius = outside / 2.0
    for layer in seg.insulation:
        layers.append(Layer(radius, radius + layer.thickness, layer.conductivity, layer.material))
        radius += layer.thickness
    surroundings = seg.surroundings
    ambient = surroundings.ambient_temperature if surroundings.ambient_temperature is not None else site.ambient_temperature
    wind = surroundings.wind_speed if surroundings.wind_speed is not None else site.wind_speed
    if surroundings.location in ("indoor", "sheltered", "buried"):
        wind = 0.0 if surroundings.wind_speed is None else wind
    soil_resistance = 0.0
    if surroundings.location == "buried":
        depth = max(surroundings.burial_depth, radius * 1.01)
        # Conduction shape factor of a buried cylinder, S = 2 pi / acosh(2z/D) per metre
        # (Incropera, Fundamentals of Heat and Mass Transfer, Table 4.1, case 2).
        soil_resistance = math.acosh(depth / radius) / (2.0 * math.pi * surroundings.soil_conductivity)
        soil_resistance /= heat_loss_factor
    traced_fraction = 1.0 - seg.untraced_length / seg.length if seg.traced else 0.0
    return LineSegment(
        index=index, name=seg.name, kind=seg.kind, x_start=x_start, length=seg.length,
        inside_diameter=inside, outside_diameter=outside, nominal_diameter_in=nominal_in,
        relative_roughness=roughness / inside, elevation_change=seg.elevation_change,
        fitting_a=fitting_a, fitting_b=fitting_b, wall_resistance=wall_resistance, layers=layers,
        jacket_diameter=2.0 * radius, emissivity=seg.jacket_emissivity, location=surroundings.location,
        ambient_temperature=ambient, wind_speed=wind, soil_resistance=soil_resistance,
        traced=seg.traced, traced_fraction=traced_fraction, pressure_rating=seg.pressure_rating,
        flange_class=seg.flange_class, hazardous_area_class=seg.hazardous_area_class, spec=seg,
        heat_loss_factor=heat_loss_factor,
    )


def build_line(route: Route, site: Site, heat_loss_factor: float = 1.0) -> list[LineSegment]:
    """The route's segments as ``LineSegment``s, each with its distance from the inlet;
    ``heat_loss_factor`` (the scenario's ``[calibration]``) multiplies heat loss to the surroundings.

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC): diameters from the B36.10M table [1]; the jacket 60.3 + 2 x 50 =
    160.3 mm; the wall ln(60.3/52.48) / (2 pi 45) = 4.91e-4 K m/W (carbon steel 45 W/(m K) [2] [mem]):

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> seg = build_line(scenario.route, scenario.site)[0]
    >>> round(seg.inside_diameter * 1000, 2), round(seg.jacket_diameter * 1000, 1), f"{seg.wall_resistance:.3g}"
    (52.48, 160.3, '0.000491')

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    [2] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, eq. 3.33 and
        Table A.1 (carbon steel) [mem].
    """
    segments = []
    x = 0.0
    for index, seg in enumerate(route.segments):
        segments.append(build_segment(seg, index, x, site, route.fitting_method, heat_loss_factor))
        x += seg.length
    return segments
