"""The ``tank.overflow`` danger fires only for a tank that spills.

A tank that starts at its overflow level spills only if what flows in exceeds what flows
out there: the surplus at the overflow level is ``feed - Q_out(level)``, with ``Q_out`` the
steady flow of its outlet line at that level (continuity for the tank as a control volume;
the steady solver, checked elsewhere against Colebrook and the minor-loss tables, gives
``Q_out``). A surplus below zero means the level falls at once and nothing spills: a note
(``tank.at_overflow``), not a danger.
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.hardening.harness import ROOT
from workbench.core.network import solve_steady
from workbench.core.transient import simulate
from workbench.project.document import load_project_text

DRAIN = ROOT / "projects" / "fellgate_neutraliser_drain.toml"
FULL = 'level = "5.2 m"'  # the demo tank's height: its overflow level


def _drain_at_overflow(feed_l_s: float | None = None, start: str = "at_rest"):
    text = DRAIN.read_text().replace('level = "4.6 m"', FULL, 1)
    text = text.replace('initial_state = "at_rest"', f'initial_state = "{start}"', 1)
    if feed_l_s is not None:
        text = text.replace(FULL, f'{FULL}\ninflow = "{feed_l_s} L/s"', 1)
    return load_project_text(text).system


def _outflow_at_overflow() -> float:
    """The outlet's steady flow with the tank at its overflow level [m3/s]."""
    system = _drain_at_overflow()
    return solve_steady(system).lines["210-DR-04"].flow


def _codes(result, severity=None):
    return [w.code for w in result.warnings if severity in (None, w.severity)]


def test_a_tank_starting_at_its_overflow_level_that_drains_gets_no_overflow_danger():
    result = simulate(_drain_at_overflow())
    assert result.success, result.message
    assert "tank.overflow" not in _codes(result)
    note = next(w for w in result.warnings if w.code == "tank.at_overflow")
    assert note.severity == "info" and "does not spill" in note.message
    assert float(np.max(result.spills)) == 0.0


def test_a_tank_starting_full_with_its_line_at_rest_spills_the_feed_until_the_line_takes_it():
    q_out = _outflow_at_overflow()
    result = simulate(_drain_at_overflow(round(0.5 * q_out * 1000, 3)), duration=600.0)
    assert result.success, result.message
    assert "tank.overflow" in _codes(result, "danger")
    k = result.tank_ids.index("TK-210")
    # at t = 0 the line is at rest: the whole feed spills
    assert float(result.spills[k][0]) == pytest.approx(round(0.5 * q_out * 1000, 3) / 1000)


def test_a_tank_starting_at_its_overflow_level_with_a_feed_below_its_outflow_does_not_spill():
    # flowing at the start (from rest the line would need a second or two to take the
    # feed, and the tank would spill meanwhile: a real, if short, spill)
    q_out = _outflow_at_overflow()
    result = simulate(_drain_at_overflow(round(0.5 * q_out * 1000, 3), "steady"),
                      duration=600.0)
    assert result.success, result.message
    assert "tank.overflow" not in _codes(result)
    assert "tank.at_overflow" in _codes(result, "info")


def test_a_tank_starting_at_its_overflow_level_with_a_feed_above_its_outflow_spills_the_surplus():
    q_out = _outflow_at_overflow()
    feed = round(2.0 * q_out * 1000, 3) / 1000
    result = simulate(_drain_at_overflow(feed * 1000, "steady"), duration=600.0)
    assert result.success, result.message
    danger = next(w for w in result.warnings if w.code == "tank.overflow")
    assert danger.severity == "danger"
    assert "tank.at_overflow" not in _codes(result)
    k = result.tank_ids.index("TK-210")
    # held at overflow, the spill is the feed less the outlet's steady flow at that level
    assert float(np.max(result.spills[k])) == pytest.approx(feed - q_out, rel=1e-3)
