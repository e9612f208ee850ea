"""Heat loss per metre from the pipe wall to the surroundings, and from the product to the wall.

Outward path (series resistances per metre of line):
    wall surface -> each insulation layer (ln(r2/r1) / (2 pi k(T_mean))) -> jacket surface
    -> air by convection (natural: Churchill–Chu; wind: Churchill–Bernstein, combined) and
       radiation to surroundings at ambient temperature; or, buried, soil by the shape factor.
The jacket temperature sets the surface coefficient, so it is solved by fixed-point iteration
(insulation dominates, so it converges in a few passes; warm starts along the line make it 1–2).

A calibration's ``heat_loss_factor`` (``LineSegment.heat_loss_factor``) divides every outward
resistance (layers and surface here, soil where the segment is built), so the heat loss at a given
wall temperature is multiplied by it and the jacket temperature is unchanged.

Inward path: the product's film (``heat_transfer.nu_internal``) plus the pipe wall conduction, worked
out inline in ``march.py`` where it changes every step.
"""

from __future__ import annotations

import math

from planner.correlations.heat_transfer import h_outer_cylinder
from planner.line.route import LineSegment

PI = math.pi


def insulation_resistance(seg: LineSegment, t_wall: float, t_jacket: float) -> float:
    """Sum of the layers' conduction resistances [K m/W], k at the mean of wall and jacket."""
    if not seg.layers:
        return 0.0
    t_mean = 0.5 * (t_wall + t_jacket)
    total = 0.0
    for layer in seg.layers:
        total += layer.log_ratio / (2.0 * PI * layer.conductivity_at(t_mean))
    return total / seg.heat_loss_factor


def surface_resistance(seg: LineSegment, t_jacket: float) -> float:
    """Jacket surface to surroundings [K m/W]."""
    if seg.location == "buried":
        return seg.soil_resistance
    h_conv, h_rad = h_outer_cylinder(seg.jacket_diameter, t_jacket, seg.ambient_temperature,
                                     seg.wind_speed, seg.emissivity)
    return 1.0 / (PI * seg.jacket_diameter * (h_conv + h_rad) * seg.heat_loss_factor)


def outer_conductance(seg: LineSegment, t_wall: float, t_jacket: float) -> tuple[float, float]:
    """(conductance wall->surroundings [W/(m K)], insulation resistance [K m/W]) at a jacket guess."""
    r_ins = insulation_resistance(seg, t_wall, t_jacket)
    return 1.0 / (r_ins + surface_resistance(seg, t_jacket)), r_ins


def jacket_temperature(seg: LineSegment, t_wall: float, tolerance: float = 1e-3, max_iter: int = 60) -> tuple[float, float]:
    """Solve the outward path at a known wall temperature.

    Returns (jacket temperature [K], heat loss [W/m]).  Used by tests and checks; the march does
    the same iteration inline with a warm start.
    """
    t_ambient = seg.ambient_temperature
    if seg.location == "buried":
        r_ins = insulation_resistance(seg, t_wall, t_wall)
        q = (t_wall - t_ambient) / (r_ins + seg.soil_resistance)
        return t_wall - q * r_ins, q
    t_jacket = t_ambient + 0.2 * (t_wall - t_ambient) if seg.layers else t_wall
    for _ in range(max_iter):
        g_out, r_ins = outer_conductance(seg, t_wall, t_jacket)
        q = g_out * (t_wall - t_ambient)
        new = t_wall - q * r_ins
        if abs(new - t_jacket) < tolerance:
            return new, q
        # light damping: bare pipes (r_ins = 0) converge without it, thick layers too
        t_jacket = 0.5 * (t_jacket + new) if not seg.layers else new
    return t_jacket, g_out * (t_wall - t_ambient)
