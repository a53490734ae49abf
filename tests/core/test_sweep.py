"""The vectorised single-line engine of what-if sweeps, checked against outside references.

References used here, each named beside its check:
* fluids' ``Clamond`` (Clamond 2009, Ind. Eng. Chem. Res. 48(7)) and ``Colebrook`` (the
  Colebrook 1939 equation solved by fluids with a closed form), from the package registry;
* scipy's ``brentq`` on the energy equation, solved case by case in the test itself;
* Hagen-Poiseuille laminar flow, Q = pi D^4 dp / (128 mu L).
"""

from __future__ import annotations

import math

import fluids
import numpy as np
import pytest
from scipy.optimize import brentq

from workbench.core.friction import friction_with_slope
from workbench.core.model import G
from workbench.core.sweep import LineCases, solve_line_cases


def colebrook_friction(re, rr):
    """The sweep's friction law on the turbulent range (Re >= 4000): Colebrook."""
    return friction_with_slope(re, rr)


darcy_friction_vectorised = friction_with_slope

# A grid over the turbulent range Colebrook covers in practice: Re 5e3..1e8, eps/D 0..0.05.
RE = np.logspace(math.log10(5e3), 8, 120)
RR = np.concatenate(([0.0], np.logspace(-7, math.log10(0.05), 40)))
RE_GRID, RR_GRID = np.meshgrid(RE, RR)


def test_colebrook_matches_fluids_clamond_to_1e_10_relative_over_the_turbulent_range() -> None:
    # Source: fluids.friction.Clamond (Clamond 2009), accurate to machine precision.
    f, _ = colebrook_friction(RE_GRID, RR_GRID)
    ref = np.vectorize(fluids.friction.Clamond)(RE_GRID, RR_GRID)
    np.testing.assert_allclose(f, ref, rtol=1e-10, atol=0.0)


@pytest.mark.parametrize(
    ("re", "rr"),
    [
        (5e3, 0.0),  # smooth, low turbulent end
        (1e5, 1e-4),  # fluids' Clamond docstring example point
        (1e6, 1e-3),
        (1e7, 1e-2),  # rough, fully rough zone
        (4e4, 5e-2),  # very rough
    ],
)
def test_colebrook_matches_fluids_colebrook_closed_form_to_1e_10(re: float, rr: float) -> None:
    # Source: fluids.friction.Colebrook (Colebrook 1939 equation, Lambert-W closed form).
    f, _ = colebrook_friction(re, rr)
    assert float(f) == pytest.approx(fluids.friction.Colebrook(re, rr), rel=1e-10)


def test_the_friction_slope_matches_a_central_difference() -> None:
    # Independent check: central finite difference of the same function, relative step 1e-6.
    h = 1e-6
    f_plus, _ = colebrook_friction(RE_GRID * (1 + h), RR_GRID)
    f_minus, _ = colebrook_friction(RE_GRID * (1 - h), RR_GRID)
    f, df = colebrook_friction(RE_GRID, RR_GRID)
    # Compared as elasticities (Re/f) df/dRe, which are O(0.1) in smooth and ~0 in rough pipe.
    central = (f_plus - f_minus) / (2 * h * RE_GRID)
    np.testing.assert_allclose(df * RE_GRID / f, central * RE_GRID / f, rtol=1e-5, atol=1e-7)


def test_friction_is_64_over_re_in_the_laminar_regime() -> None:
    # Source: Hagen-Poiseuille, f = 64/Re.
    re = np.array([10.0, 500.0, 1999.0])
    f, _ = darcy_friction_vectorised(re, 1e-3)
    np.testing.assert_allclose(f, 64.0 / re, rtol=1e-14)


def test_friction_is_continuous_across_the_transition_band_edges() -> None:
    # Common practice, no source: the blend must meet laminar at 2000 and Colebrook at 4000.
    eps = 1e-7
    f, _ = darcy_friction_vectorised(np.array([2000 - eps, 2000 + eps, 4000 - eps, 4000 + eps]), 0.0)
    assert f[0] == pytest.approx(f[1], rel=1e-8)
    assert f[2] == pytest.approx(f[3], rel=1e-8)


