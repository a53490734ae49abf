"""Elastic surge (method of characteristics): the core's kernels against a plain Python loop.

A 2 km steel line (DN 300, Korteweg wave speed) from a reservoir to a valve discharging to
a downstream reservoir, 200 reaches, 120 s of simulated time: a 6 s closure and the
oscillation after it. Prints the wall time and node-updates per second of
``workbench.core.elastic.simulate_elastic`` with each time-stepping kernel (compiled by
numba, and numpy-vectorised) and of the same equations written as a plain Python loop over
reaches (Wylie & Streeter's textbook form, below), and the ratios. All runs use the same
grid, friction and valve law and must give the same envelope. It also prints the one-off
cost of loading and of compiling the compiled kernel in a new process.

Target: the core at least 50x the plain loop.

Run: .venv/bin/python tests/benchmarks/bench_elastic.py
"""

from __future__ import annotations

import math
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

from workbench.core.elastic import kernel as elastic_kernel
from workbench.core.elastic import simulate_elastic
from workbench.core.model import (
    FluidProps,
    G,
    Line,
    Reservoir,
    SurgeSettings,
    System,
    Valve,
    ValveSchedule,
)

LENGTH = 2000.0

#: The single-line case separates: the plain loop below has no cavity model, so the core
#: runs it without one (and without the repeat at twice the reaches) to solve the same
#: discrete equations.
SAME_EQUATIONS = {"cavities": False, "grid_check": False}
REACHES = 200
DURATION = 120.0


def bench_system(reaches: int = REACHES) -> System:
    fluid = FluidProps("water", 998.207, 1.0016e-3, 2339.2, 2.19e9, 293.15)
    valve = Valve("linear", k_open=3.0, opening=1.0,
                  schedule=ValveSchedule((1.0, 7.0), (1.0, 0.0)))
    line = Line("L1", "HEAD", "TAIL", LENGTH, 0.30318, roughness=4.5e-5,
                wall_thickness=0.01031, elastic_modulus=207e9, valve=valve,
                surge=SurgeSettings("elastic", reaches))
    return System(
        "bench", fluid,
        {"HEAD": Reservoir("HEAD", "constant_level", 0.0, 120.0),
         "TAIL": Reservoir("TAIL", "constant_level", 0.0, 80.0)},
        {}, {}, {"L1": line},
    )


