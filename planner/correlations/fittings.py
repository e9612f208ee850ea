"""Loss coefficients of pipe fittings by the Hooper 2-K and Darby 3-K methods.

Both methods make K depend on the Reynolds number, which matters for viscous service: at Re
about 100 a standard elbow costs some 25 times its turbulent K.

    Hooper 2-K:  K = K1/Re + Kinf (1 + 1/D_in)       D_in = actual inside diameter [in]
    Darby 3-K:   K = K1/Re + Ki (1 + Kd / Dn^0.3)     Dn = nominal diameter [in]

Head loss of a fitting is K V^2 / (2 g); the K of fittings in one line of constant bore add up,
so a set of fittings reduces to K_total = a/Re + b (see fitting_coefficients), which the plan's
inner loop evaluates with one division.

Sources:
  Hooper, W. B., "The two-K method predicts head losses in pipe fittings", Chem. Eng. 88(17),
  24 Aug 1981, p. 96-100, Table 1.
  Darby, R., "Correlate pressure drops through fittings", Chem. Eng. 106(7), 1999, p. 101-104,
  Table 1 (also in Darby, Chemical Engineering Fluid Mechanics, 2nd ed., 2001).
Constants transcribed from the copies of both tables carried in fluids 1.3.1
(fluids/fittings.py, dicts ``Hooper`` and ``Darby``); the fluids row is named beside each entry.
"""

from __future__ import annotations

from collections.abc import Iterable

__all__ = [
    "HOOPER_2K",
    "DARBY_3K",
    "HOOPER_NO_SIZE_TERM",
    "k_hooper",
    "k_darby",
    "fitting_coefficients",
    "fitting_names",
]

_M_PER_IN = 0.0254

HOOPER_2K: dict[str, tuple[float, float]] = {
    # name: (K1, Kinf)                      # row of Hooper's Table 1 (fluids 1.3.1 key)
    "elbow_90_standard": (800.0, 0.25),     # Elbow 90 deg, standard R/D = 1, flanged/welded
                                            # ("Elbow, 90°, Standard (R/D = 1), Flanged/welded")
    "elbow_90_long_radius": (800.0, 0.20),  # Elbow 90 deg, long radius R/D = 1.5, all types
                                            # ("Elbow, 90°, Long-radius (R/D = 1.5), All types")
    "elbow_45_standard": (500.0, 0.20),     # Elbow 45 deg, standard R/D = 1, all types
                                            # ("Elbow, 45°, Standard (R/D = 1), All types")
    "tee_branch_flow": (800.0, 0.80),       # Tee used as elbow, standard, flanged/welded
                                            # ("Elbow, Elbow, Standard, Flanged/welded")
    "tee_run_through": (150.0, 0.05),       # Tee, run through, flanged or welded
                                            # ("Tee, Through, Flanged or welded")
    "gate_valve": (300.0, 0.10),            # Gate/ball/plug valve, full line size, beta = 1
                                            # ("Valve, Gate, Full line size, Beta = 1")
    "ball_valve": (300.0, 0.10),            # same row: Hooper's table gives one row for
                                            # gate, ball and plug valves of full line size
    "plug_valve": (300.0, 0.10),            # same row (full-bore plug valve)
    "globe_valve": (1500.0, 4.0),           # Globe valve, standard ("Valve, Globe, Standard")
    "butterfly_valve": (800.0, 0.25),       # Butterfly valve ("Valve, Butterfly,")
    "swing_check_valve": (1500.0, 1.5),     # Check valve, swing ("Valve, Check, Swing")
    "lift_check_valve": (2000.0, 10.0),     # Check valve, lift ("Valve, Check, Lift")
    # Entrance and exit: not in the fluids copy of the table; values as given in Hooper (1981)
    # for a normal (flush, sharp-edged) pipe entrance and a pipe exit [mem] unverified.
    "pipe_entrance_sharp": (160.0, 0.5),
    "pipe_exit": (0.0, 1.0),
}
"""Hooper 2-K constants (K1 [-], Kinf [-]) by fitting name."""

HOOPER_NO_SIZE_TERM = frozenset({"pipe_entrance_sharp", "pipe_exit"})
"""Entries whose K has no (1 + 1/D) size term: K = K1/Re + Kinf. An exit loses one velocity
head whatever the bore; Hooper applies the size term to fittings only [mem] unverified."""

