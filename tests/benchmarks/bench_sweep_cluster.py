"""Benchmark of a transient sweep on a Dask cluster beside the local process pool: prints
figures, asserts nothing (run it, read it).

    .venv/bin/python tests/benchmarks/bench_sweep_cluster.py [--cases N] [--workers W]
        [--scheduler ADDRESS]

The sweep is the tank drain of ``bench_sweep.py`` over N initial levels (default 100), every
case simulated. It runs (1) on the local process pool (:func:`workbench.sweep_runner.run_sweep`
default), then (2) on a Dask cluster through :func:`workbench.sweep_runner.cluster_executor`:
by default a ``distributed.LocalCluster`` of W worker processes with one thread each
(W = the machine's cores), started here (its start-up is timed apart), or the running
cluster at ``--scheduler``. The cases' results are compared (the same, in the same order).
On one machine the cluster adds its messaging to the same cores, so expect it no faster
than the pool; it pays off when its workers are other machines.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_sweep import DRAIN, free_parallelism  # noqa: E402


def _same(a: dict, b: dict) -> bool:
    def strip(obj):
        if isinstance(obj, dict):
            return {k: strip(v) for k, v in obj.items() if "wall" not in k}
        if isinstance(obj, list):
            return [strip(v) for v in obj]
        return obj

    return strip(a) == strip(b)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", type=int, default=100)
    parser.add_argument("--workers", type=int, default=os.cpu_count() or 1)
    parser.add_argument("--scheduler", default=None, help="a running cluster's scheduler address")
    args = parser.parse_args(argv)
    import distributed

    from workbench.project.document import load_project
    from workbench.sweep_runner import cluster_executor, plan_sweep, run_sweep

    n = args.cases
    print(f"python {sys.version.split()[0]}, distributed {distributed.__version__}, "
          f"{os.cpu_count()} cores; control: two plain CPU loops run "
          f"{free_parallelism():.2f}x faster in two processes; load average "
          f"{os.getloadavg()[0]:.1f}")
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "drain.toml"
        path.write_text(DRAIN, encoding="utf-8")
        project = load_project(path)
        plan = plan_sweep(project, [f"reservoirs.T1.level=0.3 m..3.4 m/{n}"],
                          ["drain_time(T1) < 15 min"])
        t0 = time.perf_counter()
        pooled = run_sweep(project, plan, workers=args.workers)
        t_pool = time.perf_counter() - t0
        print(f"Transient sweep: {n} simulated drain cases")
        print(f"  local process pool ({args.workers} processes): {t_pool:8.2f} s wall "
              f"({n / t_pool:.1f} cases/s)")

        t0 = time.perf_counter()
        if args.scheduler:
            cluster, address, what = None, args.scheduler, f"cluster at {args.scheduler}"
        else:
            cluster = distributed.LocalCluster(n_workers=args.workers, threads_per_worker=1,
                                               processes=True, dashboard_address=None)
            address, what = cluster, f"LocalCluster, {args.workers} processes x 1 thread"
        t_start = time.perf_counter() - t0
        try:
            with cluster_executor(address) as executor:
                t0 = time.perf_counter()
                first = run_sweep(project, plan, executor=executor)
                t_cold = time.perf_counter() - t0
                t0 = time.perf_counter()
                second = run_sweep(project, plan, executor=executor)
                t_warm = time.perf_counter() - t0
        finally:
            if cluster is not None:
                cluster.close()
        print(f"  Dask ({what}): start {t_start:.2f} s; first sweep {t_cold:8.2f} s wall "
              f"({n / t_cold:.1f} cases/s, workers import and load the project); "
              f"second {t_warm:8.2f} s ({n / t_warm:.1f} cases/s)")
        print(f"  second sweep / local pool: {t_warm / t_pool:.2f}x the time; results the same "
              f"and in the same order: {_same(pooled.to_json(), first.to_json())} "
              f"and {_same(pooled.to_json(), second.to_json())}; failed cases "
              f"{sum(1 for c in first.cases if c.error)}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
