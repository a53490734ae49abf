"""Wave speed, Joukowsky rise and effective closure time against hand calculations."""

from __future__ import annotations

import math

import pytest

from workbench.core.model import Valve, ValveSchedule
from workbench.core.surge import (
    effective_closure_time,
    is_rapid_closure,
    joukowsky,
    round_trip,
    wave_speed,
)
from workbench.core.valve import relative_flow_coefficient

WATER_K = 2.19e9  # bulk modulus of water near 20 degC [Pa] (common practice, no source)
WATER_RHO = 998.2  # IAPWS-95 at 20 degC (HYDRAULICS notes table: 998.207)

# Steel NPS 12 Sch 40: ID 303.18 mm, wall 10.31 mm (ASME B36.10M); E 207 GPa, nu 0.30
# (common practice for carbon steel).
STEEL = dict(diameter=0.30318, wall_thickness=0.01031, elastic_modulus=207e9, poisson_ratio=0.30)


@pytest.mark.parametrize(
    ("support", "expected"),
    [
        # HYDRAULICS notes, computed from the Korteweg formula with thin-wall c1 = 1, 1 - nu^2,
        # 1 - nu/2 (labels per Wylie & Streeter 1993 ch. 2, from memory).
        ("expansion_joints", 1293.6),
        ("anchored", 1307.6),
        ("anchored_upstream", 1317.2),
    ],
)
def test_steel_wave_speed_matches_the_computed_values_for_each_support(support, expected):
    ws = wave_speed(WATER_K, WATER_RHO, support=support, wall="thin", **STEEL)
    assert ws.speed == pytest.approx(expected, abs=0.06)
    assert ws.wall == "thin"


@pytest.mark.parametrize("support", ["anchored_upstream", "anchored", "expansion_joints"])
def test_the_default_wave_speed_is_continuous_in_wall_thickness(support):
    # The thick-wall factor c1 = 2e/D (1 + nu) + D c1_thin/(D + e) (Wylie & Streeter 1993,
    # ch. 2, from memory) tends to the thin-wall c1 as e/D -> 0: no jump at D/e = 25, a
    # thinner wall never gives a faster wave, and the thin-wall value is the limit.
    import numpy as np

    d = 0.3
    ratios = np.linspace(5.0, 200.0, 400)
    speeds = [wave_speed(WATER_K, WATER_RHO, d, d / r, 207e9, 0.3, support).speed
              for r in ratios]
    assert np.all(np.diff(speeds) < 0.0)  # thinner wall (larger D/e): slower wave
    near = [wave_speed(WATER_K, WATER_RHO, d, d / r, 207e9, 0.3, support).speed
            for r in (25.0 - 1e-9, 25.0 + 1e-9)]
    assert near[0] == pytest.approx(near[1], rel=1e-9)
    thin = wave_speed(WATER_K, WATER_RHO, d, d / 1e6, 207e9, 0.3, support, wall="thin").speed
    assert wave_speed(WATER_K, WATER_RHO, d, d / 1e6, 207e9, 0.3, support).speed == \
        pytest.approx(thin, rel=1e-5)


def _korteweg_by_hand(k, rho, d, e, modulus, c1):
    # Korteweg (1878) as written in Wylie & Streeter (1993), eq. for a in ch. 2 (from memory).
    return math.sqrt((k / rho) / (1.0 + c1 * k * d / (modulus * e)))


def test_pe_wave_speed_uses_the_thick_wall_factor_and_matches_a_hand_calculation():
    # PE 100 SDR 11, DN 110: OD 110 mm, e 10.0 mm, ID 90 mm (EN 12201-2 dimensions, from
    # memory); short-term E 1.0 GPa and nu 0.45 (from memory). D/e = 9: thick wall.
    d, e, modulus, nu = 0.090, 0.010, 1.0e9, 0.45
    c1 = 2 * e / d * (1 + nu) + d * (1 - nu**2) / (d + e)  # anchored, thick wall
    ws = wave_speed(WATER_K, WATER_RHO, d, e, modulus, nu, "anchored")
    assert ws.wall == "thick"
    assert ws.c1 == pytest.approx(c1, rel=1e-14)
    assert ws.speed == pytest.approx(_korteweg_by_hand(WATER_K, WATER_RHO, d, e, modulus, c1),
                                     rel=1e-12)


@pytest.mark.parametrize(
    ("pipe", "low", "high"),
    [
        # Steel water mains roughly 1000-1400 m/s (common practice, no source).
        (STEEL, 1000.0, 1400.0),
        # PE roughly 200-400 m/s (common practice, no source): SDR 11 and SDR 17 DN 110.
        (dict(diameter=0.090, wall_thickness=0.010, elastic_modulus=1.0e9, poisson_ratio=0.45),
         200.0, 400.0),
        (dict(diameter=0.0970, wall_thickness=0.0066, elastic_modulus=1.0e9, poisson_ratio=0.45),
         200.0, 400.0),
    ],
)
def test_wave_speeds_fall_in_the_common_practice_ranges(pipe, low, high):
    for support in ("anchored_upstream", "anchored", "expansion_joints"):
        assert low <= wave_speed(WATER_K, WATER_RHO, support=support, **pipe).speed <= high


