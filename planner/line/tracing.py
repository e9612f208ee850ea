"""Heat tracing: what the heater or steam tracer puts into the pipe wall, and the wall's balance.

The wall node (pipe metal, temperature ``t_wall``) takes heat from the tracer and passes it inward
to the product (conductance ``g_inner`` per metre, film plus wall) and outward to the air
(``g_outer``, insulation plus surface):

    q_trace(t_wall) = g_inner (t_wall - t_bulk) + g_outer (t_wall - t_ambient)

Heater output is piecewise linear in wall temperature, ``P(T) = alpha - beta T`` on each piece, so
the balance solves in closed form.  A thermostat (the setpoint, sensing the pipe wall) cycles the
heater; over a cycle it delivers just what holds the wall at the setpoint, never more than the
heater's capacity.  When the loss exceeds the capacity the heater stays on and the line cools.

Where the thermostat senses (``Tracing.sensing``):
- ``pipe_wall`` (default, the usual line-sensing thermostat [trade]): it holds the wall at the
  setpoint;
- ``product``: it holds the product at the setpoint: full output below it, off above it, and at it
  just what keeps the product there (the heat loss less the viscous heating already in the product);
- ``ambient``: an ambient-sensing controller runs the heater at full output whenever the segment's
  ambient is below ``switch_temperature`` and switches it off otherwise; there is no pipe setpoint.

Models:
- constant wattage: P = rated output, independent of temperature;
- self-regulating: output falling linearly from its rating at 10 degC to zero at the
  ``zero_output_temperature`` (a common first approximation of polymer heaters [trade]), or a user
  curve through measured points;
- steam: P = C (T_steam - T_wall), T_steam the saturation temperature at the supply pressure
  (IAPWS-IF97), C the tracer-to-pipe conductance (larger with heat-transfer cement).
"""

from __future__ import annotations

from typing import NamedTuple

from planner.scenario.schema import Tracing
from planner.correlations.steam import saturation_temperature_gauge

# Tracer-to-pipe conductance per tracer [W/(m K)], for a 1/2 in tube tracer on a 2-8 in line.
# Planning figures from memory [mem, unverified]: cement raises contact conductance several-fold.
STEAM_CONDUCTANCE_BARE = 0.6
STEAM_CONDUCTANCE_CEMENT = 6.0
SELF_REGULATING_RATING_TEMPERATURE = 283.15  # output is rated at 10 degC pipe temperature
PRODUCT_HOLD_BAND_K = 1e-6   # product sensing: within this of the setpoint the thermostat holds


# The heater's state at a wall balance (plain ints: the march compares them at every step)
HEATER_OFF = 0        # untraced, or the thermostat has switched the heater off
HEATER_HOLDING = 1    # the thermostat holds its setpoint: the heater gives just what that needs
HEATER_FULL = 2       # the heater gives all it can at this wall temperature
HEATER_STATE_WORDS = {HEATER_OFF: "off", HEATER_HOLDING: "holding", HEATER_FULL: "full output"}


class WallBalance(NamedTuple):
    t_wall: float
    q_trace: float          # W per metre of pipe into the wall
    wall_follows_bulk: float   # d t_wall / d t_bulk in the heater state in force (the exponential step)
    heater_state: int       # HEATER_OFF, HEATER_HOLDING or HEATER_FULL


