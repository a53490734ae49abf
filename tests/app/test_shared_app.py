"""The app that read-only tests share (tests/app/conftest.py) is handed over clean: what a
test leaves behind is seen, and the next test gets a fresh app instead."""

from __future__ import annotations

from tests.app.conftest import (
    PROJECTS,
    TRANSFER,
    SharedApp,
    choose_entry,
    field_input,
    settle,
    type_into,
)

LINE = "310-PW-12"


async def test_a_shared_app_left_edited_or_with_a_dialog_or_typed_text_is_not_handed_on(tmp_path):
    from workbench.app.screens.desk import DeskScreen

    shared = SharedApp(PROJECTS / TRANSFER, tmp_path, prebuild_forms=False)
    try:
        pilot = await shared.hand_over()
        assert shared.starts == 1 and shared.left_dirty() == []
        # an applied edit: named, and the next test gets a fresh app with no history
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "250 m")
        await settle(pilot)
        assert "edits applied" in shared.edits()
        assert any("edits applied" in reason for reason in shared.left_dirty())
        pilot = await shared.hand_over()
        assert shared.starts == 2 and not pilot.app.history.can_undo
        assert pilot.app.project.data["lines"][LINE]["length"] == "240 m"
        assert isinstance(pilot.app.screen, DeskScreen)  # no recovery copy offered
        # a value typed and not applied, then put back with Esc
        await choose_entry(pilot, f"lines:{LINE}")
        field_input(pilot.app, f"lines.{LINE}.length").focus()
        await pilot.pause()
        await pilot.press("end", "9")
        assert any("typed and not applied" in reason for reason in shared.left_dirty())
        await pilot.press("escape")
        await pilot.pause()
        assert shared.left_dirty() == []
        # a dialog left open, then closed
        await pilot.press("f1")
        await pilot.pause()
        assert any("left open" in reason for reason in shared.left_dirty())
        await pilot.press("escape")
        await pilot.pause()
        pilot = await shared.hand_over()
        assert shared.starts == 2  # clean again: handed on as it is, not started afresh
        assert pilot.app.focused is pilot.app.screen.query_one("ElementList")
    finally:
        await shared.stop()
