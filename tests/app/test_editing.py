"""Driving the workbench at 80x24: edits, live steady results, validation, undo, saving."""

from __future__ import annotations

import math

from tests.app.conftest import (
    SHARED_LOOP,
    SIZE,
    TRANSFER,
    choose_entry,
    field_input,
    make,
    settle,
    shared_app,
    table_cells,
    type_into,
)

LINE = "310-PW-12"
transfer_app = shared_app(TRANSFER, prebuild_forms=False)


def flow_cell(app) -> float:
    rows = {row[0]: row for row in table_cells(app, "#line-table")}
    return float(rows[LINE][1])


async def test_changing_a_line_diameter_changes_the_flow_shown_after_the_worker_finishes(
        project_file):
    path = project_file(TRANSFER)
    app = make(path, debounce=1.0)  # long enough to see the stale mark before the solve
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("f3")
        before = flow_cell(app)
        await pilot.press("f2")
        await choose_entry(pilot, f"lines:{LINE}")
        # DN150 -> DN100, schedule 40 kept: the bore goes from about 154 to 102 mm.
        await type_into(pilot, f"lines.{LINE}.nominal_size", "DN100", enter=False)
        await pilot.press("enter")
        assert app.steady_status in {"stale", "solving"}  # marked stale while in flight
        assert "STALE" in str(app.screen.query_one("#status").render())
        await settle(pilot)
        await pilot.press("f3")
        after = flow_cell(app)
    assert app.project.data["lines"][LINE]["nominal_size"] == "DN100"
    # Common practice, no source: at the same driving head a narrower line carries less.
    assert after < 0.6 * before
    # The table shows the solver's own answer for the edited model, in L/s.
    from workbench.core.network import solve_steady

    expected = solve_steady(app.project.system).lines[LINE].flow * 1000.0
    assert math.isclose(after, expected, rel_tol=1e-3)


@SHARED_LOOP
async def test_a_wrong_unit_shows_its_message_beside_the_field_and_the_model_keeps_its_value(
        transfer_app):
    pilot = transfer_app
    app = pilot.app
    await choose_entry(pilot, f"lines:{LINE}")
    before = app.project
    await type_into(pilot, f"lines.{LINE}.length", "240 mmm")
    row = field_input(app, f"lines.{LINE}.length").parent
    shown = str(row.render())  # the row draws its name, then the message beside
    assert row.has_class("-invalid")
    assert shown.startswith("length*") and "✗" in shown
    message = shown[shown.index("✗"):]
    assert "mmm" in message
    assert app.project is before
    assert app.project.data["lines"][LINE]["length"] == "240 m"
    assert not app.history.can_undo
    await pilot.press("escape")  # puts the stored value back
    await pilot.pause()
    assert not row.has_class("-invalid")


async def test_undo_and_redo_step_through_the_edits(project_file):
    path = project_file(TRANSFER)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "300 m")
        assert app.project.data["lines"][LINE]["length"] == "300 m"
        await pilot.press("ctrl+z")
        await pilot.pause()
        assert app.project.data["lines"][LINE]["length"] == "240 m"
        assert field_input(app, f"lines.{LINE}.length").value == "240 m"
        await pilot.press("ctrl+y")
        await pilot.pause()
        assert app.project.data["lines"][LINE]["length"] == "300 m"
        assert app.modified
        assert "[modified]" in str(app.screen.query_one("#status").render())


async def test_saving_writes_the_change_and_keeps_the_comments_elsewhere(project_file):
    path = project_file(TRANSFER)
    original = path.read_text()
    comments = [line for line in original.splitlines() if "#" in line and "length" not in line]
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "255 m")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert not app.modified
    saved = path.read_text()
    assert 'length = "255 m"' in saved
    assert 'length = "240 m"' not in saved
    assert comments and all(line in saved.splitlines() for line in comments)


async def test_saving_over_a_file_changed_on_disk_asks_first(project_file):
    from workbench.app.screens.dialogs import AskScreen

    path = project_file(TRANSFER)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "250 m")
        path.write_text(path.read_text() + "\n# edited by someone else\n")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, AskScreen)
        assert "changed on disk" in app.screen.question
        await pilot.press("c")
        await pilot.pause()
        assert "# edited by someone else" in path.read_text()
        assert app.modified


