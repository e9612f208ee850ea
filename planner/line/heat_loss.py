"""Heat loss per metre from the pipe wall to the surroundings, and from the product to the wall.

Outward path (series resistances per metre of line):
    wall surface -> each insulation layer (ln(r2/r1) / (2 pi k(T_mean))) -> jacket surface
    -> air by convection (natural: Churchill–Chu; wind: Churchill–Bernstein, combined) and
       radiation to surroundings at ambient temperature; or, buried, soil by the shape factor.
The jacket temperature sets the surface coefficient; ``heat_path.settle`` iterates the two.

A calibration's ``heat_loss_factor`` (``LineSegment.heat_loss_factor``) divides every outward
resistance (layers and surface here, soil where the segment is built), so the heat loss at a given
wall temperature is multiplied by it and the jacket temperature is unchanged.

The balance of the whole path (film, wall, heater, insulation, surface) is solved in ``heat_path``.
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
