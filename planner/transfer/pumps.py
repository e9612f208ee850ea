"""Pump models (this module is their public face): centrifugal pumps corrected for viscosity (ANSI/HI 9.6.7) and rotary positive-displacement pumps.

Inside, everything is SI: flow [m3/s], head [m], pressure [Pa], speed [rev/s], power [W],
kinematic viscosity [m2/s], dynamic viscosity [Pa s].  The hot-loop methods (``head``,
``efficiency``, ``delivered_flow`` ...) use plain ``math`` and ``bisect``; numpy/scipy are used only
once, when a curve is built.

Centrifugal pumps
    The user gives the water curve (head, efficiency, optionally NPSH required, against flow).
    For a viscous liquid each water point is moved by the ANSI/HI 9.6.7 correction factors
    (``hi_parameter_b`` and ``hi_correction``).  ``CentrifugalPump`` keeps one corrected curve per
    viscosity, rounded to 4 significant digits.

Positive-displacement pumps (gear, lobe, screw)
    Delivered flow = displacement x speed minus a laminar slip flow that grows with the
    differential pressure and falls with viscosity (``PositiveDisplacementPump``).

Modules: ``pump_hi`` (ANSI/HI 9.6.7 B and correction factors), ``pump_centrifugal``, ``pump_pd``.

References
    [1] ANSI/HI 9.6.7, Rotodynamic Pumps - Guideline for Effects of Liquid Viscosity on Performance
        (Hydraulic Institute, 2010/2015).  The formulas here were taken from a secondary summary of
        the standard (see ../shared/REFERENCES.md), not from the standard's own text.
    [2] Plane Poiseuille flow through a narrow slit, q = w c^3 dp / (12 mu L): any fluid-mechanics
        text (e.g. White, Viscous Fluid Flow).
    [3] Karassik, Messina, Cooper, Heald, Pump Handbook, chapter on rotary pumps: slip through the
        clearances rises with differential pressure and falls with viscosity, and is nearly
        independent of speed [mem] unverified.
"""

from __future__ import annotations

from planner.transfer.pump_centrifugal import CentrifugalPump, ViscousCurve
from planner.transfer.pump_hi import HI_B_MAX, HICorrection, hi_correction, hi_parameter_b
from planner.transfer.pump_pd import PositiveDisplacementPump


def build_pump(spec, slip_factor: float = 1.0):
    """The pump of a ``PumpSpec``; ``slip_factor`` (the scenario's ``[calibration]``) multiplies PD slip.

    Examples
    --------
    The PD pump of ``scenario.examples``' oil transfer: 0.25 L/rev at 300 rpm displaces
    0.25e-3 x 5 x 3600 = 4.5 m^3/h (by hand):

    >>> from planner.scenario.examples import example_scenario
    >>> pump = build_pump(example_scenario("oil transfer").pump)
    >>> type(pump).__name__, round(pump.theoretical_flow(300.0 / 60.0) * 3600.0, 6)
    ('PositiveDisplacementPump', 4.5)
    """
    if spec.kind == "positive_displacement":
        return PositiveDisplacementPump(
            displacement_m3_per_rev=spec.displacement, speed_rev_s=spec.speed,
            slip_flow_m3_s=spec.slip_flow * slip_factor,
            slip_reference_pressure_pa=spec.slip_reference_pressure,
            slip_reference_viscosity_pa_s=spec.slip_reference_viscosity,
            slip_viscosity_exponent=spec.slip_viscosity_exponent, relief_setting_pa=spec.relief_setting,
            mechanical_efficiency=spec.mechanical_efficiency, motor_power_w=spec.motor_power,
            npsh_required_m=spec.npsh_required, max_speed_rev_s=spec.max_speed)
    return CentrifugalPump(
        flows_m3_s=[p.flow for p in spec.curve], heads_m=[p.head for p in spec.curve],
        efficiencies=[p.efficiency for p in spec.curve], speed_rev_s=spec.speed,
        npsh_required_m=(spec.npsh_required if not spec.curve or spec.curve[0].npsh_required is None
                         else [p.npsh_required for p in spec.curve]), stages=spec.stages)


__all__ = [
    "build_pump",
    "HI_B_MAX",
    "HICorrection",
    "hi_parameter_b",
    "hi_correction",
    "ViscousCurve",
    "CentrifugalPump",
    "PositiveDisplacementPump",
]
