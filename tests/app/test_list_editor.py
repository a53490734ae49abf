"""The list editor at 80x24: a line's profile and fittings edited as a table."""

from __future__ import annotations

import pytest

from tests.app.conftest import (
    SHARED_LOOP,
    SIZE,
    TRANSFER,
    choose_entry,
    field_input,
    make,
    settle,
    shared_app,
)

LINE = "310-PW-12"
table_app = shared_app(TRANSFER, prebuild_forms=False)


async def open_table(pilot, key: str, how: str = "enter"):
    """Open the table editor on a list field of the transfer line from the form."""
    from workbench.app.screens.list_editor import ListEditorScreen

    await choose_entry(pilot, f"lines:{LINE}")
    field_input(pilot.app, f"lines.{LINE}.{key}").focus()
    await pilot.pause()
    await pilot.press(how)
    await pilot.pause()
    assert isinstance(pilot.app.screen, ListEditorScreen)
    return pilot.app.screen


async def type_keys(pilot, text: str) -> None:
    await pilot.press(*["space" if c == " " else c for c in text])


def problems_shown(screen) -> str:
    return str(screen.query_one("#list-problems").render())


async def test_the_profile_table_adds_a_point_edits_a_cell_applies_and_undo_restores_it(
        project_file):
    from workbench.app.screens.list_editor import ListEditorScreen
    from workbench.project.schema import LIST_ITEMS

    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        before = app.project.data["lines"][LINE]["profile"]
        screen = await open_table(pilot, "profile")
        assert [c.name for c in screen.columns] == [s.name for s in LIST_ITEMS["lines.profile"]]
        assert [r.cells["distance"] for r in screen.rows] == ["0 m", "20 m", "240 m"]
        await pilot.press("down", "a")  # after 20 m: the point halfway to 240 m
        assert screen.rows[2].cells == {"distance": "130 m", "elevation": "2 m", "air_valve": ""}
        await pilot.press("right")
        await type_keys(pilot, "3 m")  # typing on a cell edits it
        await pilot.press("enter")
        await pilot.press("ctrl+a")
        await settle(pilot)
        assert not isinstance(app.screen, ListEditorScreen)
        profile = app.project.data["lines"][LINE]["profile"]
        assert profile == [before[0], before[1], {"distance": "130 m", "elevation": "3 m"},
                           before[2]]
        assert len(app.project.system.lines[LINE].profile) == 4  # the model was rebuilt
        assert app.modified and app.steady_status == "fresh"
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert app.project.data["lines"][LINE]["profile"] == before
        assert '"240 m"' in field_input(app, f"lines.{LINE}.profile").value


@SHARED_LOOP
@pytest.mark.parametrize(("row", "text", "words"), [
    (2, "20 mmm", "mmm"),
    (3, "260 m", "beyond the line's length"),
])
async def test_a_bad_profile_cell_is_refused_beside_its_row_and_nothing_changes(
        table_app, row, text, words):
    from workbench.app.screens.dialogs import AskScreen
    from workbench.app.screens.list_editor import ListEditorScreen

    pilot = table_app
    app = pilot.app
    original = app.path.read_text()
    project = app.project
    screen = await open_table(pilot, "profile")
    await pilot.press(*["down"] * (row - 1))
    await type_keys(pilot, text)
    await pilot.press("enter", "ctrl+a")
    await pilot.pause()
    assert isinstance(app.screen, ListEditorScreen)  # still open
    shown = problems_shown(screen)
    assert f"row {row} · distance" in shown and words in shown
    assert words in str(screen.query_one("#cell-hint").render())  # beside the cell
    assert screen.rows[row - 1].cells["distance"] == text  # what was typed is kept
    await pilot.press("escape")
    await pilot.pause()
    assert isinstance(app.screen, AskScreen)
    await pilot.press("d")  # discard: the list as it was
    await pilot.pause()
    assert not isinstance(app.screen, (AskScreen, ListEditorScreen))
    assert app.project is project
    assert not app.modified
    assert app.path.read_text() == original


@SHARED_LOOP
async def test_escape_with_changes_asks_before_discarding_them(table_app):
    from workbench.app.screens.dialogs import AskScreen
    from workbench.app.screens.list_editor import ListEditorScreen

    pilot = table_app
    app = pilot.app
    project = app.project
    await open_table(pilot, "profile")
    await pilot.press("a", "escape")
    await pilot.pause()
    assert isinstance(app.screen, AskScreen)
    assert "not applied" in app.screen.question
    await pilot.press("k")  # keep editing: the new row is still there
    await pilot.pause()
    assert isinstance(app.screen, ListEditorScreen) and len(app.screen.rows) == 4
    await pilot.press("escape")
    await pilot.pause()
    await pilot.press("d")  # discard
    await pilot.pause()
    assert not isinstance(app.screen, (AskScreen, ListEditorScreen))
    assert app.project is project and not app.modified
    await open_table(pilot, "profile")
    await pilot.press("escape")  # nothing changed: closes without a question
    await pilot.pause()
    assert not isinstance(app.screen, (AskScreen, ListEditorScreen))


