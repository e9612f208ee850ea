"""The pump's suction: NPSH available against NPSH required at an operating point, and the flow at
which they meet when the pump is starved.

    NPSHa = (p_suction + p_atm - p_vapour) / (rho g) + V^2 / (2 g)

at the pump inlet, from the suction line's own march (ANSI/HI 9.6.1 definition; any pump handbook).
"""

from __future__ import annotations

from planner.line.brent import brentq

from planner.line.march import march
from planner.scenario.units import ATMOSPHERE_PA, GRAVITY
from planner.transfer.operating import OperatingPoint, SystemState


def check_suction(system, op: OperatingPoint, state: SystemState) -> None:
    """Set ``op``'s NPSH required; where the NPSH available falls short, flag ``suction_starved`` and set
    the highest flow the suction allows (``npsh_limited_flow``, 0 when none).  ``system``: the
    ``TransferSystem``.

    Examples
    --------
    The oil transfer of ``scenario.examples`` has no suction line, so its NPSH available is 14.42 m
    at any flow (``npsh_available``): a pump needing 20 m is starved at every flow, down to none:

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.transfer.system import TransferSystem
    >>> state = SystemState(313.15, 60.0)
    >>> op = TransferSystem(example_scenario("oil transfer")).operating_point(state)
    >>> op.flags, op.npsh_required
    ([], 3.0)
    >>> hungry = example_scenario("oil transfer")
    >>> hungry.pump.npsh_required = "20 m"
    >>> check_suction(TransferSystem(hungry), op, state)
    >>> op.flags, op.npsh_required, op.npsh_limited_flow
    (['suction_starved'], 20.0, 0.0)

    References
    ----------
    [1] ANSI/HI 9.6.1, Rotodynamic Pumps - Guideline for NPSH Margin (NPSH available against
        required) [mem].
    """
    npsh_r = npsh_required(system, op.flow)
    op.npsh_required = npsh_r
    if op.point.npsh_available >= npsh_r:
        return
    op.flags.append("suction_starved")

    def margin(q):
        return npsh_available(system, q, state) - npsh_required(system, q)

    q_low = op.flow * 1e-3
    if margin(q_low) < 0.0:
        op.npsh_limited_flow = 0.0
    else:
        op.npsh_limited_flow = brentq(margin, q_low, op.flow, xtol=1e-7, rtol=1e-4)


def npsh_available(system, flow: float, state: SystemState) -> float:
    """NPSH available [m] at the pump inlet at ``flow`` [m3/s] in ``state``.

    Examples
    --------
    The oil transfer of ``scenario.examples``: no suction line, 60 m^3 in a 5 m tank stand
    60 / (pi 2.5^2) = 3.0558 m over the outlet, so with the oil's 1 kPa vapour pressure
    NPSHa = (101325 + 900 g 3.0558 - 1000) / (900 g) = 14.42 m (by hand, g = 9.80665 m/s^2 [1]):

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.transfer.system import TransferSystem
    >>> system = TransferSystem(example_scenario("oil transfer"))
    >>> round(npsh_available(system, 1.25e-3, SystemState(313.15, 60.0)), 2)
    14.42

    References
    ----------
    [1] ANSI/HI 9.6.1, Rotodynamic Pumps - Guideline for NPSH Margin (definition of NPSH available)
        [mem].
    """
    product = system.product
    p_source = system.source_pressure(state)
    if system.suction_line is None:
        return (p_source + ATMOSPHERE_PA - product.vapour_pressure(state.source_temperature)) / (
            product.density(state.source_temperature) * GRAVITY)
    s = march(system.suction_line, flow, state.source_temperature, p_source, step=system.step, record=False).summary
    rho = product.density(s.outlet_temperature_k)
    velocity = s.mass_flow_kg_s / (rho * system.suction_line.segments[-1].area)
    return ((s.outlet_pressure_pa + ATMOSPHERE_PA - product.vapour_pressure(s.outlet_temperature_k)) / (rho * GRAVITY)
            + velocity * velocity / (2 * GRAVITY))


def npsh_required(system, flow: float) -> float:
    """NPSH the pump needs at ``flow`` [m3/s] [m]: from the centrifugal pump's NPSHr curve when the curve
    gives one, else the single figure of the pump data.

    Examples
    --------
    The oil transfer of ``scenario.examples`` (a PD pump whose data give NPSHr 3 m) needs 3 m at any flow:

    >>> from planner.scenario.examples import example_scenario
    >>> from planner.transfer.system import TransferSystem
    >>> npsh_required(TransferSystem(example_scenario("oil transfer")), 1e-3)
    3.0
    """
    from_curve = system.pump.npsh_required(flow) if system.pump_spec.kind != "positive_displacement" else None
    return from_curve if from_curve is not None else system.pump_spec.npsh_required
