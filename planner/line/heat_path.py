"""The heat path of one segment and the one solver of its balance.

Per metre of line, heat flows from the product through the inside film and the pipe wall to the
wall node, and on through the insulation layers and the jacket surface to the surroundings; a
tracer feeds the wall node:

    q_trace(T_wall) = G_in (T_wall - T_bulk) + G_out (T_wall - T_ambient)
    G_in  = 1 / (1 / (h_in pi D) + R_wall)              film and pipe wall
    G_out = 1 / (R_insulation + R_surface)              ``heat_loss``: layers at their mean
                                                        temperature, the jacket surface at its own
    T_jacket = T_wall - G_out (T_wall - T_ambient) R_insulation

For frozen conductances the heater's law (``tracing.Heater.balance``) gives the wall in closed
form.  The conductances depend on the temperatures they set: the film through the wall viscosity
(Sieder–Tate's (mu/mu_w)^0.14), the insulation through k at its mean temperature, the surface
through the jacket temperature.  ``settle`` iterates them to agreement: plain substitution on the
jacket, a secant step on the wall (the wall viscosity makes the plain map slow on cold bare lines).

One solver serves every caller:
- the march, at every evaluation, warm-started from the last one (``WarmStart``);
- a thermal entrance, where the film's resistance vanishes (``entrance_jacket``);
- a wall at a known temperature, for pre-warm, hold and the checks (``jacket_temperature``).

The surface coefficient (air properties, natural and forced convection, radiation) is the dearest
part; a ``HeatPath`` keeps it by jacket temperature on a 0.25 K grid (``SURFACE_GRID_PER_K``),
computed at the grid points themselves and interpolated linearly between them, so that a value never
depends on what was asked before.

Examples
--------
``settle`` (its example is here: the function is at the 80-line limit).  The oil line of
``scenario.examples`` (untraced, 20 degC air), product at 60 degC behind a fixed inner conductance of
1 W/(m K): at the settled wall node the heat in through the film equals the heat out, and both equal
(T_bulk - T_amb) / (1 / G_in + 1 / G_out) = 7.35 W/m with the G_out it settles at (an energy balance
of the series path [1], by hand):

>>> from planner.scenario.examples import example_scenario
>>> from planner.line.route import build_line
>>> scenario = example_scenario("oil line")
>>> path = HeatPath(build_line(scenario.route, scenario.site)[0], None)
>>> start = WarmStart(333.15); start.enter(path)
>>> wall, g_in, g_out, q_out, h_in, ratio = settle(path, start, 333.15, 0.0, 0.0, None, 1.0)
>>> round(q_out, 2), round(g_in * (333.15 - wall.t_wall), 2), round(40.0 / (1.0 / g_in + 1.0 / g_out), 2)
(7.35, 7.35, 7.35)

References
----------
[1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 3.3
    (radial systems, resistances in series).
"""

from __future__ import annotations

import math

from planner.correlations.heat_transfer import VISCOSITY_RATIO_MAX, VISCOSITY_RATIO_MIN, viscosity_corrected
from planner.line.heat_loss import insulation_resistance, surface_resistance
from planner.line.route import LineSegment
from planner.line.tracing import HEATER_OFF, Heater, WallBalance

PI = math.pi
WALL_TOLERANCE_K = 0.01          # film/wall/jacket agreement within an evaluation
WALL_VISCOSITY_BAND_K = 0.02     # mu_w is taken within this of the wall the evaluation ends with: a wall
                                 # viscosity left 0.3 K off made G jitter by 0.2 % from step to step,
                                 # which the step control then chased on fine grids (a thermostat holding)
INSULATION_BAND_K = 0.1          # k(T_mean) of the layers moves little over 0.05 K of mean temperature
SURFACE_GRID_PER_K = 4.0         # surface conductance kept on a 0.25 K grid of jacket temperature, interpolated
ENTRANCE_GRID_PER_K = 100.0      # entrance jackets kept on a 0.01 K grid of bulk temperature
MAX_ITERATIONS = 40
RIGID_CONDUCTANCE = 1e9          # W/(m K): a path part with no resistance (no wall, a wall held at a value)


