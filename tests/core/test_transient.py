"""Rigid-column transient solver against closed forms and independent integrations.

Closed forms from the classical unsteady Bernoulli equation and rigid water column theory;
independent references integrated here with scipy's ``solve_ivp`` on scalar equations
written out in the test (not through the project's code).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad, solve_ivp

from tests.core.builders import WATER, circle_area, transient_system
from workbench.core.model import (
    FluidProps,
    G,
    Junction,
    Line,
    Receiver,
    Reservoir,
    TankShape,
    Valve,
    ValveSchedule,
)
from workbench.core.transient import simulate

# ------------------------------------------------------------------ flow establishment


@pytest.mark.parametrize(
    ("f", "k_entrance", "length", "diameter", "head"),
    [
        (0.02, 0.5, 100.0, 0.10, 10.0),
        (0.015, 0.0, 400.0, 0.30, 25.0),
        (0.0, 0.0, 50.0, 0.05, 5.0),  # frictionless: v_inf = sqrt(2gH), T = 2L/v_inf
    ],
)
def test_flow_establishment_follows_the_tanh_law(f, k_entrance, length, diameter, head):
    """Unsteady Bernoulli for a line from a large reservoir discharging to air with a fixed
    friction factor: (L/g) dv/dt = H - K_t v^2/2g, so v = v_inf tanh(t/T) with
    v_inf = sqrt(2gH/K_t), K_t = 1 + sum K + fL/D and T = L v_inf/(gH) (classical result,
    e.g. Streeter, Wylie & Bedford, Fluid Mechanics)."""
    k_t = 1.0 + k_entrance + f * length / diameter
    v_inf = math.sqrt(2 * G * head / k_t)
    tau = length * v_inf / (G * head)
    system = transient_system(
        [Reservoir("R", "constant_level", 0.0, head)],
        [Line("L1", "R", "OUT", length, diameter, friction_factor=f, entrance_k=k_entrance)],
        [Receiver("OUT", "open_discharge", 0.0)],
        duration=4 * tau, initial="at_rest",
    )
    res = simulate(system, rtol=1e-8)
    assert res.success, res.message
    v = res.flows[0] / circle_area(diameter)
    assert np.max(np.abs(v - v_inf * np.tanh(res.t / tau))) <= 1e-5 * v_inf


def test_laminar_start_up_has_the_lumped_time_constant():
    """Lumped laminar start-up: I dQ/dt = rho g dH - R Q with R = 128 mu L/(pi D^4) rho g
    / (rho g) ... i.e. tau = I/R = rho D^2/(32 mu), independent of the length
    (Hagen-Poiseuille resistance with the line inertance). Oil of HYDRAULICS notes:
    mu 0.25 Pa s, rho 880 kg/m3, D 50 mm, L 30 m, dp 50 kPa -> tau = 0.275 s. The exact
    laminar start-up (Szymanski 1932, from memory) is 1.3-1.4 times slower; the lumped
    model is what the solver implements."""
    oil = FluidProps("test oil", 880.0, 0.25, None, None, None)
    dh = 50e3 / (880.0 * G)
    d = 0.05
    system = transient_system(
        [Reservoir("A", "constant_level", 0.0, 1.0 + dh), Reservoir("B", "constant_level", 0.0, 1.0)],
        [Line("L1", "A", "B", 30.0, d, entrance_k=0.0)],
        fluid=oil, duration=3.0, initial="at_rest", interval=0.001,
    )
    res = simulate(system, rtol=1e-8)
    assert res.success, res.message
    tau = 880.0 * d * d / (32 * 0.25)
    q_final = res.flows[0, -1]
    # Hagen-Poiseuille final flow (HYDRAULICS notes, computed: 1.022654e-3 m3/s); the exit
    # loss into B, two velocity heads for a laminar profile (HYDRAULICS notes "Minor
    # losses", alpha = 2), lowers it by about 0.5 %.
    assert q_final == pytest.approx(1.022654e-3, rel=6e-3)
    assert q_final < 1.022654e-3 * (1 - 4e-3)
    for n in (0.5, 1.0, 2.0, 3.0):
        q = np.interp(n * tau, res.t, res.flows[0])
        assert q / q_final == pytest.approx(1 - math.exp(-n), abs=4e-3)


@pytest.mark.parametrize("head", [0.5, 1.5])
def test_a_laminar_line_started_at_rest_settles_on_the_steady_flow(head):
    """A viscous liquid from a constant-level tank through 20 m of 50 mm pipe to air,
    started at rest. Its end state must be the steady solution: for the laminar case the
    closed form of H = (64/Re L/D + K_entrance + 2) v^2/2g (Hagen-Poiseuille, exit of a
    laminar profile alpha = 2, HYDRAULICS notes "Minor losses"), and for the larger head,
    whose Re ends in the 2000-4000 band, the steady network solver (same line model)."""
    from workbench.core.network import solve_steady

    oil = FluidProps("light oil", 850.0, 0.02, None, None, None)
    d, length = 0.05, 20.0
    system = transient_system(
        [Reservoir("T", "constant_level", 0.0, 1.0 + head)],
        [Line("L1", "T", "OUT", length, d, entrance_k=0.5)],
        [Receiver("OUT", "open_discharge", 1.0)],
        fluid=oil, duration=120.0, initial="at_rest",
    )
    res = simulate(system, rtol=1e-9)
    assert res.success, res.message
    q_end = float(res.flows[0, -1])
    steady = solve_steady(system).lines["L1"]
    assert q_end == pytest.approx(steady.flow, rel=1e-6)
    if head < 1.0:
        assert steady.reynolds < 2000.0
        nu = oil.viscosity / oil.density
        b = 32 * nu * length / (G * d * d)
        a = 2.5 / (2 * G)
        v = (-b + math.sqrt(b * b + 4 * a * head)) / (2 * a)
        assert q_end == pytest.approx(v * circle_area(d), rel=1e-6)
    else:
        assert 2000.0 < steady.reynolds < 4000.0


def test_a_steady_laminar_line_has_the_steady_grade_line_pressures():
    """Started steady with nothing changing, the run's lowest and highest pressures on a
    laminar line over a crest must be the steady grade line's: both take alpha = 2 velocity
    heads of kinetic energy in the line (HYDRAULICS notes "Minor losses") and the receiving
    head at the exit. The steady value is checked against the energy equation in
    tests/core/test_checks.py."""
    from workbench.core.network import solve_steady

    oil = FluidProps("test oil", 880.0, 0.25, None, None, None)
    system = transient_system(
        [Reservoir("T", "constant_level", 10.0, 2.0)],
        [Line("L1", "T", "OUT", 100.0, 0.08, entrance_k=0.5,
              profile=((0.0, 10.0), (20.0, 12.5), (60.0, 12.5), (100.0, 0.0)))],
        [Receiver("OUT", "open_discharge", 0.0)],
        fluid=oil, duration=5.0, initial="steady",
    )
    res = simulate(system, rtol=1e-9)
    assert res.success, res.message
    steady = solve_steady(system)
    assert steady.lines["L1"].reynolds < 2000.0
    prof = steady.profiles["L1"]
    assert res.min_pressure["L1"] == pytest.approx(prof.pressure_gauge.min(), rel=1e-7)
    assert res.max_pressure["L1"] == pytest.approx(prof.pressure_gauge.max(), rel=1e-7)


# ------------------------------------------------------------------ draining


def _drain_system(shape, h0, *, drop=1.0, length=2.0, diameter=0.05, f=0.02, k_entrance=0.5,
                  min_level=0.0, interval=None):
    return transient_system(
        [Reservoir("T", "tank", 10.0, h0, shape=shape, min_level=min_level)],
        [Line("L1", "T", "OUT", length, diameter, friction_factor=f, entrance_k=k_entrance)],
        [Receiver("OUT", "open_discharge", 10.0 - drop)],
        duration=1e6, stop_when="drained", interval=interval,
    )


def _quasi_steady_drain_time(area_of_h, h0, h1, drop, length, diameter, f, k_entrance):
    """Torricelli with a line: dt = A(h) dh / (a sqrt(2g (h + z)/K_t)), integrated by quad."""
    k_t = 1.0 + k_entrance + f * length / diameter
    a = circle_area(diameter)
    value, _ = quad(lambda h: area_of_h(h) / (a * math.sqrt(2 * G * (h + drop) / k_t)), h1, h0,
                    limit=200, epsabs=0.0, epsrel=1e-12)
    return value


def test_vertical_tank_drains_in_the_torricelli_time():
    """t = 2 A_T (sqrt(h0 + z) - sqrt(h1 + z)) / (a sqrt(2g/K_t)) (quasi-steady Torricelli
    with constant K_t, HYDRAULICS notes). The rigid column adds the line's inertia, which
    shifts the time by about the line time constant: 5e-4 relative here."""
    d_tank, h0, z = 2.0, 3.0, 1.0
    k_t = 1.0 + 0.5 + 0.02 * 2.0 / 0.05
    a = circle_area(0.05)
    expected = 2 * circle_area(d_tank) * (math.sqrt(h0 + z) - math.sqrt(z)) / (a * math.sqrt(2 * G / k_t))
    res = simulate(_drain_system(TankShape("vertical_cylinder", diameter=d_tank), h0, drop=z))
    assert res.success and res.status == 1, res.message
    assert res.drain_times["T"] == pytest.approx(expected, rel=5e-4)


def test_horizontal_cylinder_drains_in_the_closed_form_orifice_time():
    """Horizontal cylinder, flat ends, outlet level with the bottom (z = 0), short line:
    t = [2L/(C_d a sqrt(2g))] (2/3) [(D - h1)^1.5 - (D - h0)^1.5] with C_d = 1/sqrt(K_t)
    (HYDRAULICS notes; the surface width 2 sqrt(h(D - h)) integrated in closed form)."""
    d, lt, h0, h1 = 2.0, 5.0, 1.6, 0.2
    k_t = 1.0 + 0.5 + 0.02 * 0.5 / 0.05
    expected = (2 * lt * math.sqrt(k_t) / (circle_area(0.05) * math.sqrt(2 * G))
                * (2 / 3) * ((d - h1) ** 1.5 - (d - h0) ** 1.5))
    shape = TankShape("horizontal_cylinder", diameter=d, length=lt)
    res = simulate(_drain_system(shape, h0, drop=0.0, length=0.5, min_level=h1))
    assert res.success and res.status == 1, res.message
    assert res.drain_times["T"] == pytest.approx(expected, rel=5e-4)


@pytest.mark.parametrize(
    ("shape", "area_of_h", "h0"),
    [
        # horizontal cylinder drained right down to h = 0, where its width vanishes
        (TankShape("horizontal_cylinder", diameter=1.8, length=4.0),
         lambda h: 2 * 4.0 * math.sqrt(max(h * (1.8 - h), 0.0)), 1.5),
        # cone bottom (apex down, 1.0 m cone under a 1.6 m cylinder), drained to the apex
        (TankShape("cone_bottom", diameter=1.6, cone_height=1.0),
         lambda h: circle_area(1.6) * min(h / 1.0, 1.0) ** 2, 2.5),
    ],
)
def test_shaped_tanks_drain_in_the_quasi_steady_time_computed_with_quad(shape, area_of_h, h0):
    # Reference: the Torricelli integral with the plain-geometry surface area, by scipy quad.
    expected = _quasi_steady_drain_time(area_of_h, h0, 0.0, 1.0, 2.0, 0.05, 0.02, 0.5)
    res = simulate(_drain_system(shape, h0))
    assert res.success and res.status == 1, res.message
    assert res.drain_times["T"] == pytest.approx(expected, rel=5e-4)


def _independent_drain(h0, drop, length, diameter, f, k_entrance, d_tank, rtol):
    """The same rigid-column tank drain written out as two scalar ODEs and integrated with
    scipy solve_ivp (events by its own root finding): I dQ/dt = rho g (h + z - K_t v^2/2g),
    dV/dt = -Q."""
    a = circle_area(diameter)
    at = circle_area(d_tank)
    k_t = 1.0 + k_entrance + f * length / diameter
    v0 = math.sqrt(2 * G * (h0 + drop) / k_t)  # steady start

    def rhs(t, y):
        q, vol = y
        h = vol / at
        return [G * a / length * (h + drop - k_t * q * abs(q) / (2 * G * a * a)), -q]

    def empty(t, y):
        return y[1]

    empty.terminal = True
    sol = solve_ivp(rhs, (0, 1e6), [v0 * a, at * h0], method="Radau", rtol=rtol,
                    atol=[1e-14, 1e-12], events=empty)
    return sol.t_events[0][0]


@pytest.mark.parametrize("interval", [None, 500.0])
def test_drain_event_is_landed_by_root_finding_not_at_an_output_step(interval):
    # Reference: independent scipy integration of the same equations at rtol 1e-12.
    expected = _independent_drain(3.0, 1.0, 2.0, 0.05, 0.02, 0.5, 2.0, 1e-12)
    res = simulate(_drain_system(TankShape("vertical_cylinder", diameter=2.0), 3.0,
                                 interval=interval), rtol=1e-10)
    assert res.drain_times["T"] == pytest.approx(expected, rel=1e-8)
    drained = [e for e in res.events if e.code == "tank.drained"]
    assert drained[0].time == res.drain_times["T"] and res.t[-1] == drained[0].time


def test_a_tank_overflows_at_the_landed_time_and_then_holds_its_level():
    """Filling from a constant head H_R through a line: t = 2 A (sqrt(dH0) - sqrt(dH1)) /
    (a sqrt(2g/K_t)) (Torricelli in reverse, quasi-steady; HYDRAULICS notes formula)."""
    k_t = 1.0 + 0.5 + 0.02 * 2.0 / 0.05
    at, a = circle_area(1.5), circle_area(0.05)
    system = transient_system(
        [Reservoir("R", "constant_level", 10.0, 6.0),
         Reservoir("T", "tank", 10.0, 0.5, shape=TankShape("vertical_cylinder", diameter=1.5),
                   height=3.0)],
        [Line("L1", "R", "T", 2.0, 0.05, friction_factor=0.02, entrance_k=0.5)],
        duration=3000.0,
    )
    res = simulate(system)
    expected = 2 * at * (math.sqrt(5.5) - math.sqrt(3.0)) / (a * math.sqrt(2 * G / k_t))
    over = [e for e in res.events if e.code == "tank.overflow"]
    assert over and over[0].time == pytest.approx(expected, rel=5e-4)
    assert res.levels[0, -1] == pytest.approx(3.0, abs=1e-9)
    assert any(w.code == "tank.overflow" for w in res.warnings)


# ------------------------------------------------------------------ two tanks


def test_frictionless_u_tube_oscillates_with_the_small_oscillation_period():
    """Two tanks of areas A1, A2 joined by a pipe of area a, length L, no friction:
    momentum (L/g) dv/dt = h1 - h2 = dh, and continuity d(dh)/dt = -a v (1/A1 + 1/A2), so
    d2v/dt2 = -(g a/L)(1/A1 + 1/A2) v: simple harmonic with
    T = 2 pi sqrt(L/(g a (1/A1 + 1/A2))) (HYDRAULICS notes; the issue's formula). The exit
    loss (one to two velocity heads: Re peaks near 4000 here) is quadratic and negligible
    at this 1 cm amplitude. Reversals come half a period apart."""
    length, d, a1, a2 = 50.0, 0.1, 1.0, 2.5
    expected = 2 * math.pi * math.sqrt(length / (G * circle_area(d) * (1 / a1 + 1 / a2)))
    system = transient_system(
        [Reservoir("T1", "tank", 0.0, 2.01, shape=TankShape("rectangular", length=1.0, width=a1)),
         Reservoir("T2", "tank", 0.0, 2.00, shape=TankShape("rectangular", length=1.0, width=a2))],
        [Line("L1", "T1", "T2", length, d, friction_factor=0.0, entrance_k=0.0)],
        duration=3.2 * expected, initial="at_rest",
    )
    res = simulate(system, rtol=1e-9)
    times = [e.time for e in res.events if e.code == "line.reversal"]
    assert len(times) >= 5
    half_periods = np.diff(times)
    assert np.all(np.abs(2 * half_periods / expected - 1) < 2e-3)
    assert times[0] == pytest.approx(expected / 2, rel=2e-3)


def test_equalising_tanks_conserve_volume_and_end_level():
    # Mass balance (common practice): the total liquid volume never changes; with friction
    # the levels settle at equal heads (hydrostatics).
    system = transient_system(
        [Reservoir("T1", "tank", 2.0, 4.0, shape=TankShape("vertical_cylinder", diameter=2.0)),
         Reservoir("T2", "tank", 0.0, 1.0, shape=TankShape("cone_bottom", diameter=3.0,
                                                                    cone_height=0.5))],
        [Line("L1", "T1", "T2", 30.0, 0.04, roughness=4.5e-5)],
        duration=20000.0, initial="at_rest",
    )
    res = simulate(system)
    assert res.success, res.message
    total = res.volumes.sum(axis=0)
    assert np.max(np.abs(total - total[0])) <= 1e-6 * total[0]
    head1 = 2.0 + res.levels[0, -1]
    head2 = 0.0 + res.levels[1, -1]
    assert head1 == pytest.approx(head2, abs=1e-3)


def test_junction_continuity_holds_at_every_output():
    # Continuity at a junction (Kirchhoff's first law): sum of inflows = outflow, 1e-9.
    shape = TankShape("vertical_cylinder", diameter=1.5)
    system = transient_system(
        [Reservoir("T1", "tank", 5.0, 2.0, shape=shape), Reservoir("T2", "tank", 4.0, 3.0, shape=shape)],
        [Line("A", "T1", "J", 10.0, 0.05, roughness=4.5e-5),
         Line("B", "T2", "J", 15.0, 0.05, roughness=4.5e-5),
         Line("C", "J", "OUT", 20.0, 0.08, roughness=4.5e-5)],
        [Receiver("OUT", "open_discharge", 0.0)],
        [Junction("J", 3.0)],
        duration=600.0,
    )
    res = simulate(system)
    assert res.success, res.message
    q = dict(zip(res.line_ids, res.flows))
    assert np.max(np.abs(q["A"] + q["B"] - q["C"])) <= 1e-9 * np.max(np.abs(q["C"]))


# ------------------------------------------------------------------ valve closure


def _closure_system(t_close, k_open=200.0, head=30.0, length=600.0, d=0.3):
    valve = Valve("linear", k_open, schedule=ValveSchedule((1.0, 1.0 + t_close), (1.0, 0.0)))
    return transient_system(
        [Reservoir("R", "constant_level", 0.0, head)],
        [Line("L1", "R", "OUT", length, d, friction_factor=0.0, entrance_k=0.0, valve=valve)],
        [Receiver("OUT", "open_discharge", 0.0)],
        duration=t_close + 10.0,
    )


@pytest.mark.parametrize("t_close", [8.0, 20.0, 60.0])
def test_rigid_column_closure_peak_matches_the_closed_form(t_close):
    """Linear effective-area closure K = K0/tau^2, tau = 1 - t/Tc, friction vanishing at zero
    flow: peak valve head H = [(B + sqrt(B^2 + 4 H0))/2]^2 with B = L v0/(g Tc sqrt(H_v0))
    (rigid water column theory; Streeter & Wylie, from memory). The theory neglects the
    pipe velocity head; with K0 = 2000 it is 0.05 % of H0, hence the 1e-3 tolerance."""
    head, length, k0 = 30.0, 2000.0, 2000.0
    v0 = math.sqrt(2 * G * head / (1 + k0))
    h_v0 = k0 * v0 * v0 / (2 * G)
    b = length * v0 / (G * t_close * math.sqrt(h_v0))
    expected = ((b + math.sqrt(b * b + 4 * h_v0)) / 2) ** 2
    res = simulate(_closure_system(t_close, k0, head, length))
    assert res.success, res.message
    peak_head = res.max_pressure["L1"] / (WATER.density * G)  # valve at elevation 0
    assert peak_head == pytest.approx(expected, rel=1e-3)
    assert not res.surge["L1"].capped


def test_valve_closure_is_an_event_at_the_schedule_time_and_stops_the_line():
    res = simulate(_closure_system(8.0))
    closed = [e for e in res.events if e.code == "valve.closed"]
    assert [e.time for e in closed] == [9.0]  # schedule: shut at t = 1 + 8 s
    after = res.t > 9.0
    assert np.all(res.flows[0, after] == 0.0)
    assert np.all(res.flows[0, ~after] >= 0.0)  # no reverse flow through the closing valve


def test_a_fast_closure_is_flagged_and_its_peak_capped_at_static_plus_joukowsky():
    """Closure in 2 s on a 600 m steel line (2L/a about 0.9 s): about two round trips, so the
    rigid column is not valid (HYDRAULICS notes, planning comparison) and the peak is capped
    at static + rho a v0 (Joukowsky 1898)."""
    valve = Valve("linear", 5.0, schedule=ValveSchedule((1.0, 3.0), (1.0, 0.0)))
    line = Line("L1", "R", "OUT", 600.0, 0.30318, friction_factor=0.015, entrance_k=0.5,
                valve=valve, wall_thickness=0.01031, elastic_modulus=207e9,
                pressure_rating=10e5)
    system = transient_system([Reservoir("R", "constant_level", 0.0, 30.0)], [line],
                              [Receiver("OUT", "open_discharge", 0.0)], duration=10.0)
    res = simulate(system)
    s = res.surge["L1"]
    # Korteweg, anchored, the thick-wall factor used at every D/e (Wylie & Streeter 1993,
    # ch. 2, from memory): c1 = 2e/D (1 + nu) + D (1 - nu^2)/(D + e); 1307.6 m/s thin-wall.
    d, e, nu = 0.30318, 0.01031, 0.30
    c1 = 2 * e / d * (1 + nu) + d * (1 - nu**2) / (d + e)
    a = math.sqrt((2.19e9 / 998.207) / (1 + c1 * 2.19e9 * d / (207e9 * e)))
    assert s.wave_speed == pytest.approx(a, rel=1e-9)
    assert s.rapid_closure and s.capped
    codes = {w.code for w in res.warnings}
    assert {"surge.rapid_closure", "surge.pressure"} <= codes
    v0 = res.flows[0, 0] / circle_area(0.30318)
    cap = WATER.density * G * 30.0 + WATER.density * s.wave_speed * v0
    assert res.max_pressure["L1"] == pytest.approx(cap, rel=1e-3)
    assert s.max_pressure_uncapped > cap


def test_column_separation_is_flagged_where_pressure_reaches_vapour_pressure():
    # A fast closure at the *upstream* end of a line draining to air: the moving column
    # pulls away from the valve and the pressure behind it falls to vapour pressure (column
    # separation, Wylie & Streeter 1993).
    valve = Valve("linear", 5.0, position="from",
                  schedule=ValveSchedule((1.0, 2.0), (1.0, 0.0)))
    line = Line("L1", "R", "OUT", 600.0, 0.3, friction_factor=0.015, entrance_k=0.5,
                valve=valve)
    system = transient_system([Reservoir("R", "constant_level", 0.0, 30.0)], [line],
                              [Receiver("OUT", "open_discharge", 0.0)], duration=5.0)
    res = simulate(system)
    assert "surge.column_separation" in {w.code for w in res.warnings}
    assert res.min_pressure["L1"] == pytest.approx(WATER.vapor_pressure - 101325.0, rel=1e-12)


# ------------------------------------------------------------------ run control


def test_progress_is_the_fraction_of_simulated_time_and_cancel_stops_cleanly():
    fractions: list[float] = []

    def cancel():
        return bool(fractions) and fractions[-1] > 0.3

    system = _drain_system(TankShape("vertical_cylinder", diameter=2.0), 3.0)
    res = simulate(system, duration=800.0, stop_when=None, progress=fractions.append,
                   cancel=cancel)
    assert res.status == 2 and not res.success
    assert fractions == sorted(fractions) and 0.3 < fractions[-1] < 0.6
    assert res.t[-1] == pytest.approx(800.0 * fractions[-1], rel=1e-9)


def test_a_full_run_reports_progress_up_to_one():
    fractions: list[float] = []
    res = simulate(_closure_system(8.0), progress=fractions.append)
    assert res.success and fractions[-1] == 1.0 and fractions == sorted(fractions)


@pytest.mark.parametrize("method", ["Radau", "BDF", "LSODA"])
def test_implicit_methods_agree_on_the_drain_time(method):
    # Reference: independent scipy integration (see _independent_drain), rtol 1e-12.
    expected = _independent_drain(3.0, 1.0, 2.0, 0.05, 0.02, 0.5, 2.0, 1e-12)
    res = simulate(_drain_system(TankShape("vertical_cylinder", diameter=2.0), 3.0),
                   method=method)
    assert res.drain_times["T"] == pytest.approx(expected, rel=1e-4)


def test_pressure_is_tracked_at_profile_points_over_a_crest():
    """Steady flow over a crest (Bernoulli with losses, Darcy-Weisbach with a fixed f):
    HGL(s) = H0 - (1 + K_e + f s/D) v^2/2g, v = sqrt(2g H0/(1 + K_e + f L/D)); the gauge
    pressure at the crest is rho g (HGL - z). Nothing moves, so the run's minimum is it."""
    head, length, d, f, k_e = 12.0, 100.0, 0.1, 0.02, 0.5
    v = math.sqrt(2 * G * head / (1 + k_e + f * length / d))
    hgl_crest = head - (1 + k_e + f * 40.0 / d) * v * v / (2 * G)
    expected = WATER.density * G * (hgl_crest - 14.0)
    system = transient_system(
        [Reservoir("R", "constant_level", 10.0, 2.0)],
        [Line("L1", "R", "OUT", length, d, friction_factor=f, entrance_k=k_e,
              profile=((0.0, 10.0), (40.0, 14.0), (100.0, 0.0)))],
        [Receiver("OUT", "open_discharge", 0.0)],
        duration=2.0,
    )
    res = simulate(system)
    assert res.min_pressure["L1"] == pytest.approx(expected, rel=1e-6)
    assert res.min_pressure["L1"] < 0.0  # sub-atmospheric at the crest


def test_a_shut_valve_passes_nothing_until_its_schedule_opens_it():
    # A shut valve carries no flow (c(0) = 0, IEC 60534-2-4 characteristics end at zero).
    valve = Valve("linear", 2.0, opening=0.0,
                  schedule=ValveSchedule((0.0, 5.0, 10.0), (0.0, 0.0, 1.0)))
    system = transient_system(
        [Reservoir("R", "constant_level", 0.0, 10.0)],
        [Line("L1", "R", "OUT", 50.0, 0.1, friction_factor=0.02, valve=valve)],
        [Receiver("OUT", "open_discharge", 0.0)],
        duration=30.0, interval=0.5,
    )
    res = simulate(system)
    assert res.success, res.message
    assert np.all(res.flows[0, res.t <= 5.0] == 0.0)
    assert np.all(res.flows[0, res.t > 5.5] > 0.0)
    assert [(e.time, e.code) for e in res.events] == [(5.0, "valve.opened")]


def test_a_viscous_drain_with_a_millisecond_line_is_integrated_as_a_stiff_system():
    """Laminar drain (Hagen-Poiseuille, Q = pi D^4 rho g (h + z)/(128 mu L)) of a prismatic
    tank: d(h + z)/dt = -Q/A_T gives h + z = (h0 + z) exp(-t/T), T = 128 mu L A_T/(pi D^4 rho g),
    so the drain time is T ln((h0 + z)/(h1 + z)) (mass balance, derived here). The line's time
    constant rho D^2/(32 mu) is 16 ms against a 16 h drain: only an implicit method takes
    this in a few hundred steps. Entrance and exit velocity heads are 2e-4 of the head."""
    rho, mu, d, length, z, h0, area = 1260.0, 1.0, 0.02, 5.0, 1.0, 2.0, 0.5
    glycerol_like = FluidProps("test glycerol", rho, mu, None, None, None)
    system = transient_system(
        [Reservoir("T", "tank", 10.0, h0, shape=TankShape("rectangular", length=1.0, width=area))],
        [Line("L1", "T", "OUT", length, d)],
        [Receiver("OUT", "open_discharge", 10.0 - z)],
        fluid=glycerol_like, duration=1e6, stop_when="drained",
    )
    res = simulate(system)
    big_t = 128 * mu * length * area / (math.pi * d**4 * rho * G)
    assert res.drain_times["T"] == pytest.approx(big_t * math.log((h0 + z) / z), rel=5e-4)
    assert res.nsteps < 300


def test_a_drain_that_falls_below_atmospheric_at_its_outlet_is_flagged_with_when_and_where():
    """Bernoulli from the tank's surface to just inside the outlet (entrance loss K_e):
    p = rho g h - (1 + K_e) rho v^2/2 (common practice, no source). Near the end of the drain
    the few centimetres of liquid cannot supply the velocity head: the outlet runs below
    atmospheric (in the plant it would draw air). At the start (3 m) it does not."""
    rho = WATER.density
    system = _drain_system(TankShape("vertical_cylinder", diameter=2.0), 3.0, drop=1.0,
                           min_level=0.05)
    res = simulate(system)
    assert res.success, res.message
    v_end = res.flows[0][-1] / circle_area(0.05)
    expected = rho * G * 0.05 - (1.0 + 0.5) * rho * v_end**2 / 2.0
    assert expected < -5e3  # several kPa below atmospheric
    assert res.min_pressure["L1"] == pytest.approx(expected, rel=0.01)
    found = [w for w in res.warnings if w.code == "profile.subatmospheric"]
    assert len(found) == 1 and found[0].element == "L1" and found[0].severity == "caution"
    assert f"t = {res.min_pressure_time['L1']:.4g} s" in found[0].message
    assert "0 m from 'T'" in found[0].message
    v0 = res.flows[0][0] / circle_area(0.05)
    assert rho * G * 3.0 - 1.5 * rho * v0**2 / 2.0 > 0.0  # the start is above atmospheric


def test_a_run_that_stays_above_atmospheric_has_no_subatmospheric_caution():
    # Same tank, stopped long before it empties: the outlet stays above atmospheric.
    system = _drain_system(TankShape("vertical_cylinder", diameter=2.0), 3.0, drop=1.0,
                           min_level=2.5)
    res = simulate(system)
    assert res.success, res.message
    assert abs(res.min_pressure["L1"]) < 1e-6  # the lowest is the open outlet: atmospheric
    assert not [w for w in res.warnings if w.code == "profile.subatmospheric"]


def test_the_time_a_draining_outlet_loses_its_vortex_submergence_is_reported():
    """The submergence rule S = D(1 + 2.3 Fr) (ANSI/HI 9.8, as the steady check applies it)
    along a Torricelli drain: with v(h) = sqrt(2g(h + z)/K_t) (quasi-steady, HYDRAULICS
    notes) the level h* where h = S(v(h)) is found by brentq, and the time to reach it from
    the closed-form Torricelli drain time. The rigid column's inertia shifts times by about
    5e-4 relative (see the Torricelli test); the crossing is interpolated between 1 s outputs."""
    from scipy.optimize import brentq

    d, z, h0, d_tank = 0.05, 1.0, 3.0, 2.0
    k_t = 1.0 + 0.5 + 0.02 * 2.0 / 0.05
    a = circle_area(d)

    def v_of(h):
        return math.sqrt(2 * G * (h + z) / k_t)

    h_star = brentq(lambda h: h - d * (1.0 + 2.3 * v_of(h) / math.sqrt(G * d)), 0.0, h0)
    t_star = 2 * circle_area(d_tank) * (math.sqrt(h0 + z) - math.sqrt(h_star + z)) / (
        a * math.sqrt(2 * G / k_t))
    system = _drain_system(TankShape("vertical_cylinder", diameter=d_tank), h0, drop=z,
                           interval=1.0)
    res = simulate(system)
    assert res.success, res.message
    events = [e for e in res.events if e.code == "outlet.submergence"]
    assert len(events) == 1 and events[0].element == "T"
    assert events[0].time == pytest.approx(t_star, rel=2e-3)
    assert events[0].time < res.drain_times["T"]
    found = [w for w in res.warnings if w.code == "outlet.submergence"]
    assert len(found) == 1 and found[0].element == "L1"
    level = float(found[0].message.split("at a level of ")[1].split(" m")[0])
    assert level == pytest.approx(h_star, abs=2e-3)


def test_no_submergence_event_while_the_outlet_stays_deep():
    system = _drain_system(TankShape("vertical_cylinder", diameter=2.0), 3.0, drop=1.0,
                           min_level=2.5)
    res = simulate(system)
    assert not [e for e in res.events if e.code == "outlet.submergence"]