DARBY_3K: dict[str, tuple[float, float, float]] = {
    # name: (K1, Ki, Kd)                         # row of Darby's Table 1 (fluids 1.3.1 key)
    "elbow_90_standard": (800.0, 0.091, 4.0),    # Elbow 90 deg, flanged/welded/bends, r/D = 1
                                                 # ("Elbow, 90°, flanged, welded, bends, (r/D = 1)")
    "elbow_90_long_radius": (800.0, 0.071, 4.2), # Elbow 90 deg, long radius r/D = 1.5 (the only
                                                 # r/D = 1.5 row; Darby lists it as threaded)
                                                 # ("Elbow, 90°, threaded, long radius, (r/D = 1.5)")
    "elbow_45_standard": (500.0, 0.071, 4.2),    # Elbow 45 deg, standard r/D = 1
                                                 # ("Elbow, 45°, threaded standard, (r/D = 1)")
    "tee_branch_flow": (800.0, 0.28, 4.0),       # Tee through branch (as elbow), flanged r/D = 1
                                                 # ("Tee, Through-branch, (as elbow), flanged, (r/D = 1)")
    "tee_run_through": (150.0, 0.05, 4.0),       # Tee run-through, flanged r/D = 1
                                                 # ("Tee, Run-through, flanged, (r/D = 1)")
    "gate_valve": (300.0, 0.037, 3.9),           # ("Valve, Gate valve, standard, β = 1")
    "ball_valve": (300.0, 0.017, 3.5),           # ("Valve, Ball valve, standard, β = 1")
    "plug_valve": (300.0, 0.084, 3.9),           # ("Valve, Plug valve, straight through")
    "globe_valve": (1500.0, 1.7, 3.6),           # ("Valve, Globe valve, standard, β = 1")
    "swing_check_valve": (1500.0, 0.46, 4.0),    # ("Valve, Swing check")
    "lift_check_valve": (2000.0, 2.85, 3.8),     # ("Valve, Lift check")
    # No butterfly valve, pipe entrance or pipe exit row in Darby's table: left out.
}
"""Darby 3-K constants (K1 [-], Ki [-], Kd [in^0.3]) by fitting name."""

_TABLES = {"hooper": HOOPER_2K, "darby": DARBY_3K}


def fitting_names(method: str) -> list[str]:
    """Sorted fitting names known to `method` ("hooper" or "darby").

    Examples
    --------
    Darby's table [2] has no butterfly valve; Hooper's [1] has:

    >>> "butterfly_valve" in fitting_names("darby"), "butterfly_valve" in fitting_names("hooper")
    (False, True)

    References
    ----------
    [1] Hooper, W. B., Chem. Eng. 88(17), 24 Aug 1981, p. 96-100, Table 1.
    [2] Darby, R., Chem. Eng. 106(7), 1999, p. 101-104, Table 1.
    """
    return sorted(_table(method))


def _table(method: str) -> dict:
    try:
        return _TABLES[method]
    except (KeyError, TypeError):
        raise ValueError(
            f"method: {method!r} is not a fittings method; choose one of {sorted(_TABLES)}"
        ) from None


def _row(method: str, name: str) -> tuple:
    table = _table(method)
    try:
        return table[name]
    except (KeyError, TypeError):
        raise ValueError(
            f"fitting: {name!r} is not in the {method} table; known names: {', '.join(sorted(table))}"
        ) from None


def k_hooper(name: str, re: float, inside_diameter_m: float) -> float:
    """Loss coefficient by Hooper's 2-K method.

    K = K1/Re + Kinf (1 + 1/D_in),   D_in = inside diameter in inches
    (entrance and exit, HOOPER_NO_SIZE_TERM: K = K1/Re + Kinf).

    Valid for all Reynolds numbers (laminar and turbulent); K is referred to the velocity in the
    pipe of that inside diameter.

    name: fitting name, a key of HOOPER_2K.
    re: Reynolds number in the pipe [-], > 0.
    inside_diameter_m: actual inside diameter [m], > 0.
    Returns K [-].
    Source: Hooper, Chem. Eng., 24 Aug 1981, p. 97 [1].

    Examples
    --------
    Flanged standard elbow in NPS 4 Sch 40 (ID 4.026 in): 0.3201 at Re 1e5 and 8.312 at Re 100
    (fluids 1.3.1 ``Hooper2K`` [2], ../shared/REFERENCES.md; by hand from [1]: 800/1e5 + 0.25 (1 +
    1/4.026) = 0.3201):

    >>> round(k_hooper("elbow_90_standard", 1e5, 4.026 * 0.0254), 4)
    0.3201
    >>> round(k_hooper("elbow_90_standard", 100.0, 4.026 * 0.0254), 3)
    8.312

    References
    ----------
    [1] Hooper, W. B., "The two-K method predicts head losses in pipe fittings", Chem. Eng. 88(17),
        24 Aug 1981, p. 96-100.
    [2] Bell, C., fluids: fluid dynamics component of ChEDL, version 1.3.1, fluids.fittings.
    """
    k1, kinf = _row("hooper", name)
    if not re > 0.0:
        raise ValueError(f"reynolds number: {re!r} is not allowed; it must be > 0")
    if not inside_diameter_m > 0.0:
        raise ValueError(f"inside_diameter_m: {inside_diameter_m!r} is not allowed; it must be > 0")
    if name in HOOPER_NO_SIZE_TERM:
        return k1 / re + kinf
    return k1 / re + kinf * (1.0 + _M_PER_IN / inside_diameter_m)


