"""Elastic surge (method of characteristics): vectorised core against a plain Python loop.

A 2 km steel line (DN 300, Korteweg wave speed) from a reservoir to a valve discharging to
a downstream reservoir, 200 reaches, 120 s of simulated time: a 6 s closure and the
oscillation after it. Prints the wall time and node-updates per second of
``workbench.core.elastic.simulate_elastic`` and of the same equations written as a plain
Python loop over reaches (Wylie & Streeter's textbook form, below), and their ratio.
Both runs use the same grid, friction and valve law and must give the same envelope.

Target: the vectorised core at least 50x the plain loop.

Run: .venv/bin/python tests/benchmarks/bench_elastic.py
"""

from __future__ import annotations

import math
import time

import numpy as np

from workbench.core.elastic import simulate_elastic
from workbench.core.model import (
    G,
    FluidProps,
    Line,
    Reservoir,
    SurgeSettings,
    System,
    Valve,
    ValveSchedule,
)

LENGTH = 2000.0
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


def compare(reaches: int, duration: float, repeats: int = 5) -> None:
    system = bench_system(reaches)
    simulate_elastic(system, "L1", duration=1.0)  # warm-up: imports, caches
    walls = []
    result = None
    for _ in range(repeats):
        t0 = time.perf_counter()
        result = simulate_elastic(system, "L1", duration=duration)
        walls.append(time.perf_counter() - t0)
    assert result.success, result.message
    steps = len(result.time) - 1
    nodes = result.reaches["L1"] + 1
    updates = steps * nodes
    wall_core = min(walls)

    t0 = time.perf_counter()
    loop = plain_loop(system, result)
    wall_loop = time.perf_counter() - t0

    env = result.envelopes["L1"]
    dev = max(np.abs(np.asarray(loop["max_head"]) - env.max_head).max(),
              np.abs(np.asarray(loop["min_head"]) - env.min_head).max(),
              np.abs(np.asarray(loop["valve_head"]) - result.valve_head).max())

    print(f"line: {LENGTH:.0f} m, {result.reaches['L1']} reaches, wave speed "
          f"{result.wave_speeds['L1'].used:.1f} m/s (Korteweg), dt = {result.dt * 1e3:.3f} ms")
    print(f"simulated {result.duration:.1f} s: {steps} steps x {nodes} nodes = "
          f"{updates / 1e6:.2f} M node-updates; friction '{result.friction}'")
    print(f"peak valve head {result.valve_head.max():.2f} m, lowest head on the line "
          f"{env.min_head.min():.2f} m, status {result.status}")
    print(f"vectorised core (best of {len(walls)}): {wall_core:8.3f} s  "
          f"{updates / wall_core / 1e6:8.2f} M node-updates/s  "
          f"({wall_core / steps * 1e6:.1f} us per step)")
    print(f"plain Python loop:              {wall_loop:8.3f} s  "
          f"{updates / wall_loop / 1e6:8.2f} M node-updates/s  "
          f"({wall_loop / steps * 1e6:.1f} us per step)")
    print(f"ratio (loop / core): {wall_loop / wall_core:.1f}x   (target >= 50x)")
    print(f"largest difference between the two (heads): {dev:.2e} m")


def main() -> None:
    print("== the benchmark case: 2 km, 200 reaches, 120 s ==")
    compare(REACHES, DURATION)
    print()
    print("== scaling: the same line with 2000 reaches, 6 s simulated ==")
    compare(10 * REACHES, 6.0, repeats=3)


if __name__ == "__main__":
    main()
