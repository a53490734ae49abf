"""Vent flow and gas-space relations against the orifice equations they come from.

Sources: the incompressible orifice equation ``mdot = C_d A sqrt(2 rho dp)`` (ISO 5167-1:2003
eq. 1 with epsilon = 1); the expansibility factor of ISO 5167-2:2003 (section 5.3.2.2),
written out here at beta = 0; the critical pressure ratio of an ideal gas
``(2/(gamma+1))^(gamma/(gamma-1))`` (isentropic nozzle flow, any gas-dynamics text); the
ideal-gas law; the density of air at 20 degC and 1 atm, 1.2041 kg/m^3 (US Standard
Atmosphere 1976 gas constant, from memory).
"""

from __future__ import annotations

import math

import pytest

from workbench.core.vent import (
    RATED_AIR_DENSITY,
    bore_effective_area,
    gas_density,
    gas_pressure,
    quasi_steady_pressure,
    rated_effective_area,
    vent_capacity,
    vent_inflow,
)

P_ATM = 101_325.0
RHO = 1.2


def test_the_rated_air_density_is_that_of_air_at_20_degc_and_1_atm():
    # rho = p/(R T) with R = 287.05 J/(kg K): 1.2041 kg/m^3 (US Standard Atmosphere 1976)
    assert RATED_AIR_DENSITY == pytest.approx(1.2041, abs=2e-4)


@pytest.mark.parametrize("dp", [1.0, 100.0, 2000.0])
def test_a_small_difference_follows_the_incompressible_orifice_equation_with_expansibility(dp):
    """ISO 5167-2 at beta = 0: eps = 1 - 0.351 (1 - (p2/p1)^(1/kappa))."""
    area = bore_effective_area(0.05, 1.5)
    eps = 1.0 - 0.351 * (1.0 - ((P_ATM - dp) / P_ATM) ** (1.0 / 1.4))
    expected = eps * area * math.sqrt(2.0 * RHO * dp)
    assert vent_inflow(area, P_ATM - dp, P_ATM, RHO, RHO) == pytest.approx(expected, rel=1e-6)


def test_outbreathing_takes_the_gas_space_density_upstream():
    area = bore_effective_area(0.05, 1.0)
    rho_gas = 1.3
    eps = 1.0 - 0.351 * (1.0 - (P_ATM / (P_ATM + 500.0)) ** (1.0 / 1.4))
    expected = -eps * area * math.sqrt(2.0 * rho_gas * 500.0)
    assert vent_inflow(area, P_ATM + 500.0, P_ATM, rho_gas, RHO) == pytest.approx(expected,
                                                                                 rel=1e-6)


def test_the_flow_is_choked_below_the_critical_pressure_ratio():
    """(2/(gamma+1))^(gamma/(gamma-1)) = 0.5283 for gamma = 1.4: the flow at any lower
    pressure equals the flow there."""
    area = bore_effective_area(0.02, 1.0)
    r_c = (2.0 / 2.4) ** (1.4 / 0.4)
    at_critical = vent_inflow(area, r_c * P_ATM, P_ATM, RHO, RHO)
    assert vent_inflow(area, 0.3 * P_ATM, P_ATM, RHO, RHO) == pytest.approx(at_critical,
                                                                           rel=1e-9)
    assert vent_inflow(area, 0.6 * P_ATM, P_ATM, RHO, RHO) < at_critical


def test_a_sealed_vent_passes_nothing():
    assert vent_inflow(0.0, 0.5 * P_ATM, P_ATM, RHO, RHO) == 0.0


def test_a_rated_vent_passes_its_rated_flow_at_its_rated_drop():
    """The stated point (air at 20 degC, 1 atm): Q_r within the expansibility (0.15 %)."""
    area = rated_effective_area(300.0 / 3600.0, 500.0)
    m = vent_inflow(area, P_ATM - 500.0, P_ATM, RATED_AIR_DENSITY, RATED_AIR_DENSITY)
    assert m / RATED_AIR_DENSITY == pytest.approx(300.0 / 3600.0, rel=2e-3)


def test_the_steady_vacuum_at_low_flow_is_the_incompressible_orifice_drop():
    """dp = rho (Q/(C_d A))^2/2 (ISO 5167-1 with eps = 1) within 0.1 % at 0.1 kPa."""
    area = bore_effective_area(0.05, 1.5)
    q = 0.01
    p = quasi_steady_pressure(area, q, P_ATM, RHO)
    assert P_ATM - p == pytest.approx(RHO * (q / area) ** 2 / 2.0, rel=1e-3)


def test_a_vent_capacity_inverts_the_quasi_steady_pressure():
    area = bore_effective_area(0.08, 2.0)
    cap = vent_capacity(area, 500.0, P_ATM, RHO)
    assert P_ATM - quasi_steady_pressure(area, cap, P_ATM, RHO) == pytest.approx(500.0, rel=1e-8)


@pytest.mark.parametrize("n", [1.0, 1.4])
def test_gas_pressure_and_density_are_inverse_polytropes(n):
    """p V^n = const at fixed mass (Boyle for n = 1, isentropic for n = gamma)."""
    m, v = 3.0, 2.5
    p1 = gas_pressure(m, v, P_ATM, RHO, n)
    p2 = gas_pressure(m, 2.0 * v, P_ATM, RHO, n)
    assert p1 * v**n == pytest.approx(p2 * (2.0 * v) ** n, rel=1e-12)
    assert gas_density(p1, P_ATM, RHO, n) == pytest.approx(m / v, rel=1e-12)
