"""planner.line.route: a scenario's route resolved into plain-float segments.

Sources: pipe dimensions ASME B36.10M (REFERENCES.md, via fluids 1.3.1); Hooper 2-K (Chem. Eng., 24 Aug
1981) with D the actual inside diameter in inches; the wall as a cylindrical shell, ln(OD/ID) / (2 pi k)
(Incropera & DeWitt eq. 3.33) with carbon steel k = 45 W/(m K) [mem]; ASME B16.5-2009 Table 2-1.1, Group 1.1,
class 150: 19.6 bar at 38 degC [pub, REFERENCES.md].
"""

from __future__ import annotations

import math

import pytest

from conftest import base_scenario
from planner.line.route import build_line
from planner.scenario.schema import scenario_from_dict

IN = 0.0254


def _line(*segments, **route):
    data = base_scenario()
    data["route"] = {"segments": list(segments), **route}
    scenario = scenario_from_dict(data)
    return build_line(scenario.route, scenario.site)


def test_segments_take_b36_10m_diameters_and_their_distance_from_the_inlet():
    first, second = _line({"name": "a", "nps": "2", "schedule": "40", "length": 30.0},
                          {"name": "b", "nps": "4", "schedule": "80", "length": 70.0})
    # REFERENCES.md pipe table: NPS 2 Sch 40 OD 60.3 / ID 52.48 mm; NPS 4 Sch 80 OD 114.3 / ID 97.18 mm
    assert (first.outside_diameter, first.inside_diameter) == pytest.approx((0.0603, 0.05248), abs=1e-5)
    assert (second.outside_diameter, second.inside_diameter) == pytest.approx((0.1143, 0.09718), abs=1e-5)
    assert (first.x_start, second.x_start, second.x_end) == (0.0, 30.0, 100.0)
    assert second.area == pytest.approx(math.pi * 0.09718 ** 2 / 4, rel=1e-4)


def test_wall_and_jacket_of_an_insulated_steel_pipe():
    (seg,) = _line({"name": "a", "nps": "2", "schedule": "40", "length": 10.0,
                    "insulation": [{"conductivity": 0.04, "thickness": 30}, {"conductivity": 0.05, "thickness": 20}]})
    assert seg.wall_resistance == pytest.approx(math.log(0.0603 / 0.05248) / (2 * math.pi * 45.0), rel=1e-3)
    assert seg.jacket_diameter == pytest.approx(0.0603 + 2 * 0.05, rel=1e-12)
    radii = [r for layer in seg.layers for r in (layer.inner_radius, layer.outer_radius)]
    assert radii == pytest.approx([0.03015, 0.06015, 0.06015, 0.08015], abs=1e-6)


def test_fittings_collapse_with_the_actual_inside_diameter():
    # Hooper: two flanged elbows and a gate valve in NPS 4 Sch 40 (ID 4.026 in):
    # a = 2 x 800 + 300, b = (2 x 0.25 + 0.10)(1 + 1/4.026)
    (seg,) = _line({"name": "a", "nps": "4", "schedule": "40", "length": 10.0,
                    "fittings": [{"type": "elbow_90_standard", "count": 2}, {"type": "gate_valve", "count": 1}]},
                   fitting_method="hooper")
    assert seg.fitting_a == 1900.0
    assert seg.fitting_b == pytest.approx(0.6 * (1 + 1 / 4.026), rel=2e-4)


def test_rating_is_the_lower_of_own_and_flange():
    # B16.5 Group 1.1 class 150 at 38 degC: 19.6 bar; a 10 bar hose on class 150 flanges is held to 10 bar
    own, flange = _line({"name": "hose", "nps": "2", "schedule": "40", "length": 5.0, "flange_class": 150,
                         "pressure_rating": "10 bar"},
                        {"name": "pipe", "nps": "2", "schedule": "40", "length": 5.0, "flange_class": 150})
    assert own.rating_at(311.15) == pytest.approx(10e5) and own.rating_source_at(311.15) == "own rating"
    assert flange.rating_at(311.15) == pytest.approx(19.6e5)
    assert flange.rating_source_at(311.15) == "ASME B16.5 class 150"
    assert flange.rating_at(500.0 + 273.15) is None        # beyond the table's 450 degC