def plain_loop(system: System, result) -> dict:
    """The same run as a plain Python loop over reaches (lists of floats, no numpy inside).

    C+: H_P = C_P - B Q_P, C_P = H_A + B Q_A - R Q_A|Q_A|;
    C-: H_P = C_M + B Q_P, C_M = H_B - B Q_B + R Q_B|Q_B| (Wylie & Streeter 1993, ch. 3).
    Grid, friction, initial state and valve law are taken from the core result's set-up so
    that the two runs solve the same discrete problem.
    """
    from workbench.core.valve import opening_at, relative_flow_coefficient, valve_k

    line = system.lines["L1"]
    n = result.reaches["L1"]
    dt = result.dt
    a = result.wave_speeds["L1"].used
    area = math.pi * line.diameter**2 / 4.0
    b = a / (G * area)
    q0 = result.initial_flow
    env = result.envelopes["L1"]
    h = [float(v) for v in env.initial_head]
    q = [q0] * (n + 1)
    # friction per reach from the steady head drop (f at the initial Reynolds number)
    r = (h[0] - h[-1]) / (n * q0 * abs(q0))
    h_up = 120.0
    k_in = (1.0 + line.entrance_k) / (2.0 * G * area * area)
    h_down = 80.0
    steps = len(result.time) - 1
    times = dt * np.arange(steps + 1)
    v = line.valve
    x = np.array([opening_at(v, float(t)) for t in times])
    kappa = (np.asarray(valve_k(v.k_open, relative_flow_coefficient(v.characteristic, x)))
             / (2.0 * G * area * area)).tolist()
    h_max = h[:]
    h_min = h[:]
    valve_series = [h[-1]]
    hn = h[:]
    qn = q[:]
    sqrt = math.sqrt
    for k in range(1, steps + 1):
        for i in range(1, n):
            qa = q[i - 1]
            qb = q[i + 1]
            cp = h[i - 1] + b * qa - r * qa * abs(qa)
            cm = h[i + 1] - b * qb + r * qb * abs(qb)
            hp = 0.5 * (cp + cm)
            hn[i] = hp
            qn[i] = (cp - cm) / (2.0 * b)
            if hp > h_max[i]:
                h_max[i] = hp
            if hp < h_min[i]:
                h_min[i] = hp
        # upstream reservoir with entrance loss: b Q + k Q|Q| = H_res - C_M
        qb = q[1]
        cm = h[1] - b * qb + r * qb * abs(qb)
        delta = h_up - cm
        kk = k_in if delta >= 0 else 0.0
        qp = 2.0 * delta / (b + sqrt(b * b + 4.0 * kk * abs(delta)))
        hn[0] = cm + b * qp
        qn[0] = qp
        # valve discharging to the downstream reservoir: b Q + kv Q|Q| = C_P - H_tail
        qa = q[n - 1]
        cp = h[n - 1] + b * qa - r * qa * abs(qa)
        kv = kappa[k]
        if kv == math.inf:
            qp = 0.0
        else:
            delta = cp - h_down
            kk = kv if delta >= 0 else kv + k_in
            qp = 2.0 * delta / (b + sqrt(b * b + 4.0 * kk * abs(delta)))
        hn[n] = cp - b * qp
        qn[n] = qp
        for i in (0, n):
            if hn[i] > h_max[i]:
                h_max[i] = hn[i]
            if hn[i] < h_min[i]:
                h_min[i] = hn[i]
        valve_series.append(hn[n])
        h, hn = hn, h
        q, qn = qn, q
    return {"max_head": h_max, "min_head": h_min, "valve_head": valve_series, "steps": steps}


def timed_runs(system: System, duration: float, kernel: str, repeats: int):
    walls = []
    result = None
    for _ in range(repeats):
        t0 = time.perf_counter()
        result = simulate_elastic(system, "L1", duration=duration, kernel=kernel,
                                  **SAME_EQUATIONS)
        walls.append(time.perf_counter() - t0)
    assert result.success, result.message
    assert result.kernel == kernel, f"asked for the {kernel} kernel, got {result.kernel!r}"
    return result, min(walls)


def compare(reaches: int, duration: float, repeats: int = 5) -> float:
    """Print the figures for one grid; return the compiled kernel's ratio to the loop."""
    system = bench_system(reaches)
    kernels = ["compiled", "numpy"] if elastic_kernel.compiled_available() else ["numpy"]
    results = {}
    for kernel in kernels:
        simulate_elastic(system, "L1", duration=1.0, kernel=kernel)  # warm-up: loads, caches
        results[kernel] = timed_runs(system, duration, kernel, repeats)
    result = results[kernels[0]][0]
    steps = len(result.time) - 1
    nodes = result.reaches["L1"] + 1
    updates = steps * nodes

    t0 = time.perf_counter()
    loop = plain_loop(system, result)
    wall_loop = time.perf_counter() - t0

    env = result.envelopes["L1"]
    print(f"line: {LENGTH:.0f} m, {result.reaches['L1']} reaches, wave speed "
          f"{result.wave_speeds['L1'].used:.1f} m/s (Korteweg), dt = {result.dt * 1e3:.3f} ms")
    print(f"simulated {result.duration:.1f} s: {steps} steps x {nodes} nodes = "
          f"{updates / 1e6:.2f} M node-updates; friction '{result.friction}'")
    print(f"peak valve head {result.valve_head.max():.2f} m, lowest head on the line "
          f"{env.min_head.min():.2f} m, status {result.status}")
    labels = {"compiled": "compiled kernel (numba)", "numpy": "numpy-vectorised kernel"}
    for kernel in kernels:
        res, wall = results[kernel]
        e = res.envelopes["L1"]
        dev = max(np.abs(np.asarray(loop["max_head"]) - e.max_head).max(),
                  np.abs(np.asarray(loop["min_head"]) - e.min_head).max(),
                  np.abs(np.asarray(loop["valve_head"]) - res.valve_head).max())
        print(f"{labels[kernel] + f', best of {repeats}:':36s}{wall:8.4f} s "
              f"{updates / wall / 1e6:7.1f} M node-updates/s {wall / steps * 1e6:7.2f} us/step")
        print(f"{'':36s}ratio to the plain loop {wall_loop / wall:6.1f}x, "
              f"largest head difference {dev:.1e} m")
    print(f"{'plain Python loop:':36s}{wall_loop:8.4f} s "
          f"{updates / wall_loop / 1e6:7.1f} M node-updates/s {wall_loop / steps * 1e6:7.2f} us/step")
    print("(core times are whole simulate_elastic calls: steady start, grid, valve law, "
          "stepping,\n envelope and series)")
    return wall_loop / results[kernels[0]][1]


