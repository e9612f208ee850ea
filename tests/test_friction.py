"""Checks of planner.friction against published values and an independent library.

fluids is used here only as a test-time reference; planner.friction implements Clamond's
algorithm itself.
"""

import math

import fluids.friction
import pytest

from planner.correlations.friction import (
    RE_LAMINAR_MAX,
    RE_TURBULENT_MIN,
    darcy_churchill_1977,
    darcy_colebrook,
    darcy_friction,
    darcy_laminar,
    flow_regime,
)

# REFERENCES.md "Friction", Colebrook-White Darcy f [lib: fluids 1.3.1], printed to 5 figures.
COLEBROOK_TABLE = [
    (1e5, 1e-4, 0.018514),
    (1e5, 0.0, 0.017990),
    (1e5, 1e-3, 0.022175),
    (1e6, 1e-4, 0.013441),
    (1e4, 1e-3, 0.032382),
    (4000.0, 0.0, 0.039907),
]


@pytest.mark.parametrize("re, rr, f_ref", COLEBROOK_TABLE)
def test_colebrook_against_references_table(re, rr, f_ref):
    # REFERENCES.md Colebrook table [lib: fluids 1.3.1]; 5 printed figures -> rtol 1e-4
    assert darcy_colebrook(re, rr) == pytest.approx(f_ref, rel=1e-4)


@pytest.mark.parametrize("re", [4000.0, 1e4, 5e4, 2.5e5, 1e6, 1e7, 1e8])
@pytest.mark.parametrize("rr", [0.0, 1e-6, 1e-5, 1e-4, 4.6e-4, 1e-3, 1e-2, 0.05])
def test_colebrook_against_fluids_live(re, rr):
    # fluids 1.3.1 Colebrook (Lambert-W closed form). Clamond's solution is exact to round-off,
    # so the two agree far inside the brief's rtol 1e-4; 1e-9 is still a safe margin.
    assert darcy_colebrook(re, rr) == pytest.approx(fluids.friction.Colebrook(re, rr), rel=1e-9)


@pytest.mark.parametrize("re", [4000.0, 3e4, 1e6, 1e9])
@pytest.mark.parametrize("rr", [0.0, 1e-4, 1e-2])
def test_colebrook_satisfies_the_published_equation(re, rr):
    # Colebrook (1939): 1/sqrt(f) = -2 log10(e/D/3.7 + 2.51/(Re sqrt f)); residual at round-off
    f = darcy_colebrook(re, rr)
    residual = 1.0 / math.sqrt(f) + 2.0 * math.log10(rr / 3.7 + 2.51 / (re * math.sqrt(f)))
    assert abs(residual) < 1e-11


def test_white_worked_example():
    # White, Fluid Mechanics, worked example (6-in asphalted cast iron, e/d = 0.0008,
    # Re about 274,900): f = 0.0198 [pub]; the book reads it to 3 figures -> 2 %
    assert darcy_colebrook(274_900.0, 0.0008) == pytest.approx(0.0198, rel=0.02)


@pytest.mark.parametrize("re", [1.0, 64.0, 500.0, 2000.0, 2300.0])
def test_laminar_is_hagen_poiseuille(re):
    # Hagen-Poiseuille f = 64/Re [pub]; roughness has no effect in laminar flow
    assert darcy_laminar(re) == pytest.approx(64.0 / re, rel=1e-15)
    assert darcy_friction(re, 0.01) == pytest.approx(64.0 / re, rel=1e-15)


def test_laminar_hand_value():
    # [calc] 64 / 1000 = 0.064
    assert darcy_laminar(1000.0) == pytest.approx(0.064, rel=1e-15)


def test_turbulent_branch_is_colebrook():
    # fluids 1.3.1 Colebrook
    assert darcy_friction(2e5, 2e-4) == pytest.approx(fluids.friction.Colebrook(2e5, 2e-4), rel=1e-9)


@pytest.mark.parametrize("rr", [0.0, 1e-5, 1e-4, 1e-3, 1e-2])
@pytest.mark.parametrize("re", [500.0, 3000.0, 1e5, 2301.0, 2800.0, 3500.0, 3999.0])
def test_churchill_1977_matches_fluids(re, rr):
    # fluids 1.3.1 Churchill_1977 (Churchill, Chem. Eng. 84 (1977) 91-92)
    assert darcy_churchill_1977(re, rr) == pytest.approx(fluids.friction.Churchill_1977(re, rr), rel=1e-12)


@pytest.mark.parametrize("rr", [0.0, 1e-4, 1e-3, 1e-2])
def test_transitional_band_is_not_below_churchill_1977(rr):
    # issue 10 item 4: in 2300 < Re < 4000 the factor is Churchill's all-regime law (fluids 1.3.1
    # Churchill_1977), never the lower straight-line blend
    for re in [2300.5 + 1699.0 * k / 40 for k in range(41)]:
        reference = fluids.friction.Churchill_1977(re, rr)
        assert darcy_friction(re, rr) >= reference * (1 - 1e-12)
        assert darcy_friction(re, rr) == pytest.approx(reference, rel=1e-12)
    # and the branches either side stay Hagen-Poiseuille and Colebrook (fluids 1.3.1 Colebrook)
    assert darcy_friction(RE_LAMINAR_MAX, rr) == pytest.approx(64 / 2300, rel=1e-15)
    assert darcy_friction(RE_TURBULENT_MIN, rr) == pytest.approx(fluids.friction.Colebrook(4000.0, rr), rel=1e-9)


@pytest.mark.parametrize(
    "re, regime",
    [(100.0, "laminar"), (2300.0, "laminar"), (2301.0, "transitional"), (3999.0, "transitional"),
     (4000.0, "turbulent"), (1e6, "turbulent")],
)
def test_flow_regime(re, regime):
    # thresholds 2300 / 4000 [trade]
    assert flow_regime(re) == regime


@pytest.mark.parametrize("bad", [0.0, -1.0, float("nan")])
def test_bad_reynolds_raises(bad):
    with pytest.raises(ValueError, match="reynolds"):
        darcy_friction(bad, 1e-4)
    with pytest.raises(ValueError, match="reynolds"):
        flow_regime(bad)


def test_negative_roughness_raises():
    with pytest.raises(ValueError, match="relative_roughness"):
        darcy_colebrook(1e5, -1e-4)
