"""One grade line: solve's profiles and simulate's pressures at t = 0 from a steady start."""

from __future__ import annotations

import numpy as np
import pytest
from steady_cases import three_reservoirs

from workbench.core.network import solve_steady
from workbench.core.transient.loop import Run
from workbench.core.transient.model import TransientModel
from workbench.core.transient.options import resolve_options
from workbench.core.transient.state import RunState


def _station_pressures_after_a_still_run(system, duration=2.0):
    """Gauge pressure envelope per station of a run that starts steady and stays so."""
    options, _ = resolve_options(system, duration=duration, method="Radau", rtol=1e-8,
                                 atol=None, output_interval=None, initial_state="steady",
                                 stop_when=None)
    model = TransientModel(system)
    run = Run(model, options, RunState.empty(model.nl, model.nt), None, None)
    run.execute()
    return model, run.rec.p_min, run.rec.p_max


def test_solve_and_simulate_give_the_same_pressure_at_every_profile_point_at_t0():
    # Both sides evaluate one energy equation (Bernoulli with losses): static head = energy
    # head less alpha v^2/2g of the line's own velocity, at every point, junction ends
    # included. Constant-level reservoirs only, so the steady start stays put and the run's
    # envelope (min = max) is the pressure at t = 0.
    system = three_reservoirs()
    steady = solve_steady(system)
    model, p_min, p_max = _station_pressures_after_a_still_run(system)
    assert np.allclose(p_min, p_max, rtol=0.0, atol=1e-3)  # [Pa]: the run stayed steady
    for i, lid in enumerate(model.topo.line_ids):
        line = system.lines[lid]
        mine = model.st_owner == i
        s_run = model.st_frac[mine] * line.length
        prof = steady.profiles[lid]
        expected = np.interp(s_run, prof.distance, prof.pressure_gauge)
        assert p_min[mine] == pytest.approx(expected, rel=1e-6, abs=1e-2), lid


def test_the_junction_pressure_is_no_higher_than_in_any_line_meeting_there():
    # Energy equation at a junction with no loss of its own: each line's static pressure
    # there is rho g (H - z - alpha v^2/2g); the node reports the lowest of them.
    system = three_reservoirs()
    steady = solve_steady(system)
    p_j = steady.nodes["J1"].pressure
    ends = [steady.profiles[lid].pressure_gauge[-1 if system.lines[lid].to_node == "J1" else 0]
            for lid in ("L1", "L2", "L3")]
    assert p_j == pytest.approx(min(ends), rel=1e-9)