def test_the_formula_and_support_factor_are_printed():
    ws = wave_speed(WATER_K, WATER_RHO, support="anchored", **STEEL)
    assert "1 - nu^2" in ws.formula and "Wylie & Streeter" in ws.formula
    assert f"{ws.c1:.4f}" in ws.formula and "from memory" not in ws.formula


def test_a_pipe_without_wall_data_is_rigid_at_the_liquid_sound_speed():
    # a = sqrt(K/rho) for a rigid pipe (Wylie & Streeter 1993, limit of Korteweg).
    ws = wave_speed(WATER_K, WATER_RHO, 0.3, None, None)
    assert ws.speed == pytest.approx(math.sqrt(WATER_K / WATER_RHO), rel=1e-15)


def test_an_unknown_support_is_refused_with_the_choices():
    with pytest.raises(ValueError, match="expansion_joints"):
        wave_speed(WATER_K, WATER_RHO, support="welded", **STEEL)


def test_joukowsky_rise_is_rho_a_dv():
    # Joukowsky (1898): dp = rho*a*dv; 2 m/s stopped in a steel line at 1294 m/s -> about
    # 2.58 MPa, i.e. dH = a*dv/g = 263.9 m (hand calculation).
    dp = joukowsky(WATER_RHO, 1294.0, 2.0)
    assert dp == pytest.approx(998.2 * 1294.0 * 2.0, rel=1e-15)
    assert dp / (WATER_RHO * 9.80665) == pytest.approx(263.9, abs=0.05)


def test_round_trip_is_two_l_over_a():
    # 600 m at 1300 m/s: 2L/a = 0.923 s (HYDRAULICS notes: "2L/a ~ 0.92 s").
    assert round_trip(600.0, 1300.0) == pytest.approx(0.923, abs=5e-4)


def _closing(characteristic: str, stroke: float, rangeability: float = 50.0) -> Valve:
    return Valve(characteristic, k_open=2.0, opening=1.0, rangeability=rangeability,
                 schedule=ValveSchedule((0.0, 5.0, 5.0 + stroke), (1.0, 1.0, 0.0)))


def _c(valve: Valve):
    return lambda x: relative_flow_coefficient(valve.characteristic, x, valve.rangeability)


@pytest.mark.parametrize("k_line", [0.0, 2.0, 30.0])
def test_effective_closure_of_a_linear_valve_follows_the_quasi_steady_orifice_relation(k_line):
    """Linear travel and c = x over stroke T_s: r = c*sqrt((Kl + K0)/(Kl*c^2 + K0)), whose
    steepest fall (at c -> 0) is sqrt((Kl + K0)/K0)/T_s, so T_e = T_s*sqrt(K0/(Kl + K0)).
    Derived here from the orifice relation Q ~ 1/sqrt(K_total) (no further source)."""
    valve = _closing("linear", 12.0)
    est = effective_closure_time(valve, _c(valve), k_line)
    assert est.effective_time == pytest.approx(12.0 * math.sqrt(2.0 / (k_line + 2.0)), rel=2e-3)
    assert est.stroke_time == pytest.approx(12.0) and est.flow_ratio_end == 0.0


def test_effective_closure_of_an_equal_percentage_valve_is_the_stroke_over_ln_r():
    """With the valve controlling all the loss, r = c(x)/c(1) and the steepest fall of
    c = R^(x-1) (IEC 60534-2-4) is ln R at x = 1, so T_e = T_s/ln R: 12 s / ln 50 = 3.07 s."""
    valve = _closing("equal_percentage", 12.0)
    est = effective_closure_time(valve, _c(valve), 0.0)
    assert est.effective_time == pytest.approx(12.0 / math.log(50.0), rel=2e-3)


def test_a_valve_that_never_closes_has_no_effective_closure():
    valve = Valve("linear", 2.0, schedule=ValveSchedule((0.0, 10.0), (0.2, 1.0)))
    assert effective_closure_time(valve, _c(valve), 1.0) is None


@pytest.mark.parametrize(
    ("effective", "trip", "rapid"),
    # Rigid column within 3 % of an elastic solution only from about 5 round trips
    # (HYDRAULICS notes: computed against an independent method of characteristics).
    [(2.0, 0.92, True), (4.5, 0.92, True), (4.7, 0.92, False), (20.0, 0.92, False)],
)
def test_closure_shorter_than_five_round_trips_is_rapid(effective, trip, rapid):
    assert is_rapid_closure(effective, trip) is rapid


def _steel_line(rating=None):
    from workbench.core.model import Line

    return Line("L1", "A", "B", 600.0, STEEL["diameter"], wall_thickness=STEEL["wall_thickness"],
                elastic_modulus=STEEL["elastic_modulus"], poisson_ratio=0.30,
                pressure_rating=rating)


