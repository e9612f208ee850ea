"""Non-Newtonian pipe flow, held against the published formulas and outside references.

Check values: /work/shared/REFERENCES.md, "Non-Newtonian pipe flow" [calc from the published
formulas] and "Friction" (Colebrook, fluids 1.3.1).
"""

from __future__ import annotations

import math

import pytest

from planner.correlations.rheology import (
    NonNewtonianFlow,
    fanning_buckingham_reiner,
    fanning_dodge_metzner,
    fanning_power_law_laminar,
    gelled_restart_pressure,
    herschel_bulkley_wall_stress,
    metzner_reed_reynolds,
    pipe_flow_non_newtonian,
)


def _hb_shear_rate(tau_w: float, tau_y: float, k: float, n: float) -> float:
    """8V/D of a Herschel–Bulkley fluid for a given wall stress (Chhabra & Richardson 2008, ch. 3),
    typed here independently of the module: 8V/D = 4n/K^(1/n) tau_w^(1/n) (1-phi)^(1+1/n)
    [(1-phi)^2/(3n+1) + 2 phi (1-phi)/(2n+1) + phi^2/(n+1)], phi = tau_y/tau_w."""
    phi = tau_y / tau_w
    return (
        4.0 * n / k ** (1.0 / n) * tau_w ** (1.0 / n) * (1.0 - phi) ** (1.0 + 1.0 / n)
        * ((1 - phi) ** 2 / (3 * n + 1) + 2 * phi * (1 - phi) / (2 * n + 1) + phi**2 / (n + 1))
    )


# ------------------------------------------------------------------------------- Metzner–Reed
def test_metzner_reed_reference_case():
    # REFERENCES.md [calc]: rho 1000, V 1, D 0.05, K 0.5, n 0.5 -> Re_MR 1131.37, dp/L 565.7 Pa/m.
    re = metzner_reed_reynolds(1000.0, 1.0, 0.05, 0.5, 0.5)
    assert re == pytest.approx(1131.37, abs=0.01)
    assert fanning_power_law_laminar(re) == pytest.approx(16.0 / 1131.37, rel=1e-5)
    flow = pipe_flow_non_newtonian(1000.0, 1.0, 0.05, 0.5, 0.5)
    assert flow.regime == "laminar" and not flow.approximate
    assert flow.pressure_gradient == pytest.approx(565.7, abs=0.05)
    # The apparent-viscosity Reynolds number equals Re_MR for a power-law fluid (Metzner & Reed 1955)
    assert flow.reynolds == pytest.approx(re, rel=1e-12)
    assert flow.fanning == pytest.approx(16.0 / re, rel=1e-12)


def test_newtonian_limit_is_hagen_poiseuille():
    # Hagen–Poiseuille dp/L = 32 mu V / D^2 [pub, any fluid-mechanics text]; n = 1, tau_y = 0.
    mu, v, d = 0.2, 0.5, 0.1
    flow = pipe_flow_non_newtonian(900.0, v, d, mu, 1.0)
    assert flow.pressure_gradient == pytest.approx(32 * mu * v / d**2, rel=1e-12)
    assert flow.reynolds == pytest.approx(900.0 * v * d / mu, rel=1e-12)
    assert flow.apparent_viscosity == pytest.approx(mu, rel=1e-12)


# ------------------------------------------------------------------------------ Dodge–Metzner
@pytest.mark.parametrize("re, n, f_ref", [(1e4, 0.5, 0.0048738), (1e5, 0.5, 0.0025864)])
def test_dodge_metzner_reference(re, n, f_ref):
    # REFERENCES.md [calc], Dodge & Metzner, AIChE J. 1959 (Fanning), quoted to 5 significant figures.
    assert fanning_dodge_metzner(re, n) == pytest.approx(f_ref, rel=2e-5)


def test_dodge_metzner_satisfies_its_equation():
    # The returned f must satisfy the published implicit equation (Dodge & Metzner 1959).
    for n in (0.2, 0.36, 0.6, 1.0, 1.4):
        for re in (2100.0, 5e3, 3.6e4, 1e6):
            f = fanning_dodge_metzner(re, n)
            rhs = 4 / n**0.75 * math.log10(re * f ** (1 - n / 2)) - 0.4 / n**1.2
            assert 1 / math.sqrt(f) == pytest.approx(rhs, rel=1e-12)


