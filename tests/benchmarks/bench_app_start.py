"""Time to the first steady result in the workbench app against ``workbench solve``.

For each demo project, as whole processes (interpreter start included): the app is
built as ``workbench open`` builds it and run headless at 80x24; the script records
when the first frame is painted and when the first steady result is on screen, then
exits. ``workbench solve`` is run on the same file. Wall and CPU (user + system) times
are the median of a few runs; the ratio is the app's first result over solve's whole run.
On a busy machine wall times say little, so the script also prints the app's critical
path in CPU seconds (``path``: the app process's CPU until it waits for the child, or the
child's CPU from its start if longer, then the app's CPU from the answer to the result;
what the wall time would be with a free core for each process) and its ratio to solve's
CPU (``path ratio``).
The app's CPU includes its child process that reads and solves the file on the other
core (``workbench.app.solve_ahead``); ``--no-ahead`` runs the app without it.
The machine may be shared: read the CPU columns first.

    .venv/bin/python tests/benchmarks/bench_app_start.py [--runs 3] [--no-ahead] [projects/X.toml ...]
"""

from __future__ import annotations

import argparse
import os
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

APP_SCRIPT = r"""
import resource, subprocess, sys, time
T0 = time.perf_counter()
from workbench.app.factory import make_app

# CPU seconds of this process when the child starts, when the app starts waiting for its
# answer and when it has it, and the child's own CPU
cpu = {"spawn": time.process_time()}
# as `workbench open` builds it: the child process that reads and solves the file is
# started before Textual is imported (sys.argv[2] == "0" leaves it out, for comparison)
app = make_app(path=sys.argv[1], solve_ahead=sys.argv[2] == "1")
from workbench.app.app import WorkbenchApp

real_communicate = subprocess.Popen.communicate
def communicate(self, *args, **kwargs):
    cpu["wait"] = time.process_time()
    try:
        return real_communicate(self, *args, **kwargs)
    finally:
        cpu["answer"] = time.process_time()
        usage = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu["child"] = usage.ru_utime + usage.ru_stime
subprocess.Popen.communicate = communicate

marks = {}

def painted():
    marks.setdefault("frame", time.perf_counter() - T0)

orig_mount = WorkbenchApp.on_mount
def on_mount(self):
    orig_mount(self)
    self.call_after_refresh(painted)
WorkbenchApp.on_mount = on_mount

orig_solved = WorkbenchApp.on_workbench_app_steady_solved
def solved(self, message):
    orig_solved(self, message)
    if self.steady_status in {"fresh", "failed"} and "result" not in marks:
        def shown():
            marks["result"] = time.perf_counter() - T0
            cpu["result"] = time.process_time()
            self.exit(0)
        self.call_after_refresh(shown)
WorkbenchApp.on_workbench_app_steady_solved = solved

app.run(headless=True, size=(80, 24))
if "child" in cpu:  # each process on a core of its own: the longer of the two, then the rest
    path = (max(cpu["wait"], cpu["spawn"] + cpu["child"]) + cpu["result"] - cpu["answer"])
else:
    path = cpu["result"]
print(f"frame {marks.get('frame', float('nan')):.3f} result {marks.get('result', float('nan')):.3f}"
      f" path {path:.3f}")
"""


def run(cmd: list[str]) -> tuple[float, float, str]:
    """Wall and CPU seconds of one child process, and its output."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    out = subprocess.run(cmd, capture_output=True, text=True, cwd=ROOT,
                         env={**os.environ, "NO_COLOR": "1"}, check=False)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    if out.returncode not in (0, 1, 2):
        raise SystemExit(f"{' '.join(cmd)} failed:\n{out.stderr}")
    return wall, cpu, out.stdout


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("projects", nargs="*", type=Path)
    parser.add_argument("--runs", type=int, default=3)
    parser.add_argument("--no-ahead", action="store_true",
                        help="load and solve in the app's own process (no child)")
    args = parser.parse_args()
    projects = args.projects or sorted((ROOT / "projects").glob("*.toml"))
    exe = Path(sys.executable)
    workbench = exe.with_name("workbench")
    print(f"{'project':38} {'solve wall/cpu s':>16} {'frame s':>7} "
          f"{'result wall/cpu s':>17} {'ratio':>5} {'path s':>6} {'path ratio':>10}")
    boot = statistics.median(run([str(exe), "-c", "pass"])[0] for _ in range(3))
    for project in projects:
        solve, app, frames, results, paths = [], [], [], [], []
        for _ in range(args.runs):
            wall, cpu, _out = run([str(workbench), "solve", str(project)])
            solve.append((wall, cpu))
            wall, cpu, out = run([str(exe), "-c", APP_SCRIPT, str(project),
                                  "0" if args.no_ahead else "1"])
            app.append((wall, cpu))
            words = out.split()
            frames.append(float(words[1]))
            results.append(float(words[3]))
            paths.append(float(words[5]))
        s_wall = statistics.median(w for w, _c in solve)
        s_cpu = statistics.median(c for _w, c in solve)
        a_cpu = statistics.median(c for _w, c in app)
        # measured inside the app's process from its first line; the interpreter's own
        # start (a bare python run) is added so both sides are whole processes
        frame = statistics.median(frames) + boot
        result = statistics.median(results) + boot
        path = statistics.median(paths)
        print(f"{project.name:38} {s_wall:7.2f}/{s_cpu:<8.2f} {frame:7.2f} "
              f"{result:8.2f}/{a_cpu:<8.2f} {result / s_wall:5.2f} {path:6.2f} "
              f"{path / s_cpu:10.2f}")

if __name__ == "__main__":
    main()