def load_costs() -> None:
    """One-off cost of the compiled kernel in a new process: numba's import and start-up and
    loading the kernel from numba's on-disk cache, or compiling it when there is no cache.

    Measured as the first compiled run of a short case less a numpy run of the same case,
    both after a warm-up run that has imported scipy and the rest.
    """
    code = (
        "import sys, time\n"
        "sys.path.insert(0, %r)\n"
        "from bench_elastic import bench_system\n"
        "from workbench.core.elastic import simulate_elastic\n"
        "system = bench_system(20)\n"
        "simulate_elastic(system, 'L1', duration=0.5, kernel='numpy')\n"
        "t0 = time.perf_counter()\n"
        "simulate_elastic(system, 'L1', duration=0.5, kernel='numpy')\n"
        "t1 = time.perf_counter()\n"
        "simulate_elastic(system, 'L1', duration=0.5, kernel='compiled')\n"
        "t2 = time.perf_counter()\n"
        "print((t2 - t1) - (t1 - t0))\n"
    ) % str(Path(__file__).resolve().parent)
    cache = Path(elastic_kernel.__file__).resolve().parent / "__pycache__"
    # numba caches each compiled function beside the module that defines it

    def run_fresh() -> float:
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                             check=True).stdout
        return float(out.split()[-1])

    run_fresh()  # make sure the cache holds this source's kernel
    warm = sorted(run_fresh() for _ in range(3))[1]
    saved = {p: p.read_bytes() for p in cache.glob("*.nb*")}
    for p in saved:
        p.unlink()
    try:
        cold = run_fresh()
    finally:
        for p, data in saved.items():  # put the cache back as it was
            p.write_bytes(data)
    print(f"loading the compiled kernel in a new process: {warm:.2f} s from numba's on-disk "
          f"cache (median of 3), {cold:.2f} s compiling it with no cache")
    print(f"'auto' keeps a run under {elastic_kernel.AUTO_COMPILED_UPDATES / 1e6:.0f} M "
          "node-updates on numpy until the compiled kernel has run in the process")


def main() -> None:
    print("== three-line branched system: 200 reaches a line, 120 s ==")
    compare_branched()
    print()
    print("== the single-line case: 2 km, 200 reaches, 120 s ==")
    ratio = compare(REACHES, DURATION)
    print(f"target: at least 50x the plain loop; compiled kernel {ratio:.1f}x: "
          f"{'met' if ratio >= 50 else 'NOT met'}")
    print()
    print("== scaling: the same line with 2000 reaches, 6 s simulated ==")
    compare(10 * REACHES, 6.0, repeats=3)
    if elastic_kernel.compiled_available():
        print()
        print("== one-off costs of the compiled kernel ==")
        load_costs()
    else:
        print("numba is not installed: only the numpy kernel was measured")




# ---------------------------------------------------------------- a three-line branched system