@pytest.mark.parametrize("re", [1e4, 1e5])
def test_dodge_metzner_newtonian_close_to_smooth_pipe(re):
    import fluids.friction

    f_d = 4.0 * fanning_dodge_metzner(re, 1.0)  # Darcy
    # fluids 1.3.1 Blasius (smooth, Re < 1e5): within 3 %.
    assert f_d == pytest.approx(fluids.friction.Blasius(re), rel=0.03)
    # fluids 1.3.1 Colebrook, e/D = 0: within 0.5 %.
    assert f_d == pytest.approx(fluids.friction.Colebrook(re, 0.0), rel=0.005)


def test_dodge_metzner_newtonian_against_colebrook_reference():
    # REFERENCES.md [lib: fluids 1.3.1]: Colebrook Darcy f (Re 1e5, e/D 0) = 0.017990.
    assert 4.0 * fanning_dodge_metzner(1e5, 1.0) == pytest.approx(0.017990, rel=0.005)


# ---------------------------------------------------------------------------- Buckingham–Reiner
def test_buckingham_reiner_reference():
    # REFERENCES.md [calc]: (Re 1000, He 1e4) -> f 0.04194 (Fanning).
    assert fanning_buckingham_reiner(1000.0, 1e4) == pytest.approx(0.04194, abs=5e-6)


def test_buckingham_reiner_satisfies_its_equation_and_limits():
    # Published implicit form f = (16/Re)[1 + He/(6Re) - He^4/(3 f^3 Re^7)] (Buckingham 1921).
    for re, he in ((100.0, 1e2), (1000.0, 1e4), (2000.0, 1e6), (50.0, 1e7)):
        f = fanning_buckingham_reiner(re, he)
        assert f == pytest.approx(16 / re * (1 + he / (6 * re) - he**4 / (3 * f**3 * re**7)), rel=1e-10)
    assert fanning_buckingham_reiner(1000.0, 0.0) == pytest.approx(0.016, rel=1e-15)  # Newtonian


# ---------------------------------------------------------------------------- Herschel–Bulkley
def test_hb_solves_the_published_flow_equation():
    # The returned wall stress must give back 8V/D through the Chhabra & Richardson equation.
    for tau_y in (0.1, 10.0, 500.0):
        for n in (0.3, 0.7, 1.0, 1.3):
            for v in (1e-4, 0.1, 2.0):
                d, k = 0.15, 3.0
                tw = herschel_bulkley_wall_stress(v, d, tau_y, k, n)
                assert tw > tau_y
                assert _hb_shear_rate(tw, tau_y, k, n) == pytest.approx(8 * v / d, rel=1e-10)


def test_hb_without_yield_stress_is_power_law():
    # tau_y -> 0: power law tau_w = K ((3n+1)/(4n))^n (8V/D)^n (Metzner & Reed 1955).
    v, d, k, n = 1.0, 0.05, 0.5, 0.5
    tau_pl = k * ((3 * n + 1) / (4 * n)) ** n * (8 * v / d) ** n
    assert herschel_bulkley_wall_stress(v, d, 1e-9, k, n) == pytest.approx(tau_pl, rel=1e-9)
    assert herschel_bulkley_wall_stress(v, d, 0.0, k, n) == pytest.approx(tau_pl, rel=1e-15)


def test_hb_with_n_one_is_buckingham_reiner():
    # n = 1: f = 2 tau_w/(rho V^2) with Re = rho V D/mu_p, He = rho tau_y D^2/mu_p^2 must match the
    # Buckingham–Reiner equation (whose own value is checked against REFERENCES.md above).
    rho, d, mu_p = 1100.0, 0.1, 0.05
    for tau_y, v in ((5.0, 0.4), (20.0, 1.0), (0.5, 0.2)):
        tw = herschel_bulkley_wall_stress(v, d, tau_y, mu_p, 1.0)
        f = 2 * tw / (rho * v**2)
        re, he = rho * v * d / mu_p, rho * tau_y * d**2 / mu_p**2
        assert f == pytest.approx(fanning_buckingham_reiner(re, he), rel=1e-10)


