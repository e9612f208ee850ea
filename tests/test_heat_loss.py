"""planner.line.heat_loss: the outward resistances per metre, against hand calculations and reference air.

Sources:
- Conduction through a cylindrical layer, ln(r2/r1) / (2 pi k) per metre (Incropera & DeWitt,
  *Fundamentals of Heat and Mass Transfer*, eq. 3.33).
- Buried cylinder, shape factor S = 2 pi / acosh(2z/D) per metre (Incropera & DeWitt, Table 4.1, case 2).
- Outside film: the recipe of tests/test_outer_surface.py (``_h_conv_reference``) on iapws 1.5.5 air and
  ht 1.2.0 correlations, with radiation eps sigma (Ts^2 + Ta^2)(Ts + Ta).
"""

from __future__ import annotations

import dataclasses
import math

import pytest

from conftest import base_scenario
from planner.correlations.materials import INSULATION_MATERIALS
from planner.line.heat_loss import insulation_resistance, surface_resistance
from planner.line.route import build_line
from planner.scenario.schema import scenario_from_dict
from test_outer_surface import SIGMA, _h_conv_reference

OD_2IN = 0.0603   # ASME B36.10M NPS 2 (REFERENCES.md)


def _segment(**segment):
    data = base_scenario()
    data["route"]["segments"][0].update(segment)
    scenario = scenario_from_dict(data)
    return build_line(scenario.route, scenario.site)[0]


def test_two_layers_add_as_cylindrical_shells():
    # Incropera eq. 3.33, layer by layer: 30 mm at 0.04 then 20 mm at 0.05 W/(m K) on a 60.3 mm pipe
    seg = _segment(insulation=[{"conductivity": 0.04, "thickness": 30}, {"conductivity": 0.05, "thickness": 20}])
    r0, r1, r2 = OD_2IN / 2, OD_2IN / 2 + 0.03, OD_2IN / 2 + 0.05
    hand = math.log(r1 / r0) / (2 * math.pi * 0.04) + math.log(r2 / r1) / (2 * math.pi * 0.05)
    assert insulation_resistance(seg, 353.15, 293.15) == pytest.approx(hand, rel=1e-12)
    assert insulation_resistance(_segment(), 353.15, 293.15) == 0.0          # bare pipe


def test_a_material_layer_takes_k_at_the_mean_of_wall_and_jacket():
    # the layer's k(T) at (T_wall + T_jacket) / 2, from the material table (planner.correlations.materials)
    seg = _segment(insulation=[{"material": "mineral_wool", "thickness": 50}])
    k_mean = INSULATION_MATERIALS["mineral_wool"].conductivity_at(0.5 * (423.15 + 303.15))
    hand = math.log((OD_2IN / 2 + 0.05) / (OD_2IN / 2)) / (2 * math.pi * k_mean)
    assert insulation_resistance(seg, 423.15, 303.15) == pytest.approx(hand, rel=1e-12)


@pytest.mark.parametrize("t_jacket, wind", [(303.15, 0.0), (333.15, 0.0), (313.15, 4.0)])
def test_surface_resistance_against_reference_air(t_jacket, wind):
    # reference recipe (iapws 1.5.5 air, ht 1.2.0); 2 %: the planner's air fits differ by 1-2 % (test_air.py)
    data = base_scenario()
    data["site"]["wind_speed"] = wind
    data["route"]["segments"][0]["insulation"] = [{"conductivity": 0.04, "thickness": 50}]
    scenario = scenario_from_dict(data)
    seg = build_line(scenario.route, scenario.site)[0]
    d, t_air = seg.jacket_diameter, seg.ambient_temperature
    h_rad = seg.emissivity * SIGMA * (t_jacket ** 2 + t_air ** 2) * (t_jacket + t_air)
    reference = 1.0 / (math.pi * d * (_h_conv_reference(d, t_jacket, t_air, wind) + h_rad))
    assert surface_resistance(seg, t_jacket) == pytest.approx(reference, rel=0.02)


def test_buried_surface_is_the_soil_shape_factor():
    # Incropera Table 4.1 case 2: R = acosh(2z/D) / (2 pi k_soil), centre 1.2 m deep, jacket D 0.1603 m
    seg = _segment(insulation=[{"conductivity": 0.04, "thickness": 50}],
                   surroundings={"location": "buried", "burial_depth": 1.2, "soil_conductivity": 1.4})
    hand = math.acosh(1.2 / (OD_2IN / 2 + 0.05)) / (2 * math.pi * 1.4)
    assert surface_resistance(seg, 300.0) == pytest.approx(hand, rel=1e-12)


def test_the_calibration_factor_divides_both_resistances():
    # DEVELOPERS.md "Calibration": heat loss at a given wall temperature is multiplied by the factor
    seg = _segment(insulation=[{"conductivity": 0.04, "thickness": 50}])
    scaled = dataclasses.replace(seg, heat_loss_factor=1.35)
    assert insulation_resistance(scaled, 333.15, 300.0) == pytest.approx(insulation_resistance(seg, 333.15, 300.0) / 1.35)
    assert surface_resistance(scaled, 300.0) == pytest.approx(surface_resistance(seg, 300.0) / 1.35)