def k_darby(name: str, re: float, nominal_diameter_in: float) -> float:
    """Loss coefficient by Darby's 3-K method.

    K = K1/Re + Ki (1 + Kd / Dn^0.3),   Dn = nominal diameter in inches.

    Valid for all Reynolds numbers; Darby fitted sizes of about 1/2 to 24 in.

    name: fitting name, a key of DARBY_3K.
    re: Reynolds number in the pipe [-], > 0.
    nominal_diameter_in: nominal pipe size [in], > 0.
    Returns K [-].
    Source: Darby, Chem. Eng. 106(7), 1999, p. 101 [1].

    Examples
    --------
    Flanged elbow r/D = 1, NPS 4: 0.3392 at Re 1e5 and 8.331 at Re 100 (fluids 1.3.1 ``Darby3K``
    [2], ../shared/REFERENCES.md; by hand from [1]: 800/100 + 0.091 (1 + 4.0/4^0.3) = 8.331):

    >>> round(k_darby("elbow_90_standard", 1e5, 4.0), 4)
    0.3392
    >>> round(k_darby("elbow_90_standard", 100.0, 4.0), 3)
    8.331

    References
    ----------
    [1] Darby, R., "Correlate pressure drops through fittings", Chem. Eng. 106(7), 1999, p. 101-104;
        Darby, R., Chemical Engineering Fluid Mechanics, 2nd ed., Marcel Dekker, 2001.
    [2] Bell, C., fluids: fluid dynamics component of ChEDL, version 1.3.1, fluids.fittings.
    """
    k1, ki, kd = _row("darby", name)
    if not re > 0.0:
        raise ValueError(f"reynolds number: {re!r} is not allowed; it must be > 0")
    if not nominal_diameter_in > 0.0:
        raise ValueError(
            f"nominal_diameter_in: {nominal_diameter_in!r} is not allowed; it must be > 0"
        )
    return k1 / re + ki * (1.0 + kd / nominal_diameter_in**0.3)


def fitting_coefficients(
    fittings: Iterable[tuple[str, float]],
    method: str,
    inside_diameter_m: float,
    nominal_diameter_in: float,
) -> tuple[float, float]:
    """Collapse a set of fittings into K_total = a/Re + b.

    hooper: a = sum n K1,  b = sum n Kinf (1 + 1/D_in)   (no size term for entrance/exit)
    darby:  a = sum n K1,  b = sum n Ki (1 + Kd/Dn^0.3)

    fittings: (name, count) pairs; count >= 0 (may be fractional, e.g. an allowance).
    method: "hooper" (uses inside_diameter_m [m]) or "darby" (uses nominal_diameter_in [in]);
        the diameter the method does not use is ignored.
    Returns (a [-], b [-]).
    Sources: as k_hooper and k_darby [1], [2].

    Examples
    --------
    Two flanged elbows and a full-bore gate valve in 4.026 in bore by Hooper [1]: a = 2 x 800 + 300
    = 1900; b = (2 x 0.25 + 0.10)(1 + 1/4.026) = 0.7490 (by hand from [1]):

    >>> a, b = fitting_coefficients([("elbow_90_standard", 2), ("gate_valve", 1)], "hooper", 4.026 * 0.0254, 4.0)
    >>> a, round(b, 4)
    (1900.0, 0.749)

    References
    ----------
    [1] Hooper, W. B., Chem. Eng. 88(17), 24 Aug 1981, p. 96-100.
    [2] Darby, R., Chem. Eng. 106(7), 1999, p. 101-104.
    """
    _table(method)  # validates the method name
    if method == "hooper":
        if not inside_diameter_m > 0.0:
            raise ValueError(
                f"inside_diameter_m: {inside_diameter_m!r} is not allowed; it must be > 0"
            )
        size = 1.0 + _M_PER_IN / inside_diameter_m
    else:
        if not nominal_diameter_in > 0.0:
            raise ValueError(
                f"nominal_diameter_in: {nominal_diameter_in!r} is not allowed; it must be > 0"
            )
        inv_dn = nominal_diameter_in**-0.3
    a = 0.0
    b = 0.0
    for name, count in fittings:
        row = _row(method, name)
        if not count >= 0:
            raise ValueError(f"fitting count of {name!r}: {count!r} is not allowed; it must be >= 0")
        a += count * row[0]
        if method == "hooper":
            b += count * row[1] * (1.0 if name in HOOPER_NO_SIZE_TERM else size)
        else:
            b += count * row[1] * (1.0 + row[2] * inv_dn)
    return a, b
