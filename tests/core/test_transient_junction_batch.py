"""Junction pressures in time kept a step at a time: the same numbers as state by state.

Reference: the per-time evaluation, :meth:`Equations.heads` at each output time (the
module docstring of ``workbench.core.transient.junctions``: ``H_J = -W G`` column by
column). The run keeps the output times of a step together (:meth:`Equations.heads_many`,
one product, or one factorised solve, over a matrix of right-hand sides); both must give
the same series to round-off, on a system whose heads move with every part of the state
and time: a vented tank (gas pressure in the state), a fed tank (feed schedule), a valve
closing on a schedule (openings in time, then a shut line: a new configuration), two
junctions, laminar and turbulent lines. The system is our own invention.
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.core.builders import WATER, transient_system
from workbench.core.model import (
    FlowSchedule,
    Junction,
    Line,
    Receiver,
    Reservoir,
    TankShape,
    Valve,
    ValveSchedule,
    Vent,
)
from workbench.core.transient import equations, model, simulate
from workbench.core.vent import bore_effective_area


def _network():
    """Vented tank T and fed tank F into junction J1; J1 to an outlet through a valve that
    closes from 60 s to 240 s, and on to J2, which a thin (laminar) and a wide line
    leave."""
    vented = Reservoir("T", "tank", 4.0, 2.5, shape=TankShape("vertical_cylinder", diameter=1.2),
                       height=3.0, vent=Vent(bore_effective_area(0.006, 1.5)))
    fed = Reservoir("F", "tank", 5.0, 1.0, shape=TankShape("vertical_cylinder", diameter=0.8),
                    inflow_schedule=FlowSchedule((0.0, 100.0, 200.0), (0.0, 0.004, 0.001)))
    closing = Valve("equal_percentage", 0.3, schedule=ValveSchedule((0.0, 60.0, 240.0),
                                                                     (1.0, 1.0, 0.0)))
    lines = [Line("L1", "T", "J1", 12.0, 0.05), Line("L2", "F", "J1", 8.0, 0.04),
             Line("L3", "J1", "O1", 20.0, 0.04, valve=closing),
             Line("L4", "J1", "J2", 15.0, 0.05),
             Line("L5", "J2", "O2", 30.0, 0.004), Line("L6", "J2", "O3", 25.0, 0.032)]
    outlets = [Receiver("O1", "open_discharge", 0.0), Receiver("O2", "open_discharge", 1.0),
               Receiver("O3", "open_discharge", -0.5)]
    return transient_system([vented, fed], lines, outlets,
                            [Junction("J1", 2.0), Junction("J2", 1.5)], fluid=WATER,
                            duration=400.0, interval=0.5)


def _state_by_state(self, ts, ys):
    """The reference: :meth:`Equations.heads` at each output time alone."""
    return np.column_stack([self.heads(float(t), ys[:, k]) for k, t in enumerate(ts)])


@pytest.mark.parametrize("sparse", [False, True], ids=["dense", "sparse"])
def test_junction_pressures_kept_a_step_at_a_time_equal_the_state_by_state_ones(
        sparse, monkeypatch):
    if sparse:  # the sparse factors of a large system, on this small one
        monkeypatch.setattr(model, "SPARSE_LINES", 1)
    batched = simulate(_network(), junction_pressures=True)
    monkeypatch.setattr(equations.Equations, "heads_many", _state_by_state)
    reference = simulate(_network(), junction_pressures=True)
    assert batched.success and reference.success, (batched.message, reference.message)
    assert batched.junction_ids == reference.junction_ids == ("J1", "J2")
    np.testing.assert_array_equal(batched.t, reference.t)
    assert batched.junction_pressures.shape == (2, batched.t.size)
    p, p_ref = batched.junction_pressures, reference.junction_pressures
    scale = np.max(np.abs(p_ref))
    assert np.max(np.abs(p - p_ref)) / scale < 1e-10
    # the run really moves every part: the vent's gas pressure, the valve shut at 240 s
    assert np.ptp(batched.gas_pressures[0]) > 10.0
    shut = batched.t > 241.0
    assert np.all(batched.flows[2, shut] == 0.0) and np.ptp(p[0]) > 1e3
