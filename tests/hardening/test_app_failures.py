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


async def test_opening_a_damaged_file_shows_its_problems_in_words(tmp_path):
    """The workbench opened on a broken file (conflict markers, nesting, a wrong type) asks
    what to do, naming the file and the problem; it never crashes."""
    from tests.hardening.mutations import mutate
    from workbench.app.factory import make_app
    from workbench.app.screens.dialogs import AskScreen

    for case in (mutate(1), mutate(22), mutate(3)):
        path = tmp_path / "damaged.toml"
        path.write_text(case.text, encoding="utf-8")
        from workbench.project.document import ProjectError, load_project

        try:
            load_project(path)
            continue  # this mutation left a valid project: nothing to show
        except ProjectError as error:
            first = str(error.problems[0])
        app = make_app(path=path, debounce=0.05)
        async with app.run_test(size=SIZE) as pilot:
            for _ in range(100):
                await pilot.pause(0.05)
                if isinstance(app.screen, AskScreen):
                    break
            assert isinstance(app.screen, AskScreen), case.name
            assert "could not be opened" in app.screen.question
            assert first.split(": ")[0] in app.screen.question
            assert app.is_running


async def test_a_result_that_breaks_continuity_is_refused_by_the_app_as_an_internal_error(
        project_file, monkeypatch):
    """The sanity checks guard the live results too: a corrupted solve is never shown."""
    import dataclasses

    path = project_file(TRANSFER)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        real = network.solve_steady

        def corrupted(system, **kw):
            result = real(system, **kw)
            lines = dict(result.lines)
            lines[LINE] = dataclasses.replace(lines[LINE], head_loss=lines[LINE].head_loss * 0.9)
            return dataclasses.replace(result, lines=lines)

        monkeypatch.setattr(network, "solve_steady", corrupted)
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "266 m")
        await settle(pilot)
        assert app.is_running and app.steady_status == "failed"
        assert "internal consistency check failed: energy" in app.steady_message
        assert "please report" in app.steady_message