class HeatPath:
    """One segment's path from the product to the surroundings: its constants as plain floats and
    the surface resistance kept by jacket temperature."""

    __slots__ = ("seg", "heater", "t_ambient", "wall_resistance", "has_layers", "buried", "soil_resistance",
                 "film_area", "viscosity", "newtonian", "_surface", "_entrance", "_walls")

    def __init__(self, seg: LineSegment, heater: Heater | None, viscosity=None, newtonian: bool = True,
                 kept: dict | None = None):
        """``heater``: the segment's heating (None: untraced); ``viscosity``: the product's law
        mu(T) [Pa s], for the film's wall viscosity; ``kept``: a dict shared by heat paths of other
        lines of the same product and heating, whose equal paths (``key``) share their kept values."""
        self.seg = seg
        self.heater = heater if heater is not None and heater.active else None
        self.t_ambient = seg.ambient_temperature
        self.wall_resistance = seg.wall_resistance
        self.has_layers = bool(seg.layers)
        self.buried = seg.location == "buried"
        self.soil_resistance = seg.soil_resistance
        self.film_area = PI * seg.inside_diameter      # inside surface per metre
        self.viscosity = viscosity
        self.newtonian = newtonian
        self._surface, self._entrance = ({}, {}) if kept is None else kept.setdefault(self.key(), ({}, {}))
        self._walls: dict = {}   # (wall temperature, tolerance) -> (jacket, loss) of ``jacket_temperature``

    def key(self) -> tuple:
        """What the kept values depend on: the path's make-up, surroundings and heating (not its length)."""
        seg, heater = self.seg, self.heater
        return (seg.inside_diameter, seg.wall_resistance, seg.jacket_diameter, seg.emissivity, seg.location,
                seg.ambient_temperature, seg.wind_speed, seg.soil_resistance, seg.heat_loss_factor,
                tuple((layer.log_ratio, layer.conductivity, layer.material) for layer in seg.layers),
                None if heater is None else (heater.fraction, tuple(heater.pieces), heater.setpoint, heater.sensing))

    def surface_resistance(self, t_jacket: float) -> float:
        """Jacket surface to surroundings [K m/W] (``heat_loss.surface_resistance``): interpolated
        linearly in the surface conductance between the grid points of jacket temperature either side
        (``SURFACE_GRID_PER_K``), each worked out at the grid point itself."""
        if self.buried:
            return self.soil_resistance
        position = t_jacket * SURFACE_GRID_PER_K
        below = math.floor(position)
        share = position - below
        return 1.0 / ((1.0 - share) * self._surface_conductance(below) + share * self._surface_conductance(below + 1))

    def _surface_conductance(self, key: int) -> float:
        value = self._surface.get(key)
        if value is None:
            value = self._surface[key] = 1.0 / surface_resistance(self.seg, key / SURFACE_GRID_PER_K)
        return value


