"""Benchmark of what-if sweeps: prints figures, asserts nothing (run it, read it).

    .venv/bin/python tests/benchmarks/bench_sweep.py [--cases N] [--transient-cases N] [--serial]

1. Steady single-line cases per second: the vectorised engine
   (:func:`workbench.core.sweep.solve_line_cases`) on N random cases at once, against a
   per-case loop of the plain approach (scipy ``brentq`` on the energy equation with fluids'
   scalar ``Clamond`` friction), with the ratio and the largest difference between them.
   Targets: at least 20,000 cases/s and at least 30x the per-case loop.
2. Wall time of a 200-case transient sweep (a tank drain, every case simulated) spread over
   the machine's cores by :func:`workbench.sweep_runner.run_sweep`; ``--serial`` adds the same
   sweep in one process for the speed-up.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

G = 9.80665

DRAIN = """\
schema = 1

[project]
title = "Benchmark drain"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.T1]
kind = "tank"
shape = "vertical_cylinder"
diameter = "2.5 m"
bottom_elevation = "6 m"
level = "3 m"
height = "3.5 m"
min_level = "0.05 m"

[receivers.OUT]
kind = "open_discharge"
elevation = "0.5 m"

[lines.L1]
from = "T1"
to = "OUT"
length = "25 m"
nominal_size = "3 in"
roughness = "0.045 mm"
fittings = [ { type = "elbow_90_standard", count = 3 } ]

[simulation]
duration = "3 h"
stop_when = "drained"
"""


def random_cases(n: int, seed: int = 1):
    from workbench.core.sweep import LineCases

    rng = np.random.default_rng(seed)
    return LineCases.from_mapping(dict(
        head_from=rng.uniform(0.2, 30.0, n), head_to=0.0, length=rng.uniform(2.0, 500.0, n),
        diameter=rng.uniform(0.015, 0.3, n), roughness=rng.choice([0.0, 1.5e-6, 4.5e-5, 1.5e-4], n),
        density=998.2, viscosity=10 ** rng.uniform(-3.3, -1.0, n), k_forward=rng.uniform(1.0, 12.0, n),
    ))


def per_case_velocity(h, length, d, eps, rho, mu, k) -> float:
    """The plain approach: brentq on the energy equation with scalar fluids friction."""
    import fluids
    from scipy.optimize import brentq

    def residual(v: float) -> float:
        re = rho * v * d / mu
        if re <= 2000.0:
            f = 64.0 / re
        else:
            fc = fluids.friction.Clamond(re, eps / d)
            if re < 4000.0:  # the same smooth blend as the vectorised engine
                s = (re - 2000.0) / 2000.0
                w = s * s * (3 - 2 * s)
                f = (1 - w) * 64.0 / re + w * fc
            else:
                f = fc
        return (f * length / d + k) * v * v / (2 * G) - h

    vmax = math.sqrt(2 * G * h / k)
    return brentq(residual, 1e-9 * vmax, vmax * 1.0000001, xtol=1e-15, rtol=1e-13)


def bench_steady(n: int, n_loop: int) -> None:
    from workbench.core.sweep import LineCases, solve_line_cases

    cases = random_cases(n)
    solve_line_cases(random_cases(100, seed=2))  # warm-up
    best = math.inf
    for _ in range(3):
        t0 = time.perf_counter()
        result = solve_line_cases(cases)
        best = min(best, time.perf_counter() - t0)
    rate_vec = n / best
    assert result.success, result.message

    sub = slice(0, n_loop)
    args = [getattr(cases, name)[sub] for name in
            ("head_from", "length", "diameter", "roughness", "density", "viscosity", "k_forward")]
    t0 = time.perf_counter()
    v_loop = np.array([per_case_velocity(*a) for a in zip(*args, strict=True)])
    t_loop = time.perf_counter() - t0
    rate_loop = n_loop / t_loop
    diff = np.max(np.abs(v_loop / result.velocity[sub] - 1.0))

    t0 = time.perf_counter()
    for i in range(min(n_loop, 500)):
        one = LineCases(**{name: getattr(cases, name)[i:i + 1] for name in cases.__dataclass_fields__})
        solve_line_cases(one)
    rate_one = min(n_loop, 500) / (time.perf_counter() - t0)

    print("Steady single-line cases")
    print(f"  vectorised engine      : {n:>9,d} cases in {best * 1e3:8.1f} ms -> {rate_vec:>12,.0f} cases/s"
          f"  (Newton iterations {result.iterations})")
    print(f"  per-case brentq+fluids : {n_loop:>9,d} cases in {t_loop * 1e3:8.1f} ms -> {rate_loop:>12,.0f} cases/s")
    print(f"  engine called per case : {min(n_loop, 500):>9,d} cases               -> {rate_one:>12,.0f} cases/s")
    print(f"  ratio vectorised / per-case loop: {rate_vec / rate_loop:,.0f}x   (targets: >= 20,000 cases/s, >= 30x)")
    print(f"  largest relative velocity difference vs the loop: {diff:.2e}")


def _spin(n: int) -> int:
    total = 0
    for i in range(n):
        total += i * i
    return total


def free_parallelism() -> float:
    """Speed-up of two plain CPU loops in two processes over one after the other.

    About 2 on an idle two-core machine; near 1 when other work already fills the cores,
    in which case no process pool can show a speed-up either.
    """
    from concurrent.futures import ProcessPoolExecutor

    n = 4_000_000
    t0 = time.perf_counter()
    _spin(n)
    _spin(n)
    serial = time.perf_counter() - t0
    with ProcessPoolExecutor(2) as pool:
        list(pool.map(_spin, [1000, 1000]))  # start the workers outside the timing
        t0 = time.perf_counter()
        list(pool.map(_spin, [n, n]))
        parallel = time.perf_counter() - t0
    return serial / parallel


def bench_transient(n: int, serial: bool) -> None:
    from workbench.project.document import load_project
    from workbench.sweep_runner import plan_sweep, run_sweep

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "drain.toml"
        path.write_text(DRAIN, encoding="utf-8")
        project = load_project(path)
        plan = plan_sweep(project, [f"reservoirs.T1.level=0.3 m..3.4 m/{n}"], ["drain_time(T1) < 15 min"])
        cores = os.cpu_count() or 1
        t0 = time.perf_counter()
        outcome = run_sweep(project, plan)
        wall = time.perf_counter() - t0
        failed = sum(1 for c in outcome.cases if c.error)
        print(f"Transient sweep: {n} simulated drain cases on {cores} cores "
              f"(control: two plain CPU loops run {free_parallelism():.2f}x faster in two processes; "
              f"load average {os.getloadavg()[0]:.1f})")
        print(f"  process pool           : {wall:8.2f} s wall ({n / wall:.1f} cases/s), failed cases {failed},"
              f" first passing #{outcome.first_passing}")
        if serial:
            t0 = time.perf_counter()
            run_sweep(project, plan, workers=1)
            wall1 = time.perf_counter() - t0
            print(f"  one process            : {wall1:8.2f} s wall -> speed-up {wall1 / wall:.2f}x")


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", type=int, default=200_000)
    parser.add_argument("--loop-cases", type=int, default=2_000)
    parser.add_argument("--transient-cases", type=int, default=200)
    parser.add_argument("--serial", action="store_true", help="also time the transient sweep in one process")
    args = parser.parse_args(argv)
    print(f"python {sys.version.split()[0]}, numpy {np.__version__}, {os.cpu_count()} cores")
    bench_steady(args.cases, args.loop_cases)
    if args.transient_cases:
        bench_transient(args.transient_cases, args.serial)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
