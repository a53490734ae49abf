"""The forms at 80x24: every field reachable and visible, Up/Down and Esc, grouped line keys."""

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
    type_into,
)

pytestmark = SHARED_LOOP
LINE = "310-PW-12"
DRAIN = "fellgate_neutraliser_drain.toml"
VENTED = "fellgate_condensate_tank_vent.toml"
transfer = shared_app(TRANSFER, prebuild_forms=True)
every_form_demo = shared_app(DRAIN, VENTED, TRANSFER)


def _inside(inner, outer) -> bool:
    return (inner.y >= outer.y and inner.bottom <= outer.bottom
            and inner.x >= outer.x and inner.right <= outer.right)


@pytest.mark.slow  # about 30 key presses, each laying the whole form out again: 15 s of CPU
async def test_down_visits_every_field_of_a_line_form_and_each_is_inside_the_visible_form(
        transfer):
    from workbench.app.outline import Entry, form_fields
    from workbench.app.panes.form import FieldForm, FieldInput

    pilot = transfer
    app = pilot.app
    await choose_entry(pilot, f"lines:{LINE}")
    await pilot.press("enter")
    await pilot.pause()
    form = app.screen.query_one(FieldForm)
    seen = []
    for _ in range(60):
        focused = app.focused
        if isinstance(focused, FieldInput):
            seen.append(focused.field.keypath)
        # the widget being edited is drawn inside the form's visible region
        assert _inside(focused.region, form.region), (focused, focused.region, form.region)
        await pilot.press("down")
        await pilot.pause()
        if app.focused is focused:
            break
    expected = [f.keypath for f in form_fields(Entry("lines", LINE))]
    assert seen == expected
    assert len(expected) >= 25


async def test_a_line_form_puts_size_length_and_valve_opening_on_the_first_screen(transfer):
    pilot = transfer
    app = pilot.app
    await choose_entry(pilot, f"lines:{LINE}")
    form = app.screen.query_one("#form")
    for key in ("length", "nominal_size", "valve.opening"):
        row = field_input(app, f"lines.{LINE}.{key}").parent
        assert _inside(row.region, form.region), key


async def test_esc_reverts_a_typed_value_first_then_leaves_the_form_for_the_element_list(
        transfer):
    from workbench.app.panes.elements import ElementList

    pilot = transfer
    app = pilot.app
    await choose_entry(pilot, f"lines:{LINE}")
    editor = field_input(app, f"lines.{LINE}.length")
    editor.focus()
    stored = editor.value
    await pilot.press("end", "9", "9")
    await pilot.press("escape")
    assert editor.value == stored and app.focused is editor
    await pilot.press("escape")
    assert isinstance(app.focused, ElementList)
    assert app.history.can_undo is False  # nothing was applied


async def test_a_long_value_shows_whole_in_the_field_being_edited(transfer):
    pilot = transfer
    app = pilot.app
    await choose_entry(pilot, f"lines:{LINE}")
    editor = field_input(app, f"lines.{LINE}.description")
    text = "drain line from the day tank, lagged"  # 36 characters, over the old 22
    editor.focus()
    await pilot.pause()
    await pilot.press("end", "ctrl+u", *["space" if c == " " else c for c in text])
    await pilot.pause()
    shown = "".join(s.text for s in editor.render_line(0))
    assert text in shown
    await pilot.press("escape")  # puts the stored value back: nothing was applied
    assert editor.value != text and app.history.can_undo is False


async def test_an_empty_optional_field_says_not_set_and_never_shows_an_example_value(
        transfer):
    pilot = transfer
    app = pilot.app
    await choose_entry(pilot, f"lines:{LINE}")
    placeholders = {e.field.spec.name: e.placeholder
                    for e in app.screen.query("FieldInput") if e.field.keypath.startswith(
                        f"lines.{LINE}.")}
    assert "102.26" not in placeholders["inner_diameter"]
    assert all("e.g." not in text for text in placeholders.values())


