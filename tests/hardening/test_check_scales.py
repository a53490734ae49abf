"""``check`` takes time linear in the number of problems, not quadratic.

Each problem's line used to be found by rescanning the whole file (10,000 unknown keys took
171 s). The lines of all problems are now indexed once. Measured as process CPU time, with
a bound loose enough for a busy machine: ten times the problems must cost well under the
hundred times a rescan per problem would.
"""

from __future__ import annotations

import time

import pytest

from tests.hardening.harness import ROOT
from workbench.project.document import ProjectError, load_project_text

DEMO = (ROOT / "projects" / "fellgate_neutraliser_drain.toml").read_text()


def _cpu_seconds_to_refuse(unknown_keys: int) -> float:
    junk = "\n".join(f"unknown_{i} = 1" for i in range(unknown_keys))
    text = DEMO.replace("[fluid]", junk + "\n\n[fluid]", 1)
    start = time.process_time()
    with pytest.raises(ProjectError) as refused:
        load_project_text(text)
    spent = time.process_time() - start
    problems = refused.value.problems
    assert len(problems) == unknown_keys
    assert problems[-1].line == 19 + unknown_keys  # each problem still has its own line
    return spent


def test_ten_times_the_problems_cost_about_ten_times_the_time():
    small = min(_cpu_seconds_to_refuse(2_000) for _ in range(2))
    large = _cpu_seconds_to_refuse(20_000)
    assert large < 30 * max(small, 0.01), (small, large)
