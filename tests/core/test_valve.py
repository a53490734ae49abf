"""Valve characteristics, K at an opening, schedules and Kv -> K."""

from __future__ import annotations

import math

import numpy as np
import pytest

from workbench.core.model import Valve, ValveSchedule
from workbench.core.valve import (
    CHARACTERISTICS,
    k_from_kv,
    opening_at,
    relative_flow_coefficient,
    valve_k,
)


def test_kv_500_on_dn100_gives_the_computed_k():
    # Source: HYDRAULICS.md, K = d^4/(625.4 Kv^2) (d mm, Kv m3/h), computed DN 100, Kv 500 -> 0.6396.
    assert k_from_kv(500.0, 0.100) == pytest.approx(0.6396, abs=5e-5)


@pytest.mark.parametrize(("kv", "d_mm"), [(10.0, 25.0), (120.0, 80.0), (2000.0, 300.0)])
def test_kv_to_k_follows_the_handbook_formula(kv, d_mm):
    # Source: HYDRAULICS.md, K = d^4/(625.4 Kv^2); 625.4 is rounded, hence rel 1e-4.
    assert k_from_kv(kv, d_mm / 1000.0) == pytest.approx(d_mm**4 / (625.4 * kv**2), rel=1e-4)


def test_kv_to_k_agrees_with_the_pressure_drop_definition():
    # Source: definition of Kv (flow in m3/h at 1 bar for water) and K = 2 dp A^2/(rho Q^2).
    kv, d = 80.0, 0.065
    q = kv / 3600.0  # flow at exactly 1 bar
    area = math.pi * d**2 / 4
    k = 2 * 1e5 * area**2 / (1000.0 * q**2)
    assert k_from_kv(kv, d) == pytest.approx(k, rel=1e-12)


@pytest.mark.parametrize("characteristic", sorted(CHARACTERISTICS))
def test_every_characteristic_is_shut_at_zero_travel_and_full_at_one(characteristic):
    c = relative_flow_coefficient(characteristic, np.array([0.0, 1.0]), 50.0)
    assert c.tolist() == [0.0, 1.0]
    x = np.linspace(0.0, 1.0, 201)
    assert np.all(np.diff(relative_flow_coefficient(characteristic, x, 50.0)) > 0.0)


@pytest.mark.parametrize(("x", "r"), [(0.5, 50.0), (0.8, 30.0), (0.3, 100.0)])
def test_equal_percentage_is_r_to_the_x_minus_one_over_most_of_its_travel(x, r):
    # Source: IEC 60534-2-4 inherent equal-percentage characteristic c = R^(x-1).
    assert relative_flow_coefficient("equal_percentage", x, r) == pytest.approx(r ** (x - 1))


def test_equal_percentage_is_smooth_where_it_meets_the_line_through_zero():
    r = 50.0
    x_t = 1.0 / math.log(r)
    h = 1e-7
    left = (relative_flow_coefficient("equal_percentage", x_t - h, r)
            - relative_flow_coefficient("equal_percentage", x_t - 2 * h, r)) / h
    right = (relative_flow_coefficient("equal_percentage", x_t + 2 * h, r)
             - relative_flow_coefficient("equal_percentage", x_t + h, r)) / h
    assert left == pytest.approx(right, rel=1e-5)


def test_a_shut_valve_has_infinite_k_without_dividing_by_zero():
    with np.errstate(all="raise"):
        k = valve_k(np.array([0.2, 0.2]), np.array([0.0, 0.5]))
    assert math.isinf(k[0]) and k[1] == pytest.approx(0.2 / 0.25)


def test_a_schedule_is_piecewise_linear_and_holds_its_ends():
    valve = Valve("linear", 0.2, opening=1.0,
                  schedule=ValveSchedule(times=(2.0, 12.0, 20.0), openings=(1.0, 0.5, 0.0)))
    assert opening_at(valve, 0.0) == 1.0
    assert opening_at(valve, 7.0) == pytest.approx(0.75)
    assert opening_at(valve, 16.0) == pytest.approx(0.25)
    assert opening_at(valve, 99.0) == 0.0
    assert opening_at(Valve("linear", 0.2, opening=0.4), 5.0) == 0.4


def test_unknown_characteristic_names_the_known_ones():
    with pytest.raises(KeyError, match="equal_percentage"):
        relative_flow_coefficient("butterfly_curve", 0.5)


@pytest.mark.parametrize("x", [0.02, 0.1, 0.2, 0.5, 1.0])
def test_the_iec_low_opening_keeps_the_pure_equal_percentage_curve(x):
    # IEC 60534-2-4 inherent equal percentage: c = R^(x-1) for every opening above zero.
    from workbench.core.valve import relative_flow_coefficient

    assert relative_flow_coefficient("equal_percentage", x, 30.0, "iec") == pytest.approx(
        30.0 ** (x - 1.0), rel=1e-12)


def test_the_iec_low_opening_seats_at_zero_travel():
    from workbench.core.valve import relative_flow_coefficient, valve_k

    assert valve_k(0.2, relative_flow_coefficient("equal_percentage", 0.0, 30.0, "iec")) == math.inf


def test_the_tangent_s_k_at_one_tenth_is_2_3_times_iec_s_for_r_30():
    # Closed form: tangent c = x e ln R / R below x = 1/ln R; IEC c = R^(x-1); K ~ 1/c^2.
    from workbench.core.valve import equal_percentage_note, relative_flow_coefficient

    r, x = 30.0, 0.1
    expected = (r ** (x - 1.0) / (x * math.e * math.log(r) / r)) ** 2
    got = (relative_flow_coefficient("equal_percentage", x, r, "iec")
           / relative_flow_coefficient("equal_percentage", x, r)) ** 2
    assert got == pytest.approx(expected, rel=1e-12) and f"{expected:.2g}" == "2.3"
    assert "2.3 times IEC's" in equal_percentage_note("tangent", r)
