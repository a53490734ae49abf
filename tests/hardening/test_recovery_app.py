"""The workbench keeps unsaved edits through a crash and offers them on the next open.

Driven with Textual's pilot at 80x24: edit a field, and the hidden recovery copy appears
beside the project; end the session without saving or quitting (as a crash or a lost SSH
session would); open the project again, meet the offer, take the edits back, save, and the
copy is gone with the edit in the file. A clean quit leaves no copy behind.
"""

from __future__ import annotations

import pytest

from tests.app.conftest import SIZE, TRANSFER, choose_entry, make, settle, type_into

LINE = "310-PW-12"


class KeptCopies:
    """The recovery copies beside a project (one per workbench that kept edits)."""

    def __init__(self, project):
        self.project = project

    def files(self):
        return sorted(self.project.parent.glob(f".{self.project.stem}.recovery.*toml"))

    def exists(self) -> bool:
        return bool(self.files())

    def read_text(self) -> str:
        return "".join(p.read_text() for p in self.files())


async def edit_the_length(pilot, text: str) -> None:
    """Once the app has settled, choose the transfer line and type its length (an edit
    that is not saved)."""
    await settle(pilot)
    await choose_entry(pilot, f"lines:{LINE}")
    await type_into(pilot, f"lines.{LINE}.length", text)


@pytest.mark.slow
async def test_edits_survive_a_session_that_dies_and_come_back_on_the_next_open(project_file):
    from workbench.app.screens.dialogs import AskScreen

    path = project_file(TRANSFER)
    original = path.read_text()
    copy_ = KeptCopies(path)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert not copy_.exists()
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "265 m")
        assert app.modified
        assert copy_.exists() and 'length = "265 m"' in copy_.read_text()
        app.exit()  # the session ends with no save and no quit prompt: a crash
    assert path.read_text() == original and copy_.exists()

    again = make(path)
    async with again.run_test(size=SIZE) as pilot:
        await pilot.pause()
        for _ in range(50):
            if isinstance(again.screen, AskScreen):
                break
            await pilot.pause(0.05)
        assert isinstance(again.screen, AskScreen)
        assert "Unsaved edits found" in again.screen.question
        await pilot.press("r")
        await settle(pilot)
        assert again.modified
        assert again.project.system.lines[LINE].length == 265.0
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert not again.modified
    assert 'length = "265 m"' in path.read_text()
    assert not copy_.exists()


async def test_a_clean_quit_after_discarding_leaves_no_copy(project_file):
    path = project_file(TRANSFER)
    copy_ = KeptCopies(path)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await edit_the_length(pilot, "270 m")
        assert copy_.exists()
        await pilot.press("ctrl+q")
        await pilot.pause()
        await pilot.press("d")  # discard the edits and quit
        await pilot.pause()
    assert not copy_.exists()


async def test_undo_back_to_the_saved_state_removes_the_copy(project_file):
    path = project_file(TRANSFER)
    copy_ = KeptCopies(path)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await edit_the_length(pilot, "275 m")
        assert copy_.exists()
        await pilot.press("ctrl+z")
        await pilot.pause()
        assert not app.modified
        assert not copy_.exists()