def branched_system(reaches: int = REACHES) -> System:
    """HEAD (150 m) -> L1, 1.5 km DN300 -> J1 -> L2, 1.4 km DN250 -> valve closing over 20 s
    -> TAIL (130 m); J1 -> L3, 1.2 km DN200 -> TANK (125 m). Steel walls, Korteweg speeds."""
    from workbench.core.model import Junction

    fluid = FluidProps("water", 998.207, 1.0016e-3, 2339.2, 2.19e9, 293.15)
    wall = dict(roughness=4.5e-5, wall_thickness=0.0095, elastic_modulus=207e9)
    valve = Valve("linear", k_open=3.0, opening=1.0,
                  schedule=ValveSchedule((1.0, 21.0), (1.0, 0.0)))
    lines = {
        "L1": Line("L1", "HEAD", "J1", 1500.0, 0.3, surge=SurgeSettings("elastic", reaches),
                   **wall),
        "L2": Line("L2", "J1", "TAIL", 1400.0, 0.25, valve=valve,
                   surge=SurgeSettings("elastic", reaches), **wall),
        "L3": Line("L3", "J1", "TANK", 1200.0, 0.2, surge=SurgeSettings("elastic", reaches),
                   **wall),
    }
    return System("bench tee", fluid,
                  {"HEAD": Reservoir("HEAD", "constant_level", 0.0, 150.0),
                   "TAIL": Reservoir("TAIL", "constant_level", 0.0, 130.0),
                   "TANK": Reservoir("TANK", "constant_level", 0.0, 125.0)},
                  {"J1": Junction("J1", 0.0)}, {}, lines)


def plain_loop_branched(system: System, result) -> dict:
    """The branched run as a plain Python loop over reaches (lists of floats): interior
    nodes by C+ and C-, the reservoir entrance, the junction ``H = sum(C/B)/sum(1/B)``, the
    valve to TAIL and the exit into TANK (Wylie & Streeter 1993, ch. 3). Grid, friction,
    initial state and valve law from the core result's set-up; no cavity forms."""
    from workbench.core.valve import opening_at, relative_flow_coefficient, valve_k

    ids = ("L1", "L2", "L3")
    dt = result.dt
    n = {lid: result.reaches[lid] for lid in ids}
    area = {lid: math.pi * system.lines[lid].diameter ** 2 / 4.0 for lid in ids}
    b = {lid: result.wave_speeds[lid].used / (G * area[lid]) for lid in ids}
    q0 = result.initial_flows
    h = {lid: [float(v) for v in result.envelopes[lid].initial_head] for lid in ids}
    q = {lid: [q0[lid]] * (n[lid] + 1) for lid in ids}
    r = {lid: (h[lid][0] - h[lid][-1]) / (n[lid] * q0[lid] * abs(q0[lid])) for lid in ids}
    k_in = {lid: (1.0 + system.lines[lid].entrance_k) / (2.0 * G * area[lid] ** 2)
            for lid in ids}
    v = system.lines["L2"].valve
    steps = len(result.time) - 1
    x = np.array([opening_at(v, float(t)) for t in dt * np.arange(steps + 1)])
    kappa = (np.asarray(valve_k(v.k_open, relative_flow_coefficient(v.characteristic, x)))
             / (2.0 * G * area["L2"] ** 2)).tolist()
    h_max = {lid: h[lid][:] for lid in ids}
    hn = {lid: h[lid][:] for lid in ids}
    qn = {lid: q[lid][:] for lid in ids}
    sqrt = math.sqrt

    def end_flow(bb, kk, delta):
        return 0.0 if kk == math.inf else 2.0 * delta / (bb + sqrt(bb * bb + 4.0 * kk * abs(delta)))

    for k in range(1, steps + 1):
        cp, cm = {}, {}
        for lid in ids:
            hh, qq, bb, rr, N = h[lid], q[lid], b[lid], r[lid], n[lid]
            for i in range(1, N):
                qa, qb = qq[i - 1], qq[i + 1]
                c_p = hh[i - 1] + bb * qa - rr * qa * abs(qa)
                c_m = hh[i + 1] - bb * qb + rr * qb * abs(qb)
                hn[lid][i] = 0.5 * (c_p + c_m)
                qn[lid][i] = (c_p - c_m) / (2.0 * bb)
            qa, qb = qq[N - 1], qq[1]
            cp[lid] = hh[N - 1] + bb * qa - rr * qa * abs(qa)
            cm[lid] = hh[1] - bb * qb + rr * qb * abs(qb)
        # HEAD entrance into L1
        qp = end_flow(b["L1"], k_in["L1"] if 150.0 - cm["L1"] >= 0 else 0.0, 150.0 - cm["L1"])
        hn["L1"][0], qn["L1"][0] = cm["L1"] + b["L1"] * qp, qp
        # junction J1: L1 ends, L2 and L3 start
        hj = (cp["L1"] / b["L1"] + cm["L2"] / b["L2"] + cm["L3"] / b["L3"]) / (
            1.0 / b["L1"] + 1.0 / b["L2"] + 1.0 / b["L3"])
        hn["L1"][-1], qn["L1"][-1] = hj, (cp["L1"] - hj) / b["L1"]
        for lid in ("L2", "L3"):
            hn[lid][0], qn[lid][0] = hj, (hj - cm[lid]) / b[lid]
        # valve to TAIL at the end of L2, exit into TANK at the end of L3
        for lid, head, kv in (("L2", 130.0, kappa[k]), ("L3", 125.0, 0.0)):
            delta = cp[lid] - head
            qp = end_flow(b[lid], kv if delta >= 0 else kv + k_in[lid], delta)
            hn[lid][-1], qn[lid][-1] = cp[lid] - b[lid] * qp, qp
        for lid in ids:
            hm = h_max[lid]
            for i, value in enumerate(hn[lid]):
                if value > hm[i]:
                    hm[i] = value
            h[lid], hn[lid] = hn[lid], h[lid]
            q[lid], qn[lid] = qn[lid], q[lid]
    return {"max_head": h_max, "steps": steps}


