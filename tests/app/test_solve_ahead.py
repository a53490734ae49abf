"""The app opened as ``workbench open`` opens it: the file is read and solved in a child
process while Textual starts, and every way that can go wrong leaves the app to do it.

The reference for the numbers is the core's own steady solve of the same file in this
process (checked against closed forms in tests/core and tests/cli/test_demo_smoke.py):
the child must hand over exactly that project and that result, not a near one.
"""

from __future__ import annotations

import hashlib
import subprocess
import sys
from pathlib import Path

import pytest

from tests.app.conftest import SIZE, settle
from workbench.app import jobs, solve_ahead
from workbench.app.solve_ahead import SolveAhead

DRAIN = "fellgate_neutraliser_drain.toml"
LINE = "210-DR-04"


@pytest.fixture
def two_cores(monkeypatch):
    """The child is started only with a second core: pretend there is one (CI may have one)."""
    monkeypatch.setattr(solve_ahead, "second_core", lambda: True)


@pytest.fixture
def in_process(monkeypatch):
    """Count the loads and solves the app does in its own process."""
    calls = {"load": 0, "solve": 0}
    real_load, real_solve = jobs.load, jobs.solve

    def load(path):
        calls["load"] += 1
        return real_load(path)

    def solve(system):
        calls["solve"] += 1
        return real_solve(system)

    monkeypatch.setattr(jobs, "load", load)
    monkeypatch.setattr(jobs, "solve", solve)
    return calls


def child(code: str) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE,
                            stdin=subprocess.DEVNULL)


async def wait_for_project(pilot, limit: float = 120.0) -> None:
    app = pilot.app
    waited = 0.0
    while app.project is None or app.steady_status not in {"fresh", "failed"}:
        await pilot.pause(0.05)
        waited += 0.05
        assert waited < limit, "the project never showed"


async def test_the_app_opened_as_the_cli_opens_it_shows_the_result_solved_in_the_child(
        project_file, two_cores, in_process):
    from workbench.app.factory import make_app
    from workbench.core.network import solve_steady
    from workbench.project.document import load_project

    path = project_file(DRAIN)
    app = make_app(path=path, debounce=0.05, prebuild_forms=False, solve_ahead=True)
    assert app._ahead is not None  # started before the app ran
    async with app.run_test(size=SIZE) as pilot:
        await wait_for_project(pilot)
        status, steady, project = app.steady_status, app.steady, app.project
        modified = app.modified
        await settle(pilot)
    # the first result came from the child: this process neither read nor solved the file
    assert in_process == {"load": 0, "solve": 0}
    assert status == "fresh" and not modified
    assert project.path == path
    assert project.text == path.read_text(encoding="utf-8")
    assert project.loaded_hash == hashlib.sha256(path.read_bytes()).hexdigest()
    expected = solve_steady(load_project(path).system)
    assert set(steady.lines) == set(expected.lines)
    for name, line in steady.lines.items():
        assert line.flow == expected.lines[name].flow, name  # the same solve, bit for bit
    # and it is the result of the very system the app holds (edits and staleness use it)
    assert app._ahead is None


async def test_a_file_the_child_cannot_load_is_reported_by_the_app_as_without_the_child(
        tmp_path, two_cores, in_process):
    from workbench.app.factory import make_app
    from workbench.app.screens.dialogs import AskScreen

    path = tmp_path / "broken.toml"
    path.write_text('schema = 1\n[project]\ntitle = "x"\nunits = "furlongs"\n', encoding="utf-8")
    app = make_app(path=path, debounce=0.05, solve_ahead=True)
    async with app.run_test(size=SIZE) as pilot:
        for _ in range(600):
            await pilot.pause(0.05)
            if isinstance(app.screen, AskScreen):
                break
        screen = app.screen
        assert isinstance(screen, AskScreen)
        question = screen.question
    assert "could not be opened" in question
    assert str(path) in question and "project.units" in question
    assert in_process["load"] == 1  # the app read it itself, for its own words


@pytest.mark.parametrize("code", [
    "print('not an answer')",                      # garbage on stdout
    "import sys; sys.exit(3)",                     # died without a word
    "import sys, pickle; sys.stdout.buffer.write(pickle.dumps(('other', 1, 2)))",
], ids=["garbage", "died", "wrong-tag"])
async def test_a_child_that_dies_or_answers_nonsense_leaves_the_app_to_load_and_solve(
        project_file, monkeypatch, in_process, code):
    from workbench.app.factory import make_app

    path = project_file(DRAIN)
    made = []

    def start(p):
        made.append(SolveAhead(Path(p), child(code)))
        return made[-1]

    monkeypatch.setattr(SolveAhead, "start", staticmethod(start))
    app = make_app(path=path, debounce=0.05, prebuild_forms=False, solve_ahead=True)
    async with app.run_test(size=SIZE) as pilot:
        await wait_for_project(pilot)
        status = app.steady_status
        await settle(pilot)
    assert made and status == "fresh"
    assert in_process == {"load": 1, "solve": 1}


