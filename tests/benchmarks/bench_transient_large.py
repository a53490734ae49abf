"""Benchmark: `simulate` of many parallel lines between two tanks (100, 1,000, 10,000 lines).

Prints, per size, the CPU and wall time and the peak memory (resident set) of the core run
and of ``workbench simulate --json`` on a generated project file, each in a fresh process,
with the integrator's steps and the final levels. From 100 lines the transient model keeps
its matrices sparse (``workbench/core/transient/sparse.py``); before, 10,000 lines needed a
dense 10,002 x 10,002 complex matrix (about 1.6 GB) in every Radau step.

Run: ``.venv/bin/python tests/benchmarks/bench_transient_large.py [--sizes 100,1000,10000]
[--no-cli]``; ``--threshold`` compares the dense and the sparse matrices at 20-400 lines
(where ``SPARSE_LINES`` is set). A script that prints figures, not a timed test.

The plant (our own invention): two vertical tanks 20 m across, the upper one with its bottom
10 m higher, joined by N lines of 50 mm bore, 50-56 m long; ten minutes of the upper tank
draining into the lower one, started from the steady flows.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

# Water at 20 degC (IAPWS-95 density, IAPWS 2008 viscosity; HYDRAULICS notes table).
RHO, MU = 998.207, 1.0016e-3


def plant(n: int, duration: float = 600.0):
    """The two tanks and ``n`` lines as a core ``System``."""
    from workbench.core.model import (
        FluidProps,
        Line,
        Reservoir,
        SimulationSettings,
        System,
        TankShape,
    )

    water = FluidProps("water", RHO, MU, 2339.2, 2.19e9, 293.15)
    shape = TankShape("vertical_cylinder", diameter=20.0)
    tanks = {"A": Reservoir("A", "tank", 10.0, 3.0, shape=shape, height=5.0),
             "B": Reservoir("B", "tank", 0.0, 1.0, shape=shape, height=5.0)}
    lines = {f"L{i}": Line(f"L{i}", "A", "B", 50.0 + (i % 7), 0.05, roughness=4.5e-5)
             for i in range(n)}
    return System(f"{n} parallel lines", water, tanks, {}, {}, lines,
                  simulation=SimulationSettings(duration, "steady", None, 10.0))


def project_text(n: int) -> str:
    """The same plant as a project file."""
    head = f"""schema = 1

[project]
title = "{n} parallel lines between two tanks"
units = "SI"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.A]
kind = "tank"
shape = "vertical_cylinder"
diameter = "20 m"
height = "5 m"
bottom_elevation = "10 m"
level = "3 m"

[reservoirs.B]
kind = "tank"
shape = "vertical_cylinder"
diameter = "20 m"
height = "5 m"
bottom_elevation = "0 m"
level = "1 m"

[simulation]
duration = "600 s"
initial_state = "steady"
output_interval = "10 s"
"""
    body = "".join(
        f'\n[lines.L{i}]\nfrom = "A"\nto = "B"\nlength = "{50 + i % 7} m"\n'
        f'inner_diameter = "50 mm"\nroughness = "0.045 mm"\n' for i in range(n))
    return head + body


def _one(n: int) -> dict:
    """Run the core simulation of ``n`` lines in this process; its figures."""
    system = plant(n)
    from workbench.core.transient import simulate

    c0, t0 = time.process_time(), time.perf_counter()
    res = simulate(system)
    return {"cpu": time.process_time() - c0, "wall": time.perf_counter() - t0,
            "rss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0,
            "ok": bool(res.success), "steps": res.nsteps, "jac": res.njev, "lu": res.nlu,
            "levels": [float(x) for x in res.levels[:, -1]]}


def _child(cmd: list[str]) -> tuple[int, str, float, float, float]:
    """Run ``cmd``; its exit code, stdout, CPU [s], wall [s] and peak RSS [MB] (its own,
    from ``wait4``)."""
    with tempfile.TemporaryFile() as out:
        t0 = time.perf_counter()
        proc = subprocess.Popen(cmd, stdout=out, stderr=subprocess.DEVNULL)
        _, status, usage = os.wait4(proc.pid, 0)
        wall = time.perf_counter() - t0
        proc.returncode = os.waitstatus_to_exitcode(status)
        out.seek(0)
        text = out.read().decode("utf-8", "replace")
    return (proc.returncode, text, usage.ru_utime + usage.ru_stime, wall,
            usage.ru_maxrss / 1024.0)


def _cli(n: int, workdir: Path) -> dict:
    """``workbench simulate --json`` on the generated project, in a child process."""
    path = workdir / f"parallel_{n}.toml"
    path.write_text(project_text(n), encoding="utf-8")
    exe = Path(sys.executable).with_name("workbench")
    code, text, cpu, wall, rss = _child([str(exe), "simulate", str(path), "--json"])
    return {"cpu": cpu, "wall": wall, "rss_mb": rss, "exit": code, "json_mb": len(text) / 1e6}


def threshold() -> None:
    """CPU time of the same runs with dense and with sparse matrices (mean of 3)."""
    from workbench.core.transient import model as model_module
    from workbench.core.transient import simulate

    for n in (20, 60, 90, 110, 150, 400):
        system = plant(n)
        row = []
        for limit in (10**9, 1):
            model_module.SPARSE_LINES = limit
            simulate(system)
            c0 = time.process_time()
            for _ in range(3):
                simulate(system)
            row.append((time.process_time() - c0) / 3)
        print(f"{n:>5} lines: dense {row[0]:.3f} s, sparse {row[1]:.3f} s CPU")


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", default="100,1000,10000")
    parser.add_argument("--no-cli", action="store_true", help="time the core run only")
    parser.add_argument("--one", type=int, help=argparse.SUPPRESS)
    parser.add_argument("--threshold", action="store_true",
                        help="compare dense and sparse matrices at 20-400 lines")
    args = parser.parse_args(argv)
    if args.threshold:
        threshold()
        return 0
    if args.one:
        print(json.dumps(_one(args.one)))
        return 0
    print("parallel lines between two tanks, 600 s from the steady flows (CPU time is the "
          "better measure on a shared machine)")
    print(f"{'lines':>7} {'what':<9} {'CPU [s]':>8} {'wall [s]':>9} {'peak RSS [MB]':>14} "
          f"{'steps':>6} {'jac':>4}  final levels [m] / JSON size")
    with tempfile.TemporaryDirectory() as tmp:
        for n in (int(x) for x in args.sizes.split(",")):
            code, text, _, _, rss = _child([sys.executable, __file__, "--one", str(n)])
            if code:
                print(f"{n:>7} core      failed (exit {code}), peak RSS {rss:.0f} MB")
            else:
                r = json.loads(text.strip().splitlines()[-1])
                print(f"{n:>7} {'core':<9} {r['cpu']:8.2f} {r['wall']:9.2f} {r['rss_mb']:14.0f} "
                      f"{r['steps']:6d} {r['jac']:4d}  "
                      + ", ".join(f"{x:.4f}" for x in r["levels"]))
            if not args.no_cli:
                c = _cli(n, Path(tmp))
                print(f"{n:>7} {'CLI json':<9} {c['cpu']:8.2f} {c['wall']:9.2f} "
                      f"{c['rss_mb']:14.0f} {'':>6} {'':>4}  exit {c['exit']}, "
                      f"{c['json_mb']:.1f} MB of JSON")
            sys.stdout.flush()
    return 0


if __name__ == "__main__":
    sys.exit(main())
