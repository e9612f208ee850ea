"""The weather over the transfer (``[weather]``): an hourly table of ambient and wind, or the design day.

- ``[[weather.hours]]`` rows give ``time`` (a plain number: hours from ``schedule.start``, or the start of
  the plan when there is none; a string: a duration with its unit, ``"90 min"``, or an ISO 8601 timestamp
  with its offset, which needs ``schedule.start``), ``ambient_temperature`` and ``wind_speed`` (each in any
  unit the planner reads; the wind defaults to the site's).  Times must increase from row to row.
- ``profile = "design_day"`` (no rows): the ASHRAE fraction-of-daily-range shape between
  ``coldest_temperature`` (default ``site.design_ambient_temperature``) and ``warmest_temperature``
  (default ``site.ambient_temperature``), at the hour of day of ``schedule.start`` (needed).

Without a ``[weather]`` section the plan keeps the one site ambient (today's plans, unchanged).
"""

from __future__ import annotations

import math
from datetime import datetime
from typing import Literal, Optional, Union

from pydantic import Field, field_validator, model_validator

from planner.scenario.fields import Ambient, WindSpeed, _Model
from planner.scenario.units import UnitError, to_si

MAX_WEATHER_ROWS = 2000                  # a month of hourly rows and more
MAX_WEATHER_OFFSET_S = 60 * 86400.0      # rows within ±60 days of the start


def timestamp(text: str, where: str) -> datetime:
    """An ISO 8601 date and time with its UTC offset; ValueError naming ``where`` otherwise."""
    try:
        stamp = datetime.fromisoformat(text.strip())
    except ValueError:
        raise ValueError(f"{where} {text.strip()[:40]!r} is not an ISO 8601 date and time "
                         "(e.g. '2026-01-14T18:00+01:00')") from None
    if stamp.utcoffset() is None:
        raise ValueError(f"{where} {text.strip()[:40]!r} has no UTC offset: add it, e.g. "
                         f"'{stamp.isoformat(timespec='minutes')}+01:00'")
    return stamp


def _looks_like_timestamp(text: str) -> bool:
    text = text.strip()
    return len(text) >= 10 and text[4:5] == "-" and text[:4].isdigit()


class WeatherHour(_Model):
    """One row of the weather table."""

    time: Union[float, str] = Field(description="hours from schedule.start (a plain number), a duration with its "
                                                "unit ('90 min'), or an ISO 8601 timestamp with offset")
    ambient_temperature: Ambient
    wind_speed: Optional[WindSpeed] = Field(None, description="wind at this time; empty: the site's wind_speed")

    @field_validator("time", mode="before")
    @classmethod
    def _time(cls, value):
        if isinstance(value, bool) or not isinstance(value, (int, float, str)):
            raise ValueError("give hours from the start (a number), a duration ('90 min') or an ISO 8601 timestamp")
        if isinstance(value, str):
            if _looks_like_timestamp(value):
                timestamp(value, "time")
                return value.strip()
            try:                      # a bare number, even in quotes, is hours (as a plain number is)
                value = float(value)
            except ValueError:
                pass
        if isinstance(value, str):
            try:
                seconds = to_si(value, "time", "time")
            except UnitError as exc:
                raise ValueError(str(exc).removeprefix("time: ")) from None
        else:
            seconds = float(value) * 3600.0
        if not math.isfinite(seconds):
            raise ValueError(f"{value!r} is not a finite time: give hours from the start, e.g. 2.5")
        if abs(seconds) > MAX_WEATHER_OFFSET_S:
            raise ValueError(f"{value!r} is out of range: a row must lie within {MAX_WEATHER_OFFSET_S / 86400:.0f} "
                             "days of the start")
        return float(value) if not isinstance(value, str) else value.strip()


class Weather(_Model):
    """The weather over the transfer: a table of hours, or the design day."""

    profile: Literal["table", "design_day"] = Field(
        "table", description="table: the rows of weather.hours; design_day: the ASHRAE daily-range shape between "
                             "the coldest and warmest temperatures")
    hours: list[WeatherHour] = Field(default_factory=list, max_length=MAX_WEATHER_ROWS)
    coldest_temperature: Optional[Ambient] = Field(None, description="design day: coldest temperature; empty: "
                                                                     "site.design_ambient_temperature")
    warmest_temperature: Optional[Ambient] = Field(None, description="design day: warmest temperature; empty: "
                                                                     "site.ambient_temperature")

    @model_validator(mode="after")
    def _consistent(self):
        if self.profile == "table" and not self.hours:
            raise ValueError("give weather.hours rows (time, ambient_temperature, wind_speed), or "
                             "profile = \"design_day\"")
        if self.profile == "design_day" and self.hours:
            raise ValueError("a design day takes no weather.hours rows: remove them, or use profile = \"table\"")
        if (self.coldest_temperature is not None and self.warmest_temperature is not None
                and self.coldest_temperature > self.warmest_temperature):
            raise ValueError("coldest_temperature is above warmest_temperature")
        return self


def start_of(schedule) -> datetime | None:
    """``schedule.start`` as a datetime (None when not given)."""
    return timestamp(schedule.start, "schedule.start") if schedule.start else None


def row_seconds(row: WeatherHour, start: datetime | None) -> float:
    """Seconds of a weather row from the start (``start``: ``schedule.start`` read, or None)."""
    if isinstance(row.time, str):
        if _looks_like_timestamp(row.time):
            if start is None:
                raise ValueError("an ISO timestamp needs schedule.start (the planned start, e.g. "
                                 "'2026-01-14T18:00+01:00'); or give hours from the start as numbers")
            return (timestamp(row.time, "time") - start).total_seconds()
        return to_si(row.time, "time", "time")
    return float(row.time) * 3600.0


def weather_problems(scenario) -> list[tuple[str, str]]:
    """What the weather rows and the design day need of the rest of the scenario, as (field, message)
    pairs: timestamps need schedule.start, times increase, a design day needs the start's hour of day."""
    weather = scenario.weather
    if weather is None:
        return []
    start = start_of(scenario.schedule)
    problems = []
    if weather.profile == "design_day" and start is None:
        problems.append(("schedule.start", "a design day needs the planned start (its hour of day), e.g. "
                                           "'2026-01-14T18:00+01:00'"))
    last = -math.inf
    for i, row in enumerate(weather.hours):
        try:
            seconds = row_seconds(row, start)
        except ValueError as exc:
            problems.append((f"weather.hours[{i}].time", str(exc)))
            continue
        if not seconds > last:
            problems.append((f"weather.hours[{i}].time", f"{seconds / 3600:.4g} h from the start is not after the "
                                                         f"previous row's {last / 3600:.4g} h: give the rows in "
                                                         "order of increasing time"))
        last = max(last, seconds)
    coldest = weather.coldest_temperature or scenario.site.design_ambient_temperature or scenario.site.ambient_temperature
    warmest = weather.warmest_temperature or scenario.site.ambient_temperature
    if weather.profile == "design_day" and coldest > warmest:
        problems.append(("weather.coldest_temperature" if weather.coldest_temperature else
                         "site.design_ambient_temperature",
                         f"the design day's coldest {coldest - 273.15:.4g} °C is above its warmest "
                         f"{warmest - 273.15:.4g} °C (weather.warmest_temperature, else site.ambient_temperature)"))
    return problems