def test_an_answer_for_another_file_is_refused(project_file):
    drain = project_file(DRAIN)
    other = project_file("fellgate_process_water_transfer.toml")
    process = subprocess.Popen([sys.executable, "-m", "workbench.app.solve_ahead", str(drain)],
                               stdout=subprocess.PIPE, stdin=subprocess.DEVNULL)
    assert SolveAhead(other, process).take() is None
    process = subprocess.Popen([sys.executable, "-m", "workbench.app.solve_ahead", str(drain)],
                               stdout=subprocess.PIPE, stdin=subprocess.DEVNULL)
    project, steady = SolveAhead(drain, process).take()
    assert project.path == drain and steady.success


def test_with_one_core_no_child_is_started(project_file, monkeypatch):
    monkeypatch.setattr(solve_ahead, "second_core", lambda: False)
    assert SolveAhead.start(project_file(DRAIN)) is None


async def test_quitting_while_the_child_still_works_ends_the_child(project_file, monkeypatch):
    from workbench.app.factory import make_app

    made = []

    def start(p):
        made.append(SolveAhead(Path(p), child("import time; time.sleep(120)")))
        return made[-1]

    monkeypatch.setattr(SolveAhead, "start", staticmethod(start))
    app = make_app(path=project_file(DRAIN), debounce=0.05, solve_ahead=True)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause(0.3)
        await pilot.press("ctrl+q")
        await pilot.pause(0.3)
    assert made and made[0].process.wait(timeout=30) is not None
    assert app.project is None


async def test_keys_typed_while_the_child_loads_reach_the_field_they_lead_to(
        project_file, two_cores):
    from workbench.app.factory import make_app
    from workbench.app.panes.form import FieldInput

    app = make_app(path=project_file(DRAIN), debounce=0.05, prebuild_forms=False,
                   solve_ahead=True)
    async with app.run_test(size=SIZE) as pilot:
        # typed at once, before the answer is in: down to the line, into its form, three
        # fields on
        await pilot.press(*["down"] * 5, "enter", "down", "down", "down")
        await wait_for_project(pilot)
        while app._held_keys is not None:
            await pilot.pause(0.05)
        await settle(pilot)
        focused = app.focused
    assert isinstance(focused, FieldInput)
    assert focused.field.keypath == f"lines.{LINE}.nominal_size"


async def test_ctrl_r_typed_while_loading_is_answered_before_the_views_are_built_behind_it(
        project_file, two_cores, monkeypatch):
    """The typed-ahead run starts, and its view shows, as soon as the project is on
    screen: building the other views and forms in the background waits for it."""
    from textual.widgets import TabbedContent

    from workbench.app.app import WorkbenchApp
    from workbench.app.factory import make_app

    seen = []
    real = WorkbenchApp.action_simulate

    def simulate(self):
        seen.append((getattr(self.screen, "views_built", None),
                     all(p.prebuilt for p in self.screen.query("SystemPane"))))
        real(self)

    monkeypatch.setattr(WorkbenchApp, "action_simulate", simulate)
    app = make_app(path=project_file(DRAIN), debounce=0.05, solve_ahead=True)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.press("ctrl+r")
        await wait_for_project(pilot)
        for _ in range(2400):
            if app.run_status not in {"idle", "running"}:
                break
            await pilot.pause(0.05)
        await settle(pilot, timeout=120.0)
        active = app.screen.query_one(TabbedContent).active
        run_status = app.run_status
    assert seen == [(False, False)]
    assert active == "run" and run_status == "done"


async def test_keys_typed_in_a_burst_as_the_first_result_shows_reach_the_field_they_lead_to(
        project_file, two_cores):
    """Typed faster than the screen follows, right as the first result is painted (the
    first form still being built): each key lands where the keys before it led, Enter's
    form included, as if typed slowly."""
    from textual import events

    from workbench.app.factory import make_app
    from workbench.app.panes.form import FieldInput

    app = make_app(path=project_file(DRAIN), debounce=0.05, prebuild_forms=False,
                   solve_ahead=True)
    async with app.run_test(size=SIZE) as pilot:
        while app.steady_status != "fresh":
            await pilot.pause(0.01)
        for key in ["down"] * 5 + ["enter"] + ["down"] * 3:  # one burst, as from a terminal
            app.post_message(events.Key(key, "\r" if key == "enter" else None))
        await settle(pilot)
        while app._held_keys is not None:
            await pilot.pause(0.05)
        await settle(pilot)
        focused = app.focused
    assert isinstance(focused, FieldInput)
    assert focused.field.keypath == f"lines.{LINE}.nominal_size"
