"""Fittings by name through the 2-K (Hooper 1981) and 3-K (Darby 1999/2001) methods,
entrances and the exit, checked against the fluids tables and HYDRAULICS.md values."""

from __future__ import annotations

import numpy as np
import pytest

from workbench.core.fittings import (
    ENTRANCES,
    EXIT_K,
    EXIT_K_LAMINAR,
    FITTINGS,
    FittingError,
    entrance_k,
    exit_k,
    fitting_constants,
    fitting_k,
)
from workbench.core.model import Fitting

NPS4_SCH40_ID = 0.10226  # [m], ASME B36.10M (HYDRAULICS.md)
RE_10_LPS = 1.241e5  # water at 10 L/s in NPS 4 Sch 40 (HYDRAULICS.md)


@pytest.mark.parametrize("name", sorted(FITTINGS))
def test_every_fitting_maps_onto_exact_names_in_the_fluids_tables(name):
    # Source: fluids.fittings.Hooper and fluids.fittings.Darby tables.
    from fluids.fittings import Darby, Hooper

    data = FITTINGS[name]
    assert data.hooper is not None or data.darby is not None
    if data.hooper is not None:
        assert data.hooper in Hooper
    if data.darby is not None:
        assert data.darby in Darby


# Source: the methods' published constants as HYDRAULICS.md quotes them.
@pytest.mark.parametrize(("name", "hooper", "darby"), [
    ("elbow_90_standard", (800.0, 0.25), (800.0, 0.091, 4.0)),
    ("gate_valve", (300.0, 0.10), (300.0, 0.037, 3.9)),
])
def test_table_constants_are_the_published_ones(name, hooper, darby):
    from fluids.fittings import Darby, Hooper

    assert tuple(Hooper[FITTINGS[name].hooper]) == pytest.approx(hooper)
    assert tuple(Darby[FITTINGS[name].darby]) == pytest.approx(darby)


# Source: HYDRAULICS.md, computed for NPS 4 Sch 40, water at 10 L/s (Re 1.241e5).
@pytest.mark.parametrize(("name", "method", "expected"), [
    ("elbow_90_standard", "hooper_2k", 0.3185),
    ("elbow_90_standard", "darby_3k", 0.3376),
    ("gate_valve", "hooper_2k", 0.1273),
    ("gate_valve", "darby_3k", 0.1346),
])
def test_k_of_a_standard_elbow_and_a_gate_valve_at_nps_4(name, method, expected):
    k = fitting_k(Fitting(type=name, method=method), RE_10_LPS, NPS4_SCH40_ID)
    assert k == pytest.approx(expected, abs=6e-5)
    k_nominal = fitting_k(Fitting(type=name, method=method), RE_10_LPS, NPS4_SCH40_ID, 4.0)
    assert k_nominal == pytest.approx(expected, abs=6e-5)


@pytest.mark.parametrize("name", ["elbow_90_long_radius", "tee_branch", "globe_valve",
                                  "swing_check_valve", "butterfly_valve", "diaphragm_valve"])
@pytest.mark.parametrize("re", [50.0, 1e4, 1e6])
def test_k_agrees_with_fluids_hooper2k_and_darby3k(name, re):
    # Source: fluids.fittings.Hooper2K (Di in inches) and Darby3K (given Di).
    from fluids.fittings import Darby3K, Hooper2K

    d = 0.0779  # NPS 3 Sch 40 inside diameter [m]
    data = FITTINGS[name]
    if data.hooper:
        ours = fitting_k(Fitting(type=name, method="hooper_2k"), re, d)
        assert ours == pytest.approx(Hooper2K(Di=d / 0.0254, Re=re, name=data.hooper), rel=1e-12)
    if data.darby:
        ours = fitting_k(Fitting(type=name, method="darby_3k"), re, d)
        assert ours == pytest.approx(Darby3K(Di=d, Re=re, name=data.darby), rel=1e-12)


def test_a_method_that_lacks_the_fitting_falls_back_and_says_so():
    loss = fitting_constants(Fitting(type="butterfly_valve", method="darby_3k"), 0.1)
    assert loss.method == "hooper_2k"


def test_an_explicit_k_is_used_as_given():
    assert fitting_k(Fitting(k=2.5), np.array([10.0, 1e6]), 0.05).tolist() == [2.5, 2.5]


def test_unknown_fitting_names_list_ours():
    with pytest.raises(FittingError, match="elbow_90_standard"):
        fitting_k(Fitting(type="elbow_90"), 1e5, 0.1)


