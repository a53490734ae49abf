"""Elastic surge by the method of characteristics (workbench.core.elastic).

Checks against outside references: Joukowsky's rise and the 4L/a period of the frictionless
line, line packing and friction attenuation (Wylie & Streeter, Fluid Transients in Systems,
1993), the wave transmission coefficient at a series junction, the rigid-column solution
for slow closures, grid convergence and the column-separation flag.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.core.elastic_systems import WATER, WATER_WHOLE, closing, reservoir_line
from workbench.core.elastic import (
    FRICTION_MODELS,
    ElasticSetupError,
    elastic_line_ids,
    run_elastic,
    simulate_elastic,
)
from workbench.core.model import (
    FluidProps,
    G,
    Junction,
    Line,
    Receiver,
    Reservoir,
    SurgeSettings,
    System,
    Valve,
    ValveSchedule,
)

#: Every check runs on both time-stepping kernels (the ``kernel`` fixture, tests/core/conftest.py).
pytestmark = pytest.mark.usefixtures("kernel")


WATER_NO_VAPOUR = WATER_WHOLE


def single_line(*, f=0.0, rating=None, **kw) -> System:
    """Reservoir -> frictionless (or fixed-``f``) line without entrance loss -> valve -> free
    discharge (or a downstream reservoir): 600 m, 300 mm, 20 m head, 20 reaches unless told."""
    return reservoir_line(friction_factor=f, entrance_k=0.0, pressure_rating=rating, **kw)


def run(system, a=1300.0, **kw):
    speeds = {lid: a for lid in system.lines}
    return simulate_elastic(system, "L1", wave_speeds=speeds, **kw)


def velocity(result, diameter=0.3):
    return result.initial_flow / (math.pi * diameter**2 / 4.0)


# ---------------------------------------------------------------- frictionless, instant


def test_instantaneous_closure_raises_the_valve_head_by_joukowsky_exactly():
    # Joukowsky (1898); Wylie & Streeter (1993) ch. 1: dH = a*dv/g for a full stop.
    a = 1300.0
    res = run(single_line(valve=closing(1e-6), fluid=WATER_NO_VAPOUR), a=a, duration=3.0)
    rise = res.valve_head[1] - res.valve_head[0]
    assert rise == pytest.approx(a * velocity(res) / G, rel=1e-12)


def test_frictionless_valve_head_is_a_square_wave_with_period_four_l_over_a():
    # Wylie & Streeter (1993) ch. 1: after an instantaneous closure of a frictionless line the
    # valve head alternates between H0 + a*v0/g and H0 - a*v0/g, each for 2L/a: period 4L/a.
    a, length = 1300.0, 600.0
    res = run(single_line(valve=closing(1e-6), fluid=WATER_NO_VAPOUR), a=a, duration=8.0)
    h = res.valve_head - 20.0
    jump = a * velocity(res) / G
    high = h > 0
    ups = np.flatnonzero(~high[:-1] & high[1:]) + 1
    period = np.diff(res.time[ups])
    assert period == pytest.approx(4 * length / a, abs=1e-9)
    # square shape: the head is flat between the jumps, and the jumps are about +-2 a v0/g
    half = int(round(2 * length / a / res.dt))
    for start in (1, 1 + half, 1 + 2 * half):
        plateau = h[start:start + half]
        assert np.ptp(plateau) == pytest.approx(0.0, abs=1e-9 * jump)
    assert abs(h[1 + half] - h[1]) == pytest.approx(2 * jump, rel=0.01)


# ---------------------------------------------------------------- friction


def packing_case(f: float):
    # A 10 km line, 500 mm, 100 m head to a downstream reservoir: a long line whose friction
    # loss is a sizeable fraction of the Joukowsky rise.
    system = single_line(length=10_000.0, diameter=0.5, f=f, head=100.0,
                         valve=closing(1e-6, k_open=300.0), reaches=100,
                         downstream="reservoir", fluid=WATER_NO_VAPOUR)
    return run(system, a=1000.0, duration=130.0)


@pytest.mark.parametrize("f", [0.01, 0.02])
def test_line_packing_raises_the_valve_head_beyond_joukowsky_by_up_to_the_friction_loss(f):
    # Wylie & Streeter (1993) ch. 3, "line packing": after an instantaneous closure of a long
    # line with friction the head at the valve keeps rising for 2L/a after the Joukowsky jump,
    # toward reservoir head + a*v0/g, i.e. by up to about the steady friction loss h_f
    # (qualitative statement from memory; no published figure re-read).
    res = packing_case(f)
    v0 = velocity(res, 0.5)
    h_f = f * 10_000.0 / 0.5 * v0**2 / (2 * G)
    jump = res.valve_head[1] - res.valve_head[0]
    assert jump == pytest.approx(1000.0 * v0 / G, rel=1e-9)  # Joukowsky at the valve
    before_return = int(round((2 * 10_000.0 / 1000.0) / res.dt)) - 1
    packing = res.valve_head[before_return] - res.valve_head[1]
    assert 0.5 * h_f < packing <= h_f


def test_a_frictionless_line_shows_no_line_packing():
    # Wylie & Streeter (1993) ch. 1: without friction the valve head stays flat for 2L/a.
    res = packing_case(0.0)
    before_return = int(round(20.0 / res.dt)) - 1
    assert res.valve_head[before_return] == pytest.approx(res.valve_head[1], abs=1e-9)


def test_friction_attenuates_successive_peaks():
    # Wylie & Streeter (1993) ch. 3: friction damps the oscillation, each cycle's peak lower.
    res = packing_case(0.02)
    per = int(round(40.0 / res.dt))
    peaks = [res.valve_head[i * per:(i + 1) * per].max() for i in range(3)]
    assert peaks[0] > peaks[1] > peaks[2]
    assert peaks[2] < 0.9 * peaks[0]


# ---------------------------------------------------------------- slow closure vs rigid


def rigid_peak_closed_form(h_reservoir, h_valve0, v0, length, t_close):
    """Rigid-column peak for a linear effective-area closure, friction vanishing as Q -> 0.

    H = [(B + sqrt(B^2 + 4 H0))/2]^2, B = L v0/(g Tc sqrt(H_v0)) (rigid water column
    theory; Streeter & Wylie, from memory; HYDRAULICS.md). The driving head H0 inside the
    root is the reservoir head; the valve's calibration v0/sqrt(H_v0) uses the steady head at
    the valve (they differ by the entrance velocity head, which the derivation neglects).
    """
    b = length * v0 / (G * t_close * math.sqrt(h_valve0))
    return ((b + math.sqrt(b * b + 4.0 * h_reservoir)) / 2.0) ** 2


@pytest.mark.parametrize("round_trips", [5.4, 10.8, 21.7])
def test_slow_closure_agrees_with_the_rigid_column_within_three_percent(round_trips):
    # Criterion of the transient issue (HYDRAULICS.md: planning comparison on a 600 m line,
    # 2L/a about 0.92 s): rigid and elastic peaks within 3 % from about five round trips.
    a, length = 1300.0, 600.0
    t_close = round_trips * 2 * length / a
    res = run(single_line(valve=closing(t_close), fluid=WATER_NO_VAPOUR), a=a)
    rigid = rigid_peak_closed_form(20.0, res.valve_head[0], velocity(res), length, t_close)
    assert res.valve_head.max() == pytest.approx(rigid, rel=0.03)


def test_rigid_column_overstates_a_closure_of_two_round_trips():
    # HYDRAULICS.md planning numbers: at 2.2 round trips the rigid column overstates the
    # elastic peak by about half (332.8 m against 217.8 m, computed while planning).
    a, length = 1300.0, 600.0
    t_close = 2.2 * 2 * length / a
    res = run(single_line(valve=closing(t_close), fluid=WATER_NO_VAPOUR), a=a)
    rigid = rigid_peak_closed_form(20.0, res.valve_head[0], velocity(res), length, t_close)
    assert rigid > 1.25 * res.valve_head.max()
    # and the elastic peak respects the Joukowsky bound (Joukowsky 1898)
    assert res.valve_head.max() <= res.valve_head[0] + a * velocity(res) / G + 1e-9


@pytest.mark.parametrize(
    ("round_trips", "tolerance"),
    [
        (5.4, 0.035),  # planning: 82.2 m rigid against 84.7 m elastic, 3.0 % apart
        (10.8, 0.03),
        (21.7, 0.03),
    ],
)
def test_slow_closure_agrees_with_the_rigid_column_solver(round_trips, tolerance):
    # The rigid-column solver of workbench.core.transient (an independent stiff integration
    # of I dQ/dt = rho g (H_from - H_to - h_loss)) against the elastic valve peak, 600 m line
    # with friction: within 3 % from about five round trips (criterion of the transient
    # issue, HYDRAULICS.md planning numbers; at 5.4 round trips they are 3.0 % apart).
    from workbench.core.model import SimulationSettings
    from workbench.core.transient import simulate

    a, length = 1300.0, 600.0
    t_close = round_trips * 2 * length / a
    base = single_line(valve=closing(t_close), fluid=WATER_NO_VAPOUR, f=0.015)
    system = System(base.title, base.fluid, base.reservoirs, base.junctions, base.receivers,
                    base.lines, simulation=SimulationSettings(duration=t_close + 5.0))
    rigid = simulate(system)
    assert rigid.success, rigid.message
    res = run(system, a=a, duration=t_close + 5.0)
    assert res.initial_flow == pytest.approx(rigid.flows[0][0], rel=1e-6)
    rigid_peak_head = rigid.max_pressure["L1"] / (WATER_NO_VAPOUR.density * G)  # valve at z=0
    assert res.valve_head.max() == pytest.approx(rigid_peak_head, rel=tolerance)


# ---------------------------------------------------------------- grid convergence


@pytest.mark.parametrize("reaches", [20, 40])
def test_peaks_change_by_less_than_half_a_percent_when_the_reaches_double(reaches):
    # Grid convergence (common practice, no source): a 2.5 s closure (about 2.7 round trips)
    # on a 600 m line with friction: the valve peak and the envelope's peak at mid-line. The
    # closure's end falls between time steps, so convergence is first order in dt.
    def peaks(n):
        res = run(single_line(valve=closing(2.5), f=0.02, head=60.0,
                              fluid=WATER_NO_VAPOUR, reaches=n), duration=12.0)
        env = res.envelopes["L1"]
        return res.valve_head.max(), np.interp(300.0, env.distance, env.max_head)

    coarse, fine = peaks(reaches), peaks(2 * reaches)
    assert fine[0] == pytest.approx(coarse[0], rel=0.005)
    assert fine[1] == pytest.approx(coarse[1], rel=0.005)


# ---------------------------------------------------------------- column separation


def test_column_separation_is_flagged_where_the_downsurge_reaches_vapour_pressure():
    # After an instant closure the valve head falls to H0 - a v0/g at t = 2L/a (Wylie &
    # Streeter 1993 ch. 1); 20 m static head minus a 330 m Joukowsky drop is far below vapour
    # pressure (2339 Pa abs at 20 degC, IAPWS IF97).
    a, length = 1300.0, 600.0
    res = run(single_line(valve=closing(1e-6)), a=a, duration=4.0)
    assert res.success and res.status == 1
    codes = [f.code for f in res.findings]
    assert "surge.column_separation" in codes
    sep = res.column_separation
    assert sep.line == "L1" and sep.distance == pytest.approx(length)
    # closure acts in the first step; the drop reaches the valve one round trip later
    assert sep.time == pytest.approx(2 * length / a + res.dt, abs=1e-9)
    assert res.trusted_until == sep.time
    assert sep.pressure_abs <= WATER.vapor_pressure
    assert "not trustworthy" in res.message


def test_no_column_separation_when_the_static_head_holds_the_downsurge():
    # Same closure but a 600 m static head against a Joukowsky drop of about 3.5 v0 * 37 m:
    # the minimum stays above vapour pressure; nothing may be flagged.
    res = run(single_line(valve=closing(1e-6, k_open=4000.0), head=600.0), duration=4.0)
    a_dv = 1300.0 * velocity(res) / G
    assert 600.0 - a_dv > 50.0  # the premise of the check
    assert res.status == 0 and res.column_separation is None
    assert "surge.column_separation" not in [f.code for f in res.findings]


# ---------------------------------------------------------------- series lines, ends


def two_in_series(d1=0.3, d2=0.3, l1=300.0, l2=300.0, valve=None, fluid=WATER_NO_VAPOUR):
    lines = {
        "L1": Line("L1", "R1", "J1", l1, d1, friction_factor=0.0, entrance_k=0.0),
        "L2": Line("L2", "J1", "OUT", l2, d2, friction_factor=0.0, valve=valve,
                   surge=SurgeSettings("elastic", 30)),
    }
    return System("series", fluid, {"R1": Reservoir("R1", "constant_level", 0.0, 200.0)},
                  {"J1": Junction("J1", 0.0)}, {"OUT": Receiver("OUT", "open_discharge", 0.0)},
                  lines)


def test_two_equal_lines_in_series_behave_as_one_line():
    # A junction between identical pipes transmits the whole wave (Wylie & Streeter 1993,
    # ch. 3, series pipes): the valve trace equals the single 600 m line's.
    one = run(single_line(valve=closing(0.5), head=200.0, fluid=WATER_NO_VAPOUR, reaches=60),
              duration=3.0)
    two = simulate_elastic(two_in_series(valve=closing(0.5)), "L2",
                           wave_speeds={"L1": 1300.0, "L2": 1300.0}, duration=3.0)
    assert two.line_ids == ("L1", "L2")
    assert two.valve_head == pytest.approx(one.valve_head, rel=1e-9)


def test_a_series_junction_transmits_the_wave_by_the_impedance_ratio():
    # Transmission coefficient of a wave passing from pipe 2 into pipe 1 at a series
    # junction: s = 2(A2/a2)/(A1/a1 + A2/a2) (Wylie & Streeter 1993 ch. 3, from memory;
    # follows from continuity of head and flow across the junction).
    d1, d2, a = 0.5, 0.3, 1300.0
    system = two_in_series(d1=d1, d2=d2, valve=closing(1e-6))
    res = simulate_elastic(system, "L2", wave_speeds={"L1": a, "L2": a}, duration=0.5)
    a1, a2 = math.pi * d1**2 / 4, math.pi * d2**2 / 4
    s = 2 * (a2 / a) / (a1 / a + a2 / a)
    incident = res.valve_head[1] - res.valve_head[0]
    # the wave reaches mid-L1 (150 m upstream of the junction) after 300 m + 150 m of travel
    mid = res.midline_head["L1"]
    transmitted = mid[int(round(0.40 / res.dt))] - mid[0]
    assert transmitted == pytest.approx(s * incident, rel=1e-9)


def test_wave_speeds_are_adjusted_within_tolerance_for_a_common_time_step():
    # Courant number one on every line with one dt (Wylie & Streeter 1993 ch. 3, the usual
    # practice): a_used = L/(N dt), change from the Korteweg speed reported and small.
    system = two_in_series(l1=317.0, l2=300.0, valve=closing(0.5))
    res = simulate_elastic(system, "L2", wave_speeds={"L1": 1250.0, "L2": 1300.0},
                           duration=1.0)
    for lid, line in system.lines.items():
        use = res.wave_speeds[lid]
        assert use.used == pytest.approx(line.length / (res.reaches[lid] * res.dt), rel=1e-12)
        assert abs(use.adjustment) <= 0.05


def test_the_steady_state_stays_put_when_nothing_moves():
    # A steady initial state must be an equilibrium of the discrete equations (Wylie &
    # Streeter 1993 ch. 3: steady-state initial conditions), with friction, a part-open valve
    # at a junction and entrance losses: heads constant to round-off.
    lines = {
        "L1": Line("L1", "R1", "J1", 400.0, 0.2, roughness=4.5e-5),
        "L2": Line("L2", "J1", "R2", 250.0, 0.15, roughness=4.5e-5,
                   valve=Valve("equal_percentage", 2.0, opening=0.6, position="from")),
    }
    system = System("steady", WATER, {"R1": Reservoir("R1", "constant_level", 10.0, 5.0),
                                      "R2": Reservoir("R2", "tank", 0.0, 2.0)},
                    {"J1": Junction("J1", 5.0)}, {}, lines)
    res = simulate_elastic(system, "L1", wave_speeds={"L1": 1200.0, "L2": 1100.0},
                           duration=5.0)
    assert res.initial_flow > 0
    for env in res.envelopes.values():
        assert env.max_head == pytest.approx(env.initial_head, abs=1e-9)
        assert env.min_head == pytest.approx(env.initial_head, abs=1e-9)


def test_initial_flow_matches_the_steady_network_solver():
    # The elastic run's own steady state against the steady network solver (an independent
    # Newton solution of the same line model): flow within 0.5 %.
    network = pytest.importorskip("workbench.core.network")
    system = single_line(f=None, head=15.0, valve=Valve("linear", 5.0, opening=0.8))
    system.lines["L1"] = Line("L1", "R1", "OUT", 600.0, 0.3, roughness=4.5e-5,
                              valve=Valve("linear", 5.0, opening=0.8))
    steady = network.solve_steady(system)
    assert steady.success, steady.message
    res = run(system, duration=1.0)
    assert res.initial_flow == pytest.approx(steady.lines["L1"].flow, rel=0.005)


def test_an_upstream_valve_closure_drops_the_head_below_it_by_joukowsky():
    # Valve at the upstream end of a line discharging to a reservoir: closing it instantly
    # lowers the head on its downstream side by a*v0/g (Joukowsky 1898).
    line = Line("L1", "R1", "R2", 600.0, 0.3, friction_factor=0.0, entrance_k=0.0,
                valve=closing(1e-6, k_open=30.0, position="from"))
    system = System("up", WATER_NO_VAPOUR,
                    {"R1": Reservoir("R1", "constant_level", 0.0, 400.0),
                     "R2": Reservoir("R2", "constant_level", 0.0, 380.0)}, {}, {}, {"L1": line})
    res = run(system, duration=1.0)
    drop = res.valve_head[0] - res.valve_head[1]
    assert drop == pytest.approx(1300.0 * velocity(res) / G, rel=1e-12)


def test_a_line_ending_in_a_dead_end_rests_at_the_reservoir_head():
    # Hydrostatics: with no flow path the whole dead-ended chain sits at the reservoir head
    # and stays there (no spurious motion from the dead-end boundary).
    lines = {
        "L1": Line("L1", "R1", "J1", 300.0, 0.3, friction_factor=0.02),
        "L2": Line("L2", "J1", "J2", 200.0, 0.2, friction_factor=0.02),
    }
    system = System("dead", WATER_NO_VAPOUR,
                    {"R1": Reservoir("R1", "constant_level", 0.0, 50.0)},
                    {"J1": Junction("J1", 0.0), "J2": Junction("J2", 0.0)}, {}, lines)
    res = simulate_elastic(system, "L2", wave_speeds={"L1": 1300.0, "L2": 1200.0},
                           duration=2.0)
    assert res.success and res.initial_flow == 0.0
    for env in res.envelopes.values():
        assert env.max_head == pytest.approx(np.full_like(env.max_head, 50.0), abs=1e-9)
        assert env.min_head == pytest.approx(np.full_like(env.min_head, 50.0), abs=1e-9)


# ---------------------------------------------------------------- models and set-up


def test_quasi_steady_friction_gives_nearly_the_same_first_peak():
    # Updating f every step from the local Reynolds number (Colebrook) rather than holding the
    # initial f changes the first peak very little for a closure from turbulent flow (common
    # practice, no source).
    system = single_line(f=None, head=60.0, valve=closing(2.0), fluid=WATER_NO_VAPOUR)
    system.lines["L1"] = Line("L1", "R1", "OUT", 600.0, 0.3, roughness=4.5e-5,
                              valve=closing(2.0), surge=SurgeSettings("elastic", 20))
    held = run(system, duration=6.0, friction="initial")
    updated = run(system, duration=6.0, friction="quasi_steady")
    assert set(FRICTION_MODELS) >= {"initial", "quasi_steady"}
    assert updated.friction == "quasi_steady"
    assert updated.valve_head.max() == pytest.approx(held.valve_head.max(), rel=0.01)


def test_korteweg_speed_is_used_when_none_is_given():
    # Steel NPS 12 Sch 40 with water, anchored: Korteweg with the thick-wall factor used at
    # every D/e, c1 = 2e/D (1 + nu) + D (1 - nu^2)/(D + e) (Wylie & Streeter 1993, ch. 2,
    # from memory), by hand below (the thin-wall factor gives 1307.6 m/s, HYDRAULICS.md);
    # a single line keeps its speed exactly.
    d, e = 0.30318, 0.01031
    c1 = 2 * e / d * 1.30 + d * (1 - 0.30**2) / (d + e)
    a = ((2.19e9 / 998.2) / (1 + c1 * 2.19e9 * d / (207e9 * e))) ** 0.5
    line = Line("L1", "R1", "OUT", 600.0, 0.30318, roughness=4.5e-5, wall_thickness=0.01031,
                elastic_modulus=207e9, poisson_ratio=0.30, support="anchored",
                valve=closing(1.0))
    system = System("k", FluidProps("water", 998.2, 1.0e-3, 2339.2, 2.19e9),
                    {"R1": Reservoir("R1", "constant_level", 0.0, 30.0)}, {},
                    {"OUT": Receiver("OUT", "open_discharge", 0.0)}, {"L1": line})
    res = simulate_elastic(system, "L1", duration=1.0)
    assert res.wave_speeds["L1"].korteweg == pytest.approx(a, rel=1e-12)
    assert res.wave_speeds["L1"].adjustment == pytest.approx(0.0, abs=1e-12)


def test_a_liquid_without_bulk_modulus_is_refused_with_a_message():
    fluid = FluidProps("oil", 880.0, 0.05, None, None)
    res = simulate_elastic(single_line(valve=closing(1.0), fluid=fluid), "L1")
    assert not res.success
    assert "bulk modulus" in res.message


def test_lines_marked_elastic_and_named_on_the_command_line_are_run_once_per_chain():
    system = two_in_series(valve=closing(0.5))
    assert elastic_line_ids(system) == ("L2",)
    assert elastic_line_ids(system, ["L1"]) == ("L2", "L1")
    with pytest.raises(ElasticSetupError, match="L9"):
        elastic_line_ids(system, ["L9"])
    results = run_elastic(system, ("L2", "L1"), duration=0.5)
    assert results["L1"] is results["L2"]
    assert results["L1"].success


def test_column_separation_is_placed_where_the_downsurge_first_meets_the_profile():
    # A valve at the upstream end closing instantly sends a drop of a*v0/g downstream
    # (Joukowsky 1898); the front travels at a (Wylie & Streeter 1993 ch. 1), so the first
    # node where H0(x) - a v0/g reaches the vapour head z + (p_v - p_atm)/(rho g) is met at
    # t = t_close + x/a. The profile rises to a crest 25 m up at mid-line.
    a = 1300.0
    line = Line("L1", "R1", "R2", 600.0, 0.3, friction_factor=0.0, entrance_k=0.0,
                profile=((0.0, 0.0), (300.0, 25.0), (600.0, 0.0)),
                valve=closing(1e-6, k_open=7700.0, position="from"))
    system = System("crest", WATER,
                    {"R1": Reservoir("R1", "constant_level", 0.0, 60.0),
                     "R2": Reservoir("R2", "constant_level", 0.0, 40.0)}, {}, {}, {"L1": line})
    res = run(system, a=a, duration=1.0)
    env = res.envelopes["L1"]
    drop = a * velocity(res) / G
    vapour_head = env.elevation + (WATER.vapor_pressure - 101325.0) / (WATER.density * G)
    reached = np.flatnonzero(env.initial_head - drop <= vapour_head)
    assert reached.size and env.distance[reached[0]] > 100.0  # premise: on the climb
    x_first = env.distance[reached[0]]
    sep = res.column_separation
    assert sep is not None and sep.line == "L1"
    assert sep.distance == pytest.approx(x_first)
    assert sep.time == pytest.approx(res.dt + x_first / a, abs=1e-9)


def test_a_cancelled_run_stops_with_status_minus_two_and_reports_progress():
    seen = []
    res = run(single_line(valve=closing(1.0), fluid=WATER_NO_VAPOUR), duration=30.0,
              progress=seen.append, cancel=lambda: len(seen) >= 2)
    assert res.status == -2 and not res.success
    assert 0.0 < seen[-1] < 1.0 and seen == sorted(seen)
    assert len(res.time) == len(res.valve_head) and res.duration < 30.0


def test_a_shut_valve_at_the_outlet_of_a_dead_ended_chain_leaves_finite_heads():
    # Regression (found by the kernel comparison): a shut valve at the reservoir end of a
    # chain that ends in a dead end gave K*Q|Q| = inf*0 = NaN for the initial head. With
    # no flow anywhere, the chain rests at the reservoir head (hydrostatics).
    lines = {
        "L1": Line("L1", "R1", "J1", 300.0, 0.3, friction_factor=0.02,
                   valve=Valve("linear", 2.0, opening=0.0, position="from",
                               schedule=ValveSchedule((0.5, 0.7), (0.0, 1.0)))),
        "L2": Line("L2", "J1", "J2", 200.0, 0.2, friction_factor=0.02),
    }
    system = System("dead", WATER, {"R1": Reservoir("R1", "constant_level", 0.0, 50.0)},
                    {"J1": Junction("J1", 0.0), "J2": Junction("J2", 0.0)}, {}, lines)
    res = simulate_elastic(system, "L2", wave_speeds={"L1": 1300.0, "L2": 1200.0},
                           duration=2.0)
    assert res.success
    for env in res.envelopes.values():
        assert np.all(np.isfinite(env.initial_head))
        assert env.max_head == pytest.approx(np.full_like(env.max_head, 50.0), abs=1e-9)
        assert env.min_head == pytest.approx(np.full_like(env.min_head, 50.0), abs=1e-9)