class WarmStart:
    """The solver's starting point (wall, jacket, wall viscosity, the resistances last taken),
    carried from evaluation to evaluation along a march and across segment boundaries."""

    __slots__ = ("t_wall", "t_jacket", "mu_wall", "mu_wall_at", "surface_at", "r_surface", "insulation_at",
                 "r_insulation", "at", "wall_rate", "jacket_rate", "wall_full", "jacket_full", "full_at", "layout")

    def __init__(self, t: float):
        self.t_wall = t
        self.t_jacket = t
        self.mu_wall, self.mu_wall_at = 1.0, -1.0
        self.layout = None
        self.at = self.wall_rate = self.jacket_rate = 0.0
        self.surface_at = self.insulation_at = -1.0
        self.r_surface = self.r_insulation = 0.0
        self.wall_full = self.jacket_full = self.full_at = None

    def enter(self, path: HeatPath) -> None:
        """A new segment: keep the wall; restart the jacket guess where the insulation differs."""
        seg = path.seg
        layout = (path.has_layers, seg.jacket_diameter, path.buried)
        if layout != self.layout:
            self.t_jacket = path.t_ambient + 0.2 * (self.t_wall - path.t_ambient) if path.has_layers else self.t_wall
            self.layout = layout
        self.surface_at = self.insulation_at = -1.0
        self.r_surface = self.r_insulation = 0.0   # no layers: r_insulation stays 0
        self.at = self.wall_rate = self.jacket_rate = 0.0
        self.wall_full = self.jacket_full = self.full_at = None

    def learn(self, at: float) -> None:
        """A step's midpoint was settled at ``at`` [m]: the next warm start follows the trend of the
        converged wall and jacket along the line."""
        if self.full_at is not None and at > self.full_at:
            span = at - self.full_at
            self.wall_rate = (self.t_wall - self.wall_full) / span
            self.jacket_rate = (self.t_jacket - self.jacket_full) / span
        self.wall_full, self.jacket_full, self.full_at = self.t_wall, self.t_jacket, at


