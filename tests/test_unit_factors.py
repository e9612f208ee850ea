"""planner/scenario/unit_factors.py: the written-out factors are pint's own (the reference: pint's unit
registry with its default definitions), so a plan converts without pint exactly as it did with it.

``python -m tests.test_unit_factors`` prints the table afresh (paste it into unit_factors.py).
"""

from __future__ import annotations

import pytest

from planner.scenario.quantities import FILE_UNITS, si_to_default
from planner.scenario.unit_factors import FACTORS
from planner.scenario.units import (_SI_FOR_DISPLAY, DEFAULT_UNITS, SI_UNITS, UNIT_SYSTEMS, _normalise_unit, registry,
                                    to_si)

# spellings people write in scenario files and options besides the tables' own (the demos, the docs)
SPELLINGS = ["m", "mm", "cm", "km", "in", "inch", "ft", "m**3/h", "m**3/s", "L/s", "L/min", "gpm", "bbl_per_hour",
             "bar", "kPa", "MPa", "Pa", "psi", "m**3", "L", "gallon", "oil_barrel", "barrel", "h", "min", "s", "day",
             "kW", "W", "MW", "hp", "rpm", "revolution/minute", "m/s", "km/h", "mph", "ft/s",
             "W/m**2/K", "W/m/K", "W/m", "W/ft", "cP", "mPa*s", "Pa*s", "cSt", "mm**2/s", "m**2/s",
             "kg/m**3", "kg/m**3/K", "J/kg/K", "kJ/kg/K", "kg/s", "kg/h", "t/h", "m**2", "K", "kWh", "J", "kg",
             "dimensionless"]


def _pint_factor(src: str, dst: str) -> float:
    return float(registry().Quantity(1.0, src).to(dst).magnitude)


def _plain_scale(unit: str) -> bool:
    """A unit units._scale hands back a scale for: multiplicative, no temperature difference."""
    quantity = registry().Quantity(1.0, unit)
    return quantity._is_multiplicative and not any(n.startswith("delta_") for n, _ in quantity.unit_items())  # noqa: SLF001


def _needed_pairs() -> set[tuple[str, str]]:
    """The conversions the planner's own unit tables ask for (plain numbers, file units, display units)."""
    pairs = set()
    for kind, si in SI_UNITS.items():
        units = {DEFAULT_UNITS[kind]} | {_normalise_unit(table[kind]) for table in FILE_UNITS.values() if kind in table}
        for unit in units:
            pairs |= {(unit, si), (si, unit)}
    for table in UNIT_SYSTEMS.values():
        for kind, unit in table.items():
            pairs.add((SI_UNITS.get(kind) or _SI_FOR_DISPLAY[kind], unit.pint_unit))
    return pairs


def _table() -> dict[tuple[str, str], float]:
    sis = set(SI_UNITS.values()) | set(_SI_FOR_DISPLAY.values())
    candidates = _needed_pairs() | {(s, si) for s in SPELLINGS for si in sis} | {(si, si) for si in sis}
    table = {}
    for src, dst in sorted(candidates):
        try:
            if _plain_scale(src) and registry().Quantity(1.0, dst)._is_multiplicative:  # noqa: SLF001
                table[src, dst] = _pint_factor(src, dst)
        except Exception:  # noqa: BLE001  (a pair of other dimensions: pint refuses it, it is not a conversion)
            continue
    return table


@pytest.mark.parametrize("pair", sorted(FACTORS), ids=lambda p: f"{p[0]}->{p[1]}")
def test_each_factor_is_pints_to_the_bit(pair):
    src, dst = pair
    assert _plain_scale(src), f"{src}: offset or difference units are left to pint"
    assert FACTORS[pair] == _pint_factor(src, dst)


def test_the_table_holds_what_the_unit_tables_need():
    """Every plain-scale pair the planner's tables ask for is written out (else a plan loads pint again)."""
    assert set(_table()) <= set(FACTORS), sorted(set(_table()) - set(FACTORS))


@pytest.mark.parametrize("value, kind", [(0.002, "small_length"), (2.0, "small_length"), (1.2e-3, "displacement"),
                                         (500.0 / 60, "rotational_speed"), (0.0254, "small_length")])
def test_default_units_read_as_pint_reads_them(value, kind):
    expected = registry().Quantity(value, SI_UNITS[kind]).to(DEFAULT_UNITS[kind]).magnitude
    assert si_to_default(value, kind) == float(f"{expected:.12g}")


@pytest.mark.parametrize("text, kind", [("4 in", "small_length"), ("176 gpm", "volume_flow"), ("350 cP", "dynamic_viscosity"),
                                        ("12.5 bar", "pressure"), ("1.5 W/m2/K", "heat_transfer_coefficient"),
                                        ("80 m3", "volume"), ("400 rpm", "rotational_speed")])
def test_strings_convert_as_pint_converts_them(text, kind):
    number, unit = text.split(" ", 1)
    assert to_si(text, kind) == registry().Quantity(float(number), _normalise_unit(unit)).to(SI_UNITS[kind]).magnitude


if __name__ == "__main__":
    for (src, dst), factor in _table().items():
        print(f"    ({src!r}, {dst!r}): {factor!r},")