def compare_branched(duration: float = DURATION, repeats: int = 3) -> None:
    """The issue's target: 200 reaches x 120 s of a three-line branched system."""
    system = branched_system()
    kernels = ["compiled", "numpy"] if elastic_kernel.compiled_available() else ["numpy"]
    runs = {}
    for kernel in kernels:
        simulate_elastic(system, "L2", duration=1.0, kernel=kernel)  # warm-up
        walls = []
        for _ in range(repeats):
            t0 = time.perf_counter()
            res = simulate_elastic(system, "L2", duration=duration, kernel=kernel)
            walls.append(time.perf_counter() - t0)
        assert res.success and res.kernel == kernel, res.message
        runs[kernel] = (res, min(walls))
    res = runs[kernels[0]][0]
    nodes = sum(c + 1 for c in res.reaches.values())
    steps = len(res.time) - 1
    print(f"lines {res.line_ids}, reaches {res.reaches}, dt = {res.dt * 1e3:.3f} ms, "
          f"largest wave-speed change "
          f"{100 * max(abs(w.adjustment) for w in res.wave_speeds.values()):.2f} %")
    print(f"simulated {res.duration:.0f} s: {steps} steps x {nodes} nodes = "
          f"{steps * nodes / 1e6:.2f} M node-updates; status {res.status}, "
          f"cavities {len(res.cavity_zones)}")
    t0 = time.perf_counter()
    loop = plain_loop_branched(system, res)
    wall_loop = time.perf_counter() - t0
    for kernel in kernels:
        r, wall = runs[kernel]
        dev = max(float(np.abs(np.asarray(loop["max_head"][lid]) - r.envelopes[lid].max_head)
                        .max()) for lid in r.line_ids)
        print(f"{kernel:9s} kernel, best of {repeats}: {wall:7.3f} s "
              f"(target under 2 s: {'met' if wall < 2.0 else 'NOT met'}), "
              f"{wall_loop / wall:6.1f}x the plain loop (target 50x: "
              f"{'met' if wall_loop / wall >= 50 else 'NOT met'}), "
              f"largest head difference {dev:.1e} m")
    print(f"plain Python loop: {wall_loop:7.2f} s")


if __name__ == "__main__":
    main()
