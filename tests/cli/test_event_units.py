"""Event and warning texts of the rigid-column run follow the display unit system (issue: numbers
in messages in the user's units). Unit names: NIST SP 811 (gpm = US gallon per minute, ft)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

DEMO = Path(__file__).resolve().parents[2] / "projects" / "fellgate_clearwell_filter_feed.toml"


def _simulate(units: str) -> str:
    run = subprocess.run([sys.executable, "-m", "workbench", "simulate", "--units", units,
                          str(DEMO)], capture_output=True, text=True, env={"COLUMNS": "200",
                                                                          "PATH": ""})
    assert run.returncode == 0, run.stderr
    return run.stdout


def test_the_overflow_event_and_warning_speak_us_units_on_a_us_display() -> None:
    out = _simulate("US")
    overflow = [line for line in out.splitlines() if "overflow level" in line]
    assert overflow, out
    assert all("ft" in line and "L/s" not in line and " m " not in line for line in overflow)
    assert "gpm" in out and "surplus spilling reaches" in out


def test_the_same_overflow_in_si_reads_metres_and_litres_per_second() -> None:
    out = _simulate("SI")
    overflow = [line for line in out.splitlines() if "overflow level" in line]
    assert overflow and all(" m " in line for line in overflow)
    assert "L/s" in out