def _brentq_velocity(h, length, d, eps, rho, mu, k):
    """Energy equation of one case, solved with scipy brentq and fluids' Clamond."""

    def residual(v: float) -> float:
        re = rho * v * d / mu
        f = 64.0 / re if re <= 2000 else fluids.friction.Clamond(re, eps / d)
        return (f * length / d + k) * v * v / (2 * G) - h

    return brentq(residual, 1e-9, 100.0, xtol=1e-14, rtol=1e-14)


@pytest.mark.parametrize(
    ("h", "length", "d", "eps", "k"),
    [
        (10.0, 100.0, 0.1, 0.0, 1.5),  # smooth, 4 in class, water
        (3.0, 250.0, 0.0525, 4.5e-5, 2.8),  # NPS 2 Sch 40 commercial steel
        (25.0, 40.0, 0.1541, 1.5e-4, 6.0),  # NPS 6 galvanised, lots of fittings
        (0.5, 800.0, 0.2027, 4.5e-5, 1.5),  # long, low head
    ],
)
def test_turbulent_flows_match_a_case_by_case_brentq_solution(h, length, d, eps, k) -> None:
    # Source: scipy.optimize.brentq on the same energy equation with fluids.Clamond friction.
    rho, mu = 998.207, 1.0016e-3  # water 20 degC, IAPWS-95 / IAPWS 2008 (HYDRAULICS.md table)
    cases = LineCases.from_mapping(
        dict(head_from=h, head_to=0.0, length=length, diameter=d, roughness=eps,
             density=rho, viscosity=mu, k_forward=k)
    )
    result = solve_line_cases(cases)
    assert result.success
    assert float(result.velocity) == pytest.approx(_brentq_velocity(h, length, d, eps, rho, mu, k), rel=1e-10)


def test_laminar_flow_between_two_levels_is_hagen_poiseuille() -> None:
    # Source: Hagen-Poiseuille, Q = pi D^4 dp/(128 mu L); HYDRAULICS.md computed case
    # mu 0.25 Pa s, rho 880, D 50 mm, L 30 m, dp 50 kPa -> Q = 1.022654e-3 m^3/s.
    rho, mu, d, length, dp = 880.0, 0.25, 0.05, 30.0, 50e3
    cases = LineCases.from_mapping(
        dict(head_from=dp / (rho * G), head_to=0.0, length=length, diameter=d, roughness=0.0,
             density=rho, viscosity=mu, k_forward=0.0)
    )
    result = solve_line_cases(cases)
    expected = math.pi * d**4 * dp / (128 * mu * length)
    assert float(result.flow) == pytest.approx(expected, rel=1e-10)
    assert float(result.flow) == pytest.approx(1.022654e-3, rel=1e-6)


def test_an_array_of_random_cases_matches_brentq_and_every_case_converges() -> None:
    # Source: scipy brentq case by case (as above), on 60 random cases across all regimes.
    rng = np.random.default_rng(7)
    n = 60
    h = rng.uniform(0.1, 20.0, n)
    length = rng.uniform(2.0, 400.0, n)
    d = rng.uniform(0.01, 0.3, n)
    mu = 10 ** rng.uniform(-3.0, -0.5, n)
    k = rng.uniform(0.5, 10.0, n)
    cases = LineCases.from_mapping(
        dict(head_from=h, head_to=0.0, length=length, diameter=d, roughness=4.5e-5,
             density=998.0, viscosity=mu, k_forward=k)
    )
    result = solve_line_cases(cases)
    assert result.success
    # brentq reference uses a jump from laminar to Colebrook at Re 2000; skip the blend band.
    outside_band = (result.reynolds < 2000) | (result.reynolds > 4000)
    ref = np.array([_brentq_velocity(*args, 998.0, m, kk) for *args, m, kk in
                    zip(h, length, d, np.full(n, 4.5e-5), mu, k)])
    np.testing.assert_allclose(result.velocity[outside_band], ref[outside_band], rtol=1e-9)
    assert np.count_nonzero(outside_band) > 40


