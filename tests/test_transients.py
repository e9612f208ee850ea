"""planner.line.transients: the lumped metre of a stagnant line and the untraced gap warmed from its ends.

Sources:
- Lumped capacitance, C dT/dt = -U (T - T_amb): T = T_amb + (T0 - T_amb) exp(-U t / C) (Incropera &
  DeWitt, *Fundamentals of Heat and Mass Transfer*, section 5.1).
- Fin with both ends held at T_end, losing U (T - T_amb) per metre: steady centre temperature
  T_amb + (T_end - T_amb) / cosh(m L / 2), m = sqrt(U / kA) (Incropera & DeWitt, ch. 3, fin equation).
- Its transient, C dT/dt = kA T'' - U (T - T_amb): checked against an independent explicit finite-difference
  solution written here (a standard FTCS scheme inside its stability limit, e.g. Incropera ch. 5).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import ID_4IN_SCH40, base_scenario, newtonian_product
from planner.line.products import scenario_product
from planner.line.route import build_line
from planner.line.tracing import Heater
from planner.line.transients import _gap_centre, evolve, heat_capacity_per_metre
from planner.scenario.schema import scenario_from_dict

C0 = 273.15
OD_4IN = 0.1143   # ASME B36.10M NPS 4 (REFERENCES.md)


def _buried_segment(tracing: dict | None = None):
    """NPS 4 Sch 40 under 50 mm of insulation of 0.04 W/(m K), buried 1 m deep in soil of 1 W/(m K) at
    0 degC: every resistance fixed, so the loss is exactly U (T - T_amb)."""
    data = base_scenario(product=newtonian_product(mu_pa_s=0.5, density=1100.0, cp=2000.0, k=0.2))
    if tracing is not None:
        data["tracing"] = tracing
    data["route"]["segments"][0] = {
        "name": "run", "nps": "4", "schedule": "40", "length": 200.0,
        "insulation": [{"conductivity": 0.04, "thickness": 50}],
        "surroundings": {"location": "buried", "ambient_temperature": 0.0, "burial_depth": 1.0,
                         "soil_conductivity": 1.0}}
    scenario = scenario_from_dict(data)
    return scenario, build_line(scenario.route, scenario.site)[0], scenario_product(scenario)


def _u_and_c():
    """Hand values: U from the wall, insulation and soil resistances in series (Incropera eq. 3.33 and
    Table 4.1 case 2, the buried cylinder), C from the contents and the steel wall."""
    r1, r2 = OD_4IN / 2, OD_4IN / 2 + 0.05
    u = 1 / (math.log(r2 / r1) / (2 * math.pi * 0.04) + math.acosh(1.0 / r2) / (2 * math.pi * 1.0)
             + math.log(OD_4IN / ID_4IN_SCH40) / (2 * math.pi * 45))
    c = 1100.0 * 2000.0 * math.pi * ID_4IN_SCH40 ** 2 / 4 + 7850 * 490 * math.pi / 4 * (OD_4IN ** 2 - ID_4IN_SCH40 ** 2)
    return u, c


def test_heat_capacity_per_metre_is_contents_plus_steel():
    # rho cp A of the contents plus the steel wall, 7850 kg/m3 x 490 J/(kg K) [handbook, mem]
    _, seg, product = _buried_segment()
    assert heat_capacity_per_metre(seg, product, 293.15) == pytest.approx(_u_and_c()[1], rel=1e-4)


@pytest.mark.parametrize("hours", [1.0, 12.0, 72.0])
def test_a_stagnant_metre_cools_by_the_lumped_exponential_law(hours):
    # Incropera section 5.1: T = T_amb + (T0 - T_amb) exp(-U t / C), with every resistance fixed
    scenario, seg, product = _buried_segment()
    u, c = _u_and_c()
    result = evolve(seg, Heater(scenario.tracing), product, 40.0 + C0, hours * 3600.0, False)
    expected = C0 + 40.0 * math.exp(-u * hours * 3600.0 / c)
    assert result.temperature_at_end_k == pytest.approx(expected, abs=0.01)
    assert result.settles_at_k == pytest.approx(C0, abs=1e-6) and result.energy_j_per_m == 0.0


def _fd_centre(gap, u, ka, cap, t0, t_end, t_amb, until, nodes=81):
    """FTCS: centre temperature at ``until`` seconds."""
    dx = gap / (nodes - 1)
    dt = 0.4 * cap * dx * dx / ka
    t = np.full(nodes, t0)
    t[0] = t[-1] = t_end
    steps = int(math.ceil(until / dt))
    dt = until / steps
    for _ in range(steps):
        lap = (t[2:] - 2 * t[1:-1] + t[:-2]) / (dx * dx)
        t[1:-1] += dt / cap * (ka * lap - u * (t[1:-1] - t_amb))
    return t[nodes // 2]


@pytest.mark.parametrize("gap, u", [(2.0, 0.35), (0.8, 0.35), (4.0, 0.6)])
def test_gap_centre_matches_the_fin_solution(gap, u):
    ka, cap, t0, t_end, t_amb = 0.095, 35_000.0, 5.0 + C0, 55.0 + C0, -4.0 + C0
    settles, centre = _gap_centre(gap, u, ka, cap, t0, t_end, t_amb)
    m = math.sqrt(u / ka)
    assert settles == pytest.approx(t_amb + (t_end - t_amb) / math.cosh(m * gap / 2), rel=1e-12)
    for hours in (1.0, 6.0, 24.0):
        reference = _fd_centre(gap, u, ka, cap, t0, t_end, t_amb, hours * 3600.0)
        assert centre(hours * 3600.0) == pytest.approx(reference, abs=0.05 * (t_end - t0) / 10)   # 0.25 K


@pytest.mark.parametrize("hours", [0.5, 3.0, 24.0])
def test_steam_tracing_warms_a_metre_and_delivers_the_exact_heat_of_the_linear_balance(hours):
    # steam tracing's output is linear in the wall temperature, P = a - b T (``Heater.capacity``), and the buried
    # metre's loss is U (T - T_amb): C dT/dt = a - b T - U (T - T_amb) has T = T_eq + (T0 - T_eq) exp(-t / tau),
    # tau = C / (b + U), and the heat delivered is the integral of a - b T: (a - b T_eq) t - b (T0 - T_eq) tau
    # (1 - exp(-t / tau)) (Incropera section 5.1, the lumped method with a source; integrated by hand).  The left
    # sum of the heater's output at each step's start overstated it by 2.8-3.4 % on the demos' pre-warms
    scenario, seg, product = _buried_segment({"kind": "steam", "steam_pressure": 350000.0,
                                              "heater_to_pipe_conductance": 1.5})
    heater = Heater(scenario.tracing)
    b = (heater.capacity(300.0) - heater.capacity(310.0)) / 10.0
    a = heater.capacity(300.0) + b * 300.0
    assert b > 0.0 and heater.capacity(320.0) == pytest.approx(a - b * 320.0, rel=1e-12)   # linear over the range
    u, c = _u_and_c()
    t0, t_amb, t = 10.0 + C0, C0, hours * 3600.0
    t_eq, tau = (a + u * t_amb) / (b + u), c / (b + u)
    result = evolve(seg, heater, product, t0, t, True)
    assert result.temperature_at_end_k == pytest.approx(t_eq + (t0 - t_eq) * math.exp(-t / tau), abs=0.01)
    exact = (a - b * t_eq) * t - b * (t0 - t_eq) * tau * -math.expm1(-t / tau)
    assert result.energy_j_per_m == pytest.approx(exact, rel=1e-3)
