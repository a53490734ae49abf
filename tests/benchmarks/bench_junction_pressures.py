"""Benchmark: junction pressures in time, kept a step at a time against state by state.

Prints the CPU time of one rigid-column run asked for junction pressures (a 6 h laminar
drain through a junction, 1,001 output times, the system of
``tests/core/test_calibration_pressure.py``; and the network of
``tests/core/test_transient_junction_batch.py``: a vented tank, a feed schedule, a valve
closing, two junctions), with the heads kept as the run does (one product per step over a
matrix of right-hand sides) and state by state (``Equations.heads`` at each output time),
with the same run without junction pressures as the floor, and the largest relative
difference between the two series.

Run: ``.venv/bin/python tests/benchmarks/bench_junction_pressures.py``. A script that prints
figures, not a timed test.
"""

from __future__ import annotations

import pathlib
import sys
import time

import numpy as np

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parents[2]))

from tests.core.test_calibration_pressure import _system  # noqa: E402
from tests.core.test_transient_junction_batch import _network, _state_by_state  # noqa: E402
from workbench.core.transient import equations, simulate  # noqa: E402


def _cpu(run, repeat=5):
    """Smallest CPU time of ``repeat`` calls [s], and the last result."""
    best, out = np.inf, None
    for _ in range(repeat):
        t0 = time.process_time()
        out = run()
        best = min(best, time.process_time() - t0)
    return best, out


def main() -> None:
    cases = {"laminar drain, 6 h": lambda jp: simulate(_system(d2=0.031), duration=21600.0,
                                                       stop_when=None, junction_pressures=jp),
             "vented network, 400 s": lambda jp: simulate(_network(), junction_pressures=jp)}
    batched_heads = equations.Equations.heads_many
    for name, run in cases.items():
        run(True)  # warm the imports
        floor, _ = _cpu(lambda: run(False))
        batched, res = _cpu(lambda: run(True))
        equations.Equations.heads_many = _state_by_state
        try:
            by_state, ref = _cpu(lambda: run(True))
        finally:
            equations.Equations.heads_many = batched_heads
        diff = np.max(np.abs(res.junction_pressures - ref.junction_pressures)) / np.max(
            np.abs(ref.junction_pressures))
        print(f"{name}: {res.t.size} output times; CPU without junction pressures "
              f"{floor * 1e3:.0f} ms, kept a step at a time {batched * 1e3:.0f} ms, state by "
              f"state {by_state * 1e3:.0f} ms; largest relative difference {diff:.1e}")


if __name__ == "__main__":
    main()