async def test_enter_on_a_heading_folds_its_fields_and_down_skips_them(transfer):
    from workbench.app.panes.form import GroupHeading

    pilot = transfer
    app = pilot.app
    await choose_entry(pilot, f"lines:{LINE}")
    heading = next(h for h in app.screen.query(GroupHeading)
                   if h.title == "losses" and h.parent.display)
    heading.focus()
    await pilot.press("enter")
    await pilot.pause()
    assert not field_input(app, f"lines.{LINE}.roughness").parent.display
    await pilot.press("down")
    assert app.focused.title == "wall and surge"
    await pilot.press("up", "enter")
    await pilot.pause()
    assert field_input(app, f"lines.{LINE}.roughness").parent.display


async def test_a_quick_burst_of_down_presses_lands_on_the_field_as_many_steps_on(transfer):
    """Keys sent to the terminal all at once, before any focus change has run (Textual
    moves the focus after the key that asked for it): N presses of Down from the first
    field must land on field N+1, none lost."""
    from textual import events

    from workbench.app.panes.form import FieldForm, FieldInput

    pilot = transfer
    app = pilot.app
    await choose_entry(pilot, f"lines:{LINE}")
    await pilot.press("enter")
    await pilot.pause()
    form = app.screen.query_one(FieldForm)
    items = form.focusables()
    start = items.index(app.focused)
    for steps, key in ((5, "down"), (3, "up"), (7, "down")):
        for _ in range(steps):  # all queued before the app handles the first one
            event = events.Key(key, None)
            event.set_sender(app)
            app._driver.send_message(event)
        await pilot.pause()
        await pilot.pause()
        start += steps if key == "down" else -steps
        assert app.focused is items[start], (key, steps, app.focused)
    assert isinstance(app.focused, FieldInput)
    assert _inside(app.focused.region, form.region)


async def _every_form_whole(pilot) -> list[str]:
    """Each element's form in turn: names and empty-field placeholders that do not fit."""
    from workbench.app.outline import entries
    from workbench.app.panes.form import EDITOR_WIDTH, FieldForm, FieldInput

    app = pilot.app
    cut = []
    for entry in entries(app.project.data):
        await choose_entry(pilot, entry.key)
        await pilot.pause()
        form = app.screen.query_one(FieldForm)
        for row in form.current_rows():
            editor = row.editor
            if len(row.name_text) + 1 > row.name_width:  # a space before the value
                cut.append(f"{entry.key} name {row.name_text}")
            # a field not being edited shows EDITOR_WIDTH columns, then the unit hint
            if (isinstance(editor, FieldInput) and not editor.value
                    and len(editor.placeholder) > min(EDITOR_WIDTH, editor.region.width)):
                cut.append(f"{entry.key} {row.field.keypath} placeholder {editor.placeholder!r}")
    return cut


async def test_no_name_or_placeholder_is_cut_in_any_form_of_the_demos(every_form_demo):
    """The drain (a line without a valve: the valve keys' placeholder), the vented tank
    (the longest key names) and the transfer (a line with a valve)."""
    cut = await _every_form_whole(every_form_demo)
    assert cut == [], (every_form_demo.app.path.name, cut)


async def test_a_tank_vent_can_be_set_to_none_from_the_form_and_saved(project_file):
    """vent = "none" seals the tank (the project file's own word); clearing the key opens
    it; the vent's keys below then read "no vent yet"."""
    from workbench.project.document import load_project

    path = project_file("fellgate_condensate_tank_vent.toml")
    tank = "reservoirs.TK-118"
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, "reservoirs:TK-118")
        vent = field_input(app, f"{tank}.vent")
        assert "nominal_size" in vent.value  # the vent as it stands, as inline TOML
        await type_into(pilot, f"{tank}.vent", "none")
        await settle(pilot)
        assert vent.parent.problem == ""
        assert app.project.data["reservoirs"]["TK-118"]["vent"] == "none"
        assert field_input(app, f"{tank}.vent.k").placeholder == "(no vent yet)"
        await pilot.press("ctrl+s")
        await pilot.pause()
        await type_into(pilot, f"{tank}.vent", "sealed")  # not a word the file takes
        refused = vent.parent.problem
        await type_into(pilot, f"{tank}.vent", "")
        await settle(pilot)
        opened = app.project.data["reservoirs"]["TK-118"].get("vent")
    assert load_project(path).data["reservoirs"]["TK-118"]["vent"] == "none"
    assert "none" in refused and "sealed" in refused
    assert opened is None