def test_exit_is_one_velocity_head():
    # Source: fluids.fittings.exit_normal() (turbulent exit, K = 1).
    from fluids.fittings import exit_normal

    assert EXIT_K == exit_normal()


def test_a_laminar_exit_loses_the_kinetic_energy_of_the_poiseuille_profile():
    # Source: HYDRAULICS.md "Minor losses" (about 2 velocity heads for a fully developed
    # laminar profile, alpha = 2). Checked here from its definition,
    # alpha = int u^3 dA / (v^3 A), for the Hagen-Poiseuille profile u = 2 v (1 - r^2/R^2),
    # integrated by scipy's quad (R = 1, v = 1).
    from scipy.integrate import quad

    alpha, _ = quad(lambda r: (2.0 * (1.0 - r * r)) ** 3 * 2.0 * np.pi * r, 0.0, 1.0)
    alpha /= np.pi
    assert alpha == pytest.approx(2.0, rel=1e-12)
    assert EXIT_K_LAMINAR == pytest.approx(alpha, rel=1e-12)
    k, dk = exit_k(np.array([0.0, 1e-3, 500.0, 1999.999]))
    assert k.tolist() == [alpha] * 4 and dk.tolist() == [0.0] * 4


def test_a_turbulent_exit_stays_one_velocity_head():
    # Source: fluids.fittings.exit_normal() (turbulent exit, K = 1).
    from fluids.fittings import exit_normal

    k, dk = exit_k(np.array([4000.0, 1e5, 1e8]))
    assert k.tolist() == [exit_normal()] * 3 and dk.tolist() == [0.0] * 3


def test_the_exit_k_between_the_regimes_uses_the_friction_blend_weight():
    # The same cubic weight as the friction blend, written out here: w = 3s^2 - 2s^3,
    # s = (Re - 2000)/2000 (regime limits 2000/4000, common practice, no source), and
    # K = 2 - w, so half way (Re 3000) K = 1.5.
    re = np.linspace(2000.0, 4000.0, 41)
    s = (re - 2000.0) / 2000.0
    k, _ = exit_k(re)
    np.testing.assert_allclose(k, 2.0 - (3 * s**2 - 2 * s**3), rtol=0, atol=1e-15)
    assert float(exit_k(3000.0)[0]) == 1.5


def test_the_exit_k_is_continuous_with_a_continuous_slope_that_matches_finite_differences():
    # Independent check: central differences of exit_k itself (step 1e-3 in Re), and both
    # K and dK/dRe continuous across the band edges 2000 and 4000 and the sign of Re.
    re = np.concatenate((np.linspace(1500.0, 4500.0, 3001), [1999.9995, 2000.0005,
                                                             3999.9995, 4000.0005]))
    step = 1e-3
    k, dk = exit_k(re)
    fd = (exit_k(re + step)[0] - exit_k(re - step)[0]) / (2 * step)
    np.testing.assert_allclose(dk, fd, rtol=0, atol=1e-9)
    assert np.all(dk <= 0.0) and dk.min() == pytest.approx(-1.5 / 2000.0, rel=1e-6)
    for edge in (2000.0, 4000.0):
        lo, hi = exit_k(edge - 1e-7), exit_k(edge + 1e-7)
        assert float(hi[0]) == pytest.approx(float(lo[0]), abs=1e-12)
        assert float(hi[1]) == pytest.approx(float(lo[1]), abs=1e-9)
    assert exit_k(-3000.0)[0] == exit_k(3000.0)[0]


@pytest.mark.parametrize(("name", "r_over_d"), [
    ("slightly_rounded", 0.02), ("rounded", 0.10), ("well_rounded", 0.15)])
def test_rounded_entrances_match_the_crane_values_in_fluids(name, r_over_d):
    # Source: Crane TP-410 table via fluids.entrance_rounded(method='Crane').
    from fluids.fittings import entrance_rounded

    assert entrance_k(name) == pytest.approx(entrance_rounded(1.0, r_over_d, method="Crane"))


def test_sharp_entrance_is_half_a_velocity_head_and_every_entrance_names_a_source():
    # Common practice, no source: sharp-edged flush entrance K = 0.5.
    assert entrance_k("sharp") == 0.5
    assert all(e.source for e in ENTRANCES.values())
    with pytest.raises(FittingError, match="inward_projecting"):
        entrance_k("funnel")