class Heater:
    """A line's heating as a piecewise-linear output law plus an optional thermostat.

    Examples
    --------
    A steam tracer at 3 barg runs at the saturation temperature of 4.01325 bar, 416.88 K (IAPWS-IF97
    [1], iapws 1.5.5 ``_TSat_P``); bare on the pipe (0.6 W/(m K) [mem]) it gives 0.6 (416.88 - 373.15)
    = 26.24 W/m to a wall at 100 degC:

    >>> from planner.scenario.schema import Tracing
    >>> steam = Heater(Tracing(kind="steam", steam_pressure="3 bar"))
    >>> round(steam.steam_temperature, 2), round(steam.capacity(373.15), 2)
    (416.88, 26.24)

    A 30 W/m constant-wattage heater below its setpoint, 10 W/(m K) inward to product at 300 K and
    0.5 W/(m K) outward to air at 280 K: the wall balance 30 = 10 (T - 300) + 0.5 (T - 280) gives
    T = 3170 / 10.5 = 301.905 K (by hand, [2]):

    >>> electric = Heater(Tracing(kind="electric_constant", output="30 W/m", setpoint=60.0))
    >>> wall = electric.balance(300.0, 10.0, 0.5, 280.0)
    >>> round(wall.t_wall, 3), wall.q_trace
    (301.905, 30.0)

    References
    ----------
    [1] IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997, section 8.
    [2] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, section 3.1
        (the energy balance of a node).
    """

    def __init__(self, tracing: Tracing, traced_fraction: float = 1.0, ambient_temperature: float | None = None):
        """``ambient_temperature`` [K]: the segment's, for an ambient-sensing controller."""
        self.kind = tracing.kind
        self.sensing = tracing.sensing
        self.setpoint = tracing.setpoint if self.sensing != "ambient" else None
        self.runs = tracing.circuits_per_metre
        self.fraction = traced_fraction
        self.sheath_conductance = tracing.heater_to_pipe_conductance
        self.max_exposure_temperature = tracing.max_exposure_temperature
        self.steam_temperature = None
        # pieces: list of (t_low, t_high, alpha, beta): P = alpha - beta T on [t_low, t_high]
        scale = self.runs * traced_fraction
        if self.kind == "electric_constant":
            self.pieces = [(-1e9, 1e9, tracing.output * scale, 0.0)]
        elif self.kind == "electric_self_regulating":
            if tracing.output_curve:
                pts = sorted((p.temperature, p.output) for p in tracing.output_curve)
            else:
                pts = [(SELF_REGULATING_RATING_TEMPERATURE, tracing.output), (tracing.zero_output_temperature, 0.0)]
            self.pieces = _pieces_from_points(pts, scale)
        elif self.kind == "steam":
            self.steam_temperature = saturation_temperature_gauge(tracing.steam_pressure)
            conductance = tracing.tracer_conductance
            if conductance is None:
                conductance = STEAM_CONDUCTANCE_CEMENT if tracing.heat_transfer_cement else STEAM_CONDUCTANCE_BARE
            self.tracer_conductance = conductance
            c = conductance * scale
            self.pieces = [(-1e9, self.steam_temperature, c * self.steam_temperature, c), (self.steam_temperature, 1e9, 0.0, 0.0)]
        else:
            self.pieces = [(-1e9, 1e9, 0.0, 0.0)]
        self.active = self.kind != "none" and traced_fraction > 0.0
        if self.sensing == "ambient" and ambient_temperature is not None and \
                ambient_temperature >= tracing.switch_temperature:
            self.active = False   # warm weather: the ambient-sensing controller keeps the heater off
        self._capacity_at_setpoint = self.capacity(self.setpoint) if self.setpoint is not None else 0.0

    def capacity(self, t_wall: float) -> float:
        """Most the heating can deliver at this wall temperature [W per metre of pipe]."""
        for t_low, t_high, alpha, beta in self.pieces:
            if t_low <= t_wall <= t_high:
                return max(0.0, alpha - beta * t_wall)
        return 0.0

    def balance(self, t_bulk: float, g_inner: float, g_outer: float, t_ambient: float,
                viscous: float = 0.0) -> WallBalance:
        """Wall temperature and heater output at bulk temperature ``t_bulk`` [K], conductances per
        metre [W/(m K)] inward and outward, ``viscous`` heating in the product [W/m] (product sensing)."""
        g_sum = g_inner + g_outer
        passive_wall = (g_inner * t_bulk + g_outer * t_ambient) / g_sum
        if not self.active:
            return WallBalance(passive_wall, 0.0, g_inner / g_sum, HEATER_OFF)
        setpoint = self.setpoint
        if setpoint is not None:
            if self.sensing == "product":
                if t_bulk > setpoint + PRODUCT_HOLD_BAND_K:
                    return WallBalance(passive_wall, 0.0, g_inner / g_sum, HEATER_OFF)
                if t_bulk >= setpoint - PRODUCT_HOLD_BAND_K:
                    # holding the product: the wall where the film takes out what viscous heating puts in
                    t_wall = setpoint - viscous / g_inner
                    need = g_inner * (t_wall - t_bulk) + g_outer * (t_wall - t_ambient)
                    if need <= 0.0:
                        return WallBalance(passive_wall, 0.0, g_inner / g_sum, HEATER_OFF)
                    if need <= self.capacity(t_wall):
                        return WallBalance(t_wall, need, 0.0, HEATER_HOLDING)
            else:
                if passive_wall >= setpoint:
                    return WallBalance(passive_wall, 0.0, g_inner / g_sum, HEATER_OFF)
                need = g_inner * (setpoint - t_bulk) + g_outer * (setpoint - t_ambient)
                if need <= self._capacity_at_setpoint:
                    return WallBalance(setpoint, need, 0.0, HEATER_HOLDING)
        # Full output: solve alpha - beta T = g_inner (T - t_bulk) + g_outer (T - t_ambient) per piece.
        rhs_const = g_inner * t_bulk + g_outer * t_ambient
        for t_low, t_high, alpha, beta in self.pieces:
            t = (alpha + rhs_const) / (g_sum + beta)
            if t_low - 1e-9 <= t <= t_high + 1e-9:
                q = alpha - beta * t
                if q <= 0.0:
                    break
                return WallBalance(t, q, g_inner / (g_sum + beta), HEATER_FULL)
        return WallBalance(passive_wall, 0.0, g_inner / g_sum, HEATER_OFF)

    def switch_points(self, g_inner: float, g_outer: float, t_ambient: float) -> tuple[float, float] | None:
        """Bulk temperatures [K] where the thermostat changes state with these conductances:
        (t_low, t_off): full output below t_low, holding between, off above t_off.  None without
        a thermostat."""
        setpoint = self.setpoint
        if not self.active or setpoint is None:
            return None
        if self.sensing == "product":
            return setpoint, setpoint
        t_off = (setpoint * (g_inner + g_outer) - g_outer * t_ambient) / g_inner
        t_low = setpoint - (self._capacity_at_setpoint - g_outer * (setpoint - t_ambient)) / g_inner
        return min(t_low, t_off), t_off

    def sheath_temperature(self, t_wall: float, q_trace: float) -> float:
        """Heater sheath (electric) or tracer (steam) temperature [K]."""
        if not self.active:
            return t_wall
        if self.kind == "steam":
            return self.steam_temperature
        if q_trace <= 0.0:
            return t_wall
        per_run = q_trace / (self.runs * self.fraction)
        return t_wall + per_run / self.sheath_conductance


def _pieces_from_points(points: list[tuple[float, float]], scale: float) -> list[tuple[float, float, float, float]]:
    """Linear pieces through the points; the first and last pieces extend beyond the data, output
    clamped at zero (a heater never draws heat from the pipe)."""
    pieces = []
    for i in range(len(points) - 1):
        (t0, p0), (t1, p1) = points[i], points[i + 1]
        beta = -(p1 - p0) / (t1 - t0) * scale
        alpha = p0 * scale + beta * t0
        low = -1e9 if i == 0 else t0
        high = 1e9 if i == len(points) - 2 else t1
        if beta > 0 and i == len(points) - 2:
            high = alpha / beta  # output reaches zero here
        pieces.append((low, high, alpha, beta))
    if pieces[-1][1] < 1e9:
        pieces.append((pieces[-1][1], 1e9, 0.0, 0.0))
    return pieces
