"""Start-up: ``workbench solve`` and ``workbench open`` on each demo, as whole processes.

Prints, for each demo, the CPU time (user + system of the child process) and the wall time,
median of several runs, of

* the yardstick ``python -c "import numpy, scipy.sparse"`` (the least a numeric Python tool
  pays to start);
* ``workbench solve DEMO`` (output to the null device) and its ratio to the yardstick
  (target: at most 2x), the two run in turn so that a change in the machine's load
  between demos does not tilt the ratio;
* ``workbench open DEMO`` to its first result: a headless app, as the CLI builds it, from
  process start until the steady solution is shown (CPU of the process at that moment).

The package's bytecode is compiled first (``compileall``), as ``pip install`` does and as
any run does once where ``PYTHONDONTWRITEBYTECODE`` is not set: without it every process
compiles the workbench modules from source again (about 0.25 s of CPU), which no installed
copy pays and the yardstick's libraries do not pay either.

Run: .venv/bin/python tests/benchmarks/bench_startup.py [RUNS]
"""

from __future__ import annotations

import os
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "projects").glob("*.toml"))
RUNS = int(sys.argv[1]) if len(sys.argv) > 1 else 5

#: Runs in the child: open the demo headless and print the CPU time when the first steady
#: result is on screen.
OPEN_SCRIPT = """
import asyncio, sys, time
from workbench.app.factory import make_app

async def main():
    app = make_app(path=sys.argv[1], prebuild_forms=False)
    async with app.run_test(size=(80, 24)) as pilot:
        while app.steady_status not in ("fresh", "failed"):
            await pilot.pause(0.01)
        print(time.process_time(), app.steady_status)

asyncio.run(main())
"""


def timed(argv: list[str]) -> tuple[float, float, str]:
    """(CPU s, wall s, stdout) of one child process."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    proc = subprocess.run(argv, capture_output=True, text=True, cwd=ROOT,
                          env=dict(os.environ, NO_COLOR="1"))
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if proc.returncode != 0:
        raise SystemExit(f"{' '.join(argv)} exited {proc.returncode}:\n{proc.stderr[-2000:]}")
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return cpu, wall, proc.stdout


def median_of(argv: list[str]) -> tuple[float, float]:
    runs = [timed(argv)[:2] for _ in range(RUNS)]
    return statistics.median(r[0] for r in runs), statistics.median(r[1] for r in runs)


def open_to_first_result(demo: Path) -> tuple[float, float]:
    cpus, walls = [], []
    for _ in range(RUNS):
        t0 = time.perf_counter()
        _, _, out = timed([sys.executable, "-c", OPEN_SCRIPT, str(demo)])
        cpu_at_result, status = out.split()
        cpus.append(float(cpu_at_result))
        walls.append(time.perf_counter() - t0)  # includes the app's shutdown: an upper bound
    return statistics.median(cpus), statistics.median(walls)


def main() -> None:
    python = sys.executable
    workbench = str(Path(python).with_name("workbench"))
    subprocess.run([python, "-m", "compileall", "-q", str(ROOT / "workbench")], check=True)
    yardstick = [python, "-c", "import numpy, scipy.sparse"]
    base_cpu, base_wall = median_of(yardstick)
    print(f"median of {RUNS} runs; CPU = user + system of the process; bytecode compiled first")
    print(f"{'yardstick: import numpy, scipy.sparse':48s} CPU {base_cpu:6.3f} s  wall {base_wall:6.3f} s")
    for demo in DEMOS:
        runs = [(timed(yardstick)[0], *timed([workbench, "solve", str(demo)])[:2])
                for _ in range(RUNS)]
        base = statistics.median(r[0] for r in runs)
        cpu, wall = (statistics.median(r[i] for r in runs) for i in (1, 2))
        print(f"{'solve ' + demo.stem:48s} CPU {cpu:6.3f} s  wall {wall:6.3f} s  "
              f"{cpu / base:4.2f}x the yardstick's CPU alongside ({base:5.3f} s; target <= 2x)")
    for demo in DEMOS:
        cpu, wall = open_to_first_result(demo)
        print(f"{'open ' + demo.stem + ', first result':48s} CPU {cpu:6.3f} s  wall {wall:6.3f} s "
              "(wall includes closing the app)")


if __name__ == "__main__":
    main()