def settle(path: HeatPath, start: WarmStart, t_bulk: float, viscous: float, at: float, film: tuple | None,
           g_inner: float = 0.0, tolerance: float = WALL_TOLERANCE_K):
    """Film, wall and jacket at bulk temperature ``t_bulk`` [K] iterated to agreement within
    ``tolerance`` [K], warm-started from ``start`` (moved along its trend to ``at`` [m], at most 1 K),
    which is left at the solution.

    ``film``: (Nu parts of ``heat_transfer.film_parts``, k/D [W/(m2 K)], bulk viscosity mu [Pa s]):
    the inside film with its (mu/mu_w) correction; None: the inner conductance is ``g_inner``
    [W/(m K)], fixed.  ``viscous`` [W/m]: viscous heating in the product (a product-sensing
    thermostat counts it).

    Returns (wall balance, G_in, G_out, heat loss q_out [W/m], film coefficient h_in [W/(m2 K)],
    mu/mu_w)."""
    seg, t_amb, wall_r, has_layers, film_area = path.seg, path.t_ambient, path.wall_resistance, path.has_layers, \
        path.film_area
    ratio, h_in = 1.0, 0.0
    newtonian = film is not None and path.newtonian
    if film is not None:
        (nu_lam, nu_turb, weight), k_over_d, mu = film
        if not newtonian:
            h_in = (nu_lam + weight * (nu_turb - nu_lam)) * k_over_d
            g_inner = 1.0 / (1.0 / (h_in * film_area) + wall_r)
    ahead = at - start.at   # the last solution moved along its trend by at most 1 K each
    drift, jacket_drift = start.wall_rate * ahead, start.jacket_rate * ahead
    t_wall = start.t_wall + (1.0 if drift > 1.0 else (-1.0 if drift < -1.0 else drift))
    t_jacket = start.t_jacket + (1.0 if jacket_drift > 1.0 else (-1.0 if jacket_drift < -1.0 else jacket_drift))
    mu_wall, mu_wall_at = start.mu_wall, start.mu_wall_at
    r_ins, ins_at, r_surf, surf_at = start.r_insulation, start.insulation_at, start.r_surface, start.surface_at
    balance = path.heater.balance if path.heater is not None else None
    x_prev = r_prev = None
    for _ in range(MAX_ITERATIONS):
        if newtonian:
            if abs(t_wall - mu_wall_at) > WALL_VISCOSITY_BAND_K:   # mu_w moves little over 0.02 K
                mu_wall, mu_wall_at = wall_viscosity(path.viscosity, t_wall), t_wall
            ratio = mu / mu_wall
            if weight == 0.0:
                r = VISCOSITY_RATIO_MIN if ratio < VISCOSITY_RATIO_MIN else (
                    VISCOSITY_RATIO_MAX if ratio > VISCOSITY_RATIO_MAX else ratio)
                h_in = nu_lam * r ** 0.14 * k_over_d
            else:
                h_in = viscosity_corrected((nu_lam, nu_turb, weight), ratio) * k_over_d
            g_inner = 1.0 / (1.0 / (h_in * film_area) + wall_r)
        if has_layers:
            t_mean = t_wall + t_jacket
            if abs(t_mean - ins_at) > INSULATION_BAND_K:
                r_ins, ins_at = insulation_resistance(seg, t_wall, t_jacket), t_mean
        if abs(t_jacket - surf_at) > 0.02:
            r_surf, surf_at = path.surface_resistance(t_jacket), t_jacket
        g_out = 1.0 / (r_ins + r_surf)
        if balance is None:
            g_sum = g_inner + g_out
            wall = WallBalance((g_inner * t_bulk + g_out * t_amb) / g_sum, 0.0, g_inner / g_sum, HEATER_OFF)
        else:
            wall = balance(t_bulk, g_inner, g_out, t_amb, viscous)
        q_out = g_out * (wall.t_wall - t_amb)
        new_jacket = wall.t_wall - q_out * r_ins
        residual = wall.t_wall - t_wall
        if has_layers:
            # the wall is exact for the G_in and G_out it was solved with: what is left of the wall guess's
            # error is its effect through the film's (mu/mu_w)^0.14 (and, faintly, the insulation's k(T))
            change = abs(new_jacket - t_jacket) + abs(residual) * (0.14 * abs(math.log(ratio)) + 0.02)
        else:
            change = abs(new_jacket - t_jacket) + abs(residual)   # bare: the outside h follows the wall
        t_jacket = new_jacket   # bare: the jacket is the wall, settled with it below
        if change < tolerance and (not newtonian or abs(wall.t_wall - mu_wall_at) <= WALL_VISCOSITY_BAND_K):
            break
        # a secant step on the wall temperature, the plain fixed-point step when that looks unsafe
        step = residual
        if x_prev is not None and residual != r_prev:
            secant = -residual * (t_wall - x_prev) / (residual - r_prev)
            if abs(secant) <= 4.0 * abs(residual):
                step = secant
        x_prev, r_prev = t_wall, residual
        t_wall += step
        if not has_layers:
            t_jacket = t_wall
    start.t_wall, start.t_jacket, start.mu_wall, start.mu_wall_at, start.at = t_wall, t_jacket, mu_wall, mu_wall_at, at
    start.r_insulation, start.insulation_at, start.r_surface, start.surface_at = r_ins, ins_at, r_surf, surf_at
    return wall, g_inner, g_out, q_out, h_in, ratio


def entrance_jacket(path: HeatPath, t_bulk: float) -> float:
    """The jacket temperature (bare: the wall's) where a thermal entrance starts, product at
    ``t_bulk`` [K].

    Toward an entrance the local laminar film coefficient grows without bound (Graetz), so the wall
    there follows the heat path with the film's resistance gone, only the pipe wall's own left: the
    jacket's highest value near the entrance, whatever the grid.  A step's midpoint only approaches
    it as the first step shrinks (the barge demo's inlet: 35 °C at a 4 m first step, 49 °C at 6 cm);
    taken here, the hottest jacket, and the touch check on it, no longer depend on the step.  Kept
    by bulk temperature on a 0.01 K grid (``ENTRANCE_GRID_PER_K``).

    Examples
    --------
    The oil line of ``scenario.examples``, product at 60 degC: with no film, the wall is the product's
    temperature less the steel's 4.9e-4 K m/W times 9 W/m (0.004 K), so the jacket is that of
    ``jacket_temperature`` at a 60 degC wall, 24.8 degC (the series path [1]):

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.line.route import build_line
    >>> scenario = example_scenario("oil line")
    >>> seg = build_line(scenario.route, scenario.site)[0]
    >>> entrance = entrance_jacket(HeatPath(seg, None), 333.15)
    >>> round(entrance - 273.15, 1), round(jacket_temperature(seg, 333.15)[0] - 273.15, 1)
    (24.8, 24.8)

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 3.3.
    """
    key = round(t_bulk * ENTRANCE_GRID_PER_K)
    value = path._entrance.get(key)
    if value is None:
        t = key / ENTRANCE_GRID_PER_K
        start = _fresh_start(path, t)
        g_inner = 1.0 / path.wall_resistance if path.wall_resistance > 0.0 else RIGID_CONDUCTANCE
        settle(path, start, t, 0.0, 0.0, None, g_inner, tolerance=1e-3)
        value = path._entrance[key] = start.t_jacket
    return value


