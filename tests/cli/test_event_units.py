"""Event and warning texts of the rigid-column run follow the display unit system (issue: numbers
in messages in the user's units). Unit names: NIST SP 811 (gpm = US gallon per minute, ft)."""

from __future__ import annotations

from pathlib import Path

import pytest

from workbench.cli import main

DEMO = Path(__file__).resolve().parents[2] / "projects" / "fellgate_clearwell_filter_feed.toml"


@pytest.fixture
def simulate(capsys, monkeypatch):
    """``workbench simulate --units U DEMO`` in this process (``main``, as the installed
    command calls it; a fresh interpreter adds nothing to what is checked), 200 columns."""
    monkeypatch.setenv("COLUMNS", "200")

    def run(units: str) -> str:
        code = main(["simulate", "--units", units, str(DEMO)])
        out, err = capsys.readouterr()
        assert code == 0, err
        return out

    return run


def test_the_overflow_event_and_warning_speak_us_units_on_a_us_display(simulate) -> None:
    out = simulate("US")
    overflow = [line for line in out.splitlines() if "overflow level" in line]
    assert overflow, out
    assert all("ft" in line and "L/s" not in line and " m " not in line for line in overflow)
    assert "gpm" in out and "surplus spilling reaches" in out


def test_the_same_overflow_in_si_reads_metres_and_litres_per_second(simulate) -> None:
    out = simulate("SI")
    overflow = [line for line in out.splitlines() if "overflow level" in line]
    assert overflow and all(" m " in line for line in overflow)
    assert "L/s" in out
