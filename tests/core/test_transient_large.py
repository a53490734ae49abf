"""Large systems in the rigid-column transient: thousands of lines with sparse matrices.

References: the start-up of flow in a pipe from rest under a constant head, a closed form of
the rigid-column equation ``L dv/dt = g H - K_t v^2/2`` (derived in the test's docstring);
the dense path of the package (pseudo-inverse, dense Jacobian), itself checked against
closed forms in ``test_transient_parts.py``; and a central finite difference of the
right-hand side for the Jacobian.
"""

from __future__ import annotations

import math
import time

import numpy as np
import pytest

from tests.core.builders import WATER
from workbench.core.model import (
    G,
    Junction,
    Line,
    Receiver,
    Reservoir,
    SimulationSettings,
    System,
    TankShape,
    Valve,
    ValveSchedule,
    Vent,
)
from workbench.core.transient import model as model_module
from workbench.core.transient import simulate
from workbench.core.transient.equations import Equations
from workbench.core.transient.model import TransientModel
from workbench.core.transient.state import RunState


def test_two_thousand_parallel_lines_start_up_as_the_closed_form_of_one_column():
    """2,000 lines from a constant-level reservoir (10 m) to open discharges, 50-69 m long,
    50 mm, f = 0.02, starting from rest. Each is one rigid column:
    ``L dv/dt = g H - K_t v^2/2`` with ``K_t = f L/D + 0.5 + 1`` (sharp entrance, one
    velocity head at the exit), so ``v = v_inf tanh(t/T)``, ``v_inf = sqrt(2 g H/K_t)``,
    ``T = 2 L/(K_t v_inf)`` (separation of variables). The run keeps its matrices sparse:
    the Jacobian holds about one entry per line, and the run's CPU time stays far below what
    the dense 2,000 x 2,000 complex factorisations took (generous bound: 120 s)."""
    n, head, d, f = 2000, 10.0, 0.05, 0.02
    lengths = 50.0 + (np.arange(n) % 20)
    lines = {f"L{i}": Line(f"L{i}", "R", "OUT", float(lengths[i]), d, friction_factor=f)
             for i in range(n)}
    system = System("many", WATER, {"R": Reservoir("R", "constant_level", 0.0, head)}, {},
                    {"OUT": Receiver("OUT", "open_discharge", 0.0)}, lines,
                    simulation=SimulationSettings(20.0, "at_rest", None, 1.0))
    model = TransientModel(system)
    assert model.sparse
    eq = Equations(model, RunState.empty(model.nl, model.nt))
    eq.reset(model.configuration(np.ones(n, bool), np.zeros(0, bool)), np.zeros(n, bool))
    jac = eq.jac(0.0, np.full(n, 1e-3))
    assert hasattr(jac, "tocsc") and jac.nnz <= n
    cpu = time.process_time()
    res = simulate(system)
    cpu = time.process_time() - cpu
    assert res.success, res.message
    area = math.pi * d * d / 4.0
    k_t = f * lengths / d + 1.5
    v_inf = np.sqrt(2.0 * G * head / k_t)
    tau = 2.0 * lengths / (k_t * v_inf)
    for j in (2, 5, 10, 20):
        t = res.t[j]
        v = res.flows[:, j] / area
        assert np.allclose(v, v_inf * np.tanh(t / tau), rtol=2e-4)
    assert cpu < 120.0


def _network(n_extra: int = 0) -> System:
    """Two tanks (one vented) into a header J1, on to a third tank that drains to a sump;
    a branch T1 -> J2 -> J3 -> SUMP whose two valves shut at 100 s, leaving J2 and J3 joined
    only by L8 (a group of junctions with no open path to a fixed head); ``n_extra``
    parallel lines T3 -> SUMP."""
    vent = Vent(0.02 ** 2 * math.pi / 4.0 * 0.6)
    shut = ValveSchedule((0.0, 90.0, 100.0), (1.0, 1.0, 0.0))
    tanks = [
        Reservoir("T1", "tank", 24.0, 3.5, shape=TankShape("vertical_cylinder", diameter=3.0),
                  height=5.0),
        Reservoir("T2", "tank", 22.0, 2.0, shape=TankShape("vertical_cylinder", diameter=2.0),
                  height=4.0, vent=vent),
        Reservoir("T3", "tank", 8.0, 1.0, shape=TankShape("vertical_cylinder", diameter=1.0),
                  height=1.3, min_level=0.2),
    ]
    lines = [
        Line("L1", "T1", "J1", 35.0, 0.0266, friction_factor=0.025),
        Line("L2", "T2", "J1", 60.0, 0.0266, friction_factor=0.025),
        Line("L3", "J1", "T3", 120.0, 0.0409, friction_factor=0.022),
        Line("L4", "T3", "SUMP", 80.0, 0.0266, friction_factor=0.025),
        Line("L6", "T1", "J2", 30.0, 0.02, friction_factor=0.025,
             valve=Valve("linear", 0.5, schedule=shut, position="from")),
        Line("L8", "J2", "J3", 20.0, 0.02, friction_factor=0.025),
        Line("L7", "J3", "SUMP", 40.0, 0.02, friction_factor=0.025,
             valve=Valve("linear", 0.5, schedule=shut)),
    ]
    lines += [Line(f"P{i}", "T3", "SUMP", 90.0 + i, 0.01, friction_factor=0.03)
              for i in range(n_extra)]
    return System("net", WATER, {r.id: r for r in tanks},
                  {"J1": Junction("J1", 12.0), "J2": Junction("J2", 15.0),
                   "J3": Junction("J3", 10.0)},
                  {"SUMP": Receiver("SUMP", "open_discharge", 0.5)},
                  {ln.id: ln for ln in lines},
                  simulation=SimulationSettings(600.0, "steady", None, 5.0))


