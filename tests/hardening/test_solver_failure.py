"""Solver failures are reported in words with what to change, never as a result.

Non-convergence, a singular Newton system, an integration that stalls and a tank that
overflows: each through the core result (``success``, ``status``, ``message``) and through
the CLI (exit 1 with the reason on stderr after the file name; exit 0 with a warning for
the overflow, which is a result the engineer must see, not a failure).
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from tests.hardening.harness import ROOT, run_cli, simulate_argv
from workbench.cli.exit_codes import ExitCode
from workbench.core import network
from workbench.core.network import solve_steady
from workbench.core.transient import simulate
from workbench.project.document import load_project, load_project_text

NETWORK = ROOT / "projects" / "fellgate_cooling_water_network.toml"
TRANSFER = ROOT / "projects" / "fellgate_process_water_transfer.toml"
DRAIN = ROOT / "projects" / "fellgate_neutraliser_drain.toml"


def test_newton_that_runs_out_of_steps_says_so_and_what_to_check():
    result = solve_steady(load_project(NETWORK).system, max_iterations=1)
    assert not result.success and result.status == 1
    assert "did not converge" in result.message
    assert "check for lines with almost no resistance" in result.message


def test_the_solve_command_reports_non_convergence_on_stderr_with_exit_1(monkeypatch):
    real = network.solve_steady
    monkeypatch.setattr(network, "solve_steady",
                        lambda system, **kw: real(system, max_iterations=1, **kw))
    outcome = run_cli(["solve", str(NETWORK), "--json"], project_path=str(NETWORK))
    assert outcome.ok and outcome.code == ExitCode.INVALID
    assert outcome.stderr.startswith(f"{NETWORK}: no steady solution found: did not converge")
    assert "check for" in outcome.stderr and outcome.stdout == ""


def test_a_singular_newton_system_is_reported_in_words(monkeypatch, tmp_path):
    # The junction-head solve answers an exactly singular matrix with NaN (as scipy's spsolve
    # does): injected here, as no valid file reaches it (absurd magnitudes are refused first).
    monkeypatch.setattr(network, "_solve_laplacian", lambda a, b: np.full(np.shape(b), np.nan))
    result = solve_steady(load_project(NETWORK).system)
    assert not result.success and result.status == 2
    assert "singular" in result.message and "check for" in result.message
    outcome = run_cli(["solve", str(NETWORK)], project_path=str(NETWORK))
    assert outcome.ok and outcome.code == ExitCode.INVALID
    assert "no steady solution found" in outcome.stderr


def test_a_magnitude_far_beyond_any_plant_is_refused_naming_the_key(tmp_path):
    # Found by the fuzz suite: a junction 9.9e307 m high overflowed the pressure to -inf
    # (caught by the sanity check as an internal error); now refused as input.
    text = NETWORK.read_text().replace('elevation = "20 m"', 'elevation = "9.9e307 m"', 1)
    path = tmp_path / "far.toml"
    path.write_text(text)
    outcome = run_cli(["solve", str(path), "--json"], project_path=str(path))
    assert outcome.ok and outcome.code == ExitCode.INVALID
    assert f"{path}: junctions.VP-1.elevation: '9.9e307 m': far beyond any plant" in outcome.stderr


@pytest.fixture
def stalling_integrator(monkeypatch):
    """Radau that fails after a few steps, as it does when the step size underflows."""
    from scipy import integrate

    real = integrate.Radau._step_impl
    calls = {"n": 0}

    def step(self):
        calls["n"] += 1
        if calls["n"] > 5:
            return False, "Required step size is less than spacing between numbers."
        return real(self)

    monkeypatch.setattr(integrate.Radau, "_step_impl", step)
    return calls


def test_an_integration_that_stalls_keeps_what_it_computed_and_says_what_to_change(
        stalling_integrator):
    system = load_project(TRANSFER).system
    result = simulate(system, duration=60.0)
    assert not result.success and result.status == -1
    assert "integration failed at t = " in result.message
    assert "slower valve move" in result.message
    assert result.t.size >= 2 and np.all(np.isfinite(result.flows))


def test_the_simulate_command_reports_a_stalled_integration_with_exit_1(stalling_integrator):
    outcome = run_cli(simulate_argv(str(TRANSFER), "60 s"), project_path=str(TRANSFER))
    assert outcome.code == ExitCode.INVALID
    assert "Traceback" not in outcome.stderr
    assert f"{TRANSFER}: integration failed at t = " in outcome.stderr
    data = json.loads(outcome.stdout)  # the partial run, marked as such
    assert data.get("success") is False


OVERFLOWING = """
schema = 1
[project]
title = "tank filled from a header above it"
[fluid]
kind = "water"
temperature = "20 degC"
[reservoirs.HEADER]
kind = "constant_level"
bottom_elevation = "30 m"
level = "2 m"
[reservoirs.TK]
kind = "tank"
shape = "vertical_cylinder"
diameter = "1.2 m"
height = "3 m"
bottom_elevation = "0 m"
level = "2.8 m"
[lines.FILL]
from = "HEADER"
to = "TK"
length = "40 m"
inner_diameter = "100 mm"
roughness = "0.045 mm"
[simulation]
duration = "60 s"
"""


def test_a_tank_that_overflows_is_an_event_and_a_danger_warning_with_advice(tmp_path):
    # Inflow with the header 29 m above: the 0.2 m left below the overflow (0.23 m3 in a
    # 1.2 m tank) fills in seconds. Overflow capacity is a design check (common practice).
    system = load_project_text(OVERFLOWING).system
    result = simulate(system, duration=60.0)
    assert result.success
    codes = [e.code for e in result.events]
    assert "tank.overflow" in codes
    warning = next(w for w in result.warnings if w.code == "tank.overflow")
    assert warning.severity == "danger" and "overflow capacity" in warning.message
    assert np.max(result.levels[result.tank_ids.index("TK")]) <= 3.0 + 1e-6
    path = tmp_path / "overflow.toml"
    path.write_text(OVERFLOWING)
    outcome = run_cli(simulate_argv(str(path), "60 s"), project_path=str(path))
    assert outcome.ok and outcome.code == ExitCode.OK
    data = json.loads(outcome.stdout)
    assert any(e["code"] == "tank.overflow" for e in data["events"])
    assert any(w["code"] == "tank.overflow" for w in data["warnings"])


def test_an_output_interval_far_too_fine_is_widened_with_a_note_not_a_hang():
    # Found by the fuzz suite: output_interval = "0.0000001 s" asked for 5e7 points over a
    # 5 s run and never finished. The series is capped; events keep their exact times.
    from workbench.core.transient import MAX_OUTPUT_POINTS

    system = load_project(DRAIN).system
    result = simulate(system, duration=5.0, output_interval=1e-7)
    assert result.success
    assert result.t.size <= MAX_OUTPUT_POINTS + 1 + len(result.events)
    note = next(w for w in result.warnings if w.code == "simulation.output_interval")
    assert "1e-07 s" in note.message and note.severity == "info"


def test_an_absurd_duration_is_refused_in_words_instead_of_running_for_ever(tmp_path):
    # Found by hand after the fuzz: a [simulation] duration of 1e300 s never finished (the
    # file check now refuses that magnitude; the core refuses anything above 1e9 s).
    text = DRAIN.read_text().replace('duration = "3 h"', 'duration = "1e11 s"')
    path = tmp_path / "forever.toml"
    path.write_text(text)
    outcome = run_cli(["simulate", str(path), "--json"], project_path=str(path))
    assert outcome.ok and outcome.code == ExitCode.INVALID
    assert "years: give a shorter simulation.duration" in outcome.stderr
