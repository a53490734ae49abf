"""Tanks with a feed and a draw-off in the rigid-column transient, against closed forms and
independent integrations.

Independent references are written out here: the mass balance of an incompressible liquid
dV/dt = Q_in - Q(h) (integrated with scipy's ``solve_ivp`` or in closed form), the steady
line equation solved with scipy's ``brentq``, the surface area of a horizontal cylinder
integrated with scipy's ``quad`` and its volume from ``fluids.geometry.TANK`` (an outside
library), none of them through the project's code.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad, solve_ivp
from scipy.optimize import brentq

from tests.core.builders import circle_area, transient_system
from workbench.core.model import (
    FlowSchedule,
    G,
    Line,
    Receiver,
    Reservoir,
    TankShape,
    Valve,
)
from workbench.core.transient import simulate

# Outlet line of the tests: short, fixed friction factor, sharp entrance, turbulent all run,
# so it behaves as an orifice with K_t = 1 + K_entrance + f L/D (one velocity head at the
# exit for turbulent flow: HYDRAULICS notes "Minor losses").
LINE_L, LINE_D, LINE_F, LINE_KE = 2.0, 0.05, 0.02, 0.5
K_T = 1.0 + LINE_KE + LINE_F * LINE_L / LINE_D


def _outlet(valve=None):
    return Line("L1", "T", "OUT", LINE_L, LINE_D, friction_factor=LINE_F, entrance_k=LINE_KE,
                valve=valve)


def _q_line(h, drop):
    """Steady outflow of the orifice-like line at level h (Bernoulli with losses)."""
    return circle_area(LINE_D) * math.sqrt(2 * G * max(h + drop, 0.0) / K_T)


# ------------------------------------------------------------------ equilibrium


@pytest.mark.parametrize("h0", [3.0, 0.3])
def test_a_fed_tank_settles_where_the_outflow_equals_the_feed(h0):
    """Vertical cylinder (D 2 m) fed 8 L/s, draining 1 m down through the orifice-like line.

    Equilibrium: Q(h_eq) = Q_in, solved here by brentq on the steady line equation
    h + z = K_t v^2/2g. Approach: the quasi-steady mass balance A dh/dt = Q_in - Q(h)
    integrated by scipy solve_ivp (rtol 1e-11); the rigid column adds the line's inertia,
    a lag of about its time constant (under a second against a 1500 s approach)."""
    d_tank, drop, q_in = 2.0, 1.0, 8e-3
    h_eq = brentq(lambda h: _q_line(h, drop) - q_in, 0.0, 10.0, xtol=1e-14)
    # the same from the closed form of the line equation (a check on the check)
    assert h_eq == pytest.approx(K_T * (q_in / circle_area(LINE_D)) ** 2 / (2 * G) - drop, rel=1e-12)
    tank = Reservoir("T", "tank", 10.0, h0, shape=TankShape("vertical_cylinder", diameter=d_tank),
                     inflow=q_in)
    system = transient_system([tank], [_outlet()], [Receiver("OUT", "open_discharge", 10.0 - drop)],
                              duration=20000.0, interval=50.0)
    res = simulate(system, rtol=1e-8)
    assert res.success, res.message

    at = circle_area(d_tank)
    ref = solve_ivp(lambda t, h: [(q_in - _q_line(h[0], drop)) / at], (0.0, 20000.0), [h0],
                    method="LSODA", rtol=1e-11, atol=1e-12, dense_output=True)
    expected = ref.sol(res.t)[0]
    assert np.max(np.abs(res.levels[0] - expected)) <= 2e-3 * abs(h0 - h_eq)
    assert res.levels[0, -1] == pytest.approx(h_eq, rel=1e-4)
    assert res.end_states["T"] == "steady"
    assert res.flows[0, -1] == pytest.approx(q_in, rel=1e-4)
    assert not [e for e in res.events if e.code.startswith("tank.")]


# ------------------------------------------------------------------ filling, overflow


def _shut_outlet():
    return _outlet(Valve("linear", 0.5, opening=0.0))


def test_a_tank_with_only_a_feed_fills_linearly_and_overflows_when_the_geometry_says():
    """Shut outlet, feed 12 L/s into a vertical cylinder (D 1.5 m, overflow at 3 m) from
    0.5 m: V = V0 + Q_in t exactly (mass balance), overflow at t = A (H - h0)/Q_in; then the
    level is held and the whole feed spills."""
    d_tank, h0, height, q_in = 1.5, 0.5, 3.0, 12e-3
    tank = Reservoir("T", "tank", 10.0, h0, shape=TankShape("vertical_cylinder", diameter=d_tank),
                     height=height, inflow=q_in)
    system = transient_system([tank], [_shut_outlet()], [Receiver("OUT", "open_discharge", 0.0)],
                              duration=600.0, interval=10.0)
    res = simulate(system)
    assert res.success, res.message
    at = circle_area(d_tank)
    t_over = at * (height - h0) / q_in
    over = [e for e in res.events if e.code == "tank.overflow"]
    assert len(over) == 1 and over[0].time == pytest.approx(t_over, rel=1e-9)
    before = res.t <= t_over
    assert np.allclose(res.volumes[0, before], at * h0 + q_in * res.t[before], rtol=1e-11,
                       atol=0.0)
    assert np.all(np.abs(res.levels[0, res.t >= t_over] - height) <= 1e-9)
    assert np.all(np.abs(res.flows[0]) <= 1e-15)  # the shut line: round-off of the solver
    assert np.allclose(res.spills[0, res.t > t_over], q_in, rtol=1e-12)
    assert res.end_states["T"] == "spilling"
    (finding,) = [w for w in res.warnings if w.code == "tank.overflow"]
    assert finding.severity == "danger"
    assert "feed of 12 L/s is the cause" in finding.message


def test_schedule_break_points_are_landed_exactly():
    """A piecewise-linear feed with break points at awkward times into a tank with a shut
    outlet: V(t) = V0 + integral of the feed, a piecewise quadratic computed here in closed
    form. Every break point is an output time, and the volumes agree to round-off (a kink
    inside a step would not be integrated exactly)."""
    times, flows = (0.0, 37.3, 101.9, 250.0), (0.0, 20e-3, 5e-3, 5e-3)
    tank = Reservoir("T", "tank", 10.0, 0.5, shape=TankShape("rectangular", length=2.0, width=1.5),
                     inflow_schedule=FlowSchedule(times, flows))
    system = transient_system([tank], [_shut_outlet()], [Receiver("OUT", "open_discharge", 0.0)],
                              duration=300.0, interval=7.0)
    res = simulate(system)
    assert res.success, res.message
    for tb in times[1:]:
        assert tb in res.t.tolist()

    def fed(t):  # trapezoids of the piecewise-linear feed up to t
        total = 0.0
        for (ta, qa), (tb, qb) in zip(zip(times, flows), zip(times[1:], flows[1:])):
            if t <= ta:
                break
            te = min(t, tb)
            qe = qa + (qb - qa) * (te - ta) / (tb - ta)
            total += 0.5 * (qa + qe) * (te - ta)
        return total + flows[-1] * max(t - times[-1], 0.0)

    expected = np.array([3.0 * 0.5 + fed(t) for t in res.t])
    assert np.max(np.abs(res.volumes[0] - expected)) <= 1e-12 * expected.max()
    assert np.allclose(res.feeds[0], np.interp(res.t, times, flows), rtol=0, atol=1e-15)


# ------------------------------------------------------------------ draw-off


def test_a_draw_off_empties_a_horizontal_cylinder_in_the_time_of_its_volume():
    """A horizontal cylinder (D 2 m, L 5 m, flat ends) with no lines of its own, emptied by a
    6 L/s draw-off from 1.6 m to 0.2 m: t = V(h0 -> h1)/Q with the volume the integral of
    the surface area 2 L sqrt(h (D - h)) (scipy quad), checked against fluids'
    TANK.V_from_h. Levels on the way solve integral_h^h0 A dh = Q t (brentq on quad)."""
    from fluids.geometry import TANK

    d, lt, h0, h1, q = 2.0, 5.0, 1.6, 0.2, 6e-3

    def width_area(h):
        return 2 * lt * math.sqrt(max(h * (d - h), 0.0))

    def volume_between(a, b):
        return quad(width_area, a, b, epsabs=0.0, epsrel=1e-13, limit=200)[0]

    moved = volume_between(h1, h0)
    fl = TANK(D=d, L=lt, horizontal=True, sideA=None, sideB=None)
    assert moved == pytest.approx(fl.V_from_h(h0) - fl.V_from_h(h1), rel=1e-9)

    tank = Reservoir("T", "tank", 5.0, h0, shape=TankShape("horizontal_cylinder", diameter=d,
                                                           length=lt),
                     height=d, min_level=h1, draw_off=q)
    # the system needs a line: one from a constant-level reservoir elsewhere on the site
    system = transient_system(
        [tank, Reservoir("R", "constant_level", 20.0, 1.0)],
        [Line("L9", "R", "OUT", 50.0, 0.05, friction_factor=0.02)],
        [Receiver("OUT", "open_discharge", 0.0)],
        duration=1e5, stop_when="drained", interval=60.0,
    )
    res = simulate(system)
    assert res.success and res.status == 1, res.message
    assert res.drain_times["T"] == pytest.approx(moved / q, rel=1e-9)
    codes = [(e.code, e.time) for e in res.events if e.element == "T"]
    assert [c for c, _ in codes] == ["tank.drained", "tank.draw_off_stopped"]
    assert codes[0][1] == codes[1][1]
    k = res.tank_ids.index("T")
    for t in (300.0, 600.0, 1200.0):
        h = brentq(lambda x: volume_between(x, h0) - q * t, h1, h0, xtol=1e-13)
        assert np.interp(t, res.t, res.levels[k]) == pytest.approx(h, abs=1e-9)
    assert res.draw_offs[k, -1] == 0.0  # stopped: the tank is drained
    assert np.all(res.draw_offs[k, :-1] == q)


# ------------------------------------------------------------------ drained and refilled


def test_a_drained_tank_refilled_by_a_scheduled_feed_reopens_its_outlet():
    """Vertical cylinder (D 2 m) drains through the line with no feed; a feed then ramps up
    from 0 at 1500 s to 10 L/s at 1800 s. While drained the outlet is shut, so the tank
    fills by the integral of the feed alone: it reaches its restart level 0.4 m (from the
    drained level 0.1 m) when A (0.4 - 0.1) = integral of the feed, solved here in closed
    form. Then the outlet reopens from rest and the level settles where Q(h) = 10 L/s
    (brentq on the steady line equation)."""
    d_tank, drop, h_min, h_restart, q_f = 2.0, 1.0, 0.1, 0.4, 10e-3
    t1, t2 = 1500.0, 1800.0
    tank = Reservoir("T", "tank", 10.0, 2.0, shape=TankShape("vertical_cylinder", diameter=d_tank),
                     min_level=h_min, restart_level=h_restart,
                     inflow_schedule=FlowSchedule((0.0, t1, t2), (0.0, 0.0, q_f)))
    system = transient_system([tank], [_outlet()], [Receiver("OUT", "open_discharge", 10.0 - drop)],
                              duration=25000.0, interval=20.0)
    res = simulate(system)
    assert res.success, res.message
    events = [(e.code, e.time) for e in res.events if e.code.startswith("tank.")]
    assert [c for c, _ in events] == ["tank.drained", "tank.refilled"]
    t_drain, t_refill = events[0][1], events[1][1]
    assert t_drain < t1
    # refill: q_f (t - t1)^2 / (2 (t2 - t1)) = A (h_restart - h_min), within the ramp
    need = circle_area(d_tank) * (h_restart - h_min)
    ramp = q_f * (t2 - t1) / 2
    if need <= ramp:
        expected = t1 + math.sqrt(2 * need * (t2 - t1) / q_f)
    else:
        expected = t2 + (need - ramp) / q_f
    assert t_refill == pytest.approx(expected, rel=1e-9)
    q = res.flows[0]
    shut = (res.t > t_drain) & (res.t <= t_refill)
    assert shut.any() and np.all(q[shut] == 0.0)
    assert np.all(q[res.t > t_refill + 1.0] > 0.0)
    h_eq = brentq(lambda h: _q_line(h, drop) - q_f, 0.0, 10.0, xtol=1e-14)
    assert res.levels[0, -1] == pytest.approx(h_eq, rel=1e-3)
    assert res.end_states["T"] == "steady"
    assert res.drain_times["T"] == t_drain


def test_a_draw_off_larger_than_the_feed_cycles_and_says_so():
    # Feed 2 L/s, draw-off 5 L/s, no lines of its own: the tank empties, stops the draw-off,
    # refills by the feed alone to its restart level and starts again. Each refill takes
    # A (h_restart - h_min)/Q_in and each draw-down A (h_restart - h_min)/(Q_draw - Q_in)
    # (mass balance, closed form).
    at, h_min, h_restart, q_in, q_dr = 2.0, 0.2, 0.5, 2e-3, 5e-3
    tank = Reservoir("T", "tank", 5.0, 0.5, shape=TankShape("rectangular", length=1.0, width=at),
                     height=2.0, min_level=h_min, restart_level=h_restart, inflow=q_in,
                     draw_off=q_dr)
    system = transient_system(
        [tank, Reservoir("R", "constant_level", 20.0, 1.0)],
        [Line("L9", "R", "OUT", 50.0, 0.05, friction_factor=0.02)],
        [Receiver("OUT", "open_discharge", 0.0)], duration=2000.0, interval=10.0,
    )
    res = simulate(system)
    assert res.success, res.message
    band = at * (h_restart - h_min)
    drained = [e.time for e in res.events if e.code == "tank.drained"]
    refilled = [e.time for e in res.events if e.code == "tank.refilled"]
    assert drained[0] == pytest.approx(band / (q_dr - q_in), rel=1e-9)
    assert refilled[0] - drained[0] == pytest.approx(band / q_in, rel=1e-9)
    assert drained[1] - refilled[0] == pytest.approx(band / (q_dr - q_in), rel=1e-9)
    assert any(w.code == "tank.cycling" for w in res.warnings)


def test_a_tank_without_feed_or_draw_off_is_not_flagged_as_cycling_or_fed():
    # A plain drain (common practice: nothing new should appear): one drain, no cycling.
    tank = Reservoir("T", "tank", 10.0, 1.0, shape=TankShape("vertical_cylinder", diameter=1.0))
    system = transient_system([tank], [_outlet()], [Receiver("OUT", "open_discharge", 9.0)],
                              duration=1e5, stop_when="drained")
    res = simulate(system)
    assert res.status == 1
    assert not any(w.code == "tank.cycling" for w in res.warnings)
    assert np.all(res.feeds == 0.0) and np.all(res.draw_offs == 0.0)
