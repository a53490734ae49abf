"""Benchmark of the project document: import, first and later loads, one edit, format.

Run: .venv/bin/python tests/benchmarks/bench_project.py   (prints figures; not a test)
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "projects").glob("*.toml"))


def main() -> None:
    code = "import time; t = time.perf_counter(); import workbench.project.document; " \
           "print(time.perf_counter() - t)"
    runs = [float(subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                                 check=True).stdout) for _ in range(5)]
    print(f"import workbench.project.document: best {min(runs) * 1e3:.1f} ms of 5 fresh processes")

    from workbench.project.document import format_text, load_project, set_value

    t = time.perf_counter()
    load_project(DEMOS[0])
    print(f"first load (builds unit registry, imports property and pipe tables): "
          f"{(time.perf_counter() - t) * 1e3:.0f} ms")
    for path in DEMOS:
        n = 20
        t = time.perf_counter()
        for _ in range(n):
            project = load_project(path)
        load_ms = (time.perf_counter() - t) / n * 1e3
        line = next(iter(project.system.lines))
        t = time.perf_counter()
        for _ in range(n):
            set_value(project, f"lines.{line}.length", "1230 m")
        edit_ms = (time.perf_counter() - t) / n * 1e3
        text = path.read_text(encoding="utf-8")
        t = time.perf_counter()
        for _ in range(n):
            format_text(text)
        fmt_ms = (time.perf_counter() - t) / n * 1e3
        print(f"{path.name}: load {load_ms:.1f} ms, set_value {edit_ms:.1f} ms, "
              f"format {fmt_ms:.1f} ms")


if __name__ == "__main__":
    main()
