"""Properties of dry air at about atmospheric pressure, 200-600 K, for outside heat transfer.

Simple published laws, cheap enough for the plan's inner loop. Accuracy over 200-600 K against
the reference formulation (Lemmon et al. 2000 equation of state, Lemmon & Jacobsen 2004
transport) is roughly: viscosity within 2 %, conductivity within 3.5 % (within 1.1 % above
270 K), heat capacity within 1 %, density within 0.3 %, Prandtl number within 2.5 %.
That is well inside the uncertainty of the outside-film correlations these feed (10-20 %).

Viscosity, conductivity and heat capacity are taken as independent of pressure (true to well
under 1 % near 1 atm). Temperatures in kelvin; must be > 0.
"""

from __future__ import annotations

__all__ = [
    "air_viscosity",
    "air_conductivity",
    "air_density",
    "air_heat_capacity",
    "air_prandtl",
    "R_AIR",
]

R_AIR = 287.05
"""Specific gas constant of dry air [J/(kg K)] (R / M with M = 28.9645 g/mol, US Std Atm 1976)."""

# Sutherland's law for viscosity (White, Viscous Fluid Flow, 3rd ed., Table 1-2).
_MU0 = 1.716e-5  # [Pa s]
_T0 = 273.15  # [K]
_S_MU = 110.4  # [K]
_MU_C = _MU0 * (_T0 + _S_MU) / _T0**1.5

# Sutherland-form law for conductivity (White, Viscous Fluid Flow, 3rd ed., Table 1-3:
# k0 = 0.0241 W/(m K) at T0 = 273 K, S = 194 K); T0 taken as 273.15 K here (0.05 % effect).
_K0 = 0.0241  # [W/(m K)]
_S_K = 194.0  # [K]
_K_C = _K0 * (_T0 + _S_K) / _T0**1.5

# Ideal-gas heat capacity polynomial for air, cp = a + bT + cT^2 + dT^3 [kJ/(kmol K)],
# 273-1800 K, stated max error 0.72 % (Cengel & Boles, Thermodynamics, Table A-2c) [mem]
# unverified as copied; the tests hold it to 1 % against the reference formulation.
_CP_A = 28.11
_CP_B = 0.1967e-2
_CP_C = 0.4802e-5
_CP_D = -1.966e-9
_M_AIR = 28.97  # [kg/kmol], as used with that table
_CP_T_MIN = 273.15  # [K], the fit's lower limit; below it cp of air is flat (about 1.006 kJ/kg K)
_CP_T_MAX = 1800.0  # [K], the fit's upper limit; above it cp is held at its 1800 K value (the cubic
                    # turns down past about 2,400 K and is negative above 3,730 K: a negative Prandtl
                    # and Rayleigh number for a jacket the wall solve visits above about 7,000 K)


def _check_t(t: float) -> None:
    if not t > 0.0:
        raise ValueError(f"temperature: {t!r} K is not allowed; it must be > 0 K")


def air_viscosity(t: float) -> float:
    """Dynamic viscosity of air by Sutherland's law.

    mu = mu0 (T/T0)^1.5 (T0 + S)/(T + S),  mu0 = 1.716e-5 Pa s, T0 = 273.15 K, S = 110.4 K

    Valid about 170-1900 K (White); within 2 % of the reference formulation over 200-600 K.
    t: temperature [K]. Returns mu [Pa s].
    Source: White, Viscous Fluid Flow, Table 1-2 (same law as US Standard Atmosphere 1976) [1].

    Examples
    --------
    At 20 degC: 1.813e-5 Pa s by hand from [1] (../shared/REFERENCES.md [calc]); the reference
    formulation gives 1.8206e-5 [2] (iapws 1.5.5 humidAir.Air), 0.4 % above.

    >>> f"{air_viscosity(293.15):.4g}"
    '1.813e-05'

    References
    ----------
    [1] White, F. M., Viscous Fluid Flow, 3rd ed., McGraw-Hill, 2006, Table 1-2.
    [2] Lemmon, E. W., Jacobsen, R. T., "Viscosity and thermal conductivity equations for nitrogen,
        oxygen, argon, and air", Int. J. Thermophys. 25 (2004) 21-69.
    """
    _check_t(t)
    return _MU_C * t**1.5 / (t + _S_MU)