async def test_the_fittings_table_offers_the_fitting_names_in_its_type_column(project_file):
    from workbench.project.schema import LIST_ITEMS, choices_for

    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        before = app.project.data["lines"][LINE]["fittings"]
        screen = await open_table(pilot, "fittings", how="ctrl+t")
        columns = {c.name: c for c in screen.columns}
        assert list(columns) == [s.name for s in LIST_ITEMS["lines.fittings"]]
        assert columns["type"].choices == choices_for("lines.fittings", "type")
        assert columns["method"].choices == ("darby_3k", "hooper_2k")
        await pilot.press("down", "enter", "ctrl+u")  # row 2, type: gate_valve
        await type_keys(pilot, "ball")
        await pilot.press("right")  # takes the suggested rest of the name
        await pilot.press("enter")
        assert screen.rows[1].cells["type"] == "ball_valve"
        await pilot.press("ctrl+a")
        await settle(pilot)
    fittings = app.project.data["lines"][LINE]["fittings"]
    assert fittings[1] == {**before[1], "type": "ball_valve"}  # count and label kept
    assert fittings[0] == before[0] and fittings[2:] == before[2:]


async def test_the_inline_list_field_still_applies_typed_text(project_file):
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, f"lines:{LINE}")
        # pasted as a terminal sends it (one Paste event): 80 key presses would each lay
        # the form out again and add nothing to what is checked, the field applying it
        from textual import events

        editor = field_input(app, f"lines.{LINE}.profile")
        editor.focus()
        await pilot.pause()
        await pilot.press("end", "ctrl+u")
        editor.post_message(events.Paste('[{ distance = "0 m", elevation = "18 m" }, '
                                         '{ distance = "240 m", elevation = "1.5 m" }]'))
        await pilot.pause()
        await pilot.press("enter")
        await settle(pilot)
    assert app.project.data["lines"][LINE]["profile"] == [
        {"distance": "0 m", "elevation": "18 m"}, {"distance": "240 m", "elevation": "1.5 m"}]


async def test_rows_are_deleted_and_moved_and_a_bad_order_is_named(project_file):
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        project = app.project
        screen = await open_table(pilot, "profile")
        await pilot.press("down", "right_square_bracket")  # 20 m below 240 m
        assert [r.cells["distance"] for r in screen.rows] == ["0 m", "240 m", "20 m"]
        await pilot.press("ctrl+a")
        await pilot.pause()
        assert "row 3 · distance" in problems_shown(screen)
        assert "increase" in problems_shown(screen)
        assert app.project is project
        await pilot.press("delete")  # the misplaced point goes
        await pilot.press("ctrl+a")
        await settle(pilot)
    assert [p["distance"] for p in app.project.data["lines"][LINE]["profile"]] == ["0 m", "240 m"]


@SHARED_LOOP
async def test_quitting_from_the_table_with_changes_asks_about_them_first(table_app):
    from workbench.app.screens.dialogs import AskScreen
    from workbench.app.screens.list_editor import ListEditorScreen

    pilot = table_app
    app = pilot.app
    await open_table(pilot, "profile")
    await pilot.press("a", "ctrl+q")
    await pilot.pause()
    assert isinstance(app.screen, AskScreen)
    assert "not applied" in app.screen.question
    await pilot.press("k")
    await pilot.pause()
    assert isinstance(app.screen, ListEditorScreen) and app.is_running
    await pilot.press("escape")
    await pilot.pause()
    await pilot.press("d")  # leave the table, the new row discarded
    await pilot.pause()
    assert not isinstance(app.screen, (AskScreen, ListEditorScreen)) and not app.modified


def test_the_key_list_names_the_table_keys():
    from workbench.app.app import WorkbenchApp
    from workbench.app.screens.keys import binding_rows, key_contexts

    rows = binding_rows(key_contexts(WorkbenchApp))
    assert ("list table", "Ctrl+A", "Apply list") in rows
    assert ("list table", "a", "Add row") in rows
    assert ("list table", "[ / Ctrl+Up", "Row up") in rows
    assert ("field", "Ctrl+T", "Table") in rows
