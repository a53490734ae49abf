"""The volume totals of a run (feed, draw-off, lines, spill) against closed forms and the
volume balance, over every state a tank can reach: filling, spilling, spill end, draining,
drained and refilled, with the tank cycling faster than the output interval.

References: the mass balance of an incompressible liquid in a tank,
``V(t) - V(0) = integral of (lines in + feed - draw-off - spill) dt`` (conservation of
mass), integrated in closed form for piecewise-linear schedules; nothing from the project's
code.
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.core.builders import WATER
from workbench.core.model import (
    FlowSchedule,
    Line,
    Receiver,
    Reservoir,
    SimulationSettings,
    System,
    TankShape,
    Valve,
)
from workbench.core.transient import simulate


def _balance_residual(res, k: int) -> tuple[float, float]:
    """``V_end - V_0 - (lines + fed - drawn - spilled)`` of tank ``k`` [m^3] and the volume
    that moved through it [m^3] (the scale of the round-off)."""
    change = float(res.volumes[k, -1] - res.volumes[k, 0])
    moved = (res.line_volumes[k] + res.feed_volumes[k] - res.draw_off_volumes[k]
             - res.spill_volumes[k])
    through = (abs(res.line_volumes[k]) + res.feed_volumes[k] + res.draw_off_volumes[k]
               + res.spill_volumes[k] + abs(res.volumes[k, 0]))
    return change - float(moved), float(through)


def test_a_fed_tank_spills_the_closed_form_volume_then_drains_and_cycles_between_samples():
    """Shut outlet; rectangular tank of 2 m^2, overflow at 2 m, from 1.9 m; draw-off 5 L/s;
    feed 8 L/s to t = 200 s, then down a straight ramp to 1 L/s at t = 210 s.

    Closed form (mass balance): the tank fills at 3 L/s and reaches its overflow at
    t_o = 0.2 m^3 / 3 L/s = 66.67 s; it spills 3 L/s to t = 200 s, then f(t) - d on the
    ramp until the feed equals the draw-off at t_e = 200 + 3/0.7 s, so the spill is
    ``3e-3 (200 - t_o) + 0.5 * 3e-3 (t_e - 200)`` m^3. Then it drains to its minimum (0.2 m),
    stops the draw-off, refills by the 1 L/s feed to its restart level (0.5 m) in 600 s and
    drains again in 150 s: a cycle of 750 s, shorter than the 1,000 s output interval.
    The feed is ``integral f dt`` in closed form. Every total must close the balance to
    round-off: V_end = V_0 + fed - drawn - spilled (no line flows).
    """
    area, h0, h_over, d = 2.0, 1.9, 2.0, 5e-3
    feed = FlowSchedule((0.0, 200.0, 210.0, 6000.0), (8e-3, 8e-3, 1e-3, 1e-3))
    tank = Reservoir("T", "tank", 10.0, h0, shape=TankShape("rectangular", length=1.0,
                                                            width=area),
                     height=h_over, min_level=0.2, restart_level=0.5, inflow_schedule=feed,
                     draw_off=d)
    system = System(
        "spill", WATER, {"T": tank}, {}, {"OUT": Receiver("OUT", "open_discharge", 0.0)},
        {"L1": Line("L1", "T", "OUT", 2.0, 0.05, friction_factor=0.02,
                    valve=Valve("linear", 0.5, opening=0.0))},
        simulation=SimulationSettings(6000.0, "steady", None, 1000.0))
    res = simulate(system)
    assert res.success, res.message
    t_o = area * (h_over - h0) / (8e-3 - d)
    t_e = 200.0 + (8e-3 - d) / (7e-3 / 10.0)
    spilled = (8e-3 - d) * (200.0 - t_o) + 0.5 * (8e-3 - d) * (t_e - 200.0)
    fed = 8e-3 * 200.0 + 0.5 * (8e-3 + 1e-3) * 10.0 + 1e-3 * (6000.0 - 210.0)
    codes = [e.code for e in res.events]
    assert {"tank.overflow", "tank.spill_end", "tank.drained", "tank.refilled"} <= set(codes)
    assert codes.count("tank.drained") >= 5  # it cycles: about 750 s a cycle
    assert res.spill_volumes[0] == pytest.approx(spilled, rel=1e-9)
    assert res.feed_volumes[0] == pytest.approx(fed, rel=1e-12)
    assert res.line_volumes[0] == pytest.approx(0.0, abs=1e-12)
    residual, through = _balance_residual(res, 0)
    assert abs(residual) <= 1e-12 * through


def _cycling_pair(interval: float) -> System:
    """T1 (1 m^2, overflow at 1 m, minimum 0.1 m, restart 0.3 m) fed in pulses every 61 s
    (falling from 60 to 30 L/s over 20 s, then none for 40 s), with a 2 L/s draw-off, drains through L1 into T2 (0.5 m^2, overflow at
    0.8 m), which drains through L2 to an open outlet: T1 overflows, stops spilling, drains,
    stands drained and refills over and over; T2 overflows and stops spilling with every
    pulse."""
    times, flows, t = [0.0], [60e-3], 0.0
    while t < 1200.0:
        times += [t + 20.0, t + 21.0, t + 60.0, t + 61.0]
        flows += [30e-3, 0.0, 0.0, 60e-3]
        t += 61.0
    t1 = Reservoir("T1", "tank", 3.0, 0.5, shape=TankShape("rectangular", length=1.0, width=1.0),
                   height=1.0, min_level=0.1, restart_level=0.3,
                   inflow_schedule=FlowSchedule(tuple(times), tuple(flows)), draw_off=2e-3)
    t2 = Reservoir("T2", "tank", 0.0, 0.3, shape=TankShape("rectangular", length=1.0, width=0.5),
                   height=0.8, min_level=0.05)
    lines = [Line("L1", "T1", "T2", 20.0, 0.08, friction_factor=0.02),
             Line("L2", "T2", "OUT", 10.0, 0.04, friction_factor=0.02)]
    return System("pair", WATER, {"T1": t1, "T2": t2}, {},
                  {"OUT": Receiver("OUT", "open_discharge", -0.5)},
                  {ln.id: ln for ln in lines},
                  simulation=SimulationSettings(1200.0, "steady", None, interval))


def test_the_volume_balance_closes_to_round_off_in_every_state_of_two_cycling_tanks():
    """Conservation of mass per tank, ``V_end = V_0 + lines + fed - drawn - spilled``, to
    round-off (1e-12 of the volume moved) from the run's own totals, although both tanks
    go through dozens of overflows, spill ends, drains and refills between the 300 s output
    samples; and the exact spill agrees with the trapezoidal integral of a run sampled
    every 0.05 s to its sampling error (under 2 %), where the 300 s samples
    miss it by far (the error this total replaces)."""
    coarse = simulate(_cycling_pair(300.0))
    fine = simulate(_cycling_pair(0.05))
    assert coarse.success and fine.success
    events = {(e.code, e.element) for e in coarse.events}
    for code in ("tank.overflow", "tank.spill_end", "tank.drained", "tank.refilled"):
        assert (code, "T1") in events
    assert ("tank.overflow", "T2") in events and ("tank.spill_end", "T2") in events
    drains = sum(1 for e in coarse.events if e.code == "tank.drained")
    assert drains > 1200.0 / 300.0  # more drains than output intervals
    for k in range(2):
        residual, through = _balance_residual(coarse, k)
        assert abs(residual) <= 1e-12 * through, (coarse.tank_ids[k], residual)
        assert coarse.spill_volumes[k] > 0.0
        sampled_fine = float(np.trapezoid(fine.spills[k], fine.t))
        # the trapezoid's error: at most half the jumps times their intervals (the spill
        # jumps at every overflow), as the left and right sums bracket a monotone piece
        bound = 0.5 * float(np.sum(np.abs(np.diff(fine.spills[k])) * np.diff(fine.t)))
        assert abs(coarse.spill_volumes[k] - sampled_fine) <= bound
        assert bound < 0.02 * coarse.spill_volumes[k]
        assert coarse.spill_volumes[k] == pytest.approx(fine.spill_volumes[k], rel=1e-9)
    sampled_coarse = float(np.trapezoid(coarse.spills[1], coarse.t))
    assert abs(sampled_coarse / coarse.spill_volumes[1] - 1.0) > 1e-3
