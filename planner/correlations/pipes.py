"""Pipe sizes by NPS and schedule (ASME B36.10M / B36.19M), read from the ``fluids`` pipe table.

``fluids.piping`` carries the B36.10M/B36.19M dimensions; this module only picks the schedules
those standards define and turns a miss into a message that lists what is available.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

# The schedules of ASME B36.10M (carbon/alloy steel) and B36.19M (stainless, "S" suffix).
ASME_SCHEDULES = (
    "5", "10", "20", "30", "40", "60", "80", "100", "120", "140", "160",
    "STD", "XS", "XXS", "5S", "10S", "40S", "80S",
)


@dataclass(frozen=True)
class PipeSize:
    """The record of one pipe size: NPS [in], schedule, inside and outside diameter and wall [m]."""

    nps: float
    schedule: str
    inside_diameter_m: float
    outside_diameter_m: float
    wall_thickness_m: float


def parse_nps(value: object) -> float:
    """Read an NPS given as 4, 4.0, "4", "1-1/2", "1 1/2" or "3/4".

    Examples
    --------
    NPS sizes are written as fractions of an inch in the standard [1]:

    >>> parse_nps("1-1/2"), parse_nps("3/4"), parse_nps(4)
    (1.5, 0.75, 4.0)

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe; ASME B36.19M, Stainless Steel Pipe
        (dimensions as carried by fluids 1.3.1, fluids.piping).
    """
    if isinstance(value, bool):
        raise ValueError(f"NPS {value!r} is not a size")
    if isinstance(value, (int, float)):
        return float(value)
    text = str(value).strip().replace('"', "").replace("in", "").strip()
    parts = text.replace("-", " ").split()
    try:
        return float(sum(Fraction(part) for part in parts))
    except (ValueError, ZeroDivisionError):
        raise ValueError(f"cannot read NPS {value!r} (e.g. 4, '1-1/2', '3/4')") from None


def pipe_size(nps: object, schedule: str) -> PipeSize:
    """Dimensions of NPS ``nps`` in ``schedule``.

    Examples
    --------
    NPS 4 Sch 40: OD 114.3 mm, wall 6.02 mm, ID 102.26 mm [1] (../shared/REFERENCES.md):

    >>> p = pipe_size(4, "40")
    >>> round(p.inside_diameter_m * 1000, 2), round(p.outside_diameter_m * 1000, 1)
    (102.26, 114.3)

    References
    ----------
    [1] ASME B36.10M, Welded and Seamless Wrought Steel Pipe; ASME B36.19M, Stainless Steel Pipe
        (dimensions as carried by fluids 1.3.1, fluids.piping).
    """
    schedule = str(schedule).strip().upper()
    if schedule not in ASME_SCHEDULES:
        raise ValueError(f"unknown schedule {schedule!r}; ASME B36.10M/B36.19M schedules are {', '.join(ASME_SCHEDULES)}")
    from fluids.piping import schedule_lookup      # here: a route given by inside diameters loads no fluids

    size = parse_nps(nps)
    nps_list, inside, outside, wall = schedule_lookup[schedule]
    for index, listed in enumerate(nps_list):
        if abs(listed - size) < 1e-9:
            # the table is in millimetres
            return PipeSize(size, schedule, inside[index] / 1000.0, outside[index] / 1000.0, wall[index] / 1000.0)
    sizes = ", ".join(f"{n:g}" for n in nps_list)
    raise ValueError(f"NPS {size:g} is not listed in schedule {schedule}; listed sizes are {sizes}")
