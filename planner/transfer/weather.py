"""The weather over the transfer: ambient and wind at each moment of the plan, and the lines at that weather.

The plan's clock starts at ``schedule.start`` (or at 0 without one) when the start-up begins (pre-warm or
push-out); the transfer's timeline follows the start-up.  A table (``[[weather.hours]]`` or ``--weather``)
is interpolated linearly between its rows and held before the first and after the last; the design day
follows the ASHRAE fraction of the daily range (``correlations.design_day``) at the local hour of the clock.

The lines at one weather state (ambient and wind rounded to ``AMBIENT_STEP_K`` and ``WIND_STEP_M_S``) are
built once per state and kept on the system (``weathered``): a new ``LineSegment`` per segment, so no value
kept for one ambient (the segment's own outward path) is used at another; the heat paths' kept surface
values are shared through ``Line.kept``, whose key holds the ambient and the wind.  A segment with its
own ``surroundings.ambient_temperature`` keeps it (indoor rooms, heated enclosures), and one with its own
``wind_speed`` keeps that; indoor, sheltered and buried runs see no wind unless they give one; buried runs
keep the scenario's ambient (the soil around a buried line does not follow the hour).

Examples
--------
A table from 18:00 (-2 degC, 3 m/s) to 06:00 (-8 degC, 1 m/s): at 21:00, a quarter of the way, the
ambient is -3.5 degC and the wind 2.5 m/s (linear interpolation); after the last row it is held:

>>> from datetime import datetime
>>> weather = WeatherProfile((0.0, 43200.0), (271.15, 265.15), (3.0, 1.0), datetime.fromisoformat("2026-01-14T18:00+01:00"))
>>> [round(v, 2) for v in weather.at(10800.0)], weather.at(90000.0), weather.clock(10800.0)
([269.65, 2.5], (265.15, 1.0), '21:00')

References
----------
[1] ASHRAE Handbook - Fundamentals, chapter 14 "Climatic Design Information", table "Fraction of Daily
    Temperature Range" (2009 and 2013 editions) [mem]: the design day's shape.
"""

from __future__ import annotations

import copy
import math
from dataclasses import dataclass
from datetime import datetime, timedelta

from planner.correlations.design_day import design_day_temperature
from planner.line.march import Line
from planner.line.route import build_line
from planner.scenario.schema import Scenario, row_seconds, start_of
from planner.scenario.wording import Q, Sentence

AMBIENT_STEP_K = 0.1          # weather states kept per 0.1 K of ambient ...
WIND_STEP_M_S = 0.1           # ... and 0.1 m/s of wind
DAY_S = 86400.0


