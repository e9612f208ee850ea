"""The coefficients of one march evaluation: hydraulics, the inside film and the heat path at one
bulk temperature, over one stretch of a segment.

Friction is Darcy's (``correlations.friction``), in laminar flow the mean apparent factor of the
hydrodynamic entrance over the stretch (Shah 1978: the entrance starts with the thermal one, at the
route inlet and at every change of inside diameter), or the non-Newtonian laws of
``correlations.rheology`` (fully developed); fittings (2-K or 3-K) are spread evenly over their segment; the viscous
heating S is the frictional pressure loss times the volume flow.  The laminar film is the local
coefficient of the thermal entrance averaged over the stretch (``heat_transfer.film_parts``); where
a laminar stretch spans a wide range of distances from the entrance, the bulk-to-surroundings
conductance is averaged over it piecewise (``entrance_mean_conductance``).  The film, wall and
jacket are settled together by ``heat_path.settle``.
"""

from __future__ import annotations

import math
from typing import NamedTuple

from planner.correlations.constants import GRAVITY
from planner.correlations.friction import RE_LAMINAR_MAX, darcy_friction, darcy_laminar_developing
from planner.correlations.heat_transfer import film_parts, nu_laminar_local_over
from planner.correlations.rheology import pipe_flow_non_newtonian
from planner.line.heat_path import HeatPath, WarmStart, settle
from planner.line.products import Product
from planner.line.route import LineSegment
from planner.line.tracing import Heater, WallBalance

PI = math.pi
ENTRANCE_SPLIT_RATIO = 1.5   # a laminar step spanning more than this in distance from the entrance is split


class SegmentConstants:
    """A segment's constants as plain floats for the hot loop, built once per line."""

    __slots__ = ("seg", "heater", "path", "diameter", "area", "relative_roughness", "fitting_a", "fitting_b",
                 "slope", "t_ambient", "length", "density", "viscosity", "specific_heat", "conductivity",
                 "newtonian", "thermostat", "signature", "shows_jacket", "product")

    def __init__(self, seg: LineSegment, heater: Heater, product: Product, kept: dict | None = None):
        """``kept``: heat-path values kept by path (``heat_path.HeatPath.key``), shared with other lines."""
        self.seg, self.product = seg, product
        self.heater = heater if heater.active else None
        self.path = HeatPath(seg, heater, product.viscosity, product.newtonian, kept)
        self.density, self.viscosity = product.density, product.viscosity
        self.specific_heat, self.conductivity = product.specific_heat, product.conductivity
        self.newtonian = product.newtonian
        self.diameter = seg.inside_diameter
        self.area = PI * self.diameter * self.diameter / 4.0
        self.relative_roughness = seg.relative_roughness
        self.fitting_a = seg.fitting_a / seg.length
        self.fitting_b = seg.fitting_b / seg.length
        self.slope = seg.elevation_change / seg.length
        self.t_ambient = seg.ambient_temperature
        self.length = seg.length
        self.thermostat = heater.active and heater.setpoint is not None
        self.shows_jacket = bool(seg.layers) or seg.location == "buried"   # else the jacket is the wall
        # what the heat path is made of: equal signatures, nothing to re-learn at the boundary
        self.signature = (self.diameter, seg.wall_resistance,
                          tuple((layer.log_ratio, layer.conductivity, layer.material) for layer in seg.layers),
                          seg.location, self.t_ambient, seg.wind_speed, seg.emissivity, heater.active, heater.fraction)


class Coefficients(NamedTuple):
    """Everything of one evaluation (a step's midpoint state) the step and the totals need."""

    t_equilibrium: float          # T_eq [K] of the product balance
    conductance: float            # G, bulk to surroundings through the heater's state [W/(m K)]
    viscous_heating: float        # S [W/m] dissipated into the product
    heat_capacity_rate: float     # m cp [W/K]
    wall: WallBalance
    t_bulk: float                 # the bulk temperature evaluated at [K]
    g_inner: float                # film and wall [W/(m K)]
    g_outer: float                # insulation and surface (or soil) [W/(m K)]
    viscosity: float              # bulk (apparent, non-Newtonian) [Pa s]
    reynolds: float
    velocity: float               # [m/s]
    grad_friction: float          # [Pa/m]
    grad_fittings: float
    grad_static: float
    heat_loss: float              # to the surroundings [W/m]
    film_coefficient: float       # h_in [W/(m2 K)]
    viscosity_ratio: float        # mu / mu_wall
    t_jacket: float               # [K]


