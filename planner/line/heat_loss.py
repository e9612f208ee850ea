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

from planner.correlations.outer_surface import h_outer_cylinder
from planner.line.route import LineSegment

PI = math.pi


def insulation_resistance(seg: LineSegment, t_wall: float, t_jacket: float) -> float:
    """Sum of the layers' conduction resistances [K m/W], k at the mean of wall and jacket.

    Each layer is a cylindrical shell, ln(r2/r1) / (2 pi k) per metre [2], divided by the
    calibration's ``heat_loss_factor``.

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC): ln(80.15/30.15) / (2 pi 0.04) = 3.890 K m/W
    (by hand from [2]):

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> from planner.line.route import build_line
    >>> seg = build_line(scenario.route, scenario.site)[0]
    >>> round(insulation_resistance(seg, 333.15, 300.0), 3)
    3.89

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    [2] Incropera, F. P., DeWitt, D. P., Fundamentals of Heat and Mass Transfer, Wiley, eq. 3.33
        (conduction resistance of a cylindrical wall).
    """
    if not seg.layers:
        return 0.0
    t_mean = 0.5 * (t_wall + t_jacket)
    total = 0.0
    for layer in seg.layers:
        total += layer.log_ratio / (2.0 * PI * layer.conductivity_at(t_mean))
    return total / seg.heat_loss_factor


def surface_resistance(seg: LineSegment, t_jacket: float) -> float:
    """Jacket surface to surroundings [K m/W]: 1 / (pi D (h_conv + h_rad)) in air
    (``correlations.outer_surface.h_outer_cylinder``), the soil's shape-factor resistance when buried.

    Examples
    --------
    The oil line of ``scenario.examples`` (1 Pa s, 900 kg/m^3, 2000 J/(kg K); 100 m of NPS 2 Sch 40,
    ID 52.48 mm, OD 60.3 mm [1], under 50 mm of insulation of 0.04 W/(m K); still air at 20 degC); jacket (OD 160.3 mm, emissivity 0.15) at 30 degC:
    the same recipe on reference air properties (iapws 1.5.5 humidAir.Air [2]) with ht
    1.2.0's Churchill-Chu [3] and the radiation law (tests/test_outer_surface.py ``_h_conv_reference``) gives 0.4488 K m/W:

    >>> from planner.scenario.examples import example_scenario
    >>> scenario = example_scenario("oil line")
    >>> from planner.line.route import build_line
    >>> seg = build_line(scenario.route, scenario.site)[0]
    >>> round(surface_resistance(seg, 303.15), 2)
    0.45

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe (via fluids 1.3.1, fluids.piping).
    [2] Lemmon, E. W., et al., J. Phys. Chem. Ref. Data 29 (2000) 331-385; Lemmon, E. W., Jacobsen,
        R. T., Int. J. Thermophys. 25 (2004) 21-69 (air, by iapws 1.5.5).
    [3] Churchill, S. W., Chu, H. H. S., Int. J. Heat Mass Transfer 18 (1975) 1049-1053 (by ht 1.2.0).
    """
    if seg.location == "buried":
        return seg.soil_resistance
    h_conv, h_rad = h_outer_cylinder(seg.jacket_diameter, t_jacket, seg.ambient_temperature,
                                     seg.wind_speed, seg.emissivity)
    return 1.0 / (PI * seg.jacket_diameter * (h_conv + h_rad) * seg.heat_loss_factor)
