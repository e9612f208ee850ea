"""The pump chart at the plan's start: the pump's curves, the system curve and where they meet (SI).

A centrifugal pump is drawn in head [m]: its water curve as given, the curve ANSI/HI 9.6.7 corrects for
the product's kinematic viscosity at the pump inlet (``CentrifugalPump.viscous_curve``, the same curve the
operating point is solved on), the system's head at each flow (``TransferSystem.at_flow``: the pump
differential over rho g, rho at the source temperature, as ``TransferSystem._centrifugal_point`` takes it)
and the operating point.  A positive-displacement pump is drawn in differential pressure [Pa]: the
displacement times the speed (no slip), the delivered flow at the product's viscosity (slip,
``PositiveDisplacementPump.delivered_flow``), the system's differential at each flow, the relief setting
and the operating point.

Nothing here is a new model: every number is the planner's own pump and system at the start's state.
Where the corrected curve lies beyond ANSI/HI 9.6.7 (B at or above ``HI_B_MAX``) neither it nor the
operating point solved on it is given (``corrected`` and the point are None, ``note`` says why): a figure
beyond its method is no result.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from planner.correlations.constants import GRAVITY
from planner.transfer.operating import SystemState
from planner.transfer.pump_centrifugal import CentrifugalPump

CURVE_SEGMENTS = 48         # even steps along the water curve, shut-off to its last point (and the user's points)
SYSTEM_POINTS = 24          # flows at which the system curve is worked out
LOWEST_FLOW_FRACTION = 0.02  # the system curve starts at this share of the pump's largest flow


@dataclass(frozen=True)
class Curve:
    """One line of the chart: flows [m3/s] and values [m of head, or Pa] (NaN: no value there)."""

    flow_m3_s: tuple[float, ...]
    value: tuple[float, ...]


@dataclass(frozen=True)
class PumpChart:
    kind: str                       # "centrifugal" or "positive_displacement"
    quantity: str                   # what the value axis is: "head" [m] or "pressure" [Pa]
    water: Curve                    # centrifugal: the water curve; PD: displacement x speed, no slip
    corrected: Curve | None         # the curve at the product's viscosity (None: beyond the method)
    system: Curve                   # the system at the start's state (NaN where the product sets)
    operating_flow_m3_s: float | None     # None: the pump moves nothing at the start
    operating_value: float | None
    kinematic_viscosity_m2_s: float | None  # the product's at the pump inlet (the corrected curve's)
    hi_b: float | None = None       # ANSI/HI 9.6.7 parameter B (centrifugal)
    relief_pa: float | None = None  # PD relief setting [Pa]
    note: str = ""


def _state(plan) -> SystemState:
    source = plan.scenario.source
    return SystemState(source.temperature, source.initial_volume)


def _system_curve(system, state: SystemState, q_top: float, per_flow) -> Curve:
    flows = [q_top * (LOWEST_FLOW_FRACTION + (1.0 - LOWEST_FLOW_FRACTION) * i / (SYSTEM_POINTS - 1))
             for i in range(SYSTEM_POINTS)]
    values = []
    for q in flows:
        point = system.at_flow(q, state)
        values.append(math.nan if point.sets else per_flow(point.pump_differential))
    return Curve(tuple(flows), tuple(values))


def _pump_inlet_temperature(plan, state: SystemState) -> float:
    point = plan.start.point
    return point.pump_inlet_temperature if point is not None else state.source_temperature


def _centrifugal(plan, system, state: SystemState) -> PumpChart:
    pump: CentrifugalPump = system.pump
    product = system.product
    rho = product.density(state.source_temperature)
    flows = tuple(sorted({pump.flows_m3_s[-1] * i / CURVE_SEGMENTS for i in range(CURVE_SEGMENTS + 1)}
                         | set(pump.flows_m3_s)))       # the user's points among even steps
    water = Curve(flows, tuple(pump.water_head(q) for q in flows))
    nu = product.kinematic_viscosity(_pump_inlet_temperature(plan, state))
    viscous = pump.viscous_curve(nu)
    corrected, note = Curve(tuple(viscous.flow), tuple(viscous.head)), ""
    if not viscous.correction.in_range:
        corrected, note = None, viscous.correction.note
    q_top = max(water.flow_m3_s[-1], plan.start.flow if plan.start.moving else 0.0)
    system_curve = _system_curve(system, state, q_top, lambda dp: dp / (rho * GRAVITY))
    # beyond the method neither the corrected curve nor the point solved on it is a result
    moving = plan.start.moving and plan.start.pump_head is not None and corrected is not None
    return PumpChart("centrifugal", "head", water, corrected, system_curve,
                     plan.start.flow if moving else None, plan.start.pump_head if moving else None,
                     nu, viscous.correction.b, None, note)


def _positive_displacement(plan, system, state: SystemState) -> PumpChart:
    pump = system.pump
    product = system.product
    speed = plan.start.speed if plan.start.speed else system.pump_spec.speed
    mu = product.viscosity(_pump_inlet_temperature(plan, state))
    q_th = pump.theoretical_flow(speed)
    relief = system.pump_spec.relief_setting
    system_curve = _system_curve(system, state, q_th, lambda dp: dp)
    top = relief or max([v for v in system_curve.value if math.isfinite(v)] or [1e5]) * 1.2
    pressures = tuple(top * i / (SYSTEM_POINTS - 1) for i in range(SYSTEM_POINTS))
    water = Curve(tuple(q_th for _ in pressures), pressures)
    corrected = Curve(tuple(pump.delivered_flow(p, mu, speed) for p in pressures), pressures)
    moving = plan.start.moving and plan.start.point is not None
    value = plan.start.point.pump_differential if moving else None
    nu = product.kinematic_viscosity(_pump_inlet_temperature(plan, state))
    return PumpChart("positive_displacement", "pressure", water, corrected, system_curve,
                     plan.start.flow if moving else None, value, nu, None, relief, "")


def pump_chart(plan) -> PumpChart | None:
    """The pump chart at the start of ``plan`` (``transfer.plan.Plan``); None without a system.

    Examples
    --------
    The oil transfer of ``scenario.examples``: a PD pump without slip delivers its 4.5 m^3/h against
    the line's Hagen-Poiseuille 6.714 bar [1] plus the entrance's 0.002 bar, less the 3.056 m of oil
    over the tank outlet (0.270 bar): 6.446 bar (by hand, see ``transfer.timeline``):

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.transfer.plan import make_plan
    >>> chart = pump_chart(make_plan(example_scenario("oil transfer")))
    >>> chart.kind, round(chart.operating_flow_m3_s * 3600, 3), round(chart.operating_value / 1e5, 3)
    ('positive_displacement', 4.5, 6.446)

    References
    ----------
    [1] White, F. M., Fluid Mechanics, McGraw-Hill, section 6.4 (Hagen-Poiseuille flow) and
        chapter 2 (hydrostatics).
    """
    system = plan.system
    if system is None:
        return None
    state = _state(plan)
    if system.pump_spec.kind == "positive_displacement":
        return _positive_displacement(plan, system, state)
    return _centrifugal(plan, system, state)
