"""The sweep runner on any ``concurrent.futures.Executor``: the local process pool, a thread
pool, and a Dask cluster give the same outcomes in the same (sweep) order as solving every
case in this process one after the other.

The reference is the serial run (``workers=1``: each case solved here, no executor): the
cases' JSON must be equal, floats to round-off (``pytest.approx``, rel 1e-12), which also
checks that no case's result lands at another case's index.
"""

from __future__ import annotations

import math

import pytest
from sweep_runner_project import SIZES, comparable, load_runner_project

from workbench.sweep_runner import plan_sweep, run_sweep


def assert_same(a, b, path="") -> None:
    if isinstance(a, dict):
        assert isinstance(b, dict) and set(a) == set(b), path
        for k in a:
            assert_same(a[k], b[k], f"{path}.{k}")
    elif isinstance(a, list):
        assert isinstance(b, list) and len(a) == len(b), path
        for i, (x, y) in enumerate(zip(a, b)):
            assert_same(x, y, f"{path}[{i}]")
    elif isinstance(a, float) and isinstance(b, float) and math.isfinite(a):
        assert b == pytest.approx(a, rel=1e-12, abs=1e-300), path
    elif isinstance(a, float) and math.isnan(a):
        assert isinstance(b, float) and math.isnan(b), path
    else:
        assert a == b, path


@pytest.fixture(scope="module")
def runner_project():
    return load_runner_project()


@pytest.fixture(scope="module")
def serial(runner_project):
    """The plan and the serial reference, run once for the module (the tests only read)."""
    plan = plan_sweep(runner_project, [SIZES], ["drain_time(T1) < 10 min"])
    return plan, comparable(run_sweep(runner_project, plan, workers=1).to_json())


@pytest.fixture(scope="module")
def pooled(runner_project, serial):
    """The same sweep on the local process pool (two workers), run once for the module."""
    plan, _ = serial
    return comparable(run_sweep(runner_project, plan, workers=2).to_json())


def test_the_serial_reference_simulates_every_case_and_judges_it(serial) -> None:
    plan, reference = serial
    assert plan.simulate
    cases = reference["cases"]
    assert [c["values"]["lines.L1.nominal_size"] for c in cases] == ["1 in", "1.5 in", "2 in", "3 in"]
    drains = [c["checks"][0]["value"] for c in cases]
    # A larger bore drains the same tank faster (the flow grows with the bore).
    assert all(d is not None for d in drains) and drains == sorted(drains, reverse=True)
    assert [c["pass"] for c in cases] == [d < 600.0 for d in drains]
    assert all(c["simulation"] is not None and c["error"] is None for c in cases)


def test_the_local_process_pool_gives_the_serial_outcomes_in_sweep_order(serial, pooled) -> None:
    _, reference = serial
    assert_same(reference, pooled)


def test_any_executor_runs_the_cases_and_keeps_the_sweep_order(runner_project, serial) -> None:
    from concurrent.futures import ThreadPoolExecutor

    plan, reference = serial
    seen = []
    with ThreadPoolExecutor(max_workers=2) as executor:
        outcome = run_sweep(runner_project, plan, executor=executor,
                            progress=lambda done, total: seen.append((done, total)))
    assert_same(reference, comparable(outcome.to_json()))
    assert seen[-1] == (4, 4) and [d for d, _ in seen] == [1, 2, 3, 4]


#: Run in a fresh interpreter: Dask leaves a thread behind (its offload pool), after which
#: the local pool of later tests in this process would start by fork server instead of fork.
DASK_SWEEP = """
import json, sys
sys.path.insert(0, {here!r})
import distributed
from sweep_runner_project import SIZES, load_runner_project
from workbench.sweep_runner import ClusterError, cluster_executor, plan_sweep, run_sweep

project = load_runner_project()
plan = plan_sweep(project, [SIZES], ["drain_time(T1) < 10 min"])
with distributed.LocalCluster(n_workers=1, threads_per_worker=2, processes=False,
                              dashboard_address=None) as cluster:
    with cluster_executor(cluster) as executor:
        outcome = run_sweep(project, plan, executor=executor)
try:
    with cluster_executor("tcp://127.0.0.1:9", timeout=0.5):
        refused = ""
except ClusterError as exc:
    refused = str(exc)
print(json.dumps({{"sweep": outcome.to_json(), "refused": refused}}))
"""


@pytest.fixture(scope="module")
def dask_run():
    import json
    import subprocess
    import sys
    from pathlib import Path

    pytest.importorskip("distributed")
    code = DASK_SWEEP.format(here=str(Path(__file__).resolve().parent))
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          timeout=600)
    assert done.returncode == 0, done.stderr[-3000:]
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_a_local_dask_cluster_gives_the_process_pools_outcomes_in_the_same_order(
        serial, pooled, dask_run) -> None:
    _, reference = serial
    on_cluster = comparable(dask_run["sweep"])
    assert_same(pooled, on_cluster)
    assert_same(reference, on_cluster)


def test_an_unreachable_scheduler_is_a_clear_error_not_a_traceback(dask_run) -> None:
    assert dask_run["refused"].startswith("cannot reach the Dask scheduler at tcp://127.0.0.1:9")
