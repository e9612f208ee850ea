"""The design day: the outdoor air temperature over a day from its coldest and warmest values.

The shape is the ASHRAE fraction of the daily range [1]: at each hour of the day the temperature lies a
fraction f of the daily range below the day's warmest, T(h) = T_warmest - f(h) (T_warmest - T_coldest),
with f = 1 near 05:00 (the coldest hour) and f = 0 at 14:00-15:00 (the warmest).  The table gives f at
the whole hours of local (solar) time; between them the temperature is interpolated linearly.
"""

from __future__ import annotations

import math

# Fraction of the daily temperature range below the day's warmest temperature, at hours 1 to 24 of local
# time (hour 24 is midnight).  Source: ASHRAE Handbook - Fundamentals (2009, 2013), chapter 14
# "Climatic Design Information", table "Fraction of Daily Temperature Range" [1]. [mem]: the values are
# from memory of the published table; confirm against the handbook before relying on the shape.
FRACTION_OF_DAILY_RANGE: dict[int, float] = {
    1: 0.88, 2: 0.92, 3: 0.95, 4: 0.98, 5: 1.00, 6: 0.98, 7: 0.91, 8: 0.74,
    9: 0.55, 10: 0.38, 11: 0.23, 12: 0.13, 13: 0.05, 14: 0.00, 15: 0.00, 16: 0.06,
    17: 0.14, 18: 0.24, 19: 0.39, 20: 0.50, 21: 0.59, 22: 0.68, 23: 0.75, 24: 0.82,
}


def fraction_of_daily_range(hour_of_day: float) -> float:
    """The fraction f [-] of the daily range below the warmest temperature at ``hour_of_day`` [h] of local
    time (any real number; taken modulo 24), linear between the table's whole hours [1].

    Examples
    --------
    The coldest hour, 05:00, and the warmest, 14:00, of the published table [1] [mem]; half past seven is
    halfway between 0.91 (07:00) and 0.74 (08:00):

    >>> fraction_of_daily_range(5.0), fraction_of_daily_range(14.0), round(fraction_of_daily_range(7.5), 3)
    (1.0, 0.0, 0.825)

    References
    ----------
    [1] ASHRAE Handbook - Fundamentals, chapter 14 "Climatic Design Information", table "Fraction of
        Daily Temperature Range" (2009 and 2013 editions) [mem].
    """
    if not math.isfinite(hour_of_day):
        raise ValueError(f"hour_of_day: {hour_of_day!r} is not a number of hours")
    hour = hour_of_day % 24.0
    below = int(math.floor(hour))
    weight = hour - below
    low = FRACTION_OF_DAILY_RANGE[below or 24]
    high = FRACTION_OF_DAILY_RANGE[below + 1]
    return low + weight * (high - low)


def design_day_temperature(hour_of_day: float, coldest: float, warmest: float) -> float:
    """The design-day air temperature [K] at ``hour_of_day`` [h, local time] for a day whose coldest
    temperature is ``coldest`` [K] and warmest ``warmest`` [K]: T = warmest - f (warmest - coldest), f the
    ASHRAE fraction of the daily range [1].

    Examples
    --------
    A winter day from -8 degC to +2 degC (10 K range): at 05:00 it is -8 degC, at 15:00 +2 degC, at 20:00
    (f = 0.50 [1] [mem]) -3 degC:

    >>> [round(design_day_temperature(h, 265.15, 275.15) - 273.15, 2) for h in (5, 15, 20)]
    [-8.0, 2.0, -3.0]

    References
    ----------
    [1] ASHRAE Handbook - Fundamentals, chapter 14 "Climatic Design Information", table "Fraction of
        Daily Temperature Range" (2009 and 2013 editions) [mem].
    """
    if not coldest <= warmest:
        raise ValueError(f"coldest {coldest!r} K is above warmest {warmest!r} K")
    return warmest - fraction_of_daily_range(hour_of_day) * (warmest - coldest)
