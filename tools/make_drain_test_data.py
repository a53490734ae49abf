"""Write the invented level log of the wash-water tank drain test (a demo, not plant data).

The demo project ``projects/fellgate_wash_tank_drain_test.toml`` states the handbook
roughness of new commercial steel for its drain line. This script makes the "measured" level
trace the calibration demo fits: the same model with an aged-pipe roughness that the project
does not state (:data:`AGED_ROUGHNESS`), sampled every minute as a plant historian would log
it, with transmitter noise from a fixed seed, rounded to the centimetre, one reading lost to
a communications gap, from the opening of the drain valve until the level falls below
:data:`LAST_LEVEL`.

Run by hand after changing the demo (never at install or at run time):

    .venv/bin/python tools/make_drain_test_data.py
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import numpy as np

from workbench.core.calibration import FitParameter, with_parameters
from workbench.core.transient import simulate
from workbench.project.document import load_project

ROOT = Path(__file__).resolve().parents[1]
PROJECT = ROOT / "projects" / "fellgate_wash_tank_drain_test.toml"
CSV = ROOT / "projects" / "fellgate_wash_tank_drain_test_levels.csv"

#: Roughness of the aged line that made the invented data [m].
AGED_ROUGHNESS = 0.6e-3
#: Transmitter noise, one standard deviation [m].
NOISE = 0.008
#: Seed of the noise (fixed, so the file is the same on every run).
SEED = 420
#: The log ends at the first reading below this level [m].
LAST_LEVEL = 0.3
#: Reading interval [s] and the time the drain valve was opened.
INTERVAL = 60.0
START = dt.datetime(2026, 11, 12, 7, 40, 0)
#: Reading lost to a communications gap (index from the first reading).
GAP = 17


def main() -> None:
    project = load_project(PROJECT)
    line = next(iter(project.system.lines))
    aged = with_parameters(project.system, [FitParameter("aged", "roughness", line, 0.0, 1.0, 0.0)],
                           [AGED_ROUGHNESS])
    result = simulate(aged, duration=2 * 3600.0, stop_when=None, output_interval=5.0, rtol=1e-9)
    times = np.arange(0.0, result.t[-1], INTERVAL)
    level = np.interp(times, result.t, result.levels[0])
    noisy = np.round(level + np.random.default_rng(SEED).normal(0.0, NOISE, times.size), 2)
    end = int(np.flatnonzero(level < LAST_LEVEL)[0]) + 1
    rows = ["timestamp,LT-420,quality"]
    for i, (t, value) in enumerate(zip(times[:end], noisy[:end])):
        stamp = (START + dt.timedelta(seconds=float(t))).isoformat()
        rows.append(f"{stamp},,comms" if i == GAP else f"{stamp},{value:.2f},good")
    CSV.write_text("\n".join(rows) + "\n", encoding="utf-8")
    print(f"wrote {CSV.name}: {end} readings, drained (model) at {result.drain_times}")


if __name__ == "__main__":
    main()