@dataclass(frozen=True)
class WeatherProfile:
    """Ambient [K] and wind [m/s] against seconds from the start: a table's rows, or (``coldest`` and
    ``warmest`` given) the design day."""

    times_s: tuple
    ambient_k: tuple
    wind_m_s: tuple
    start: datetime | None = None
    source: str = "table"                 # "table" or "design_day"
    coldest_k: float | None = None
    warmest_k: float | None = None
    reference: tuple = (273.15, 0.0)      # the site's ambient [K] and wind [m/s]: the states count from them

    def at(self, elapsed_s: float) -> tuple[float, float]:
        """(ambient [K], wind [m/s]) at ``elapsed_s`` from the start."""
        if self.source == "design_day":
            local = self.start + timedelta(seconds=elapsed_s)
            hour = local.hour + local.minute / 60.0 + (local.second + local.microsecond / 1e6) / 3600.0
            return design_day_temperature(hour, self.coldest_k, self.warmest_k), self.wind_m_s[0]
        times = self.times_s
        if elapsed_s <= times[0]:
            return self.ambient_k[0], self.wind_m_s[0]
        if elapsed_s >= times[-1]:
            return self.ambient_k[-1], self.wind_m_s[-1]
        i = next(k for k in range(1, len(times)) if times[k] >= elapsed_s)
        w = (elapsed_s - times[i - 1]) / (times[i] - times[i - 1])
        return (self.ambient_k[i - 1] + w * (self.ambient_k[i] - self.ambient_k[i - 1]),
                self.wind_m_s[i - 1] + w * (self.wind_m_s[i] - self.wind_m_s[i - 1]))

    def state(self, elapsed_s: float) -> tuple[float, float]:
        """The weather state at ``elapsed_s``: ambient and wind rounded to the kept steps, counted from the
        site's (``reference``), so weather at the site's own values gives exactly the site's lines."""
        ambient, wind = self.at(elapsed_s)
        ambient_0, wind_0 = self.reference
        return (ambient_0 + round((ambient - ambient_0) / AMBIENT_STEP_K) * AMBIENT_STEP_K,
                max(0.0, wind_0 + round((wind - wind_0) / WIND_STEP_M_S) * WIND_STEP_M_S))

    def _knots(self, t0: float, t1: float) -> list[float]:
        if self.source == "design_day":
            local = self.start + timedelta(seconds=t0)
            first = t0 + (3600.0 - (local.minute * 60 + local.second + local.microsecond / 1e6)) % 3600.0
            return [first + 3600.0 * k for k in range(int(max(0.0, t1 - first) // 3600.0) + 1) if first + 3600.0 * k <= t1]
        return [t for t in self.times_s if t0 < t < t1]

    def coldest_between(self, t0: float, t1: float) -> float:
        """The moment [s from the start] of the lowest ambient in [t0, t1] (the first, on a tie); the
        profile is piecewise linear between its knots, so the lowest is at an end or a knot."""
        candidates = [t0, *self._knots(t0, t1), max(t0, t1)]
        return min(candidates, key=lambda t: (self.at(t)[0], t))

    def clock(self, elapsed_s: float) -> str:
        """The local clock time ``HH:MM`` at ``elapsed_s`` ("" without a start); a later day is marked
        "on day 2"."""
        if self.start is None or not math.isfinite(elapsed_s):
            return ""
        local = self.start + timedelta(seconds=round(elapsed_s / 60.0) * 60.0)
        days = (local.date() - self.start.date()).days
        return local.strftime("%H:%M") + (f" on day {days + 1}" if days else "")

    def when(self, elapsed_s: float):
        """A moment in a sentence: "at 03:40" with a start, else "after 5.2 h"."""
        text = self.clock(elapsed_s)
        return f"at {text}" if text else Sentence("after {t}", t=Q(max(elapsed_s, 0.0), "time"))

    def as_dict(self) -> dict:
        """The weather used, for the plan JSON (SI)."""
        doc = {"source": self.source, "start": self.start.isoformat() if self.start else None}
        if self.source == "design_day":
            doc.update(coldest_k=self.coldest_k, warmest_k=self.warmest_k, wind_speed_m_s=self.wind_m_s[0])
        else:
            doc["rows"] = [{"time_s": t, "ambient_temperature_k": a, "wind_speed_m_s": w}
                           for t, a, w in zip(self.times_s, self.ambient_k, self.wind_m_s)]
        return doc


def weather_profile(scenario: Scenario) -> WeatherProfile | None:
    """The scenario's weather (None without a ``[weather]`` section: the one site ambient).

    Examples
    --------
    The oil transfer of ``scenario.examples`` (still air) with a table: -3 degC 12 h before the start,
    2 degC at it, 8 degC and 4 m/s 6 h after; 3 h in, half way to the last row, the air is at 5 degC
    and 2 m/s (linear interpolation, by hand; a row without wind takes the site's 0 m/s):

    >>> import copy
    >>> from planner.scenario.examples import EXAMPLES
    >>> from planner.scenario.schema import scenario_from_dict
    >>> doc = copy.deepcopy(EXAMPLES["oil transfer"])
    >>> doc["weather"] = {"hours": [{"time": -12, "ambient_temperature": -3.0}, {"time": 0, "ambient_temperature": 2.0},
    ...                             {"time": 6, "ambient_temperature": 8.0, "wind_speed": 4.0}]}
    >>> profile = weather_profile(scenario_from_dict(doc))
    >>> [round(v, 2) for v in profile.at(3 * 3600.0)]
    [278.15, 2.0]
    """
    weather = scenario.weather
    if weather is None:
        return None
    site = scenario.site
    start = start_of(scenario.schedule)
    if weather.profile == "design_day":
        coldest = weather.coldest_temperature or site.design_ambient_temperature or site.ambient_temperature
        warmest = weather.warmest_temperature or site.ambient_temperature
        return WeatherProfile((0.0,), (coldest,), (site.wind_speed,), start, "design_day", coldest, warmest,
                              (site.ambient_temperature, site.wind_speed))
    rows = weather.hours
    return WeatherProfile(tuple(row_seconds(r, start) for r in rows), tuple(r.ambient_temperature for r in rows),
                          tuple(site.wind_speed if r.wind_speed is None else r.wind_speed for r in rows), start,
                          reference=(site.ambient_temperature, site.wind_speed))


def line_start_default(profile: WeatherProfile) -> float:
    """The contents' temperature at the start when ``schedule.line_start_temperature`` is not given: the
    lowest ambient of the day before the start (the contents stood in the line overnight).

    Examples
    --------
    The table of ``weather_profile``'s example: the lowest ambient of the 24 h before the start is the
    row 12 h before it, -3 degC:

    >>> import copy
    >>> from planner.scenario.examples import EXAMPLES
    >>> from planner.scenario.schema import scenario_from_dict
    >>> doc = copy.deepcopy(EXAMPLES["oil transfer"])
    >>> doc["weather"] = {"hours": [{"time": -12, "ambient_temperature": -3.0}, {"time": 0, "ambient_temperature": 2.0},
    ...                             {"time": 6, "ambient_temperature": 8.0, "wind_speed": 4.0}]}
    >>> round(line_start_default(weather_profile(scenario_from_dict(doc))) - 273.15, 2)
    -3.0
    """
    return profile.at(profile.coldest_between(-DAY_S, 0.0))[0]


def weathered(system, ambient: float, wind: float):
    """A copy of ``system`` (``TransferSystem``) whose lines see ``ambient`` [K] and ``wind`` [m/s] (rules in
    the module docstring); kept per state on the system, so each state's lines are built once.

    Examples
    --------
    The oil transfer of ``scenario.examples`` (20 degC, still air) at 5 degC and 2 m/s: the copy's line
    sees them, the system's own is untouched, and asking again gives the kept copy:

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.transfer.system import TransferSystem
    >>> system = TransferSystem(example_scenario("oil transfer"))
    >>> cold = weathered(system, 278.15, 2.0)
    >>> seg, own = cold.discharge_line.segments[0], system.discharge_line.segments[0]
    >>> seg.ambient_temperature, seg.wind_speed, own.ambient_temperature, weathered(system, 278.15, 2.0) is cold
    (278.15, 2.0, 293.15, True)
    """
    cache = system.__dict__.setdefault("weathered", {})
    key = (ambient, wind)
    if key not in cache:
        variant = copy.copy(system)
        variant.evaluations = 0
        variant.discharge_line = _line_at(system.scenario, system.scenario.route, system.discharge_line, ambient, wind)
        if system.suction_line is not None:
            variant.suction_line = _line_at(system.scenario, system.scenario.suction, system.suction_line, ambient, wind)
        variant.ambient_temperature = ambient
        cache[key] = variant
    return cache[key]


def _line_at(scenario: Scenario, route, base: Line, ambient: float, wind: float) -> Line:
    site = scenario.site.model_copy(update={"ambient_temperature": ambient, "wind_speed": wind})
    segments = build_line(route, site, base.segments[0].heat_loss_factor if base.segments else 1.0)
    for seg, kept in zip(segments, base.segments):
        if seg.location == "buried":
            seg.ambient_temperature = kept.ambient_temperature
    return Line(segments, base.product, base.tracing, name=base.name, kept=base.kept)


def evaluations_of(system) -> int:
    """Operating-point evaluations of ``system`` and of its weathered copies.

    Examples
    --------
    One system curve point on the system and one on a weathered copy: two in all (by count):

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.transfer.system import SystemState, TransferSystem
    >>> system = TransferSystem(example_scenario("oil transfer"))
    >>> state = SystemState(313.15, 60.0)
    >>> _ = system.at_flow(1.25e-3, state), weathered(system, 278.15, 2.0).at_flow(1.25e-3, state)
    >>> system.evaluations, evaluations_of(system)
    (1, 2)
    """
    return system.evaluations + sum(v.evaluations for v in system.__dict__.get("weathered", {}).values()
                                    if v is not system)