def _water():
    from workbench.core.model import FluidProps

    return FluidProps("water", WATER_RHO, 1.0e-3, 2339.2, WATER_K, 293.15)


def _screen(line, station_max, station_min, effective_closure):
    from workbench.core.surge import screen_line

    return screen_line("L1", line, _water(), atmospheric_pressure=101325.0,
                       station_max=station_max, station_min=station_min,
                       station_elevation=[0.0, 5.0], static_head=30.0, velocity_max=2.0,
                       effective_closure=effective_closure)


def test_screening_caps_a_rigid_column_peak_at_static_plus_joukowsky():
    # Cap: rho g (H_static - z) + rho a v (Joukowsky 1898) at the lowest point (z = 0).
    import numpy as np

    screened, findings = _screen(_steel_line(), np.array([9e6, 1e5]), np.array([2e5, 1e5]), 1.0)
    a = wave_speed(WATER_K, WATER_RHO, support="anchored", **STEEL).speed
    cap = WATER_RHO * 9.80665 * 30.0 + WATER_RHO * a * 2.0
    assert screened.capped and screened.max_pressure == pytest.approx(cap, rel=1e-12)
    assert screened.rapid_closure  # 1 s against 2L/a = 0.92 s
    assert [f.code for f in findings] == ["surge.rapid_closure"]
    assert "elastic" in findings[0].message


def test_screening_flags_a_peak_above_the_pressure_rating():
    import numpy as np

    screened, findings = _screen(_steel_line(rating=4e5), np.array([5e5, 1e5]),
                                 np.array([1e5, 1e5]), 30.0)
    assert not screened.rapid_closure and not screened.capped
    assert [f.code for f in findings] == ["surge.pressure"]


def test_screening_flags_column_separation_and_limits_the_minimum_to_vapour_pressure():
    # Vapour pressure of water at 20 degC: 2339.2 Pa (IAPWS IF97, HYDRAULICS notes table).
    import numpy as np

    screened, findings = _screen(_steel_line(), np.array([2e5, 1e5]),
                                 np.array([-1.5e5, 1e4]), None)
    assert screened.column_separation
    assert screened.min_pressure == pytest.approx(2339.2 - 101325.0, rel=1e-12)
    assert [f.code for f in findings] == ["surge.column_separation"]


def test_a_run_well_inside_the_limits_raises_nothing():
    import numpy as np

    screened, findings = _screen(_steel_line(rating=10e5), np.array([3e5, 2e5]),
                                 np.array([-5e4, 1e4]), 30.0)
    assert findings == [] and screened.min_pressure == -5e4 and screened.max_pressure == 3e5


def _valved_line(position: str):
    from dataclasses import replace

    return replace(_steel_line(), valve=Valve(characteristic="linear", k_open=0.2,
                                              position=position))


@pytest.mark.parametrize(("position", "flow_sign", "upsurge"), [
    ("to", 1.0, True), ("to", -1.0, False), ("from", 1.0, False), ("from", -1.0, True)])
def test_rapid_closure_words_follow_the_side_of_the_valve_the_flow_comes_from(
        position, flow_sign, upsurge):
    # A valve cutting the flow raises the pressure on its upstream side and lowers it on its
    # downstream side, each by up to Joukowsky's a dv/g (Joukowsky 1898; Wylie & Streeter
    # 1993): the line lies upstream of a to-end valve only while the flow runs from -> to.
    import numpy as np

    from workbench.core.surge import screen_line

    _, findings = screen_line(
        "L1", _valved_line(position), _water(), atmospheric_pressure=101325.0,
        station_max=np.array([2e5, 1e5]), station_min=np.array([1e5, 1e5]),
        station_elevation=[0.0, 5.0], static_head=30.0, velocity_max=2.0,
        effective_closure=1.0, flow_sign=flow_sign)
    (rapid,) = [f for f in findings if f.code == "surge.rapid_closure"]
    assert ("rise)" in rapid.message) == upsurge
    assert ("downsurge" in rapid.message) == (not upsurge)


def test_column_separation_gives_the_first_time_and_a_later_peak_is_marked_untrustworthy():
    # Rule of the screening: after the column has separated at vapour pressure the rigid
    # column no longer describes the liquid (Wylie & Streeter 1993, column separation).
    import numpy as np

    from workbench.core.surge import screen_line

    _, findings = screen_line(
        "L1", _steel_line(rating=4e5), _water(), atmospheric_pressure=101325.0,
        station_max=np.array([5e5, 1e5]), station_min=np.array([-1.5e5, 1e4]),
        station_elevation=[0.0, 5.0], static_head=30.0, velocity_max=2.0,
        effective_closure=None, max_time=700.0, min_time=700.0, separation_time=610.0)
    sep = [f for f in findings if f.code == "surge.column_separation"][0]
    peak = [f for f in findings if f.code == "surge.pressure"][0]
    assert "first at t = 610 s" in sep.message
    assert "after the column separated at t = 610 s" in peak.message
    assert "not trustworthy" in peak.message
