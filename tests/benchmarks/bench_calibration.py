"""Benchmark: calibrating the drain-test demo (one roughness against 38 level readings).

Prints the wall and CPU time of the whole fit, the model runs it made and the time per run,
the fitted roughness with its 95 % interval, the roughness the readings were invented with
(``tools/make_drain_test_data.py``) and the model's drain time before and after. Then the
same for a start far from the answer (a bore that drains the tank before the second
reading, tests/core/test_calibration.py) and for a junction's pressure trace
(tests/core/test_calibration_pressure.py).

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
    from workbench.core.calibration import fit, with_parameters
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

    for label, case in (("poor start (bore 60 mm, answer 25 mm)", _poor_start),
                        ("junction pressure trace (bore 31 mm, answer 25 mm)", _gauge)):
        observations, parameters = case()
        wall, cpu = time.perf_counter(), time.process_time()
        res = fit(observations, parameters)
        wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
        lo, hi = res.ci95[0] * 1e3
        print(f"{label}: {res.message}; {res.evaluations} model runs in {cpu:.2f} s CPU; "
              f"bore {res.values[0] * 1e3:.4f} mm (95 % {lo:.4f} to {hi:.4f} mm)")


def _poor_start():
    import numpy as np

    from tests.core.test_calibration import LAM_D, LAM_L, VISCOUS, _drain, laminar_levels
    from workbench.core.calibration import FitParameter, Observation
    from workbench.core.model import Line

    times = np.linspace(0.0, 10 * 3600.0, 11)
    system = _drain(VISCOUS, Line("L", "T", "O", LAM_L, 0.060, entrance_k=0.0), times[-1])
    obs = Observation("lam", "T", "level", times, laminar_levels(times, LAM_D), system)
    return [obs], [FitParameter("lines.L.inner_diameter", "diameter", "L", 0.015, 0.080, 0.060)]


def _gauge():
    from tests.core.test_calibration_pressure import BORE2, _gauge

    return [_gauge(noise=50.0)], [BORE2]


if __name__ == "__main__":
    import sys

    sys.path.insert(0, str(ROOT))
    main()