async def test_quitting_with_unsaved_edits_meets_the_prompt(project_file):
    from workbench.app.screens.dialogs import AskScreen

    path = project_file(TRANSFER)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "260 m")
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert isinstance(app.screen, AskScreen)
        assert "unsaved edits" in app.screen.question
        await pilot.press("c")  # keep working
        await pilot.pause()
        assert app.is_running and not isinstance(app.screen, AskScreen)
        await pilot.press("ctrl+q")
        await pilot.pause()
        await pilot.press("d")  # discard and quit
        await pilot.pause()
    assert app.return_code == 0
    assert 'length = "240 m"' in path.read_text()


async def test_quitting_without_edits_leaves_at_once(project_file):
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+q")
        await pilot.pause()
    assert app.return_code == 0


@SHARED_LOOP
async def test_the_unit_switch_changes_the_display_and_no_stored_value(transfer_app):
    pilot = transfer_app
    app = pilot.app
    await pilot.press("f3")
    si_flow = flow_cell(app)
    await pilot.press("f7")
    await pilot.pause()
    header = [str(c.label) for c in app.screen.query_one("#line-table").columns.values()]
    us_flow = flow_cell(app)
    assert app.unit_system == "US"
    assert "flow gpm" in header
    # 1 US gallon = 3.785411784 L exactly (NIST Handbook 44, appendix C).
    assert math.isclose(us_flow, si_flow * 60 / 3.785411784, rel_tol=2e-3)
    assert not app.modified
    assert app.project.data["project"]["units"] == "SI"
    await pilot.press("f7")  # and back
    await pilot.pause()
    assert app.unit_system == "SI" and flow_cell(app) == si_flow


async def test_a_fluid_kind_that_needs_its_strength_asks_for_it_and_applies_both(project_file):
    # Glycol-water is valid only with its mass fraction, and a mass fraction only with a
    # solution kind: the form asks for the missing key and applies both as one edit; going
    # back to water drops the key that no longer applies.
    from tests.app.test_files import answer
    from workbench.app.screens.dialogs import TextScreen

    path = project_file(TRANSFER)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, "fluid")
        await type_into(pilot, "fluid.kind", "ethylene_glycol_water")
        assert isinstance(app.screen, TextScreen)
        assert "mass_fraction" in app.screen.prompt and "0 to 0.6" in app.screen.prompt
        await answer(pilot, "0.3")
        await settle(pilot)
        fluid = dict(app.project.data["fluid"])
        props = app.project.system.fluid
        await pilot.press("ctrl+z")  # one edit: one undo goes back to water
        await settle(pilot)
        after_undo = dict(app.project.data["fluid"])
        await pilot.press("ctrl+y")
        await settle(pilot)
        await choose_entry(pilot, "fluid")
        await type_into(pilot, "fluid.kind", "water")
        await settle(pilot)
        back = dict(app.project.data["fluid"])
    assert fluid["kind"] == "ethylene_glycol_water" and float(fluid["mass_fraction"]) == 0.3
    # 30 % ethylene glycol at 15 degC is denser than water, about 1040-1045 kg/m3 (ASHRAE
    # Handbook Fundamentals ch. 31 table, from memory)
    assert 1035.0 < props.density < 1050.0
    assert after_undo["kind"] == "water" and "mass_fraction" not in after_undo
    assert back["kind"] == "water" and "mass_fraction" not in back
    assert 'kind = "water"' in path.read_text()  # nothing saved without Ctrl+S


@SHARED_LOOP
async def test_escaping_the_question_leaves_the_fluid_as_it_was(transfer_app):
    from workbench.app.screens.dialogs import TextScreen

    pilot = transfer_app
    app = pilot.app
    await choose_entry(pilot, "fluid")
    await type_into(pilot, "fluid.kind", "seawater")
    assert isinstance(app.screen, TextScreen) and "salinity" in app.screen.prompt
    await pilot.press("escape")
    await pilot.pause()
    kind = app.project.data["fluid"]["kind"]
    modified = app.modified
    assert kind == "water" and not modified
    field_input(app, "fluid.kind").focus()
    await pilot.press("escape")  # the word typed in the field goes back too
    await pilot.pause()
