"""Saturation line of water (IAPWS-IF97 region 4) for steam tracing and jacketing.

The saturation-pressure equation of IF97 and its backward (saturation-temperature) form, with
the ten n-coefficients of the release. Both are explicit; the backward form is consistent with
the forward one to well under 1e-7 relative.

Source: IAPWS, Revised Release on the IAPWS Industrial Formulation 1997 for the Thermodynamic
Properties of Water and Steam (IAPWS R7-97(2012)), Section 8, eqs. 29-31, Table 34.
"""

from __future__ import annotations

from math import sqrt

__all__ = [
    "P_SAT_MIN",
    "P_SAT_MAX",
    "T_SAT_MIN",
    "T_SAT_MAX",
    "saturation_pressure",
    "saturation_temperature",
    "saturation_temperature_gauge",
]

# IF97 Table 34, coefficients n1..n10 of the region-4 equations.
_N1 = 0.11670521452767e4
_N2 = -0.72421316703206e6
_N3 = -0.17073846940092e2
_N4 = 0.12020824702470e5
_N5 = -0.32325550322333e7
_N6 = 0.14915108613530e2
_N7 = -0.48232657361591e4
_N8 = 0.40511340542057e6
_N9 = -0.23855557567849
_N10 = 0.65017534844798e3

T_SAT_MIN = 273.15
"""Lowest temperature of IF97 region 4 [K]."""
T_SAT_MAX = 647.096
"""Critical temperature, highest temperature of IF97 region 4 [K]."""
P_SAT_MIN = 611.212677
"""Saturation pressure at 273.15 K by the IF97 equation [Pa] (611.213 Pa)."""
P_SAT_MAX = 22.064e6
"""Critical pressure, highest pressure of IF97 region 4 [Pa]."""

# Range checks allow a round-off margin of 1e-9 relative, so that the two equations can be
# chained at the ends of the line (e.g. saturation_pressure(647.096 K) is 22.064 MPa + 0.3 mPa).
_T_LO = T_SAT_MIN * (1.0 - 1e-9)
_T_HI = T_SAT_MAX * (1.0 + 1e-9)
_P_LO = P_SAT_MIN * (1.0 - 1e-9)
_P_HI = P_SAT_MAX * (1.0 + 1e-9)


def saturation_pressure(temperature_k: float) -> float:
    """Saturation pressure of water, IAPWS-IF97 region 4 (eq. 30).

    theta = T + n9/(T - n10)                 (T in K)
    A = theta^2 + n1 theta + n2,  B = n3 theta^2 + n4 theta + n5,  C = n6 theta^2 + n7 theta + n8
    p_sat = [2C / (-B + (B^2 - 4AC)^0.5)]^4 * 1 MPa

    Valid 273.15 K <= T <= 647.096 K; outside, ValueError.
    temperature_k: temperature [K]. Returns p_sat [Pa].
    Source: IAPWS R7-97(2012), eq. 30 and Table 34 [1].

    Examples
    --------
    The release's verification value, Table 35 [1]: 0.353658941e-2 MPa at 300 K:

    >>> f"{saturation_pressure(300.0) / 1e6:.8e}"
    '3.53658941e-03'

    References
    ----------
    [1] IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997 for the Thermodynamic
        Properties of Water and Steam, Section 8.
    """
    if not _T_LO <= temperature_k <= _T_HI:
        raise ValueError(
            f"temperature: {temperature_k!r} K is outside the IAPWS-IF97 saturation line "
            f"({T_SAT_MIN} K to {T_SAT_MAX} K)"
        )
    th = temperature_k + _N9 / (temperature_k - _N10)
    a = (th + _N1) * th + _N2
    b = (_N3 * th + _N4) * th + _N5
    c = (_N6 * th + _N7) * th + _N8
    x = 2.0 * c / (-b + sqrt(b * b - 4.0 * a * c))
    x *= x
    return 1.0e6 * x * x


