"""Step lengths of the march, following the local rate of change.

Steps are at most ``step`` long (at least two per segment) and shrink where the product changes
fast: the bulk temperature by more than TEMPERATURE_CHANGE_PER_STEP_K (a thermal length short
against the step), the log of viscosity by more than LOG_VISCOSITY_CHANGE_PER_STEP, or the log of
the bulk-to-surroundings conductance by more than LOG_CONDUCTANCE_CHANGE_PER_STEP per step.  All
targets scale with ``step`` / DEFAULT_STEP_M, so a ten-times smaller ``step`` is a ten-times finer
grid everywhere (tests/test_march_grid.py, tests/test_plan_grid.py).  Near a thermal entrance, where
the laminar film changes as x^(-1/3), the steps grow with the distance from it.
"""

from __future__ import annotations

import math

from planner.correlations.friction import RE_LAMINAR_MAX
from planner.line.bulk_step import advance
from planner.line.tracing import HEATER_FULL
from planner.scenario.budget import MARCH_STEP_M

PI = math.pi
DEFAULT_STEP_M = MARCH_STEP_M          # 100 m: single passes and plans alike (grid test: tests/test_march_grid.py)
TEMPERATURE_CHANGE_PER_STEP_K = 3.0   # at the default step; planner choice (grid test: tests/test_march.py)
LOG_VISCOSITY_CHANGE_PER_STEP = 0.05  # at the default step: viscosity within about 5 % per step
LOG_CONDUCTANCE_CHANGE_PER_STEP = 0.1  # at the default step: G (film, wall, outside) within 10 % per step
ENTRANCE_FIRST_STEP = 0.04            # first step at a thermal entrance, share of the step (film-dominated)
THERMOSTAT_ENTRANCE_WEIGHT = 1.0      # entrance steps under a thermostat: no longer than the distance from it
SHORTEST_STEP = 1e-3                  # share of the step: no step is shorter


class StepControl:
    """The next step's length from what the last steps saw (see the module docstring)."""

    __slots__ = ("max_step", "d_temperature", "d_log_viscosity", "d_log_conductance", "mu_last", "g_last", "dx_last",
                 "state_last", "shortest")

    def __init__(self, step: float):
        scale = step / DEFAULT_STEP_M
        self.max_step = step
        self.shortest = SHORTEST_STEP * step
        self.d_temperature = TEMPERATURE_CHANGE_PER_STEP_K * scale
        self.d_log_viscosity = LOG_VISCOSITY_CHANGE_PER_STEP * scale
        self.d_log_conductance = LOG_CONDUCTANCE_CHANGE_PER_STEP * scale
        self.mu_last, self.g_last, self.state_last = None, 0.0, -1
        self.dx_last = step

    def first(self, length: float) -> float:
        """The first step of a segment; G may jump at the boundary (another heat path), so its trend
        starts afresh."""
        self.g_last = 0.0
        return min(self.max_step, 0.5 * length, 2.0 * self.dx_last)

    def entrance(self, dx: float, local, from_entry: float, d: float, thermostat: bool) -> float:
        """Where the laminar film is a large part of the heat path, steps near a thermal entrance
        grow with the distance from it: the film, the wall and the outside coefficient all change
        steeply there, and a long first step would average them wrongly.  Under a thermostat
        (``thermostat``), holding or off, the heater's output is the difference of what the wall loses
        outward and what the film takes in, so it follows the steep film even where the film is a
        small part of the path (and the heater is off where the film alone holds the wall): the steps
        grow so too.  At full output the heater gives what it can whatever the film.

        ``local``: the evaluation of the step (``coefficients.Coefficients``)."""
        if from_entry >= dx or local.reynolds > RE_LAMINAR_MAX or local.conductance <= 0.0:
            return dx   # (the limit below is never shorter than the distance from the entrance)
        share = local.conductance / (local.film_coefficient * PI * d)     # film resistance over the whole path's
        weight = 4.0 * share * (1.0 - share)
        if thermostat and weight < THERMOSTAT_ENTRANCE_WEIGHT and local.wall.heater_state != HEATER_FULL:
            weight = THERMOSTAT_ENTRANCE_WEIGHT
        if weight < 0.05:
            return dx
        return min(dx, max(from_entry, ENTRANCE_FIRST_STEP * self.max_step) / weight)

    def fit(self, dx: float, t: float, local, viscosity) -> float:
        """A step from ``t`` no longer than ``dx`` whose predicted temperature change (exact for the
        coefficients at its start: the thermal length mcp/G and the drive) and viscosity change stay
        within the targets."""
        g, mcp, viscous = local.conductance, local.heat_capacity_rate, local.viscous_heating
        if g > 1e-12:
            drive = abs(local.t_equilibrium + viscous / g - t)
            if drive > self.d_temperature:
                dx = min(dx, -mcp / g * math.log(1.0 - self.d_temperature / drive))
        elif viscous > 0.0:
            dx = min(dx, self.d_temperature * mcp / viscous)
        t_end = advance(t, local.t_equilibrium, g, viscous, mcp, dx)
        try:
            change = abs(math.log(viscosity(t_end) / local.viscosity)) if t_end != t else 0.0
        except (ValueError, OverflowError):
            change = math.inf
        if change > self.d_log_viscosity:
            dx *= self.d_log_viscosity / change
        return max(dx, self.shortest)

    def after(self, dx: float, t: float, t_new: float, mu: float, g: float, state: int) -> float:
        """The next step's length after a step of ``dx`` from ``t`` to ``t_new`` (midpoint viscosity
        mu, bulk-to-surroundings conductance g in heater state ``state``)."""
        if state != self.state_last:
            self.g_last, self.state_last = 0.0, state   # G jumps with the heater state: no trend
        limit = self.max_step if self.max_step < 2.0 * dx else 2.0 * dx
        change = abs(t_new - t)
        if change * limit > self.d_temperature * dx:
            limit = self.d_temperature * dx / change
        if self.mu_last is not None:
            between = 0.5 * (dx + self.dx_last)
            per_metre = abs(math.log(mu / self.mu_last)) / between
            if per_metre * limit > self.d_log_viscosity:
                limit = self.d_log_viscosity / per_metre
            if g > 0.0 and self.g_last > 0.0:
                # the loss and the viscous heating nearly balance in long viscous lines: their
                # coefficients must be followed, not just the temperature they leave
                per_metre = abs(math.log(g / self.g_last)) / between
                if per_metre * limit > self.d_log_conductance:
                    limit = self.d_log_conductance / per_metre
        self.mu_last, self.g_last, self.dx_last = mu, g, dx
        return limit if limit > self.shortest else self.shortest
