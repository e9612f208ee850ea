"""Quantity fields (``planner/scenario/quantities.py``): a bound typed as the message and the schema give it
is accepted at "at least"/"at most" and refused at "greater than"/"less than", in any unit.

The conversions here are exact definitions (0 degC = 273.15 K, 1 L = 0.001 m3, degF = 5/9 K from
-459.67 degF: NIST SP 811, appendix B); the float arithmetic of a conversion lands a few units in the
last place off the SI bound, which is what this file checks is not read as beyond the bound.
"""

from __future__ import annotations

import typing

import pytest
from pydantic import BaseModel, BeforeValidator

from conftest import DEMO_FILES
from planner.errors import ScenarioError
from planner.scenario.quantities import QuantityKind, si_to_default
from planner.scenario.schema import Scenario, load_scenario, scenario_from_dict, scenario_to_dict
from planner.scenario.units import DEFAULT_UNITS


def _quantity_fields() -> dict:
    """(kind, gt, ge, lt, le) -> (the field's reader, a field path) for every quantity of the scenario."""
    found, visited = {}, set()

    def walk(annotation, where):
        for arg in typing.get_args(annotation):
            walk(arg, where)
        meta = getattr(annotation, "__metadata__", ())
        kind = next((m.kind for m in meta if isinstance(m, QuantityKind)), None)
        if kind:
            reader = next(m for m in meta if isinstance(m, BeforeValidator)).func
            cells = dict(zip(reader.__code__.co_freevars, (c.cell_contents for c in reader.__closure__)))
            key = (kind, *(cells.get(word) for word in ("gt", "ge", "lt", "le")))
            found.setdefault(key, (reader, where))
        if isinstance(annotation, type) and issubclass(annotation, BaseModel) and annotation not in visited:
            visited.add(annotation)
            for name, field in annotation.model_fields.items():
                walk(typing.Annotated[(field.annotation, *field.metadata)] if field.metadata else field.annotation,
                     f"{annotation.__name__}.{name}")

    walk(Scenario, "Scenario")
    return found


FIELDS = _quantity_fields()


def test_the_walk_finds_the_quantity_fields():
    kinds = {key[0] for key in FIELDS}
    assert len(FIELDS) >= 40 and {"temperature", "displacement", "length", "volume_flow"} <= kinds


@pytest.mark.parametrize("key", sorted(FIELDS, key=str), ids=lambda key: FIELDS[key][1])
def test_a_bound_in_the_default_unit_is_the_bound(key):
    kind, gt, ge, lt, le = key
    reader, _ = FIELDS[key]
    for inclusive, bound in ((False, gt), (True, ge), (False, lt), (True, le)):
        if bound is None:
            continue
        shown = si_to_default(bound, kind)          # the figure the schema and the messages give
        for typed in (shown, f"{shown!r} {DEFAULT_UNITS[kind]}"):
            if inclusive:
                assert reader(typed, None) == pytest.approx(bound, rel=1e-12, abs=0.0)
            else:
                with pytest.raises(ValueError, match="is out of range|at or below absolute zero"):
                    reader(typed, None)


def _barge() -> dict:
    return scenario_to_dict(load_scenario(next(p for p in DEMO_FILES if "barge" in p.name)))


@pytest.mark.parametrize("typed", ["-90 degC", -90, "-130 degF", "183.15 K"])
def test_the_coldest_ambient_is_accepted_in_each_unit(typed):
    # -90 degC (fields.COLDEST_K): -90 + 273.15 is 183.14999999999998 in floats; it was refused as
    # "-90 °C is out of range: must be at least -90 °C"
    data = _barge()
    data["site"]["design_ambient_temperature"] = typed
    scenario = scenario_from_dict(data)
    assert scenario.site.design_ambient_temperature == 183.15


def test_the_largest_displacement_is_accepted_and_a_bit_more_refused():
    data = _barge()
    data["pump"]["displacement"] = "1000 L"        # 1000 * 0.001 is 1.0000000000000002 m3 in floats
    assert scenario_from_dict(data).pump.displacement == 1.0
    data["pump"]["displacement"] = "1000.001 L"
    with pytest.raises(ScenarioError, match=r"pump\.displacement.*at most 1000 L"):
        scenario_from_dict(data)


def test_a_value_just_past_the_coldest_ambient_is_still_refused():
    data = _barge()
    data["site"]["design_ambient_temperature"] = "-90.001 degC"
    with pytest.raises(ScenarioError, match=r"site\.design_ambient_temperature.*at least -90 °C"):
        scenario_from_dict(data)