def test_the_sparse_matrices_give_the_dense_results_on_a_network_with_junctions_and_vents(
        monkeypatch):
    """The same network run with dense and with sparse matrices (forced from one line):
    flows, levels, gas pressures, events and the volume totals agree to the integration's
    round-off, through valves shutting (a junction group left with no open path to a fixed
    head: the pseudo-inverse's case), a vented tank and a tank that overflows."""
    system = _network(n_extra=3)
    dense = simulate(system)
    monkeypatch.setattr(model_module, "SPARSE_LINES", 1)
    assert TransientModel(system).sparse
    sparse = simulate(system)
    assert dense.success and sparse.success, (dense.message, sparse.message)
    assert [(e.code, e.element) for e in dense.events] == [
        (e.code, e.element) for e in sparse.events]
    assert np.allclose([e.time for e in dense.events], [e.time for e in sparse.events],
                       rtol=1e-6)
    assert dense.t.shape == sparse.t.shape
    scale = np.max(np.abs(dense.flows))
    assert np.allclose(dense.flows, sparse.flows, rtol=1e-6, atol=1e-6 * scale)
    assert np.allclose(dense.levels, sparse.levels, rtol=1e-7, atol=1e-7)
    assert np.allclose(dense.gas_pressures, sparse.gas_pressures, rtol=1e-6, atol=1e-3)
    assert np.allclose(dense.spill_volumes, sparse.spill_volumes, rtol=1e-6, atol=1e-9)
    assert any(e.code == "tank.overflow" for e in sparse.events)
    for lid in dense.max_pressure:
        assert sparse.max_pressure[lid] == pytest.approx(dense.max_pressure[lid], rel=1e-6)


@pytest.mark.parametrize("sparse_path", [False, True])
def test_the_jacobian_matches_a_finite_difference_with_junctions_gas_and_a_spilling_tank(
        monkeypatch, sparse_path):
    """Central differences of the right-hand side agree with the analytic Jacobian, dense
    and sparse, over the lines, tanks, the vented tank's gas space and the volume
    accumulators, with tank T3 spilling."""
    if sparse_path:
        monkeypatch.setattr(model_module, "SPARSE_LINES", 1)
    system = _network()
    model = TransientModel(system)
    assert model.sparse == sparse_path
    state = RunState.empty(model.nl, model.nt)
    spilling = np.array([tid == "T3" for tid in model.tank_ids])
    eq = Equations(model, state)
    eq.reset(model.configuration(np.ones(model.nl, bool), spilling), np.zeros(model.nl, bool))
    y = np.zeros(model.n_state)
    y[:model.nl] = np.linspace(2e-3, 4e-3, model.nl)
    y[model.nl:model.nl + model.nt] = [g.volume(r.level) for g, r in
                                       zip(model.geoms, model.tanks)]
    v = y[model.nl:model.nl + model.nt]
    y[model.nl + model.nt:model.ne] = model.gas.excess(v, np.array([-300.0]))
    jac = eq.jac(0.0, y)
    jac = jac.toarray() if sparse_path else jac
    fd = np.zeros_like(jac)
    for j in range(model.n_state):
        h = 1e-7 * max(abs(y[j]), 1e-3)
        yp, ym = y.copy(), y.copy()
        yp[j] += h
        ym[j] -= h
        fd[:, j] = (eq.rhs(0.0, yp) - eq.rhs(0.0, ym)) / (2 * h)
    assert np.allclose(jac, fd, rtol=1e-4, atol=1e-6 * np.abs(jac).max())
    ne, nt = model.ne, model.nt
    assert np.any(jac[ne + nt:, :model.nl] != 0.0)  # the spill accumulator of T3


def test_a_header_joining_too_many_lines_is_refused_with_the_reason(monkeypatch):
    """Lines meeting at one junction couple every pair in the model's matrices: past the
    limit the run is refused with the count and what to do, not a memory error."""
    from workbench.core.transient import sparse

    monkeypatch.setattr(model_module, "SPARSE_LINES", 1)
    monkeypatch.setattr(sparse, "MAX_COUPLED_ENTRIES", 100)
    system = _network(n_extra=0)
    lines = dict(system.lines)
    for i in range(12):
        lines[f"H{i}"] = Line(f"H{i}", "T1", "J1", 40.0, 0.02, friction_factor=0.025)
    from dataclasses import replace

    with pytest.raises(ValueError, match="lines meet at one junction"):
        simulate(replace(system, lines=lines))


def test_lsoda_is_refused_for_more_lines_than_its_dense_jacobian_allows(monkeypatch):
    """LSODA (ODEPACK) keeps a dense Jacobian: past its line limit the run says to choose a
    sparse method."""
    import workbench.core.transient as transient

    monkeypatch.setattr(transient, "LSODA_LINES", 5)
    with pytest.raises(ValueError, match="choose Radau or BDF"):
        simulate(_network(n_extra=3), method="LSODA")
