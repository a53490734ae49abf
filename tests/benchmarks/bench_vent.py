"""Cost of modelling a tank's gas space: the condensate-tank demo drained open, through
vents of several bores, and sealed. Prints steps, right-hand-side evaluations, CPU time and
the outcome of each run.

Run: ``.venv/bin/python tests/benchmarks/bench_vent.py``.
"""

from __future__ import annotations

import time
from dataclasses import replace
from pathlib import Path

from workbench.core.model import Vent
from workbench.core.transient import simulate
from workbench.core.vent import bore_effective_area
from workbench.project.document import load_project

DEMO = Path(__file__).resolve().parents[2] / "projects" / "fellgate_condensate_tank_vent.toml"


def main() -> None:
    system = load_project(DEMO).system
    tank = system.reservoirs["TK-118"]
    cases = [("open (no vent key)", None)]
    cases += [(f"vent {d * 1000:g} mm, K 1.8", Vent(bore_effective_area(d, 1.8), d, 1.8))
              for d in (0.0266, 0.0525, 0.1023, 0.5)]
    cases.append(("sealed", Vent(0.0)))
    print(f"{'case':<22} {'steps':>6} {'rhs':>6} {'cpu s':>7} {'drained s':>10} "
          f"{'min gas kPa':>12}  outcome")
    for name, vent in cases:
        sysc = replace(system, reservoirs={"TK-118": replace(tank, vent=vent)})
        t0 = time.process_time()
        res = simulate(sysc)
        cpu = time.process_time() - t0
        drained = res.drain_times.get("TK-118")
        gas = f"{res.gas_pressures.min() / 1000:.4g}" if res.gas_pressures.size else "-"
        print(f"{name:<22} {res.nsteps:>6} {res.nfev:>6} {cpu:>7.2f} "
              f"{'-' if drained is None else f'{drained:.1f}':>10} {gas:>12}  {res.message}")


if __name__ == "__main__":
    main()