def saturation_temperature(pressure_pa: float) -> float:
    """Saturation temperature of water, IAPWS-IF97 region 4 backward equation (eq. 31).

    beta = (p / 1 MPa)^(1/4)
    E = beta^2 + n3 beta + n6,  F = n1 beta^2 + n4 beta + n7,  G = n2 beta^2 + n5 beta + n8
    D = 2G / (-F - (F^2 - 4EG)^0.5)
    T_sat = [n10 + D - ((n10 + D)^2 - 4(n9 + n10 D))^0.5] / 2 * 1 K

    Valid 611.213 Pa <= p <= 22.064 MPa (absolute); outside, ValueError.
    pressure_pa: absolute pressure [Pa]. Returns T_sat [K].
    Source: IAPWS R7-97(2012), eq. 31 and Table 34 [1].

    Examples
    --------
    The release's verification value, Table 36 [1]: 372.755919 K at 0.1 MPa:

    >>> round(saturation_temperature(0.1e6), 6)
    372.755919

    References
    ----------
    [1] IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997 for the Thermodynamic
        Properties of Water and Steam, Section 8.
    """
    if not _P_LO <= pressure_pa <= _P_HI:
        raise ValueError(
            f"pressure: {pressure_pa!r} Pa (absolute) is outside the IAPWS-IF97 saturation line "
            f"({P_SAT_MIN} Pa to {P_SAT_MAX} Pa)"
        )
    beta = sqrt(sqrt(pressure_pa * 1.0e-6))
    e = (beta + _N3) * beta + _N6
    f = (_N1 * beta + _N4) * beta + _N7
    g = (_N2 * beta + _N5) * beta + _N8
    d = 2.0 * g / (-f - sqrt(f * f - 4.0 * e * g))
    s = _N10 + d
    return 0.5 * (s - sqrt(s * s - 4.0 * (_N9 + _N10 * d)))


def saturation_temperature_gauge(pressure_gauge_pa: float, atmospheric_pa: float = 101325.0) -> float:
    """Saturation temperature at a gauge pressure: T_sat(p_gauge + p_atm).

    pressure_gauge_pa: gauge pressure [Pa] (1 barg = 1e5 Pa above atmosphere);
    atmospheric_pa: local atmospheric pressure [Pa], > 0 (default 101325 Pa, standard atmosphere).
    Returns T_sat [K]. ValueError when the absolute pressure is outside the saturation line.
    Source: as saturation_temperature [1].

    Examples
    --------
    1 barg at standard atmosphere is 2.01325 bar absolute: 120.42 degC (iapws 1.5.5 ``_TSat_P`` [2]):

    >>> round(saturation_temperature_gauge(1e5) - 273.15, 2)
    120.42

    References
    ----------
    [1] IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997 for the Thermodynamic
        Properties of Water and Steam, Section 8.
    [2] Romera, J. J. G., iapws: Python implementation of IAPWS standards, version 1.5.5.
    """
    if not atmospheric_pa > 0.0:
        raise ValueError(f"atmospheric_pa: {atmospheric_pa!r} Pa is not allowed; it must be > 0")
    return saturation_temperature(pressure_gauge_pa + atmospheric_pa)


# Latent heat of vaporisation, for steam consumption of tracers and vessel coils.
CRITICAL_TEMPERATURE_K = 647.096
_LATENT_REFERENCE_T = 373.124      # K, saturation at 101.325 kPa (IAPWS-95)
_LATENT_REFERENCE_J_KG = 2256.4e3  # J/kg at that temperature (IAPWS-95 steam tables) [pub, mem]


def latent_heat(temperature_k: float) -> float:
    """Latent heat of vaporisation of water [J/kg] at saturation temperature ``temperature_k`` [K].

    Watson's relation (Watson 1943; Poling, Prausnitz & O'Connell, The Properties of Gases and
    Liquids, eq. 7-12.1): h_fg = h_fg,ref ((Tc - T)/(Tc - T_ref))^n, referenced to the normal
    boiling point.  Watson's general exponent 0.38 is 2.7 % low for water at 250 degC; n = 0.34
    suits water over 100-250 degC, within 0.5 % of IAPWS-IF97 there (checked in tests against the
    iapws library).  That is far inside the uncertainty of a tracer's steam consumption (trap
    losses, condensate sub-cooling).

    Examples
    --------
    At 150 degC IAPWS-IF97 gives h'' - h' = 2113.7 kJ/kg (iapws 1.5.5 ``IAPWS97`` [3]); the Watson
    form 2106.9 (0.3 % low), the same to 10 kJ/kg:

    >>> round(latent_heat(423.15) / 1e3, -1)
    2110.0

    References
    ----------
    [1] Watson, K. M., "Thermodynamics of the liquid state", Ind. Eng. Chem. 35 (1943) 398-406.
    [2] Poling, B. E., Prausnitz, J. M., O'Connell, J. P., The Properties of Gases and Liquids,
        5th ed., McGraw-Hill, 2001, eq. 7-12.1.
    [3] IAPWS R7-97(2012); Romera, J. J. G., iapws, version 1.5.5.
    """
    if not 273.15 <= temperature_k < CRITICAL_TEMPERATURE_K:
        raise ValueError(f"temperature = {temperature_k!r} K: latent heat needs 273.15 K <= T < {CRITICAL_TEMPERATURE_K} K")
    return _LATENT_REFERENCE_J_KG * ((CRITICAL_TEMPERATURE_K - temperature_k) /
                                     (CRITICAL_TEMPERATURE_K - _LATENT_REFERENCE_T)) ** 0.34