def test_reverse_head_gives_reverse_flow_with_the_reverse_loss_coefficients() -> None:
    # Symmetry of the energy equation (no source needed): swapping the ends and the K sets
    # gives the same magnitude and the opposite sign.
    common = dict(length=120.0, diameter=0.08, roughness=4.5e-5, density=998.0, viscosity=1e-3)
    fwd = solve_line_cases(LineCases.from_mapping(dict(head_from=8.0, head_to=2.0, k_forward=1.5, k_reverse=3.0, **common)))
    rev = solve_line_cases(LineCases.from_mapping(dict(head_from=2.0, head_to=8.0, k_forward=3.0, k_reverse=1.5, **common)))
    assert float(rev.flow) == pytest.approx(-float(fwd.flow), rel=1e-12)
    assert float(fwd.flow) > 0


def test_a_shut_valve_or_equal_heads_give_zero_flow_without_warnings() -> None:
    cases = LineCases.from_mapping(
        dict(head_from=np.array([5.0, 3.0]), head_to=3.0, length=50.0, diameter=0.1,
             roughness=0.0, density=998.0, viscosity=1e-3, k_forward=np.array([np.inf, 1.5]))
    )
    with np.errstate(all="raise"):
        result = solve_line_cases(cases)
    np.testing.assert_array_equal(result.flow, [0.0, 0.0])
    assert result.success


def test_a_fixed_friction_factor_overrides_the_correlation() -> None:
    # Closed form with constant f: V = sqrt(2 g H / (f L/D + K)).
    cases = LineCases.from_mapping(
        dict(head_from=6.0, head_to=0.0, length=60.0, diameter=0.1, roughness=0.0,
             density=998.0, viscosity=1e-3, k_forward=1.5, friction_factor=0.02)
    )
    result = solve_line_cases(cases)
    assert float(result.velocity) == pytest.approx(math.sqrt(2 * G * 6.0 / (0.02 * 600 + 1.5)), rel=1e-12)


def test_re_dependent_fitting_terms_are_included() -> None:
    # 2-K form K = K1/Re + K_inf (Hooper 1981): with a fixed f the energy equation becomes
    # a quadratic in V that the test solves in closed form.
    k1, kinf, f, length, d, nu = 800.0, 0.3, 0.03, 10.0, 0.02, 1e-6
    h = 0.5
    cases = LineCases.from_mapping(
        dict(head_from=h, head_to=0.0, length=length, diameter=d, roughness=0.0, density=1000.0,
             viscosity=1e-3, k_forward=kinf + 1.5, k_re=k1, friction_factor=f)
    )
    a = (f * length / d + kinf + 1.5) / (2 * G)
    b = k1 * nu / d / (2 * G)
    v = (-b + math.sqrt(b * b + 4 * a * h)) / (2 * a)
    assert float(solve_line_cases(cases).velocity) == pytest.approx(v, rel=1e-12)


def _single_line_system(diameter: float, level: float, valve_opening: float | None = None,
                        viscosity: float = 1.0016e-3):
    from workbench.core.model import (
        Fitting,
        FluidProps,
        Line,
        Receiver,
        Reservoir,
        System,
        Valve,
    )

    valve = None if valve_opening is None else Valve("equal_percentage", 0.2, valve_opening)
    line = Line("L1", "T1", "OUT", length=85.0, diameter=diameter, roughness=4.5e-5,
                fittings=(Fitting(type="elbow_90_standard", count=3), Fitting(k=0.9)), valve=valve)
    return System(
        title="drain", fluid=FluidProps("water" if viscosity < 2e-3 else "oil", 998.207, viscosity),
        reservoirs={"T1": Reservoir("T1", "constant_level", 6.0, level)},
        junctions={}, receivers={"OUT": Receiver("OUT", "open_discharge", 0.5)},
        lines={"L1": line},
    )


@pytest.mark.parametrize("valve_opening", [None, 0.6])
def test_cases_built_from_systems_balance_the_network_line_model_head_loss(valve_opening) -> None:
    # Outside reference: the line model the network solver uses (workbench.core.line.LineSet,
    # itself checked against fluids' 2-K/3-K tables); at the vectorised flow its head loss
    # must equal the head difference between the two ends.
    from workbench.core.line import LineSet
    from workbench.core.sweep import line_cases_from_systems

    systems = [_single_line_system(d, lv, valve_opening) for d in (0.0525, 0.0779, 0.10226)
               for lv in (0.5, 2.0, 4.0)]
    cases = line_cases_from_systems(systems)
    result = solve_line_cases(cases)
    assert result.success
    for system, q, dh in zip(systems, result.flow, cases.head_from - cases.head_to):
        h, _ = LineSet(system).head_loss(np.array([q]))
        assert float(h[0]) == pytest.approx(dh, rel=1e-9)


