"""The sweep plan (cases in sweep order, keys that conflict with a swept key) and how the
local pool starts its workers."""

from __future__ import annotations

import threading

import pytest
from sweep_runner_project import load_runner_project

from workbench.sweep_runner.plan import plan_sweep, prepared_base
from workbench.sweep_runner.pool import pool_context


def test_the_first_vary_changes_slowest_in_the_case_order() -> None:
    project = load_runner_project()
    plan = plan_sweep(project, ["lines.L1.nominal_size=2 in,3 in", "reservoirs.T1.level=1 m,1.5 m"])
    values = [tuple(c.values.values()) for c in plan.cases]
    assert values == [("2 in", "1 m"), ("2 in", "1.5 m"), ("3 in", "1 m"), ("3 in", "1.5 m")]
    assert [c.index for c in plan.cases] == [0, 1, 2, 3]


def test_sweeping_the_bore_of_a_line_sized_by_nominal_size_drops_the_size() -> None:
    project = load_runner_project()
    plan = plan_sweep(project, ["lines.L1.inner_diameter=40 mm,60 mm"], simulate=False)
    base = prepared_base(project, plan.axes)
    line = base.data["lines"]["L1"]
    assert "nominal_size" not in line and "schedule" not in line
    assert line["inner_diameter"] == "40 mm"
    assert base.system.lines["L1"].diameter == pytest.approx(0.040)


def test_workers_fork_from_a_single_thread_and_use_a_fork_server_from_a_threaded_process() -> None:
    import multiprocessing

    if "forkserver" not in multiprocessing.get_all_start_methods():
        pytest.skip("no fork server on this platform")
    seen = {}
    thread = threading.Thread(target=lambda: seen.setdefault("method", pool_context().get_start_method()))
    thread.start()
    thread.join()
    assert seen["method"] == "forkserver"  # forking a threaded process is unsafe
    if threading.active_count() == 1:
        assert pool_context().get_start_method() == "fork"
