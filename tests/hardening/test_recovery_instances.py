"""Two workbenches on one file keep their own copies; new projects and broken files too.

A workbench still running is told apart from one that died by its recovery copy's owner
mark (host, process id and start time): its live edits are never offered to a second
workbench, nor overwritten or deleted by it. A project never saved keeps its edits in the
user's state folder and gets them back at the next ``workbench open``; a project file that
no longer loads (a merge left conflict markers in it) still has its kept edits offered.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap

from tests.app.conftest import SIZE, TRANSFER, make, settle
from tests.hardening.harness import ROOT
from workbench.project.document import load_project, set_value
from workbench.project.recovery import Owner, scan_recoveries, write_recovery

LINE = "310-PW-12"


def copies(project):
    return sorted(project.parent.glob(f".{project.stem}.recovery.*toml"))


def start_other_workbench(path, length: str) -> subprocess.Popen:
    """Another process keeping a recovery copy of ``path``, as a running workbench does."""
    script = textwrap.dedent(f"""
        import sys, time
        from workbench.project.document import load_project, set_value
        from workbench.project.recovery import Owner, write_recovery
        project = load_project({str(path)!r})
        edited = set_value(project, "lines.{LINE}.length", {length!r})
        write_recovery(project.path, edited.text, project.loaded_hash, Owner.new())
        print("kept", flush=True)
        time.sleep(120)
    """)
    process = subprocess.Popen([sys.executable, "-c", script], cwd=ROOT, stdout=subprocess.PIPE,
                               text=True)
    assert process.stdout.readline().strip() == "kept"
    return process


def test_a_running_workbenchs_copy_is_not_offered_but_a_dead_ones_is(project_file):
    path = project_file(TRANSFER)
    other = start_other_workbench(path, "281 m")
    try:
        scan = scan_recoveries(path, Owner.new())
        assert scan.offers == [] and [o.pid for o in scan.live] == [other.pid]
    finally:
        os.kill(other.pid, signal.SIGKILL)
        other.wait()
    scan = scan_recoveries(path, Owner.new())
    assert scan.live == [] and len(scan.offers) == 1
    assert 'length = "281 m"' in scan.offers[0].text


async def test_a_second_workbench_on_the_same_file_keeps_its_own_copy_and_leaves_the_first_alone(
        project_file):
    from workbench.app.screens.dialogs import AskScreen

    path = project_file(TRANSFER)
    other = start_other_workbench(path, "281 m")
    try:
        theirs = copies(path)
        assert len(theirs) == 1
        before = theirs[0].read_text()
        notices = []
        app = make(path)
        app.notify = lambda message, **kw: notices.append(message)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot)
            assert not isinstance(app.screen, AskScreen)  # nothing offered: it is alive
            assert any("also open in another workbench" in n and str(other.pid) in n
                       for n in notices)
            app.apply_edit(set_value, f"lines.{LINE}.length", "266 m")
            await pilot.pause()
            ours = app.recovery.copy
            assert ours is not None and ours != theirs[0] and 'length = "266 m"' in ours.read_text()
            await pilot.press("ctrl+q")
            await pilot.pause()
            await pilot.press("d")  # discard and quit: only our copy goes
            await pilot.pause()
        assert copies(path) == theirs and theirs[0].read_text() == before
    finally:
        os.kill(other.pid, signal.SIGKILL)
        other.wait()
    # the first workbench died: its edits are offered to the next one
    found = scan_recoveries(path, Owner.new()).offers
    assert len(found) == 1 and 'length = "281 m"' in found[0].text


async def test_a_new_project_never_saved_gets_its_edits_back_at_the_next_open(tmp_path):
    from tests.app.test_files import new_app, wait_for_screen
    from workbench.app.screens.dialogs import AskScreen

    app = new_app()
    async with app.run_test(size=SIZE) as pilot:
        await wait_for_screen(pilot, AskScreen)
        await pilot.press("n")
        await settle(pilot)
        assert app.recovery.copy is None  # the untouched starter is not worth a copy
        app.apply_edit(set_value, "project.title", "Lime slurry day tank drain")
        await pilot.pause()
        kept = app.recovery.copy
        assert kept is not None and kept.parent == tmp_path / "state"
        app.exit()  # the session dies with the edit unsaved
    assert kept.exists()

    again = new_app()
    async with again.run_test(size=SIZE) as pilot:
        await wait_for_screen(pilot, AskScreen)
        assert "a new project (never saved)" in again.screen.question
        await pilot.press("r")
        await settle(pilot)
        assert again.path is None and again.modified
        assert again.project.system.title == "Lime slurry day tank drain"
        assert again.recovery.copy is not None and not kept.exists()


async def test_kept_edits_are_offered_when_the_project_file_no_longer_loads(project_file):
    from workbench.app.factory import make_app
    from workbench.app.screens.dialogs import AskScreen

    path = project_file(TRANSFER)
    project = load_project(path)
    edited = set_value(project, f"lines.{LINE}.length", "272 m")
    dead = Owner.new()
    write_recovery(path, edited.text, project.loaded_hash, dead)
    dead.release()  # that workbench died
    text = path.read_text()
    path.write_text("<<<<<<< ours\n" + text + "=======\n" + text + ">>>>>>> theirs\n")

    app = make_app(path=path, debounce=0.05, prebuild_forms=False)
    async with app.run_test(size=SIZE) as pilot:
        for _ in range(200):
            if isinstance(app.screen, AskScreen):
                break
            await pilot.pause(0.05)
        question = app.screen.question
        assert "could not be opened" in question and "conflict marker" in question
        assert "Unsaved edits of it were kept" in question
        await pilot.press("r")
        await settle(pilot)
        assert app.path == path and app.modified
        assert app.project.system.lines[LINE].length == 272.0
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert not app.modified
    assert load_project(path).system.lines[LINE].length == 272.0
    assert copies(path) == []
