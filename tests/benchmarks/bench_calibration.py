"""Benchmark: calibrating the drain-test demo (one roughness against 38 level readings).

Prints the wall and CPU time of the whole fit, the model runs it made and the time per run,
the fitted roughness with its 95 % interval, the roughness the readings were invented with
(``tools/make_drain_test_data.py``) and the model's drain time before and after.

Run: ``.venv/bin/python tests/benchmarks/bench_calibration.py``. A script that prints
figures, not a timed test.
"""

from __future__ import annotations

import importlib.util
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "projects" / "fellgate_wash_tank_drain_test.toml"
KEY = "lines.420-DR-07.roughness"


def main() -> None:
    from workbench.core.calibration import with_parameters
    from workbench.core.transient import simulate
    from workbench.project.calibration import calibrate
    from workbench.project.document import load_project

    spec = importlib.util.spec_from_file_location("gen", ROOT / "tools" / "make_drain_test_data.py")
    gen = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(gen)
    project = load_project(DEMO)
    wall, cpu = time.perf_counter(), time.process_time()
    run = calibrate(project, [f"{KEY}=0.01..3 mm"])
    wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
    res = run.result
    print(f"fit: {res.message}; {res.evaluations} model runs in {wall:.2f} s wall, {cpu:.2f} s CPU "
          f"({wall / max(res.evaluations, 1):.3f} s per run)")
    lo, hi = res.ci95[0] * 1e3
    print(f"roughness: handbook {res.parameters[0].start * 1e3:.3f} mm -> fitted "
          f"{res.values[0] * 1e3:.4f} mm (95 % {lo:.4f} to {hi:.4f} mm); invented with "
          f"{gen.AGED_ROUGHNESS * 1e3:.4f} mm")
    for label, value in (("before", res.parameters[0].start), ("after", res.values[0])):
        system = with_parameters(project.system, res.parameters, [value])
        drained = simulate(system).drain_times.get("TK-420")
        print(f"model drain time {label}: {drained / 60:.2f} min")
    print(f"RMS residual: before {res.rms_before['drain_test_nov'] * 1e3:.1f} mm, "
          f"after {res.rms_after['drain_test_nov'] * 1e3:.2f} mm")


if __name__ == "__main__":
    main()
