"""The parts of the rigid-column package, one module at a time, against closed forms.

Each check names its source: Newton's second law on a rigid column (``I dQ/dt = rho g
Delta H``, e.g. Wylie & Streeter, Fluid Transients, ch. 1, from memory), hydrostatics, the
rigid-column impulse at a junction (derived in the test's docstring), or a finite
difference of the right-hand side.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.core.builders import WATER, circle_area
from workbench.core.model import (
    G,
    Junction,
    Line,
    Receiver,
    Reservoir,
    SimulationSettings,
    System,
    TankShape,
)
from workbench.core.transient import events as ev
from workbench.core.transient import handlers
from workbench.core.transient.assembly import rest_of_line_k
from workbench.core.transient.end_states import end_states
from workbench.core.transient.equations import Equations
from workbench.core.transient.loop import Run
from workbench.core.transient.model import Configuration, TransientModel
from workbench.core.transient.options import MAX_OUTPUT_POINTS, resolve_options
from workbench.core.transient.recording import Recording
from workbench.core.transient.state import RunState
from workbench.core.transient.submergence import submergence


def _tank_drain(level=2.0, duration=100.0, out_z=0.0):
    tank = Reservoir("T", "tank", 5.0, level, shape=TankShape("vertical_cylinder", diameter=1.0),
                     height=4.0)
    return System(
        "t", WATER, {"T": tank}, {}, {"OUT": Receiver("OUT", "open_discharge", out_z)},
        {"L1": Line("L1", "T", "OUT", 20.0, 0.05, friction_factor=0.02)},
        simulation=SimulationSettings(duration, "at_rest", None, None))


def _junction_system():
    """Reservoir R -> junction J -> two open discharges, lines of different inertance."""
    return System(
        "j", WATER, {"R": Reservoir("R", "constant_level", 0.0, 10.0)},
        {"J": Junction("J", 0.0)},
        {"A": Receiver("A", "open_discharge", 0.0), "B": Receiver("B", "open_discharge", 0.0)},
        {"L0": Line("L0", "R", "J", 50.0, 0.10, friction_factor=0.02),
         "LA": Line("LA", "J", "A", 30.0, 0.08, friction_factor=0.02),
         "LB": Line("LB", "J", "B", 90.0, 0.05, friction_factor=0.02)},
        simulation=SimulationSettings(10.0, "at_rest", None, None))


def _equations(system):
    model = TransientModel(system)
    state = RunState.empty(model.nl, model.nt)
    eq = Equations(model, state)
    eq.reset(Configuration(model, np.ones(model.nl, bool), state.spilling),
             np.zeros(model.nl, bool))
    return model, state, eq


# ------------------------------------------------------------------ model


def test_stopping_one_line_at_a_junction_redistributes_flow_by_inertance():
    """Rigid-column impulse at a junction: stopping line LB at once gives each line at J
    the change dQ_i = -a_i/sum(a) * (sum of the stopped imbalance), a = gA/L, so that
    continuity holds after the instant (momentum over an instant; derived from
    I_i dQ_i = rho g dH_J with sum dQ_i = -imbalance)."""
    model = TransientModel(_junction_system())
    ids = list(model.topo.line_ids)
    open_lines = np.array([lid != "LB" for lid in ids])
    cfg = Configuration(model, open_lines, np.zeros(0, bool))
    q = np.array([{"L0": 0.03, "LA": 0.02, "LB": 0.0}[lid] for lid in ids])
    q2 = cfg.project(q)
    a = {lid: G * circle_area(d) / ln for lid, ln, d in (("L0", 50.0, 0.10), ("LA", 30.0, 0.08))}
    # imbalance into J: +0.03 (in) - 0.02 (out) = 0.01 must leave: L0 slows, LA speeds up
    total = a["L0"] + a["LA"]
    assert q2[ids.index("L0")] == pytest.approx(0.03 - 0.01 * a["L0"] / total, rel=1e-12)
    assert q2[ids.index("LA")] == pytest.approx(0.02 + 0.01 * a["LA"] / total, rel=1e-12)


# ------------------------------------------------------------------ equations


def test_a_column_at_rest_accelerates_by_newtons_second_law():
    """A line at rest under a head difference dH: dQ/dt = g A dH / L (rigid column)."""
    model, _, eq = _equations(_tank_drain(level=2.0))
    y = np.array([0.0, circle_area(1.0) * 2.0])
    dq = eq.rhs(0.0, y)[0]
    assert dq == pytest.approx(G * circle_area(0.05) * (5.0 + 2.0) / 20.0, rel=1e-12)


def test_the_analytic_jacobian_matches_a_finite_difference_of_the_right_hand_side():
    """Central differences of rhs (second-order, step 1e-6 relative) agree with jac."""
    model, _, eq = _equations(_junction_system())
    y = np.array([0.02, 0.012, 0.006])
    jac = eq.jac(0.0, y)
    fd = np.zeros_like(jac)
    for j in range(len(y)):
        h = 1e-6 * max(abs(y[j]), 1e-3)
        yp, ym = y.copy(), y.copy()
        yp[j] += h
        ym[j] -= h
        fd[:, j] = (eq.rhs(0.0, yp) - eq.rhs(0.0, ym)) / (2 * h)
    assert np.allclose(jac, fd, rtol=1e-5, atol=1e-9 * np.max(np.abs(jac)))


# ------------------------------------------------------------------ recording


def test_a_column_at_rest_shows_hydrostatic_pressure_at_its_ends():
    """At rest the pressure at the tank end of the outlet is rho g h (hydrostatics; the
    inlet end is at the tank bottom) and zero gauge at the open discharge."""
    model, state, eq = _equations(_tank_drain(level=2.0))
    rec = Recording(model)
    rec.track(eq, 0.0, np.array([0.0, circle_area(1.0) * 2.0]), np.zeros(1))
    assert rec.p_max[0] == pytest.approx(WATER.density * G * 2.0, rel=1e-12)
    assert rec.p_max[-1] == pytest.approx(0.0, abs=1e-9)


# ------------------------------------------------------------------ events


def test_a_drain_event_is_located_where_the_volume_meets_the_drained_volume():
    """brentq on a linear dense output V(t) = V0 - Q t finds V = V_min at (V0 - V_min)/Q."""
    model, state, eq = _equations(_tank_drain(level=2.0))
    events = ev.arm(eq)
    v0, q = circle_area(1.0) * 2.0, 0.01

    def sol(t):
        t = np.asarray(t, float)
        return np.array([np.full_like(t, q), v0 - q * t])

    found = ev.find_events(eq, events, sol, 0.0, sol(0.0), 200.0, sol(200.0))
    drains = [(te, k) for te, k in found if events.kind_of[k] == ev.DRAIN]
    assert drains and drains[0][0] == pytest.approx(v0 / q, rel=1e-12)


# ------------------------------------------------------------------ handlers


def test_a_drained_tank_holds_its_outlet_and_a_refill_releases_it():
    """The model's rule (module docstring): outlets of a drained tank stop; they open again
    at the restart level (common practice, no source)."""
    model, state, _ = _equations(_tank_drain(level=2.0))
    handlers.drain(model, state, 0, 12.0, np.array([0.01, 0.0]))
    assert state.blocked.tolist() == [True] and state.drain_times == {"T": 12.0}
    handlers.refill(model, state, 0, 30.0)
    assert state.blocked.tolist() == [False]
    assert [e.code for e in state.events] == ["tank.drained", "tank.refilled"]


# ------------------------------------------------------------------ loop, options


def test_a_run_starting_steady_starts_from_the_steady_flow_of_the_closed_form():
    """Steady flow of a tank draining through one line to air:
    Q = A sqrt(2 g dH / (1 + K_ent + f L/D)) (energy equation, fixed friction factor)."""
    system = _tank_drain(level=2.0)
    model = TransientModel(system)
    options, _ = resolve_options(system, duration=10.0, method="Radau", rtol=1e-6, atol=None,
                                 output_interval=None, initial_state="steady",
                                 stop_when=None)
    y0 = Run(model, options, RunState.empty(model.nl, model.nt)).initial()
    q = circle_area(0.05) * math.sqrt(2 * G * 7.0 / (1.0 + 0.5 + 0.02 * 20.0 / 0.05))
    assert y0[0] == pytest.approx(q, rel=1e-6)


def test_an_output_interval_too_fine_is_widened_with_a_note():
    """The series stay below MAX_OUTPUT_POINTS (a limit of this program)."""
    system = _tank_drain()
    options, notes = resolve_options(system, duration=1e6, method="Radau", rtol=1e-6,
                                     atol=None, output_interval=1e-3, initial_state=None,
                                     stop_when=None)
    assert options.output_interval == pytest.approx(1e6 / MAX_OUTPUT_POINTS)
    assert [n.code for n in notes] == ["simulation.output_interval"]


# ------------------------------------------------------------------ assembly, post


def test_the_rest_of_line_k_is_the_friction_entrance_and_exit_coefficients():
    """K = f L/D + K_entrance + K_exit (1 at turbulent flow), no valve (Darcy-Weisbach)."""
    model, state, _ = _equations(_tank_drain())
    state.q_peak = np.array([0.01])

    class _R:  # what rest_of_line_k reads of a run
        pass

    run = _R()
    run.state = state
    assert rest_of_line_k(model, 0, run) == pytest.approx(0.02 * 20.0 / 0.05 + 0.5 + 1.0,
                                                          rel=1e-9)


def test_submergence_is_lost_where_the_level_crosses_the_vortex_rule():
    """S = D(1 + 2.3 Fr) (the steady check's rule); a level falling linearly crosses it at
    the time interpolated linearly between output times."""
    model = TransientModel(_tank_drain())
    q = 0.004
    fr = q / circle_area(0.05) / math.sqrt(G * 0.05)
    s = 0.05 * (1.0 + 2.3 * fr)
    t = np.linspace(0.0, 100.0, 101)
    levels = (2.0 * s - 2.0 * s * t / 100.0)[None, :]
    events, findings = submergence(model, t, np.full((1, t.size), q), levels)
    assert [e.code for e in events] == ["outlet.submergence"]
    assert events[0].time == pytest.approx(50.0, rel=1e-9)
    assert findings[0].element == "L1"


@pytest.mark.parametrize(("q", "feed", "word"), [
    (0.01, 0.01, "steady"),  # in equals out (mass balance)
    (0.01, 0.0, "falling"),
    (0.0, 0.005, "rising"),
    (0.0, 0.0, "still"),
])
def test_the_end_state_word_follows_the_tank_balance(q, feed, word):
    """dV/dt = sum Q_in - sum Q_out + feed - draw (volume balance)."""
    model = TransientModel(_tank_drain())
    state = RunState.empty(model.nl, model.nt)
    ys = np.array([[q], [1.0]])
    rates, states = end_states(model, state, ys, np.array([[feed]]), np.array([[0.0]]))
    assert states["T"] == word
    assert rates["T"] == pytest.approx(feed - q, abs=1e-15)


def test_the_jacobian_with_a_gas_space_matches_a_finite_difference():
    """Central differences of rhs agree with jac for a tank with a 20 mm vent under 300 Pa
    of vacuum and a sealed one (the gas rows and the tank columns with dp/dV, dp/dX)."""
    from workbench.core.model import Vent
    from workbench.core.vent import bore_effective_area

    for vent in (Vent(bore_effective_area(0.02, 1.5)), Vent(0.0)):
        tank = Reservoir("T", "tank", 5.0, 2.0, shape=TankShape("vertical_cylinder", diameter=1.0),
                         height=4.0, vent=vent)
        system = System(
            "g", WATER, {"T": tank}, {}, {"OUT": Receiver("OUT", "open_discharge", 0.0)},
            {"L1": Line("L1", "T", "OUT", 20.0, 0.05, friction_factor=0.02)},
            simulation=SimulationSettings(10.0, "at_rest", None, None))
        model, _, eq = _equations(system)
        v = circle_area(1.0) * 2.0
        x = float(model.gas.excess(np.array([v]), np.array([-300.0]))[0])
        y = np.array([0.01, v, x])
        jac = eq.jac(0.0, y)
        fd = np.zeros_like(jac)
        for j, h in enumerate((1e-7, 1e-7, 1e-9)):
            yp, ym = y.copy(), y.copy()
            yp[j] += h
            ym[j] -= h
            fd[:, j] = (eq.rhs(0.0, yp) - eq.rhs(0.0, ym)) / (2 * h)
        assert np.allclose(jac, fd, rtol=1e-4, atol=1e-6 * np.abs(jac).max())


@pytest.mark.parametrize("seconds, words", [
    (42.1, "42.1 s"), (1452.27, "24 min 12 s"), (7260.0, "2 h 01 min"), (5.0, "5 s")])
def test_a_time_span_reads_in_seconds_minutes_or_hours_by_its_size(seconds, words):
    """How an operator reads a stopwatch (common practice, no source)."""
    from workbench.core.finding_text import duration_text

    assert duration_text(seconds) == words


def test_a_run_that_drains_every_tank_says_when_in_minutes_not_raw_seconds():
    """The run's closing message names the end time as the events do (not ``t = 1452.27 s``);
    the time is the run's own last output time."""
    from workbench.core.finding_text import duration_text
    from workbench.core.transient import simulate

    result = simulate(_tank_drain(level=2.0, duration=3600.0), stop_when="drained")
    assert result.status == 1
    assert result.message == f"every draining tank drained by {duration_text(result.t[-1])}"
    assert "t =" not in result.message