def test_hb_zero_velocity_is_yield_stress():
    assert herschel_bulkley_wall_stress(0.0, 0.1, 12.5, 1.0, 0.8) == 12.5
    flow = pipe_flow_non_newtonian(950.0, 0.0, 0.1, 1.0, 0.8, 12.5)
    assert flow.regime == "no flow" and flow.reynolds == 0.0
    assert flow.pressure_gradient == pytest.approx(4 * 12.5 / 0.1, rel=1e-15)


# ------------------------------------------------------------------------------ pipe flow regimes
def test_turbulent_power_law_uses_dodge_metzner():
    # Water-thin shear-thinning slurry at speed: Re above 2100 [trade] -> Dodge–Metzner.
    rho, v, d, k, n = 1200.0, 3.0, 0.1, 0.02, 0.7
    re_mr = metzner_reed_reynolds(rho, v, d, k, n)
    flow = pipe_flow_non_newtonian(rho, v, d, k, n)
    assert re_mr > 2100 and flow.regime == "turbulent" and not flow.approximate
    assert flow.reynolds == pytest.approx(re_mr, rel=1e-12)
    f = fanning_dodge_metzner(re_mr, n)
    assert flow.fanning == pytest.approx(f, rel=1e-15)
    assert flow.pressure_gradient == pytest.approx(4 * f * 0.5 * rho * v**2 / d, rel=1e-12)


def test_turbulent_yield_stress_fluid_flagged_approximate():
    flow = pipe_flow_non_newtonian(1000.0, 4.0, 0.2, 0.01, 0.8, yield_stress=2.0)
    assert flow.regime == "turbulent" and flow.approximate
    assert isinstance(flow, NonNewtonianFlow)


def test_yield_stress_raises_laminar_gradient():
    # A yield stress only adds resistance: HB gradient exceeds the power-law one and 4 tau_y/D.
    base = pipe_flow_non_newtonian(900.0, 0.5, 0.1, 2.0, 0.6)
    hb = pipe_flow_non_newtonian(900.0, 0.5, 0.1, 2.0, 0.6, yield_stress=30.0)
    assert hb.regime == "laminar"
    assert hb.pressure_gradient > base.pressure_gradient
    assert hb.pressure_gradient > 4 * 30.0 / 0.1


# -------------------------------------------------------------------------------------- restart
def test_gelled_restart_force_balance():
    # Force balance on a plug: dp * pi D^2/4 = tau_y * pi D L (closed form 4 tau_y L / D).
    tau_y, length, d = 15.0, 1200.0, 0.2
    dp = gelled_restart_pressure(tau_y, length, d)
    assert dp == pytest.approx(3.6e5, rel=1e-15)
    assert dp * math.pi * d**2 / 4 == pytest.approx(tau_y * math.pi * d * length, rel=1e-14)


# --------------------------------------------------------------------------------------- errors
@pytest.mark.parametrize(
    "call, pattern",
    [
        (lambda: metzner_reed_reynolds(0.0, 1.0, 0.05, 0.5, 0.5), r"density = 0\.0: must be > 0"),
        (lambda: metzner_reed_reynolds(1e3, -1.0, 0.05, 0.5, 0.5), r"velocity = -1\.0 m/s"),
        (lambda: fanning_dodge_metzner(1e4, 0.0), r"flow_index = 0\.0: Dodge–Metzner needs 0 < n < 2"),
        (lambda: fanning_dodge_metzner(1e4, 2.0), r"flow_index = 2\.0: Dodge–Metzner needs 0 < n < 2"),
        (lambda: fanning_power_law_laminar(-5.0), r"re_mr = -5\.0: must be > 0"),
        (lambda: fanning_buckingham_reiner(1e3, -1.0), r"hedstrom = -1\.0: must be >= 0"),
        (lambda: herschel_bulkley_wall_stress(1.0, 0.1, -2.0, 1.0, 1.0), r"yield_stress = -2\.0 Pa"),
        (lambda: herschel_bulkley_wall_stress(1.0, math.nan, 2.0, 1.0, 1.0), r"diameter = nan"),
        (lambda: gelled_restart_pressure(10.0, -1.0, 0.1), r"length = -1\.0 m: must be >= 0"),
    ],
)
def test_bad_input_names_field(call, pattern):
    with pytest.raises(ValueError, match=pattern):
        call()
