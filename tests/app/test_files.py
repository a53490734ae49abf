"""Opening and saving from the workbench: a new project from the starter, save-as, Ctrl+O.

Nothing the user wrote may be lost: a new project is written where the user says, the file
reads back as the same project, and opening another file with unsaved edits asks first.
"""

from __future__ import annotations

from tests.app.conftest import NETWORK, SIZE, TRANSFER, settle


def new_app():
    from workbench.app.factory import make_app

    return make_app(None, offer_new=True, debounce=0.05, prebuild_forms=False)


async def answer(pilot, text: str) -> None:
    """Put ``text`` in the open one-line question and press Enter."""
    from textual.widgets import Input

    box = pilot.app.screen.query_one("#answer", Input)
    box.value = text
    box.focus()
    await pilot.press("enter")
    await pilot.pause()


async def wait_for_screen(pilot, kind, tries: int = 100) -> None:
    for _ in range(tries):
        if isinstance(pilot.app.screen, kind):
            return
        await pilot.pause(0.05)
    raise AssertionError(f"{kind.__name__} never appeared (screen: {pilot.app.screen})")


async def test_a_new_project_from_the_starter_is_saved_where_the_user_says(tmp_path):
    from workbench.app.screens.dialogs import AskScreen, TextScreen
    from workbench.project.document import load_project

    target = tmp_path / "clearwell_drain.toml"
    app = new_app()
    async with app.run_test(size=SIZE) as pilot:
        await wait_for_screen(pilot, AskScreen)
        assert "starter" in app.screen.question
        await pilot.press("n")
        await settle(pilot)
        assert app.project is not None and app.path is None and app.modified
        title = app.project.system.title
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, TextScreen)
        await answer(pilot, str(tmp_path / "no_such_folder" / "x.toml"))
        problem = str(app.screen.query_one("#answer-problem").render())
        assert isinstance(app.screen, TextScreen) and "does not exist" in problem
        await answer(pilot, str(tmp_path / "clearwell_drain.txt"))
        assert "must end in .toml" in str(app.screen.query_one("#answer-problem").render())
        await answer(pilot, str(target))
        assert not isinstance(app.screen, TextScreen)
        assert app.path == target and not app.modified
    assert target.is_file()
    again = load_project(target)
    assert again.system.title == title
    assert set(again.system.lines) == set(app.project.system.lines)
    # the starter's comments, which explain every key, are kept in the saved file
    assert sum(line.lstrip().startswith("#") for line in target.read_text().splitlines()) > 5


async def test_ctrl_o_with_unsaved_edits_asks_then_opens_the_other_file(project_file):
    from tests.app.conftest import make
    from workbench.app.screens.dialogs import AskScreen, TextScreen
    from workbench.project.document import set_value

    first = project_file(TRANSFER)
    other = project_file(NETWORK)
    before = first.read_text()
    app = make(first)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.apply_edit(set_value, "lines.310-PW-12.length", "250 m")
        await settle(pilot)
        assert app.modified
        await pilot.press("ctrl+o")
        await pilot.pause()
        assert isinstance(app.screen, AskScreen) and "unsaved edits" in app.screen.question
        await pilot.press("c")  # keep working: nothing changes
        await pilot.pause()
        assert app.modified and app.path == first
        await pilot.press("ctrl+o")
        await pilot.pause()
        await pilot.press("d")  # discard the edits and open another file
        await pilot.pause()
        assert isinstance(app.screen, TextScreen)
        await answer(pilot, str(other.parent / "missing.toml"))
        assert "no file" in str(app.screen.query_one("#answer-problem").render())
        await answer(pilot, str(other))
        await app.workers.wait_for_complete()
        await settle(pilot)
        assert app.path == other and not app.modified
        assert set(app.project.system.lines) == {"400-CW-01", "410-CW-02", "400-CW-03"}
    assert first.read_text() == before  # the discarded edit never reached the file