def evaluate(s: SegmentConstants, mass_flow: float, start: WarmStart, t_eval: float, from_d: float, to_d: float,
             at: float, full_step: bool) -> Coefficients:
    """Coefficients at bulk temperature ``t_eval`` [K] for the stretch [from_d, to_d] (distances from
    the thermal entrance over D), taken as at distance ``at`` [m]: hydraulics, then the film, wall
    and jacket settled together.  ``full_step``: a step's midpoint (the warm start learns from it).

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3; ID 52.48 mm [1]) at 5 m^3/h (1.25 kg/s),
    far from the entrance (x/D = 1e5): Re = rho V D / mu = 30.33, the friction gradient is
    Hagen-Poiseuille's 128 mu Q / (pi D^4) = 7460.2 Pa/m [2] and the viscous heating that gradient
    times the flow, 10.36 W/m [3] (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.line.model import line_from_scenario
    >>> s = line_from_scenario(example_scenario("oil line")).constants[0]
    >>> start = WarmStart(333.15); start.enter(s.path)
    >>> c = evaluate(s, 1.25, start, 333.15, 1e5, 1e5 + 10.0, 50.0, False)
    >>> round(c.reynolds, 2), round(c.grad_friction, 1), round(c.viscous_heating, 2)
    (30.33, 7460.2, 10.36)

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    [2] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow).
    [3] Bird, R. B., Stewart, W. E., Lightfoot, E. N., Transport Phenomena, 2nd ed., Wiley, 2002,
        section 11.4 (viscous dissipation).
    """
    d = s.diameter
    rho = s.density(t_eval)
    velocity = mass_flow / (rho * s.area)
    k_prod = s.viscosity(t_eval)
    if s.newtonian:
        mu = k_prod
        re = rho * velocity * d / mu
        # laminar: the stretch's mean apparent factor of the hydrodynamic entrance (Shah 1978), which
        # starts where the thermal entrance does; 64/Re far from it (the laminar film takes no factor)
        f = darcy_laminar_developing(re, from_d, to_d) if re <= RE_LAMINAR_MAX else \
            darcy_friction(re, s.relative_roughness)
        grad_friction = f * rho * velocity * velocity / (2.0 * d)
    else:
        product = s.product
        flow_nn = pipe_flow_non_newtonian(rho, velocity, d, k_prod, product.flow_index, product.yield_stress)
        re = flow_nn.reynolds
        mu = flow_nn.apparent_viscosity
        f = 4.0 * flow_nn.fanning
        grad_friction = flow_nn.pressure_gradient
    grad_fittings = (s.fitting_a / re + s.fitting_b) * 0.5 * rho * velocity * velocity
    viscous = (grad_friction + grad_fittings) * mass_flow / rho
    cp = s.specific_heat(t_eval)
    conductivity = s.conductivity(t_eval)
    pr = cp * mu / conductivity
    parts = film_parts(re, pr, f, from_d, to_d)
    wall, g_in, g_out, q_out, h_in, ratio = settle(s.path, start, t_eval, viscous, at, (parts, conductivity / d, mu))
    if full_step:
        start.learn(at)
    follows = wall.wall_follows_bulk
    g = g_in * (1.0 - follows)
    if parts[2] == 0.0 and to_d > ENTRANCE_SPLIT_RATIO * from_d:
        g = entrance_mean_conductance(g, h_in, parts[0], re * pr, from_d, to_d, d)
    return Coefficients((wall.t_wall - follows * t_eval) / (1.0 - follows), g, viscous, mass_flow * cp, wall,
                        t_eval, g_in, g_out, mu, re, velocity, grad_friction, grad_fittings, rho * GRAVITY * s.slope,
                        q_out, h_in, ratio, start.t_jacket)


def entrance_mean_conductance(g: float, h_in: float, nu_step: float, pe: float, from_d: float, to_d: float,
                              d: float) -> float:
    """The step's bulk-to-surroundings conductance [W/(m K)] averaged over the thermal entrance.

    Near the entrance the film coefficient varies steeply within a step (as x^(-1/3)); the film is
    in series with the rest of the path (wall, insulation, air), so the mean of the series
    conductance is not the conductance of the mean film.  The step is cut into geometric pieces
    (exact mean film of each from the entrance correlation), each piece's conductance taken with
    the rest of the path as solved, and the conductances averaged by length.

    Examples
    --------
    The first 10 diameters of a laminar entrance (Pe = Re Pr = 4e5, D = 52.48 mm, k = 0.13 W/(m K)),
    the rest of the path 0.5 K m/W (a bare line): the conductance of the mean film is 1.835 W/(m K);
    the length-mean of the series conductance is lower (it is concave in the film: Jensen's
    inequality), 1.818 W/(m K), within 0.1 % of a 4000-piece geometric sum of the same local film [1]
    (1.817, by a short script):

    >>> from planner.correlations.heat_transfer import nu_laminar_local_over
    >>> d, pe, r_rest = 0.05248, 4.0e5, 0.5
    >>> nu = nu_laminar_local_over(0.0, 10.0 / pe)
    >>> h = nu * 0.13 / d
    >>> g = 1.0 / (1.0 / (h * math.pi * d) + r_rest)
    >>> round(g, 3), round(entrance_mean_conductance(g, h, nu, pe, 0.0, 10.0, d), 3)
    (1.835, 1.818)

    References
    ----------
    [1] Shah, R. K., London, A. L., Laminar Flow Forced Convection in Ducts, Academic Press, 1978
        (thermal entrance of a circular duct) [mem]; the film's law is ``heat_transfer``'s.
    """
    r_film = 1.0 / (h_in * PI * d)
    r_rest = 1.0 / g - r_film
    if r_rest <= 1e-3 * r_film or r_rest >= 20.0 * r_film:
        return g   # the film is nearly the whole path, or a small part of it: the mean film will do
    h_per_nu = h_in / nu_step                      # k / D times the viscosity correction
    low = from_d if from_d > 0.0 else to_d / 32.0
    pieces = min(6, max(2, int(math.log2(to_d / low)) + 1))
    factor = (to_d / low) ** (1.0 / pieces)
    total, a = 0.0, 0.0 if from_d <= 0.0 else from_d
    edges = [low * factor ** i for i in range(1, pieces + 1)]
    if from_d <= 0.0:
        edges.insert(0, low)
    for b in edges:
        nu = nu_laminar_local_over(a / pe, b / pe)
        total += (b - a) / (1.0 / (nu * h_per_nu * PI * d) + r_rest)
        a = b
    return total / (to_d - (from_d if from_d > 0.0 else 0.0))
