"""Viscosity against temperature: Andrade, Vogel–Fulcher–Tammann and Walther (ASTM D341) laws.

Temperatures are kelvin throughout.  Each law is a small frozen dataclass whose evaluation uses only
the ``math`` module (it sits in the planner's hot loop).  ``viscosity_fit.fit_viscosity_law`` turns
measured points into a law and says how well it fits and over which range.

Laws
----
- ``AndradeLaw``: ln(mu / [Pa s]) = a + b / T.  Source: E. N. da C. Andrade, Phil. Mag. 17 (1934)
  497; the usual two-constant liquid-viscosity form.
- ``VogelFulcherTammannLaw``: ln(mu / [Pa s]) = a + b / (T - c), valid for T > c.  Source: Vogel
  (1921), Fulcher (1925), Tammann & Hesse (1926).
- ``WaltherLaw``: log10 log10 Z = a - b log10 T with
  Z = nu + 0.7 + exp(-1.47 - 1.84 nu - 0.51 nu^2), nu in [cSt] = [mm2/s].  Source: ASTM D341-09 and
  later editions (the 2009 form with the exponential correction for low viscosities).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

LAW_NAMES = ("andrade", "vft", "walther")
MIN_POINTS = {"andrade": 2, "vft": 3, "walther": 2}


# --------------------------------------------------------------------------------------------- laws
@dataclass(frozen=True, slots=True)
class AndradeLaw:
    """Andrade law ln(mu/[Pa s]) = a + b/T, T in [K]; a [-], b [K].

    Valid over the fitted range of a simple (Newtonian) liquid; two constants describe water within
    about 2 % across 20–60 °C.  Source: Andrade (1934) [1].

    Examples
    --------
    Water through 1.0016 mPa s at 20 °C and 0.46604 at 60 °C [2]; at 40 °C the reference gives
    0.65273 mPa s [2], the law 2.1 % more, inside the "few percent" of ../shared/REFERENCES.md:

    >>> import math
    >>> b = math.log(1.0016e-3 / 0.46604e-3) / (1 / 293.15 - 1 / 333.15)
    >>> law = AndradeLaw(math.log(1.0016e-3) - b / 293.15, b)
    >>> abs(law.dynamic(313.15) / 0.65273e-3 - 1) < 0.03
    True

    References
    ----------
    [1] Andrade, E. N. da C., "A theory of the viscosity of liquids", Phil. Mag. 17 (1934) 497-511.
    [2] Huber, M. L., et al., "New international formulation for the viscosity of H2O", J. Phys. Chem.
        Ref. Data 38 (2009) 101-125 (IAPWS 2008); values by iapws 1.5.5, ../shared/REFERENCES.md.
    """

    a: float
    b: float
    quantity = "dynamic"
    name = "andrade"

    def __post_init__(self) -> None:
        _check_parameters(self.name, a=self.a, b=self.b)

    def dynamic(self, t: float) -> float:
        """Dynamic viscosity [Pa s] at temperature ``t`` [K] (t > 0)."""
        if not t > 0.0:
            raise ValueError(f"temperature = {t!r} K: must be > 0 K")
        return math.exp(self.a + self.b / t)

    value = dynamic

    def parameters(self) -> dict[str, float]:
        """The constants, {"a": [-], "b": [K]}."""
        return {"a": self.a, "b": self.b}


@dataclass(frozen=True, slots=True)
class VogelFulcherTammannLaw:
    """Vogel–Fulcher–Tammann law ln(mu/[Pa s]) = a + b/(T - c); a [-], b [K], c [K].

    Valid for T > c only (the law diverges at T = c); use inside the fitted range.
    Source: Vogel (1921) [1], Fulcher (1925) [2], Tammann & Hesse (1926) [3].

    Examples
    --------
    Through water at 20, 40 and 60 °C [4], the law gives 50 °C within 0.1 % of the reference's
    0.54652 mPa s [4]:

    >>> from planner.correlations.viscosity_fit import fit_viscosity_law
    >>> law = fit_viscosity_law("vft", [293.15, 313.15, 333.15], [1.0016e-3, 0.65273e-3, 0.46604e-3]).law
    >>> abs(law.dynamic(323.15) / 0.54652e-3 - 1) < 0.001
    True

    References
    ----------
    [1] Vogel, H., Phys. Z. 22 (1921) 645-646.
    [2] Fulcher, G. S., J. Am. Ceram. Soc. 8 (1925) 339-355.
    [3] Tammann, G., Hesse, W., Z. Anorg. Allg. Chem. 156 (1926) 245-257.
    [4] Huber, M. L., et al., "New international formulation for the viscosity of H2O", J. Phys. Chem.
        Ref. Data 38 (2009) 101-125 (IAPWS 2008); values by iapws 1.5.5, ../shared/REFERENCES.md.
    """

    a: float
    b: float
    c: float
    quantity = "dynamic"
    name = "vft"

    def __post_init__(self) -> None:
        _check_parameters(self.name, a=self.a, b=self.b, c=self.c)

    def dynamic(self, t: float) -> float:
        """Dynamic viscosity [Pa s] at temperature ``t`` [K]; ValueError unless t > c."""
        if not t > self.c:
            raise ValueError(
                f"temperature = {t!r} K: the VFT law needs temperature > c = {self.c!r} K"
            )
        return math.exp(self.a + self.b / (t - self.c))

    value = dynamic

    def parameters(self) -> dict[str, float]:
        """The constants, {"a": [-], "b": [K], "c": [K]}."""
        return {"a": self.a, "b": self.b, "c": self.c}


@dataclass(frozen=True, slots=True)
class WaltherLaw:
    """ASTM D341 (Walther) law log10 log10 Z = a - b log10 T, T in [K]; a [-], b [-].

    Z = nu + 0.7 + exp(-1.47 - 1.84 nu - 0.51 nu^2) with nu the kinematic viscosity in [cSt].
    The inverse is the standard's expression
    nu = (Z - 0.7) - exp(-0.7487 - 3.295 (Z-0.7) + 0.6119 (Z-0.7)^2 - 0.3193 (Z-0.7)^3),
    followed by two Newton steps on the forward expression (the standard's inverse is within
    about 2.4e-4 relative of it below 3 cSt and within 1e-14 above 6 cSt).
    Valid for petroleum liquids between cloud point and initial boiling point; the 2009 equations
    cover about 0.21 cSt upwards [mem] unverified.  Source: ASTM D341-09, section 5 [1].

    Examples
    --------
    A residual fuel at the ISO 8217 RME180 limit, 180 cSt at 50 °C [2], and 30 cSt at 100 °C
    (invented); constants by hand from the standard's equations [1]:

    >>> import math
    >>> y50, y100 = (math.log10(math.log10(walther_cst_to_z(nu))) for nu in (180.0, 30.0))
    >>> b = (y50 - y100) / (math.log10(373.15) - math.log10(323.15))
    >>> law = WaltherLaw(y50 + b * math.log10(323.15), b)
    >>> round(law.kinematic(323.15) * 1e6, 6)
    180.0

    References
    ----------
    [1] ASTM D341-09, Standard Practice for Viscosity-Temperature Charts for Liquid Petroleum Products,
        section 5.
    [2] ISO 8217, Petroleum products - Fuels (class F) - Specifications of marine fuels, table 2.
    """

    a: float
    b: float
    quantity = "kinematic"
    name = "walther"

    def __post_init__(self) -> None:
        _check_parameters(self.name, a=self.a, b=self.b)

    def kinematic(self, t: float) -> float:
        """Kinematic viscosity [m2/s] at temperature ``t`` [K] (t > 0)."""
        if not t > 0.0:
            raise ValueError(f"temperature = {t!r} K: must be > 0 K")
        try:
            z = 10.0 ** (10.0 ** (self.a - self.b * math.log10(t)))
        except OverflowError:
            raise ValueError(
                f"temperature = {t!r} K: Walther law a = {self.a!r}, b = {self.b!r} gives a "
                "viscosity beyond floating-point range"
            ) from None
        nu = walther_z_to_cst(z)
        if not nu > 0.0:
            raise ValueError(
                f"temperature = {t!r} K: Walther law gives Z = {z!r}, below the ASTM D341 range "
                "(kinematic viscosity would be <= 0)"
            )
        return nu * 1e-6

    value = kinematic

    def parameters(self) -> dict[str, float]:
        """The constants, {"a": [-], "b": [-]} (T in K, nu in cSt)."""
        return {"a": self.a, "b": self.b}


ViscosityLaw = AndradeLaw | VogelFulcherTammannLaw | WaltherLaw


def walther_cst_to_z(nu_cst: float) -> float:
    """ASTM D341-09 Z = nu + 0.7 + exp(-1.47 - 1.84 nu - 0.51 nu^2); nu in [cSt], Z [-].

    Examples
    --------
    1 cSt: 1 + 0.7 + exp(-3.82) = 1.72193 (by hand from [1]):

    >>> round(walther_cst_to_z(1.0), 5)
    1.72193

    References
    ----------
    [1] ASTM D341-09, Standard Practice for Viscosity-Temperature Charts for Liquid Petroleum Products,
        section 5.
    """
    return nu_cst + 0.7 + math.exp(-1.47 - 1.84 * nu_cst - 0.51 * nu_cst * nu_cst)


def walther_z_to_cst(z: float) -> float:
    """Inverse of ``walther_cst_to_z``: kinematic viscosity [cSt] from Z [-].

    ASTM D341-09 inverse nu = w - exp(-0.7487 - 3.295 w + 0.6119 w^2 - 0.3193 w^3), w = Z - 0.7,
    then, for w < 6 where the correction matters, two Newton steps on the forward expression so that
    the round trip is exact to rounding.

    Examples
    --------
    Z = 1.72193 is 1 cSt (by hand from [1]: see ``walther_cst_to_z``):

    >>> round(walther_z_to_cst(1.72193), 5)
    1.0

    References
    ----------
    [1] ASTM D341-09, Standard Practice for Viscosity-Temperature Charts for Liquid Petroleum Products,
        section 5.
    """
    w = z - 0.7
    if w >= 1.0e3:  # the correction is exp(-3e8) = 0; w**3 would overflow past about 5e102
        return w
    if w >= 6.0:  # D341's correction terms are below 1e-14 relative here
        return w - math.exp(-0.7487 - 3.295 * w + 0.6119 * w * w - 0.3193 * w * w * w)
    nu = w - math.exp(-0.7487 - 3.295 * w + 0.6119 * w * w - 0.3193 * w * w * w)
    for _ in range(2):  # 2.4e-4 -> ~1e-8 -> rounding
        e = math.exp(-1.47 - 1.84 * nu - 0.51 * nu * nu)
        nu -= (nu + 0.7 + e - z) / (1.0 - e * (1.84 + 1.02 * nu))
    return nu


def _check_parameters(law: str, **params: float) -> None:
    for key, val in params.items():
        if not isinstance(val, (int, float)) or not math.isfinite(val):
            raise ValueError(f"{law} parameter {key} = {val!r}: must be a finite number")
