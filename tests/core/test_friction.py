"""Darcy friction factor: checked against fluids, an independent brentq Colebrook solve,
Swamee-Jain (1976) and the Moody-chart values of HYDRAULICS.md."""

from __future__ import annotations

import math

import numpy as np
import pytest

from workbench.core.friction import (
    FRICTION_METHODS,
    colebrook_slope,
    darcy_friction,
    friction_blend,
    friction_churchill,
    friction_colebrook,
    friction_re_product,
    friction_swamee_jain,
    in_published_range,
    regime_of,
)


def colebrook_by_brentq(re: float, rr: float) -> float:
    """Colebrook (1939) solved here independently: brentq on 1/sqrt(f)."""
    from scipy.optimize import brentq

    def g(x: float) -> float:
        return x + 2.0 * math.log10(rr / 3.7 + 2.51 * x / re)

    x = brentq(g, 1.0, 100.0, xtol=1e-14, rtol=1e-15)
    return 1.0 / x**2


@pytest.mark.parametrize("re", [4e3, 1e4, 1e5, 1e6, 1e7, 1e8])
@pytest.mark.parametrize("rr", [0.0, 1e-6, 1e-4, 1e-3, 1e-2, 5e-2])
def test_clamond_agrees_with_colebrook_solved_by_brentq(re, rr):
    # Source: Colebrook (1939) equation, solved by scipy.optimize.brentq in this test.
    assert friction_colebrook(re, rr) == pytest.approx(colebrook_by_brentq(re, rr), rel=1e-12)


@pytest.mark.filterwarnings("ignore:overflow encountered:RuntimeWarning")
def test_vectorised_clamond_matches_fluids_clamond_and_colebrook_over_a_grid():
    # Source: fluids.friction.Clamond and fluids.friction.Colebrook (reference library).
    import fluids

    re = np.logspace(np.log10(2000.0), 9, 60)
    rr = np.concatenate([[0.0], np.logspace(-7, -1.3, 20)])
    big_re, big_rr = np.meshgrid(re, rr)
    ours = friction_colebrook(big_re, big_rr)
    clamond = np.vectorize(fluids.Clamond)(big_re, big_rr)
    colebrook = np.vectorize(fluids.Colebrook)(big_re, big_rr)
    assert np.max(np.abs(ours / clamond - 1.0)) < 1e-10
    assert np.max(np.abs(ours / colebrook - 1.0)) < 1e-10


# Source: HYDRAULICS.md table (Colebrook computed by brentq), quoted to 4 significant figures.
MOODY_SPOTS = [
    (1e5, 0.0, 0.01799),
    (1e6, 0.0, 0.01165),
    (1e5, 1e-3, 0.02217),
    (5e4, 2e-3, 0.02651),
    (1e7, 1e-2, 0.03791),
]


@pytest.mark.parametrize(("re", "rr", "expected"), MOODY_SPOTS)
def test_default_method_gives_the_moody_chart_values(re, rr, expected):
    f, method = darcy_friction(re, rr)
    assert f == pytest.approx(expected, abs=0.6e-5)
    assert method == "Colebrook (Clamond)"


def test_swamee_jain_stays_within_three_percent_of_colebrook_over_its_range():
    # Source: Swamee & Jain (1976) range 5e3..1e8, 1e-6..1e-2; HYDRAULICS.md: the worst
    # deviation on this range is 2.83 % (at Re 5000, eps/D 0.01), so 3 % is the bound.
    re = np.logspace(np.log10(5e3), 8, 120)
    rr = np.logspace(-6, -2, 120)
    big_re, big_rr = np.meshgrid(re, rr)
    dev = np.abs(friction_swamee_jain(big_re, big_rr) / friction_colebrook(big_re, big_rr) - 1)
    assert dev.max() < 0.03
    assert dev.max() > 0.025  # the bound is nearly reached, as HYDRAULICS.md computed


@pytest.mark.parametrize("re", [1.0, 10.0, 500.0, 1999.0, 2000.0])
def test_laminar_flow_follows_hagen_poiseuille(re):
    # Source: Hagen-Poiseuille, f = 64/Re.
    assert friction_blend(re, 1e-3) == pytest.approx(64.0 / re, rel=1e-15)


