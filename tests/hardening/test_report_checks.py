"""``report`` refuses what ``solve`` and ``simulate`` refuse: the same consistency checks.

A record is signed by a checker: it must never publish a result that the other commands
would call an internal error. Two open discharges joined by one line give a steady answer
that breaks the energy balance (a 5 m head difference with no flow and no loss); both
commands must refuse it with the same words and exit status 3.
"""

from __future__ import annotations

import subprocess
import sys

from tests.hardening.harness import ROOT

TWO_DISCHARGES = """schema = 1

[project]
title = "Two open discharges joined by a line"

[fluid]
kind = "water"
temperature = "20 degC"

[receivers.A]
kind = "open_discharge"
elevation = "5 m"

[receivers.B]
kind = "open_discharge"
elevation = "0 m"

[lines.AB]
from = "A"
to = "B"
length = "20 m"
inner_diameter = "80 mm"
roughness = "0.045 mm"
"""


def _run(*args):
    return subprocess.run([sys.executable, "-m", "workbench", *args], capture_output=True,
                          text=True, cwd=ROOT, timeout=300)


def test_report_refuses_a_result_that_solve_refuses_with_the_same_words(tmp_path):
    path = tmp_path / "two_discharges.toml"
    path.write_text(TWO_DISCHARGES)
    solve = _run("solve", str(path))
    record = tmp_path / "record.md"
    report = _run("report", str(path), "--output", str(record))
    assert solve.returncode == report.returncode == 3
    assert "internal consistency check failed" in report.stderr
    assert report.stderr.strip() == solve.stderr.strip()
    assert not record.exists()