def jacket_temperature(seg: LineSegment, t_wall: float, tolerance: float = 1e-3) -> tuple[float, float]:
    """The outward path at a known wall temperature ``t_wall`` [K] (pre-warm, hold, checks).

    Returns (jacket temperature [K], heat loss [W/m]).

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC); wall at 60 degC: the series of the insulation's 3.890 K m/W
    (by hand, [4]) and the surface resistance by the same recipe on reference air properties (iapws 1.5.5 humidAir.Air [2]) with ht
    1.2.0's Churchill-Chu [3] and the radiation law (tests/test_outer_surface.py ``_h_conv_reference``), iterated on the jacket
    temperature, gives a jacket at 24.80 degC and a loss of 9.048 W/m:

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> from planner.line.route import build_line
    >>> seg = build_line(scenario.route, scenario.site)[0]
    >>> jacket, loss = jacket_temperature(seg, 333.15)
    >>> round(jacket - 273.15, 1), round(loss, 1)
    (24.8, 9.0)

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    [2] Lemmon, E. W., et al., J. Phys. Chem. Ref. Data 29 (2000) 331-385; Lemmon, E. W., Jacobsen,
        R. T., Int. J. Thermophys. 25 (2004) 21-69 (air, by iapws 1.5.5).
    [3] Churchill, S. W., Chu, H. H. S., Int. J. Heat Mass Transfer 18 (1975) 1049-1053 (by ht 1.2.0).
    [4] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 3.3
        (radial systems, resistances in series).
    """
    path = seg.__dict__.get("_outward_path")
    if path is None:   # kept on the segment: pre-warm and hold ask it at many wall temperatures
        path = seg.__dict__["_outward_path"] = HeatPath(seg, None)
    key = (t_wall, tolerance)
    known = path._walls.get(key)   # hold integrates each cool-down twice from one start: the same walls
    if known is None:
        start = _fresh_start(path, t_wall)
        _, _, _, q_out, _, _ = settle(path, start, t_wall, 0.0, 0.0, None, RIGID_CONDUCTANCE, tolerance)
        known = path._walls[key] = (start.t_jacket, q_out)
    return known


def _fresh_start(path: HeatPath, t: float) -> WarmStart:
    start = WarmStart(t)
    start.enter(path)
    return start


def wall_viscosity(viscosity, t_wall: float) -> float:
    """Viscosity at the wall temperature; beyond the law's domain (a VFT law below its c, a value out
    of floating-point range) the wall counts as set: infinitely viscous (the ratio is then bounded).

    Examples
    --------
    The law's value where it has one; an Arrhenius-like law exp(1e4 / T) at 1 K overflows a float
    (e^10000), so the wall counts as set:

    >>> wall_viscosity(lambda t: 1.0, 300.0), wall_viscosity(lambda t: math.exp(1e4 / t), 1.0)
    (1.0, inf)
    """
    try:
        return viscosity(t_wall)
    except (ValueError, OverflowError):
        return math.inf


__all__ = ["HeatPath", "WarmStart", "entrance_jacket", "jacket_temperature", "settle",
           "wall_viscosity"]