def test_a_laminar_case_with_an_exit_takes_two_velocity_heads() -> None:
    # Source: Hagen-Poiseuille plus entrance 0.5 and the exit of a laminar profile, alpha = 2
    # (HYDRAULICS.md "Minor losses"): H = 32 nu L v/(g D^2) + (0.5 + 2) v^2/2g, closed form.
    rho, mu, d, length, h = 880.0, 0.25, 0.05, 30.0, 2.0
    cases = LineCases.from_mapping(
        dict(head_from=h, head_to=0.0, length=length, diameter=d, roughness=0.0,
             density=rho, viscosity=mu, k_forward=0.5, exit_forward=1.0)
    )
    result = solve_line_cases(cases)
    b = 32 * (mu / rho) * length / (G * d * d)
    a = 2.5 / (2 * G)
    assert float(result.reynolds) < 2000.0
    assert float(result.velocity) == pytest.approx((-b + math.sqrt(b * b + 4 * a * h)) / (2 * a),
                                                   rel=1e-10)


@pytest.mark.parametrize("valve_opening", [None, 0.6])
def test_viscous_cases_agree_with_the_network_solver_from_laminar_to_turbulent(valve_opening) -> None:
    # Outside reference: the network solver (workbench.core.network.solve_steady) case by
    # case, to the tolerance the quick sweep keeps against it (1e-8), for a viscous liquid
    # whose cases run laminar, through the 2000-4000 band and turbulent, where the exit loss
    # goes from two velocity heads to one.
    from workbench.core.line import LineSet
    from workbench.core.network import solve_steady
    from workbench.core.sweep import line_cases_from_systems

    systems = [_single_line_system(d, lv, valve_opening, viscosity=mu)
               for d in (0.0525, 0.10226) for lv in (0.2, 1.0, 4.0) for mu in (0.004, 0.03, 0.3)]
    cases = line_cases_from_systems(systems)
    assert cases.exit_forward.tolist() == [1.0] * len(systems)
    result = solve_line_cases(cases)
    assert result.success
    assert np.any(result.reynolds < 2000) and np.any(result.reynolds > 4000)
    assert np.any((result.reynolds > 2000) & (result.reynolds < 4000))
    for system, q, dh in zip(systems, result.flow, cases.head_from - cases.head_to):
        steady = solve_steady(system)
        assert steady.success
        assert float(q) == pytest.approx(steady.lines["L1"].flow, rel=1e-8)
        h, _ = LineSet(system).head_loss(np.array([q]))
        assert float(h[0]) == pytest.approx(dh, rel=1e-9)


def test_the_sweep_uses_the_network_solvers_friction_law_to_the_last_bit() -> None:
    # One friction law in the core: the friction factor the sweep reports at each solved
    # Reynolds number is core.friction's default method there, bit for bit, in every regime.
    from workbench.core.friction import friction_blend

    rng = np.random.default_rng(3)
    n = 500
    cases = LineCases.from_mapping(dict(
        head_from=rng.uniform(0.05, 30.0, n), head_to=0.0, length=rng.uniform(1.0, 300.0, n),
        diameter=rng.uniform(0.01, 0.3, n), roughness=rng.choice([0.0, 4.5e-5, 1.5e-4], n),
        density=998.0, viscosity=10 ** rng.uniform(-3.0, -0.5, n), k_forward=rng.uniform(0.5, 8.0, n)))
    result = solve_line_cases(cases)
    assert result.success
    expected = friction_blend(result.reynolds, cases.roughness / cases.diameter)
    np.testing.assert_array_equal(result.friction_factor, expected)
    assert np.any(result.reynolds < 2000) and np.any((result.reynolds > 2000) & (result.reynolds < 4000))


def test_an_unknown_friction_method_is_refused_with_the_known_names() -> None:
    cases = LineCases.from_mapping(dict(head_from=1.0, head_to=0.0, length=1.0, diameter=0.1,
                                        roughness=0.0, density=1000.0, viscosity=1e-3, k_forward=1.5))
    with pytest.raises(ValueError, match="laminar_blend_colebrook"):
        solve_line_cases(cases, method="moody")
