"""The time-stepping kernels of the elastic surge model (workbench.core.elastic.kernel).

The numbers themselves are checked against outside references in test_elastic_surge.py,
which runs every case on both kernels. Here: the compiled kernel's scalar friction against
Colebrook as computed by the `fluids` package, the two kernels against each other on runs
that exercise every end and junction type, and the rules that pick a kernel.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.core.elastic_systems import WATER, reservoir_line
from tests.core.elastic_systems import closing as shared_closing
from workbench.core.elastic import kernel as elastic_kernel
from workbench.core.elastic import simulate_elastic
from workbench.core.friction import friction_re_product
from workbench.core.model import (
    Junction,
    Line,
    Receiver,
    Reservoir,
    SurgeSettings,
    System,
    Valve,
    ValveSchedule,
)

needs_compiled = pytest.mark.skipif(
    not elastic_kernel.compiled_available(), reason="numba is not installed here")



@needs_compiled
@pytest.mark.parametrize("re", [1e3, 2.5e3, 3.9e3, 1e4, 1e5, 1e6, 1e8])
@pytest.mark.parametrize("rr", [0.0, 1e-5, 1e-3, 0.05])
def test_scalar_friction_equals_the_array_form_and_colebrook(re, rr):
    # The scalar twin against the array function used by the numpy kernel (same formula),
    # and above Re = 4000 against Colebrook's equation solved by the `fluids` package
    # (fluids.friction.Colebrook, Colebrook 1939).
    compiled = pytest.importorskip("workbench.core.elastic.compiled")
    phi = compiled.friction_re_product_scalar(re, rr)
    ref, _ = friction_re_product(np.array([re]), np.array([rr]))
    assert phi == pytest.approx(float(ref[0]), rel=1e-13)
    if re >= 4000.0:
        fluids_friction = pytest.importorskip("fluids.friction")
        assert phi / re == pytest.approx(fluids_friction.Colebrook(re, rr), rel=1e-9)
    if re <= 2000.0:
        assert phi == 64.0  # Hagen-Poiseuille, f = 64/Re


def closing(t_close, k_open=3.0, position="to", start=1.0):
    return shared_closing(t_close, k_open=k_open, position=position, start=start)


def reversing_chain() -> System:
    """Two lines in series between reservoirs, a valve at the junction that shuts fast,
    friction from roughness and a downstream valve: the wave reverses the flow."""
    lines = {
        "L1": Line("L1", "R1", "J1", 900.0, 0.25, roughness=4.5e-5,
                   surge=SurgeSettings("elastic", 30)),
        "L2": Line("L2", "J1", "R2", 600.0, 0.2, roughness=1.5e-4,
                   valve=closing(0.3, k_open=1.0, position="from")),
    }
    return System("kernels", WATER,
                  {"R1": Reservoir("R1", "constant_level", 0.0, 60.0),
                   "R2": Reservoir("R2", "tank", 0.0, 20.0)},
                  {"J1": Junction("J1", 0.0)}, {}, lines)


def single(valve, fluid=WATER, downstream="air", head=80.0, f=None):
    return reservoir_line(length=1200.0, diameter=0.3, head=head, valve=valve, reaches=40,
                          fluid=fluid, downstream=downstream, tail=10.0, roughness=4.5e-5,
                          friction_factor=f, name="single")


def opening_to_the_air() -> System:
    """A shut valve at the reservoir outlet opens in 0.4 s; the line discharges to the air,
    so the flow builds up from rest through laminar and transitional Reynolds numbers."""
    valve = Valve("linear", 2.0, opening=0.0, position="from",
                  schedule=ValveSchedule((0.5, 0.9), (0.0, 1.0)))
    line = Line("L1", "R1", "OUT", 400.0, 0.2, roughness=4.5e-5, valve=valve,
                surge=SurgeSettings("elastic", 40))
    return System("opening", WATER, {"R1": Reservoir("R1", "constant_level", 0.0, 30.0)}, {},
                  {"OUT": Receiver("OUT", "open_discharge", 0.0)}, {"L1": line})


def dead_end_chain() -> System:
    lines = {
        "L1": Line("L1", "R1", "J1", 300.0, 0.3, friction_factor=0.02,
                   valve=Valve("linear", 2.0, opening=0.0, position="from",
                               schedule=ValveSchedule((0.5, 0.7), (0.0, 1.0)))),
        "L2": Line("L2", "J1", "J2", 200.0, 0.2, friction_factor=0.02),
    }
    return System("dead", WATER, {"R1": Reservoir("R1", "constant_level", 0.0, 50.0)},
                  {"J1": Junction("J1", 0.0), "J2": Junction("J2", 0.0)}, {}, lines)


def header_tee(valve_at_junction: bool = False) -> System:
    """A reservoir and a tank feeding a header, branching to a valve that shuts fast and a
    free discharge: junctions of three lines, cavities on a branch."""
    lines = {
        "A": Line("A", "R1", "J1", 500.0, 0.25, roughness=4.5e-5),
        "B": Line("B", "T1", "J1", 300.0, 0.2, roughness=4.5e-5),
        "C": Line("C", "J1", "J2", 200.0, 0.3, roughness=4.5e-5),
        "D": Line("D", "J2", "OUT", 400.0, 0.2, roughness=4.5e-5, valve=closing(0.2)),
        "E": Line("E", "J2", "OUT2", 250.0, 0.15, roughness=4.5e-5,
                  valve=closing(0.1, position="from") if valve_at_junction else None),
    }
    return System("tee", WATER, {"R1": Reservoir("R1", "constant_level", 0.0, 30.0),
                                 "T1": Reservoir("T1", "tank", 0.0, 25.0)},
                  {"J1": Junction("J1", 0.0), "J2": Junction("J2", 0.0)},
                  {"OUT": Receiver("OUT", "open_discharge", 0.0),
                   "OUT2": Receiver("OUT2", "open_discharge", 0.0)}, lines)


CASES = {
    "branched header, fast closure on a branch": (header_tee, "D", "initial"),
    "branched header, quasi-steady friction": (header_tee, "C", "quasi_steady"),
    "a valve at a junction of three lines": (lambda: header_tee(True), "E", "initial"),
    "valve at a junction, flow reversing, held friction": (reversing_chain, "L2", "initial"),
    "valve at a junction, quasi-steady friction": (reversing_chain, "L2", "quasi_steady"),
    "closure to the air, column separation": (lambda: single(closing(0.2)), "L1", "initial"),
    "closure to a reservoir, fixed f, quasi-steady": (
        lambda: single(closing(2.0), downstream="tank", f=0.018), "L1", "quasi_steady"),
    "opening a shut valve, flow from rest": (opening_to_the_air, "L1", "initial"),
    "a dead-ended chain behind a shut valve (at rest)": (dead_end_chain, "L2", "initial"),
}
MOVING = [case for case in CASES if "at rest" not in case]
_RUNS: dict = {}


def case_run(case: str, kernel: str):
    """The 8 s run of ``case`` on ``kernel``, made once for this module (the tests below
    only read it)."""
    if (case, kernel) not in _RUNS:
        build, line_id, friction = CASES[case]
        _RUNS[case, kernel] = simulate_elastic(build(), line_id, duration=8.0,
                                               friction=friction, kernel=kernel)
    return _RUNS[case, kernel]


@needs_compiled
@pytest.mark.parametrize("case", list(CASES))
def test_the_compiled_and_numpy_kernels_give_the_same_run(case):
    # Two implementations of the same discrete equations (Wylie & Streeter 1993, ch. 3):
    # they differ only in the order of floating-point operations.
    a, b = case_run(case, "numpy"), case_run(case, "compiled")
    assert a.success and b.success, (a.message, b.message)
    assert (a.kernel, b.kernel) == ("numpy", "compiled")
    assert a.status == b.status and a.message == b.message
    assert len(a.time) == len(b.time)
    scale = max(1.0, float(np.abs(a.valve_head).max()) if len(a.valve_head) else 1.0)
    if len(a.valve_head):
        assert np.abs(a.valve_head - b.valve_head).max() <= 1e-9 * scale
    assert np.abs(a.cavity_volume - b.cavity_volume).max() <= 1e-9 * max(
        1e-9, float(np.abs(a.cavity_volume).max(initial=0.0)))
    assert a.cavity_zones == b.cavity_zones
    for label in a.traces:
        assert np.abs(a.traces[label] - b.traces[label]).max() <= 1e-9 * scale
    for lid in a.envelopes:
        ea, eb = a.envelopes[lid], b.envelopes[lid]
        assert np.abs(ea.max_head - eb.max_head).max() <= 1e-9 * scale
        assert np.abs(ea.min_head - eb.min_head).max() <= 1e-9 * scale
        assert np.abs(a.midline_head[lid] - b.midline_head[lid]).max() <= 1e-9 * scale
    if a.column_separation is None:
        assert b.column_separation is None
    else:
        assert b.column_separation is not None
        assert b.column_separation.time == a.column_separation.time
        assert b.column_separation.line == a.column_separation.line
        assert b.column_separation.distance == a.column_separation.distance


def test_the_cases_move_the_liquid():
    # The comparison above means something only if the runs are not at rest: each case
    # changes the head somewhere by metres, and the reversing case reverses its flow.
    for case in MOVING:
        res = case_run(case, "numpy")
        swing = max(float((e.max_head - e.min_head).max()) for e in res.envelopes.values())
        assert swing > 1.0, case
    res = simulate_elastic(reversing_chain(), "L2", duration=8.0, kernel="numpy")
    assert res.initial_flow > 0
    env = res.envelopes["L1"]
    assert env.max_head[-1] > env.initial_head[-1] + 10.0


@needs_compiled
def test_the_compiled_kernel_reports_progress_and_can_be_cancelled():
    seen = []
    res = simulate_elastic(single(closing(1.0), head=20.0), "L1", duration=60.0,
                           kernel="compiled", progress=seen.append,
                           cancel=lambda: len(seen) >= 3)
    assert res.status == -2 and res.kernel == "compiled"
    assert seen == sorted(seen) and 0.0 < seen[-1] < 1.0
    assert len(res.time) == len(res.valve_head) and res.duration < 60.0


def test_auto_takes_numpy_for_a_short_run_in_a_cold_process(monkeypatch):
    monkeypatch.delenv(elastic_kernel.KERNEL_ENV, raising=False)
    monkeypatch.setattr(elastic_kernel, "_warm", False)
    assert elastic_kernel.choose_kernel("auto", updates=1e5) == "numpy"
    expected = "compiled" if elastic_kernel.compiled_available() else "numpy"
    assert elastic_kernel.choose_kernel(
        "auto", updates=elastic_kernel.AUTO_COMPILED_UPDATES) == expected
    monkeypatch.setattr(elastic_kernel, "_warm", True)
    assert elastic_kernel.choose_kernel("auto", updates=1e5) == expected


def test_the_environment_variable_overrides_auto_but_not_an_explicit_choice(monkeypatch):
    monkeypatch.setenv(elastic_kernel.KERNEL_ENV, "numpy")
    monkeypatch.setattr(elastic_kernel, "_warm", True)
    assert elastic_kernel.choose_kernel("auto", updates=math.inf) == "numpy"
    if elastic_kernel.compiled_available():
        assert elastic_kernel.choose_kernel("compiled") == "compiled"


def test_without_numba_every_choice_is_numpy(monkeypatch):
    monkeypatch.setattr(elastic_kernel, "_numba_found", False)
    assert elastic_kernel.choose_kernel("compiled") == "numpy"
    assert elastic_kernel.choose_kernel("auto", updates=math.inf) == "numpy"
    res = simulate_elastic(single(closing(1.0)), "L1", duration=2.0, kernel="compiled")
    assert res.success and res.kernel == "numpy"


def test_an_unknown_kernel_is_refused_in_words():
    res = simulate_elastic(single(closing(1.0)), "L1", duration=1.0, kernel="gpu")
    assert not res.success and "unknown kernel 'gpu'" in res.message


@needs_compiled
def test_a_run_whose_heads_stop_being_numbers_fails_in_words(monkeypatch):
    # Guard: a kernel that returned NaN heads must never reach the engineer as a result.
    def poisoned(plan, out, progress=None, cancel=None):
        out.h_max[3] = math.nan
        return plan.n_steps, False

    monkeypatch.setattr(elastic_kernel, "run_compiled", poisoned)
    res = simulate_elastic(single(closing(1.0)), "L1", duration=1.0, kernel="compiled")
    assert not res.success and "stopped being finite numbers" in res.message


def test_numba_is_not_imported_for_the_package_or_a_short_default_run():
    # numba is an optional extra (issue 17): importing the elastic package and a short run
    # with kernel="auto" in a fresh process must leave it unloaded (its start-up costs a
    # large part of a second).
    import subprocess
    import sys

    code = (
        "import sys\n"
        "from tests.core.test_elastic_kernel import single, closing\n"
        "from workbench.core.elastic import simulate_elastic\n"
        "res = simulate_elastic(single(closing(1.0)), 'L1', duration=2.0)\n"
        "assert res.success, res.message\n"
        "print(res.kernel, 'numba' in sys.modules)\n"
    )
    env = {k: v for k, v in __import__("os").environ.items()
           if k != elastic_kernel.KERNEL_ENV}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, env=env).stdout.split()
    assert out == ["numpy", "False"]