def test_the_sign_of_the_reynolds_number_does_not_matter():
    re = np.array([-1e5, -3000.0, -100.0])
    assert np.array_equal(friction_blend(re, 1e-4), friction_blend(-re, 1e-4))


def test_zero_flow_gives_infinite_f_but_a_finite_f_times_re():
    # Hagen-Poiseuille limit: f*Re = 64 as Re -> 0.
    with np.errstate(all="raise"):
        f, name = darcy_friction(0.0, 1e-3)
        phi, dphi = friction_re_product(np.array([0.0]), 1e-3)
    assert math.isinf(f) and name == "laminar 64/Re"
    assert phi[0] == 64.0 and dphi[0] == 0.0


def test_transition_band_is_continuous_and_differentiable_at_both_ends():
    # Ends: 64/Re at 2000 (Hagen-Poiseuille) and fluids' Colebrook at 4000.
    import fluids

    rr = 1e-3
    assert friction_blend(2000.0, rr) == pytest.approx(64.0 / 2000.0, rel=1e-14)
    assert friction_blend(4000.0, rr) == pytest.approx(fluids.Colebrook(4000.0, rr), rel=1e-10)
    re = np.array([1999.0, 2001.0, 2500.0, 3000.0, 3999.0, 4001.0])
    phi, dphi = friction_re_product(re, rr)
    eps = 1e-4
    numeric = (friction_re_product(re + eps, rr)[0] - friction_re_product(re - eps, rr)[0]) / (
        2 * eps
    )
    np.testing.assert_allclose(dphi, numeric, rtol=1e-6, atol=1e-9)
    # No jump in the slope across the ends (a C1 blend).
    d_left, d_right = friction_re_product(np.array([2000.0 - 1e-6, 2000.0 + 1e-6]), rr)[1]
    assert abs(d_left - d_right) < 1e-6


@pytest.mark.parametrize(("re", "rr"), [(1e4, 0.0), (1e5, 1e-3), (1e7, 1e-4)])
def test_colebrook_slope_matches_a_central_difference(re, rr):
    h = re * 1e-6
    numeric = (friction_colebrook(re + h, rr) - friction_colebrook(re - h, rr)) / (2 * h)
    assert colebrook_slope(re, rr) == pytest.approx(numeric, rel=1e-6)


# Source: HYDRAULICS.md (Churchill 1977, computed) and fluids.Churchill_1977.
@pytest.mark.parametrize(("re", "rr", "expected"), [
    (1500.0, 0.0, 0.04267),
    (3000.0, 0.0, 0.04297),
    (1e5, 1e-3, 0.02234),
])
def test_churchill_1977_matches_the_computed_values(re, rr, expected):
    import fluids

    assert friction_churchill(re, rr) == pytest.approx(expected, abs=0.6e-5)
    assert friction_churchill(re, rr) == pytest.approx(fluids.Churchill_1977(re, rr), rel=1e-12)


def test_methods_are_chosen_by_name_and_unknown_names_list_the_known_ones():
    assert set(FRICTION_METHODS) >= {"laminar_blend_colebrook", "colebrook", "churchill_1977",
                                     "swamee_jain_1976", "laminar"}
    with pytest.raises(KeyError, match="churchill_1977"):
        darcy_friction(1e5, 1e-4, method="moody_by_eye")


def test_published_range_of_swamee_jain():
    # Source: Swamee & Jain (1976): 5e3 <= Re <= 1e8, 1e-6 <= eps/D <= 1e-2.
    inside = in_published_range("swamee_jain_1976", np.array([5e3, 1e6, 2e8, 1e6]),
                                np.array([1e-6, 1e-3, 1e-3, 0.05]))
    assert inside.tolist() == [True, True, False, False]


def test_regimes_follow_the_common_limits():
    # Common practice, no source: laminar below about 2000, turbulent above about 4000.
    assert regime_of(np.array([100.0, 3000.0, 1e5])).tolist() == [
        "laminar", "transitional", "turbulent"]


def test_vectorised_friction_is_fast_on_large_arrays():
    # Not a timing assertion: the result over a million cases must equal the scalar path.
    import fluids

    re = np.geomspace(4000.0, 1e8, 1_000_000)
    f = friction_blend(re, 1e-4)
    idx = [0, 123_456, 999_999]
    for i in idx:
        assert f[i] == pytest.approx(fluids.Clamond(re[i], 1e-4), rel=1e-12)