def air_conductivity(t: float) -> float:
    """Thermal conductivity of air by a Sutherland-form law.

    k = k0 (T/T0)^1.5 (T0 + S)/(T + S),  k0 = 0.0241 W/(m K), T0 = 273.15 K, S = 194 K

    White quotes about 2 % over 160-1000 K; against the reference formulation it is within 1.1 %
    over 270-600 K and reads 3.2 % low at 200 K.
    t: temperature [K]. Returns k [W/(m K)].
    Source: White, Viscous Fluid Flow, Table 1-3 [1].

    Examples
    --------
    At 20 degC the reference formulation gives 0.02587 W/(m K) [2] (iapws 1.5.5 humidAir.Air;
    CoolProp 8.0.0 agrees, ../shared/REFERENCES.md); the law reads 0.7 % low, the same to 3 places:

    >>> round(air_conductivity(293.15), 3)
    0.026

    References
    ----------
    [1] White, F. M., Viscous Fluid Flow, 3rd ed., McGraw-Hill, 2006, Table 1-3.
    [2] Lemmon, E. W., Jacobsen, R. T., Int. J. Thermophys. 25 (2004) 21-69.
    """
    _check_t(t)
    return _K_C * t**1.5 / (t + _S_K)


def air_density(t: float, pressure: float = 101325.0) -> float:
    """Density of dry air as an ideal gas.

    rho = p / (R T),  R = 287.05 J/(kg K)

    Within 0.3 % near 1 atm over 200-600 K.
    t: temperature [K]; pressure: absolute pressure [Pa], > 0. Returns rho [kg/m^3].
    Source: ideal-gas law; R from the US Standard Atmosphere 1976 [1].

    Examples
    --------
    At 20 degC and 1 atm the reference equation of state gives 1.2046 kg/m^3 [2] (CoolProp 8.0.0,
    ../shared/REFERENCES.md); the ideal gas, 1.2041:

    >>> round(air_density(293.15), 3)
    1.204

    References
    ----------
    [1] U.S. Standard Atmosphere, 1976, NOAA/NASA/USAF, Washington D.C., 1976.
    [2] Lemmon, E. W., Jacobsen, R. T., Penoncello, S. G., Friend, D. G., "Thermodynamic properties
        of air and mixtures of nitrogen, argon and oxygen", J. Phys. Chem. Ref. Data 29 (2000) 331-385.
    """
    _check_t(t)
    if not pressure > 0.0:
        raise ValueError(f"pressure: {pressure!r} Pa is not allowed; it must be > 0 Pa absolute")
    return pressure / (R_AIR * t)


def air_heat_capacity(t: float) -> float:
    """Isobaric specific heat capacity of air (ideal gas).

    cp = (a + b T + c T^2 + d T^3) / M,  a = 28.11, b = 0.1967e-2, c = 0.4802e-5,
    d = -1.966e-9 [kJ/(kmol K)], M = 28.97 kg/kmol; T below 273.15 K is evaluated at 273.15 K
    (the fit's lower limit; cp of air changes by under 0.2 % from 200 K to 273 K) and T above
    1800 K at 1800 K (the fit's upper limit: past it the cubic falls and turns negative, while the
    real cp keeps rising; the flat value keeps every Prandtl number positive for any film temperature).

    Within 1 % of the reference formulation over 200-600 K at 1 atm.
    t: temperature [K]. Returns cp [J/(kg K)].
    Source: Cengel & Boles, Thermodynamics, Table A-2c (fit range 273-1800 K) [1] [mem] unverified.

    Examples
    --------
    At 300 K the reference formulation gives 1006.4 J/(kg K) [2] (iapws 1.5.5 humidAir.Air at
    1 atm); the fit gives 1003.8, 0.3 % low, inside the 1 % stated above:

    >>> abs(air_heat_capacity(300.0) / 1006.4 - 1.0) < 0.01
    True

    References
    ----------
    [1] Cengel, Y. A., Boles, M. A., Thermodynamics: An Engineering Approach, McGraw-Hill,
        Table A-2c [mem] unverified.
    [2] Lemmon, E. W., et al., J. Phys. Chem. Ref. Data 29 (2000) 331-385.
    """
    _check_t(t)
    if t < _CP_T_MIN:
        t = _CP_T_MIN
    elif t > _CP_T_MAX:
        t = _CP_T_MAX
    return 1000.0 * (_CP_A + t * (_CP_B + t * (_CP_C + t * _CP_D))) / _M_AIR


def air_prandtl(t: float) -> float:
    """Prandtl number of air, Pr = cp mu / k, from the functions of this module.

    Within 2.5 % of the reference formulation over 200-600 K.
    t: temperature [K]. Returns Pr [-].

    Examples
    --------
    At 20 degC the reference formulation gives 0.708 [1] (iapws 1.5.5 humidAir.Air; CoolProp 8.0.0
    agrees, ../shared/REFERENCES.md):

    >>> round(air_prandtl(293.15), 3)
    0.708

    References
    ----------
    [1] Lemmon, E. W., et al., J. Phys. Chem. Ref. Data 29 (2000) 331-385; Lemmon, E. W.,
        Jacobsen, R. T., Int. J. Thermophys. 25 (2004) 21-69.
    """
    return air_heat_capacity(t) * air_viscosity(t) / air_conductivity(t)
