"""Vapour cavities in the elastic model: the discrete vapour cavity model
(workbench.core.elastic.boundaries; Wylie & Streeter, Fluid Transients in Systems, 1993,
ch. 8; Bergant, Simpson & Tijsseling, J. Fluids Struct. 22, 2006).

Checked against a closed form derived below from the wave relations, against the physical
bounds (head never below the vapour head, no cavity before the first or after the last
event), against exact conservation of liquid volume by the discrete equations, and against
the runs without the cavity model where no cavity forms.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.core.elastic_systems import WATER, closing, reservoir_line
from workbench.core.elastic import simulate_elastic
from workbench.core.model import (
    G,
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


# Water at 20 degC: tests/core/elastic_systems.py. Atmosphere 101325 Pa (ISA sea level).
P_ATM = 101325.0
A_WAVE = 1000.0
LENGTH = 500.0
DIAMETER = 0.3
RESERVOIR_HEAD = 20.0


def vapour_head(z: float) -> float:
    return z + (WATER.vapor_pressure - P_ATM) / (WATER.density * G)


def instant_closure(reaches: int = 50, k_open: float = 1900.0) -> System:
    """Reservoir (head 20 m) -> 500 m frictionless line rising from -10 m to the valve at
    0 m -> valve shutting at once -> free discharge. The line rises towards the valve, so
    the vapour head is highest at the valve: during the first low-pressure phase, whose
    head is uniform along the line, only the valve section can reach it."""
    return reservoir_line(length=LENGTH, diameter=DIAMETER, head=RESERVOIR_HEAD,
                          valve=closing(1e-9, k_open=k_open), reaches=reaches,
                          friction_factor=0.0, entrance_k=0.0,
                          profile=((0.0, -10.0), (LENGTH, 0.0)), name="cavity")


def run(system, duration, **kw):
    return simulate_elastic(system, "L1", wave_speeds={"L1": A_WAVE}, duration=duration, **kw)


def closed_form(v0: float):
    """The cavity at a valve shut at once at the end of a frictionless line.

    Wave relations (Wylie & Streeter 1993, ch. 1 and 8): along C+ ``H + (a/g) v`` and along
    C- ``H - (a/g) v`` are constant; the reservoir holds ``H_R``. With ``D = g (H_R - H_v)/a``:

    * the closure stops the column; the reflection from the reservoir arrives back at the
      valve at ``2L/a`` with ``(H_R, -v0)``. On C+ with ``H = H_v`` the column leaves the
      valve at ``v1 = v0 - D`` (the issue's ``V0 - g(H0 - Hv)/a``); a cavity opens if
      ``v1 > 0``, and grows at ``A v1`` until ``4L/a``: ``V_max = A v1 2L/a``;
    * the wave ``(H_v, -v1)`` reflects at the reservoir (C-: ``v = D - v1``) and returns at
      ``4L/a``; at the valve (C+ to ``H_v``) the liquid now moves towards the valve at
      ``3D - v0``, so the cavity shrinks at ``A (3D - v0)`` and closes at
      ``t_c = 4L/a + (2L/a) (v0 - D)/(3D - v0)`` (when ``v0 < 2D``, within ``[4L/a, 6L/a]``);
    * at collapse the column stops against the shut valve: ``H = H_v + (a/g)(3D - v0)``
      (Joukowsky from the vapour head).
    The entrance loss at the reservoir changes the reflected velocity by ``v0^2/(2a)``
    (a few parts in 10^4 here), within the tolerances below.
    """
    area = math.pi * DIAMETER ** 2 / 4.0
    hv = vapour_head(0.0)
    d = G * (RESERVOIR_HEAD - hv) / A_WAVE
    t_round = 2.0 * LENGTH / A_WAVE
    return {
        "open": t_round,
        "v_max": area * (v0 - d) * t_round,
        "collapse": 2.0 * t_round + t_round * (v0 - d) / (3.0 * d - v0),
        "head_after": hv + A_WAVE / G * (3.0 * d - v0),
        "d": d,
    }


def test_the_valve_cavity_matches_the_wave_relations_closed_form():
    res = run(instant_closure(), duration=3.0)
    area = math.pi * DIAMETER ** 2 / 4.0
    v0 = res.initial_flow / area
    cf = closed_form(v0)
    assert cf["d"] < v0 < 2.0 * cf["d"]  # premise: one cavity cycle within [2L/a, 6L/a]
    dt = res.dt
    vol = res.cavity_volume
    open_steps = np.flatnonzero(vol > 0.0)
    first, last = int(open_steps[0]), int(open_steps[-1])
    # opens at 2L/a (the closure acts in the first step), at the valve
    assert res.time[first] == pytest.approx(cf["open"] + dt, abs=1e-9)
    sep = res.column_separation
    assert sep.line == "L1" and sep.distance == pytest.approx(LENGTH)
    # the only cavity in this first cycle is the valve's: one zone at the valve
    assert [(z.start, z.end) for z in res.cavity_zones] == [(LENGTH, LENGTH)]
    # largest volume at 4L/a, and the closed form within the grid's resolution
    assert vol.max() == pytest.approx(cf["v_max"], rel=0.005)
    assert res.time[int(np.argmax(vol))] == pytest.approx(2 * cf["open"], abs=dt)
    # collapse time within a step, and the head just after it
    assert res.time[last + 1] == pytest.approx(cf["collapse"], abs=1.5 * dt)
    assert res.valve_head[last + 2] == pytest.approx(cf["head_after"], rel=0.005)
    assert res.cavity_zones[0].last_collapse == pytest.approx(cf["collapse"], abs=1.5 * dt)


def test_the_collapse_rise_exceeds_what_the_run_without_cavities_shows_after_separation():
    # Without the cavity model the head after 2L/a falls below the vapour head (impossible);
    # with it the head stays at vapour and the collapse gives the rise of the closed form.
    with_cav = run(instant_closure(), duration=3.0)
    without = run(instant_closure(), duration=3.0, cavities=False)
    hv = vapour_head(0.0)
    assert without.valve_head.min() < hv - 10.0
    assert with_cav.valve_head.min() >= hv - 1e-9
    assert not without.cavity_zones and len(without.cavity_volume) == 0


@pytest.mark.parametrize("case", ["valve", "crest"])
def test_the_head_never_falls_below_the_vapour_head_anywhere(case):
    # Physical bound: a liquid cannot be under tension below its vapour pressure (IAPWS
    # IF97 vapour pressure); the cavity model holds every section at or above it.
    if case == "valve":
        res = run(instant_closure(), duration=12.0)
    else:
        line = Line("L1", "R1", "R2", 600.0, 0.3, roughness=4.5e-5, entrance_k=0.5,
                    profile=((0.0, 0.0), (300.0, 25.0), (600.0, 0.0)),
                    valve=Valve("linear", 30.0, opening=1.0, position="from",
                                schedule=ValveSchedule((0.0, 0.05), (1.0, 0.0))))
        system = System("crest", WATER, {"R1": Reservoir("R1", "constant_level", 0.0, 60.0),
                                          "R2": Reservoir("R2", "constant_level", 0.0, 40.0)},
                        {}, {}, {"L1": line})
        res = run(system, duration=12.0)
    assert res.cavity_zones, "premise: cavities form"
    for lid, env in res.envelopes.items():
        assert np.all(env.min_head >= res.vapour_head[lid] - 1e-9)
        # and the pressures printed from them are never below absolute zero
        assert np.all(env.min_pressure + P_ATM >= WATER.vapor_pressure - 1e-6)


def test_no_cavity_before_the_first_event_nor_after_the_last_collapse():
    # Bookkeeping of the cavity model: the total volume is zero until the first opening
    # and from the last collapse on (a long run: the oscillation decays until every
    # cavity has closed; the frictionless line still rings, within the vapour bound).
    res = run(instant_closure(reaches=20), duration=40.0)
    vol = res.cavity_volume
    zone = res.cavity_zones[0]
    assert zone.last_collapse is not None, "premise: every cavity closes within the run"
    k_first = int(round(zone.first_open / res.dt))
    k_last = int(round(zone.last_collapse / res.dt))
    assert np.all(vol[:k_first] == 0.0) and vol[k_first] > 0.0
    assert np.all(vol[k_last:] == 0.0) and vol[k_last - 1] > 0.0
    assert np.all(vol >= 0.0)


def test_liquid_volume_is_conserved_by_the_discrete_equations_to_round_off():
    """Frictionless line, shut valve downstream, reservoir upstream.

    With a Courant number of one the interior update is ``u_i' = u_{i-1}``,
    ``w_i' = w_{i+1}``, so ``sum(u) + sum(w)`` changes only at the ends: by
    ``u_0' - u_N + w_N' - w_0``. At the shut valve (no flow) ``w_N' = 2H_N - u_N'``, at the
    reservoir ``u_0' = 2H_0 - w_0'``, and a cavity adds ``2 B dV/dt`` to the sum where it
    grows (boundaries module: ``V' = V + dt sum(H - c_j)/B``). The pipe's storage in the
    scheme, ``S = (dt/2B)[sum(u) + sum(w) - w_0 - u_N]``, therefore changes by the
    reservoir's inflow ``dt Q_0 = dt (u_0 - w_0)/(2B)`` plus the growth of the cavities, so
    the liquid ``S - sum(V)`` less the volume that came in is constant. (Derived here from the discrete equations of Wylie & Streeter 1993 ch. 3 and
    the discrete vapour cavity model; exact, so round-off is the tolerance.)
    """
    from workbench.core.elastic.numpy_march import _Stepper
    from workbench.core.elastic.record import MarchOutput
    from workbench.core.elastic.setup import prepare

    system = instant_closure(reaches=20)
    setup = prepare(system, "L1", [system.lines["L1"]], duration=8.0, max_duration=None,
                    reaches=None, friction="initial", tolerance=0.05,
                    speeds={"L1": A_WAVE}, cavities=True)
    plan = setup.plan
    n, dt, b = plan.n, plan.dt, float(plan.b_node[0])
    out = MarchOutput.start(plan)
    st = _Stepper(plan, out)
    x = plan.state0.copy()

    def stored(x):
        u, w = x[:n], x[n:][::-1]
        return dt / (2 * b) * (u.sum() + w.sum() - w[0] - u[-1])

    inflow = 0.0
    start = stored(x)
    worst = 0.0
    for k in range(1, plan.n_steps + 1):
        new = np.empty_like(x)
        st.interior(x, x[::-1], new[1:], x[:-1])
        st.interior_cavities(new, k)
        st.ends(new, k)
        x = new
        inflow += dt * (x[0] - x[2 * n - 1]) / (2 * b)
        balance = stored(x) - out.vol.sum() - inflow - start
        worst = max(worst, abs(balance))
    assert out.events.sum() > 0, "premise: cavities formed and collapsed"
    assert worst <= 1e-12 * max(1.0, abs(start))


def test_where_no_cavity_forms_the_run_is_the_run_without_the_model():
    # Agreement with the single-line checks (test_elastic_surge.py): a 600 m static head
    # holds the downsurge above vapour; the cavity model must change nothing, to the bit.
    line = Line("L1", "R1", "OUT", 600.0, 0.3, friction_factor=0.02, entrance_k=0.0,
                valve=Valve("linear", 4000.0, opening=1.0,
                            schedule=ValveSchedule((0.0, 0.3), (1.0, 0.0))),
                surge=SurgeSettings("elastic", 20))
    system = System("held", WATER, {"R1": Reservoir("R1", "constant_level", 0.0, 600.0)},
                    {}, {"OUT": Receiver("OUT", "open_discharge", 0.0)}, {"L1": line})
    on = run(system, duration=5.0)
    off = run(system, duration=5.0, cavities=False)
    assert on.status == 0 and not on.cavity_zones and on.column_separation is None
    assert np.array_equal(on.valve_head, off.valve_head)
    assert np.array_equal(on.envelopes["L1"].max_head, off.envelopes["L1"].max_head)
    assert float(on.cavity_volume.max()) == 0.0


def test_separation_and_collapse_are_danger_findings_with_both_peaks_and_a_grid_check():
    res = run(instant_closure(), duration=6.0)
    codes = {f.code: f for f in res.findings}
    assert codes["surge.column_separation"].severity == "danger"
    collapse = codes["surge.cavity_collapse"]
    assert collapse.severity == "danger" and "specialist surge study" in collapse.message
    assert "before the column first separated" in collapse.message
    assert res.status == 1 and "not trustworthy" in res.message
    # the grid check repeats the run with twice the reaches and reports both peaks
    gc = res.grid_check
    assert gc is not None and gc.reaches == {"L1": 2 * res.reaches["L1"]}
    assert any("depends on the grid" in note for note in res.notes)
    env = res.envelopes["L1"]
    assert env.max_head_before_separation is not None
    assert env.max_head_before_separation.max() <= env.max_head.max()
