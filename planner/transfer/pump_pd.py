"""The rotary positive-displacement pump (gear, lobe, screw): displacement x speed minus a laminar slip
flow that grows with the differential pressure and falls with viscosity [2, 3] (references in
``transfer.pumps``).
"""

from __future__ import annotations

import math

from planner.scenario.units import si_unit_text
from planner.transfer.pump_hi import _bad, _non_negative, _positive


class PositiveDisplacementPump:
    """A rotary positive-displacement pump (gear, lobe, screw) with laminar slip.

    displacement_m3_per_rev: volume moved per revolution [m3/rev], > 0.
    speed_rev_s: running speed [rev/s], > 0 (and at most max_speed_rev_s if that is given).
    slip_flow_m3_s: slip at the reference differential pressure and viscosity [m3/s], >= 0.
    slip_reference_pressure_pa: differential pressure of that slip figure [Pa], > 0.
    slip_reference_viscosity_pa_s: dynamic viscosity of that slip figure [Pa s], > 0.
    slip_viscosity_exponent: exponent on the viscosity ratio [-], >= 0 (1 for purely laminar slip).
    relief_setting_pa: differential at which the relief valve opens [Pa], > 0, or None.  Kept for
        the checks; the flow model here does not limit pressure.
    mechanical_efficiency: shaft power to hydraulic power of the theoretical flow [-], in (0, 1].
    motor_power_w: motor rating [W], > 0, or None.
    npsh_required_m: NPSH required [m], >= 0 (a single figure).
    max_speed_rev_s: the pump's speed limit [rev/s], > 0, or None.

    Slip model: leakage back through the clearances is plane Poiseuille flow, q = w c^3 dp/(12 mu L)
    [2], so at fixed clearances slip is proportional to dp / mu and (to first order) independent of
    speed, as pump handbooks describe rotary-pump slip [3] [mem] unverified.  The exponent on the
    viscosity ratio lets a measured slip curve be fitted (thin liquids leak less than 1/mu predicts
    once the clearance flow is no longer laminar) [trade].

    Examples
    --------
    0.1 L/rev at 25 rev/s moves 2.5 L/s; with 0.1 L/s of slip at 5 bar and 0.2 Pa s, at 10 bar on a
    liquid of 0.4 Pa s the slit flow [2] is 0.1 x 2 / 2 = 0.1 L/s, so it delivers 2.4 L/s, and the shaft
    takes 2.5e-3 x 1e6 / 0.85 = 2941.2 W (by hand):

    >>> pump = PositiveDisplacementPump(1e-4, 25.0, 1e-4, 5e5, 0.2, mechanical_efficiency=0.85)
    >>> round(pump.delivered_flow(1e6, 0.4) * 1e3, 9), round(pump.shaft_power(1e6, 0.4), 1)
    (2.4, 2941.2)

    References
    ----------
    [1] ANSI/HI 9.6.7 (the module's [1]): for centrifugal pumps, not this one.
    [2] White, F. M., Viscous Fluid Flow, McGraw-Hill, section 3.2 (plane Poiseuille flow).
    [3] Karassik, I. J., et al., Pump Handbook, McGraw-Hill, chapter on rotary pumps [mem] unverified.
    """

    def __init__(self, displacement_m3_per_rev: float, speed_rev_s: float, slip_flow_m3_s: float = 0.0,
                 slip_reference_pressure_pa: float = 1e5, slip_reference_viscosity_pa_s: float = 0.1,
                 slip_viscosity_exponent: float = 1.0, relief_setting_pa: float | None = None,
                 mechanical_efficiency: float = 0.85, motor_power_w: float | None = None,
                 npsh_required_m: float = 3.0, max_speed_rev_s: float | None = None):
        self.displacement_m3_per_rev = _positive("displacement_m3_per_rev", displacement_m3_per_rev)
        self.speed_rev_s = _positive("speed_rev_s", speed_rev_s)
        self.slip_flow_m3_s = _non_negative("slip_flow_m3_s", slip_flow_m3_s)
        self.slip_reference_pressure_pa = _positive("slip_reference_pressure_pa", slip_reference_pressure_pa)
        self.slip_reference_viscosity_pa_s = _positive("slip_reference_viscosity_pa_s",
                                                       slip_reference_viscosity_pa_s)
        self.slip_viscosity_exponent = _non_negative("slip_viscosity_exponent", slip_viscosity_exponent)
        self.relief_setting_pa = (None if relief_setting_pa is None
                                  else _positive("relief_setting_pa", relief_setting_pa))
        eta = mechanical_efficiency
        if not (isinstance(eta, (int, float)) and 0.0 < eta <= 1.0):
            raise _bad("mechanical_efficiency", eta, "in (0, 1]")
        self.mechanical_efficiency = float(eta)
        self.motor_power_w = None if motor_power_w is None else _positive("motor_power_w", motor_power_w)
        self.npsh_required_m = _non_negative("npsh_required_m", npsh_required_m)
        self.max_speed_rev_s = None if max_speed_rev_s is None else _positive("max_speed_rev_s", max_speed_rev_s)
        if self.max_speed_rev_s is not None and self.speed_rev_s > self.max_speed_rev_s:
            raise _bad("speed_rev_s", speed_rev_s, f"at most max_speed_rev_s = {self.max_speed_rev_s!r}")
        # slip = coefficient * dp / mu^exponent
        self._slip_coefficient = (self.slip_flow_m3_s / self.slip_reference_pressure_pa
                                  * self.slip_reference_viscosity_pa_s ** self.slip_viscosity_exponent)

    def _speed(self, speed: float | None) -> float:
        if speed is None:
            return self.speed_rev_s
        if not speed >= 0.0:
            raise _bad("speed", speed, "a number >= 0 [rev/s]")
        return speed

    def _slip_per_pa(self, viscosity: float) -> float:
        if not viscosity > 0.0:
            raise _bad("viscosity", viscosity, "a positive dynamic viscosity [Pa s]")
        return self._slip_coefficient / viscosity ** self.slip_viscosity_exponent

    def theoretical_flow(self, speed: float | None = None) -> float:
        """Theoretical flow [m3/s] = displacement [m3/rev] x speed [rev/s] (rated speed if None)."""
        return self.displacement_m3_per_rev * self._speed(speed)

    def slip(self, dp: float, viscosity: float, speed: float | None = None) -> float:
        """Slip flow [m3/s] = slip_ref (dp / p_ref) (mu_ref / mu)^exponent, at most the theoretical flow.

        dp: differential pressure, discharge minus suction [Pa]; below 0 the slip is taken as 0
            (the model has no forward leakage).
        viscosity: dynamic viscosity [Pa s], > 0.
        speed: [rev/s], rated speed if None (only the cap depends on it).
        Sources: [2], [3] (see the class docstring).
        """
        if dp <= 0.0:
            return 0.0
        return min(self._slip_per_pa(viscosity) * dp, self.theoretical_flow(speed))

    def delivered_flow(self, dp: float, viscosity: float, speed: float | None = None) -> float:
        """Delivered flow [m3/s] = max(0, theoretical flow - slip) at differential dp [Pa] and
        dynamic viscosity [Pa s]."""
        return max(0.0, self.theoretical_flow(speed) - self.slip(dp, viscosity, speed))

    def differential_for_flow(self, q: float, viscosity: float, speed: float | None = None) -> float:
        """Differential pressure [Pa] at which the pump delivers q [m3/s]: the inverse of
        ``delivered_flow``, dp = (Q_theoretical - q) / (slip per Pa).

        q equal to the theoretical flow gives 0; q = 0 gives the differential at which slip eats
        the whole displacement.  With no slip any q below the theoretical flow gives math.inf
        (the pump cannot deliver less; the relief valve has to).  q above the theoretical flow or
        below 0 raises ValueError.
        """
        q_th = self.theoretical_flow(speed)
        if not 0.0 <= q <= q_th:
            raise _bad("flow", q, f"between 0 and the theoretical flow {q_th:.6g} {si_unit_text('volume_flow')}")
        per_pa = self._slip_per_pa(viscosity)
        if q == q_th:
            return 0.0
        if per_pa == 0.0:
            return math.inf
        return (q_th - q) / per_pa

    def shaft_power(self, dp: float, viscosity: float, speed: float | None = None) -> float:
        """Shaft power [W] = Q_theoretical dp / mechanical_efficiency.

        The theoretical flow is used, not the delivered one, because the slip flow is pumped up to
        discharge pressure too before it leaks back.  dp [Pa] below 0 counts as 0.  ``viscosity``
        [Pa s] is accepted for a uniform call and checked, but this model has no viscous-drag term.
        """
        self._slip_per_pa(viscosity)
        return self.theoretical_flow(speed) * max(dp, 0.0) / self.mechanical_efficiency

    def motor_overloaded(self, power: float) -> bool:
        """True if ``power`` [W] exceeds the motor rating (False when no rating is given)."""
        return self.motor_power_w is not None and power > self.motor_power_w
