"""When a solve fails inside the workbench, the app keeps running and keeps the edits.

Driven with Textual's pilot at 80x24: the steady solver is made to fail (no convergence,
then an exception nobody foresaw) after an edit; the failure is shown in words, the edit
is still the current state (undo still works), and the next good solve clears the mark.
"""

from __future__ import annotations

from tests.app.conftest import SIZE, TRANSFER, choose_entry, make, settle, type_into
from workbench.app import jobs
from workbench.core import network

LINE = "310-PW-12"


async def test_a_steady_solve_that_does_not_converge_is_shown_in_words_and_edits_stay(
        project_file, monkeypatch):
    path = project_file(TRANSFER)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        real = network.solve_steady
        monkeypatch.setattr(jobs, "solve", lambda system: real(system, max_iterations=1))
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "262 m")
        await settle(pilot)
        assert app.is_running
        assert app.steady_status == "failed"
        assert "did not converge" in app.steady_message
        assert app.project.system.lines[LINE].length == 262.0 and app.modified
        monkeypatch.setattr(jobs, "solve", real)
        await type_into(pilot, f"lines.{LINE}.length", "263 m")
        await settle(pilot)
        assert app.steady_status == "fresh"
        assert app.history.can_undo


async def test_an_unforeseen_exception_in_the_solver_is_words_not_a_crash(
        project_file, monkeypatch):
    path = project_file(TRANSFER)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)

        def broken(system):
            raise ZeroDivisionError("injected fault")

        monkeypatch.setattr(jobs, "solve", broken)
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "264 m")
        await settle(pilot)
        assert app.is_running
        assert app.steady_status == "failed"
        assert "ZeroDivisionError" in app.steady_message
        assert "please report" in app.steady_message
        assert app.project.system.lines[LINE].length == 264.0 and app.modified
