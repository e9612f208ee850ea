"""One step of the product's bulk temperature with the step's coefficients frozen.

The product balance per metre,

    m cp dT/dx = G (T_eq - T) + S

(G [W/(m K)] and T_eq from the wall balance of the heater state in force, S [W/m] the viscous
heating) is linear in T for frozen G, T_eq and S, and is stepped exactly: an exponential integrator,
stable at any step, even where the thermal length m cp / G is short against it.  With a thermostat
the balance is piecewise linear instead (full output below T_low, holding between T_low and T_off,
off above T_off: ``tracing.Heater.switch_points``): each piece is stepped exactly and a path that
reaches a break continues in the next piece, so a step longer than the thermal length settles
where the thermostat holds instead of overshooting.
"""

from __future__ import annotations

import math

from planner.line.tracing import HEATER_FULL, HEATER_OFF

EDGE_K = 1e-9     # a temperature this close to a switch point counts as on it


def advance(t: float, t_equilibrium: float, g: float, viscous: float, mcp: float, dx: float) -> float:
    """Exact step of m cp dT/dx = G (T_eq - T) + S over ``dx`` [m] for frozen G, T_eq, S.

    T(dx) = T_eq' + (T - T_eq') exp(-G dx / (m cp)), T_eq' = T_eq + S / G; for G = 0, T + S dx / (m cp).

    Examples
    --------
    A tube at a uniform 290 K, product in at 350 K, G dx / (m cp) = 1: the mean temperature of
    flow in a tube at constant surface temperature [1], 290 + 60 e^-1 = 312.07 K (by hand):

    >>> round(advance(350.0, 290.0, 1.0, 0.0, 100.0, 100.0), 2)
    312.07

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, eq. 8.42b
        (constant surface temperature: (Ts - Tm(x)) / (Ts - Tm,i) = exp(-P x h / (m cp))).
    """
    if g > 1e-12:
        t_eq = t_equilibrium + viscous / g
        return t_eq + (t - t_eq) * math.exp(-g * dx / mcp)
    return t + viscous * dx / mcp


def step_across_states(heater, t: float, local, dx: float, t_ambient: float, g: float, viscous: float) -> float:
    """The bulk temperature after ``dx`` [m] from ``t`` [K] with the step's conductances frozen (``g``
    [W/(m K)] and ``viscous`` [W/m]: the step's G and S, those of ``local`` or predicted from them);
    ``heater`` the segment's (None or inactive: untraced); ``local`` the step's evaluation
    (``coefficients.Coefficients``).

    Examples
    --------
    The oil line of ``scenario.examples`` at 5 m^3/h (m cp = 2500 W/K), untraced, product at 60 degC,
    far from the entrance: G = 0.1955 W/(m K) and S = 10.36 W/m (Hagen-Poiseuille's drop times the
    flow, see ``coefficients.evaluate``), so the product tends to T_eq' = 20 + S / G = 72.99 degC and
    after 100 m is at 72.99 - 12.99 exp(-100 G / 2500) = 60.10 degC [1] (by hand); a step of any
    length ends at T_eq', never beyond:

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.line.model import line_from_scenario
    >>> from planner.line.coefficients import evaluate
    >>> from planner.line.heat_path import WarmStart
    >>> s = line_from_scenario(example_scenario("oil line")).constants[0]
    >>> start = WarmStart(333.15); start.enter(s.path)
    >>> c = evaluate(s, 1.25, start, 333.15, 1e5, 1e5 + 10.0, 50.0, False)
    >>> [round(step_across_states(None, 333.15, c, dx, 293.15, c.conductance, c.viscous_heating) - 273.15, 2)
    ...  for dx in (100.0, 1e6)]
    [60.1, 72.99]

    References
    ----------
    [1] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, eq. 8.42b
        (mean temperature of flow in a tube to surroundings at a uniform temperature).
    """
    mcp = local.heat_capacity_rate
    t_end = advance(t, local.t_equilibrium, g, viscous, mcp, dx)
    if heater is None:
        return t_end
    g_in, g_out = local.g_inner, local.g_outer
    bounds = heater.switch_points(g_in, g_out, t_ambient)
    if bounds is None:
        return t_end
    t_low, t_off = bounds
    # the usual case: start and end lie in the heater state the coefficients were taken in
    state = local.wall.heater_state
    if state == HEATER_FULL:
        if t <= t_low + EDGE_K and t_end <= t_low + EDGE_K:
            return t_end
    elif state == HEATER_OFF:
        if t >= t_off - EDGE_K and t_end >= t_off - EDGE_K:
            return t_end
    elif t_low - EDGE_K <= t <= t_off + EDGE_K and t_low - EDGE_K <= t_end <= t_off + EDGE_K:
        return t_end
    remaining = dx
    for _ in range(4):
        wall = heater.balance(t, g_in, g_out, t_ambient, viscous)
        follows = wall.wall_follows_bulk
        g = g_in * (1.0 - follows)
        t_equilibrium = (wall.t_wall - follows * t) / (1.0 - follows)
        t_end = advance(t, t_equilibrium, g, viscous, mcp, remaining)
        if g <= 1e-12:
            return t_end
        if t < t_low - EDGE_K:
            edge = t_low if t_end > t_low else None
        elif t > t_off + EDGE_K:
            edge = t_off if t_end < t_off else None
        else:
            edge = None  # holding: the target (setpoint plus viscous heating) lies within reach
            if t_end > t_off + EDGE_K:
                edge = t_off
            elif t_end < t_low - EDGE_K:
                edge = t_low
        if edge is None:
            return t_end
        target = t_equilibrium + viscous / g
        if (target - edge) * (target - t) <= 0.0:
            return t_end
        dx_edge = -mcp / g * math.log((target - edge) / (target - t))
        if not 0.0 <= dx_edge < remaining:
            return t_end
        remaining -= dx_edge
        t = edge + (EDGE_K if t_end > edge else -EDGE_K)
    return t
