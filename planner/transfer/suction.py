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
    ``TransferSystem``."""
    npsh_r = system.npsh_required(op.flow)
    op.npsh_required = npsh_r
    if op.point.npsh_available >= npsh_r:
        return
    op.flags.append("suction_starved")

    def margin(q):
        return npsh_available(system, q, state) - system.npsh_required(q)

    q_low = op.flow * 1e-3
    if margin(q_low) < 0.0:
        op.npsh_limited_flow = 0.0
    else:
        op.npsh_limited_flow = brentq(margin, q_low, op.flow, xtol=1e-7, rtol=1e-4)


def npsh_available(system, flow: float, state: SystemState) -> float:
    """NPSH available [m] at the pump inlet at ``flow`` [m3/s] in ``state``."""
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
