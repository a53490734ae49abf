"""Every simulation is bounded: a run that spends its step budget stops with its results.

A stiff system (a valve with a minute Kv, a schedule that moves every 10 ms) could step for
hours with no end in sight. The rigid-column run has a budget of integration steps and of
computing time; when it is spent the run ends as an integration failure does: status -1,
a message that says where and why, and the series up to then kept (marked incomplete).
The budget is shrunk here so that a demo project spends it.
"""

from __future__ import annotations

import numpy as np

from tests.hardening.harness import ROOT
from workbench.core.transient import loop, simulate
from workbench.project.document import load_project


def test_a_run_that_spends_its_step_budget_stops_with_its_results_kept(monkeypatch):
    system = load_project(ROOT / "projects" / "fellgate_neutraliser_drain.toml").system
    whole = simulate(system)
    assert whole.success and whole.nsteps > 10
    monkeypatch.setattr(loop, "STEP_BUDGET", 10)
    cut = simulate(system)
    assert not cut.success and cut.status == -1
    assert "10 integration steps" in cut.message and "results up to then are kept" in cut.message
    assert len(cut.t) >= 2 and cut.t[-1] < whole.t[-1]
    # what was computed is the same run as far as it went
    common = np.searchsorted(whole.t, cut.t[-1])
    assert np.allclose(np.interp(cut.t, whole.t[:common + 1], whole.levels[0][:common + 1]),
                       cut.levels[0], rtol=1e-3, atol=1e-6)


def test_report_of_a_run_that_stops_short_writes_the_record_and_exits_1_as_simulate_does(
        tmp_path, monkeypatch):
    """README, *Exit status* and *Solving and simulating*: a run that stops short is shown,
    marked incomplete, with exit status 1. ``report`` exited 0 on such a run, so a script
    took the record of a partial run for a complete one."""
    from tests.hardening.harness import run_cli

    monkeypatch.setattr(loop, "STEP_BUDGET", 10)
    path = ROOT / "projects" / "fellgate_neutraliser_drain.toml"
    record = tmp_path / "record.md"
    simulated = run_cli(["simulate", str(path)], project_path=str(path))
    reported = run_cli(["report", str(path), "--output", str(record)], project_path=str(path))
    assert simulated.code == reported.code == 1
    assert f"{path}: simulation: integration stopped" in reported.stderr
    assert "after 10 integration steps" in record.read_text()  # kept, with its outcome
