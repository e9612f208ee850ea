"""Published limits used by the checks: ASME B16.5 flange ratings and IEC 60079-0 temperature classes.

ASME B16.5-2009, Table 2-1.1, material Group 1.1 (carbon steel, e.g. A105/A216 WCB), working
pressure by class against temperature [bar gauge].  Class 150 to 200 degC is confirmed against the
published table (../shared/REFERENCES.md); the other entries are from memory of the same table
[mem, unverified] and classes 900/1500/2500 follow the standard's fixed ratios to class 600 (1.5,
2.5, 4.167) [mem].  Between listed temperatures the standard allows linear interpolation.
Below -29 degC the rating depends on impact-tested material: outside this table.
"""

from __future__ import annotations

from bisect import bisect_left

B16_5_TEMPERATURES_C = (38, 50, 100, 150, 200, 250, 300, 325, 350, 375, 400, 425, 450)
B16_5_GROUP_1_1_BAR = {
    150: (19.6, 19.2, 17.7, 15.8, 13.8, 12.1, 10.2, 9.3, 8.4, 7.4, 6.5, 5.5, 4.6),
    300: (51.1, 50.1, 46.6, 45.1, 43.8, 41.9, 39.8, 38.7, 37.6, 36.4, 34.7, 28.8, 23.0),
    600: (102.1, 100.2, 93.2, 90.2, 87.6, 83.9, 79.6, 77.4, 75.1, 72.7, 69.4, 57.5, 46.0),
}
for _cls, _ratio in ((900, 1.5), (1500, 2.5), (2500, 25.0 / 6.0)):
    B16_5_GROUP_1_1_BAR[_cls] = tuple(round(v * _ratio, 1) for v in B16_5_GROUP_1_1_BAR[600])
B16_5_MIN_TEMPERATURE_C = -29.0


def flange_rating(flange_class: int, temperature_k: float) -> float | None:
    """Group 1.1 working pressure [Pa gauge] at ``temperature_k``; None outside -29..450 degC.

    Examples
    --------
    Class 150 at 38 degC and at 200 degC: 19.6 and 13.8 bar [1] (confirmed against the published
    table, ../shared/REFERENCES.md); between listed temperatures, linear (the standard's rule):

    >>> flange_rating(150, 311.15) / 1e5, flange_rating(150, 473.15) / 1e5
    (19.6, 13.8)
    >>> round(flange_rating(150, 448.15) / 1e5, 2)    # 175 degC: halfway between 15.8 and 13.8
    14.8

    References
    ----------
    [1] ASME B16.5-2009, Pipe Flanges and Flanged Fittings, Table 2-1.1 (material Group 1.1).
    """
    if flange_class not in B16_5_GROUP_1_1_BAR:
        raise ValueError(f"flange class {flange_class!r} is not in ASME B16.5 (150, 300, 600, 900, 1500, 2500)")
    t = temperature_k - 273.15
    if t < B16_5_MIN_TEMPERATURE_C - 1e-9 or t > B16_5_TEMPERATURES_C[-1] + 1e-9:
        return None
    row = B16_5_GROUP_1_1_BAR[flange_class]
    if t <= B16_5_TEMPERATURES_C[0]:
        return row[0] * 1e5
    i = bisect_left(B16_5_TEMPERATURES_C, t)
    t0, t1 = B16_5_TEMPERATURES_C[i - 1], B16_5_TEMPERATURES_C[i]
    v0, v1 = row[i - 1], row[i]
    return (v0 + (v1 - v0) * (t - t0) / (t1 - t0)) * 1e5


# IEC 60079-0, Table 2: maximum surface temperature of equipment per temperature class [degC] [pub].
TEMPERATURE_CLASS_C = {"T1": 450.0, "T2": 300.0, "T3": 200.0, "T4": 135.0, "T5": 100.0, "T6": 85.0}


def temperature_class_limit(temperature_class: str) -> float:
    """Maximum surface temperature [K] allowed in a hazardous area of ``temperature_class``.

    Examples
    --------
    T3: 200 degC [1]:

    >>> round(temperature_class_limit("T3") - 273.15, 2)
    200.0

    References
    ----------
    [1] IEC 60079-0, Explosive atmospheres - Part 0: Equipment - General requirements, Table 2.
    """
    try:
        return TEMPERATURE_CLASS_C[temperature_class] + 273.15
    except KeyError:
        raise ValueError(f"unknown temperature class {temperature_class!r}; classes are T1-T6") from None
