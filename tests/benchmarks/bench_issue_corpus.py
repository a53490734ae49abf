"""The long form of the issue corpus: many generated files through real ``workbench`` processes.

Each case of :mod:`tests.hardening.issue_corpus` goes through ``check``, ``solve --json``,
``simulate --json`` (60 s of plant time) and ``report`` in a fresh process with a CPU-time
cap, judged as in the hardening tests; the figures are the count of calls, how they ended,
the slowest call per command, and ``check`` on a file with many problems.

Run: .venv/bin/python tests/benchmarks/bench_issue_corpus.py [CASES] [SCHEDULE_POINTS]
(prints figures; not a test; default 70 cases, 2,000-point valve schedules)
"""

from __future__ import annotations

import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from tests.hardening.harness import run_subprocess  # noqa: E402
from tests.hardening.issue_corpus import KINDS, issue_case  # noqa: E402


def main() -> None:
    cases = int(sys.argv[1]) if len(sys.argv) > 1 else 10 * len(KINDS)
    points = int(sys.argv[2]) if len(sys.argv) > 2 else 2000
    ended: Counter = Counter()
    slowest: dict[str, tuple[float, str]] = {}
    failures = []
    t0 = time.perf_counter()
    with tempfile.TemporaryDirectory() as folder:
        for seed in range(cases):
            case = issue_case(seed, schedule_points=points)
            path = Path(folder) / f"case{seed}.toml"
            path.write_text(case.text, encoding="utf-8")
            for argv in (["check", str(path)], ["solve", str(path), "--json"],
                         ["simulate", str(path), "--duration", "60 s", "--json"],
                         ["report", str(path), "--output", str(path.with_suffix(".md"))]):
                outcome = run_subprocess(argv, project_path=str(path), limit=600.0)
                ended[(argv[0], outcome.code if outcome.ok else "FAILED")] += 1
                if not outcome.ok:  # with how it ended, so the cause can be told
                    failures.append((case.name, argv[0],
                                     outcome.problems + [outcome.stderr.strip()[-400:]]))
                if outcome.seconds > slowest.get(argv[0], (0.0, ""))[0]:
                    slowest[argv[0]] = (outcome.seconds, case.name)
    calls = sum(ended.values())
    print(f"{cases} cases, {calls} calls in {time.perf_counter() - t0:.0f} s wall")
    for (command, code), count in sorted(ended.items(), key=str):
        print(f"  {command:9s} exit {code}: {count}")
    for command, (seconds, name) in slowest.items():
        print(f"  slowest {command}: {seconds:.1f} s wall ({name})")
    for name, command, problems in failures[:20]:
        print(f"  FAILED {command} {name}: {problems}")
    _check_scaling()


def _check_scaling() -> None:
    base = (ROOT / "projects" / "fellgate_neutraliser_drain.toml").read_text()
    with tempfile.TemporaryDirectory() as folder:
        for n in (2_000, 10_000, 100_000):
            junk = "\n".join(f"unknown_{i} = 1" for i in range(n))
            path = Path(folder) / f"unknown_{n}.toml"
            path.write_text(base.replace("[fluid]", junk + "\n\n[fluid]", 1))
            outcome = run_subprocess(["check", str(path)], project_path=str(path), limit=600.0)
            print(f"  check with {n:,} unknown keys: {outcome.seconds:.1f} s wall, exit {outcome.code}")


if __name__ == "__main__":
    main()
