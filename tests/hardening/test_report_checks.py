"""``report`` refuses what ``solve`` and ``simulate`` refuse, with the same words.

A record is signed by a checker: it must never publish a result the other commands refuse.
Two open discharges joined by one line once gave a steady answer that broke the energy
balance (a 5 m head difference with no flow and no loss), an invented flow out of an open
discharge in ``simulate`` and "flowing, 0 L/s" in the record. An open discharge only takes
liquid out of a system (a free outfall), so such a line has nothing to feed it: every
command now refuses the file, naming the line and both discharges, and writes no record.
Where a result itself breaks the physics, ``report`` runs the same consistency checks as
``solve`` (the second test injects such a result).
"""

from __future__ import annotations

import dataclasses

import pytest

from tests.hardening.harness import ROOT, run_cli

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

[simulation]
duration = "60 s"
"""


@pytest.mark.parametrize("command", ["check", "solve", "simulate", "report"])
def test_a_line_joining_two_open_discharges_is_refused_by_every_command_naming_both(
        tmp_path, command):
    path = tmp_path / "two_discharges.toml"
    path.write_text(TWO_DISCHARGES)
    record = tmp_path / "record.md"
    extra = ["--output", str(record)] if command == "report" else []
    outcome = run_cli([command, str(path), *extra], project_path=str(path))
    assert outcome.code == 1, outcome.stderr
    assert outcome.stderr.startswith(f"{path}: lines.AB.to: line 'AB' joins two open "
                                     "discharges, from 'A' to 'B'")
    assert outcome.stdout == "" and not record.exists()


def test_report_refuses_a_result_that_breaks_continuity_as_solve_does(tmp_path, monkeypatch):
    """A steady result with one line's flow raised by 10 % breaks continuity at the
    junction of the cooling-water demo (sum of flows into a junction = 0): both commands
    must call it an internal error (exit 3) in the same words and publish nothing."""
    import workbench.core.network as network

    real = network.solve_steady

    def broken(system, **kw):
        result = real(system, **kw)
        lid, lr = next(iter(result.lines.items()))
        lines = {**result.lines, lid: dataclasses.replace(lr, flow=lr.flow * 1.1)}
        return dataclasses.replace(result, lines=lines)

    monkeypatch.setattr(network, "solve_steady", broken)
    path = ROOT / "projects" / "fellgate_cooling_water_network.toml"
    record = tmp_path / "record.md"
    solve = run_cli(["solve", str(path)], project_path=str(path))
    report = run_cli(["report", str(path), "--steady-only", "--output", str(record)],
                     project_path=str(path))
    assert solve.code == report.code == 3
    assert "internal consistency check failed: continuity" in report.stderr
    assert report.stderr.strip() == solve.stderr.strip()
    assert not record.exists()


def test_report_exits_1_like_simulate_when_the_elastic_analysis_could_not_run(
        tmp_path, monkeypatch):
    """The transfer demo asks for the elastic analysis of its line (``surge.model``). When
    that cannot be set up (here injected: status -1, as the model reports heads that stop
    being finite), ``simulate`` says so and exits 1; ``report`` wrote the record and exited
    0, so a script took it for complete. Both now say it and exit 1; the record keeps it."""
    import workbench.core.elastic as elastic

    real = elastic.run_elastic

    def failing(system, ids, **kw):
        return {lid: dataclasses.replace(res, success=False, status=-1,
                                         message="injected set-up failure")
                for lid, res in real(system, ids, **kw).items()}

    monkeypatch.setattr(elastic, "run_elastic", failing)
    path = ROOT / "projects" / "fellgate_process_water_transfer.toml"
    record = tmp_path / "record.md"
    simulated = run_cli(["simulate", str(path)], project_path=str(path), limit=120)
    reported = run_cli(["report", str(path), "--output", str(record)], project_path=str(path),
                       limit=120)
    said = f"{path}: elastic surge, line 310-PW-12: injected set-up failure"
    assert simulated.code == reported.code == 1
    assert said in simulated.stderr and said in reported.stderr
    assert "injected set-up failure" in record.read_text()
