"""Elements by keyboard (add, duplicate, rename, delete), the key list, palette and footer."""

from __future__ import annotations

from tests.app.conftest import (
    NETWORK,
    SHARED_LOOP,
    SIZE,
    TRANSFER,
    choose_entry,
    field_input,
    make,
    settle,
    shared_app,
)

transfer_app = shared_app(TRANSFER, prebuild_forms=False)


async def answer_text(pilot, text: str) -> None:
    """Replace the text of the open question and accept it."""
    await pilot.press("end", "ctrl+u", *list(text), "enter")
    await pilot.pause()


async def test_adding_a_junction_asks_its_kind_and_id_and_adds_a_line_to_it(project_file):
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, "reservoirs:TK-310")
        await pilot.press("a")
        await pilot.pause()
        await pilot.press("j")
        await pilot.pause()
        await answer_text(pilot, "J9")
        await settle(pilot)
        elements = app.screen.query_one("#elements")
    assert "J9" in app.project.data["junctions"]
    assert elements.entry.key == "junctions:J9"
    joining = [line for line in app.project.data["lines"].values() if line["to"] == "J9"]
    assert joining and joining[0]["from"] == "TK-310"
    assert app.steady_status == "fresh"
    assert app.history.can_undo


async def test_duplicating_a_line_copies_its_fields_under_the_new_id(project_file):
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, "lines:310-PW-12")
        await pilot.press("d")
        await pilot.pause()
        await answer_text(pilot, "310-PW-13")
        await settle(pilot)
    lines = app.project.data["lines"]
    assert lines["310-PW-13"] == lines["310-PW-12"]
    # Two equal lines in parallel between the same tanks.
    steady = app.steady.lines
    assert abs(steady["310-PW-13"].flow - steady["310-PW-12"].flow) < 1e-9


async def test_renaming_a_tank_carries_the_lines_that_use_it(project_file):
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, "reservoirs:TK-320")
        await pilot.press("n")
        await pilot.pause()
        await answer_text(pilot, "TK-330")
        await settle(pilot)
    assert "TK-330" in app.project.data["reservoirs"]
    assert app.project.data["lines"]["310-PW-12"]["to"] == "TK-330"


async def test_deleting_a_tank_names_the_lines_that_depend_on_it_and_asks(project_file):
    from workbench.app.screens.dialogs import AskScreen

    app = make(project_file(NETWORK))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        tank = "TK-410"
        users = [lid for lid, line in app.project.data["lines"].items()
                 if tank in (line["from"], line["to"])]
        await choose_entry(pilot, f"reservoirs:{tank}")
        await pilot.press("delete")
        await pilot.pause()
        assert isinstance(app.screen, AskScreen)
        question = app.screen.question
        await pilot.press("c")  # cancel first: nothing changes
        await pilot.pause()
        assert tank in app.project.data["reservoirs"]
        await pilot.press("delete")
        await pilot.pause()
        await pilot.press("y")
        await settle(pilot)
        gone = app.project.data
        await pilot.press("ctrl+z")
        await pilot.pause()
        back = app.project.data
    assert users and all(line in question for line in users)
    assert tank not in gone["reservoirs"]
    assert not any(line in gone["lines"] for line in users)
    assert tank in back["reservoirs"] and all(line in back["lines"] for line in users)


@SHARED_LOOP
async def test_the_key_list_shows_every_described_binding_of_the_app(transfer_app):
    from workbench.app.app import WorkbenchApp
    from workbench.app.screens.keys import KeysScreen

    pilot = transfer_app
    app = pilot.app
    await pilot.press("f1")
    await pilot.pause()
    assert isinstance(app.screen, KeysScreen)
    table = app.screen.query_one("#keys-table")
    described = {str(table.get_row_at(i)[2]) for i in range(table.row_count)}
    await pilot.press("escape")
    await pilot.pause()
    assert not isinstance(app.screen, KeysScreen)
    wanted = {b.description for b in WorkbenchApp.BINDINGS if b.description}
    assert wanted <= described


@SHARED_LOOP
async def test_the_cautions_open_from_the_app(transfer_app):
    from workbench.app.screens.cautions import CautionsScreen
    from workbench.cautions import CAUTIONS

    pilot = transfer_app
    app = pilot.app
    await pilot.press("f8")
    await pilot.pause()
    assert isinstance(app.screen, CautionsScreen)
    topics = [str(w.render()) for w in app.screen.query(".caution-topic")]
    await pilot.press("f8")  # F8 closes them again
    await pilot.pause()
    assert not isinstance(app.screen, CautionsScreen)
    assert len(topics) == len(CAUTIONS)
    assert any("Confined spaces" in t for t in topics)


async def test_undo_is_greyed_out_until_there_is_an_edit(project_file):
    from workbench.app.widgets.keyfooter import KeyCap

    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)

        def undo_key():
            return next(k for k in app.screen.query(KeyCap) if k.action == "undo")

        assert undo_key().has_class("-disabled")
        await choose_entry(pilot, "lines:310-PW-12")
        from tests.app.conftest import type_into

        await type_into(pilot, "lines.310-PW-12.length", "250 m")
        await pilot.pause()
        assert not undo_key().has_class("-disabled")
        assert app.check_action("undo", ()) is True
        assert app.check_action("stop_run", ()) is None  # nothing running


async def test_palette_commands_are_grouped_by_a_first_word_and_run(project_file):
    from workbench.app.commands import PALETTE

    groups = {name.split(":")[0] for name, _help, _action in PALETTE}
    assert {"file", "edit", "element", "view", "run", "units"} <= groups
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+p")
        await pilot.pause()
        await pilot.press(*list("units"))
        commands = app.screen.query_one("CommandList")
        for _ in range(200):  # the palette searches in the background: until it offers one
            await pilot.pause(0.02)
            if commands.option_count and commands.highlighted is not None:
                break
        await pilot.press("enter")
        for _ in range(200):
            await pilot.pause(0.02)
            if app.unit_system == "US":
                break
    assert app.unit_system == "US"


async def test_open_without_a_file_offers_the_starter_template():
    from workbench.app.factory import make_app
    from workbench.app.screens.dialogs import AskScreen

    app = make_app(offer_new=True, debounce=0.05)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert isinstance(app.screen, AskScreen)
        assert "starter" in app.screen.question
        await pilot.press("n")
        await app.workers.wait_for_complete()
        await settle(pilot)
        assert app.project is not None
        assert app.path is None
        assert app.steady_status == "fresh"


@SHARED_LOOP
async def test_the_fluid_kind_suggests_every_liquid_the_project_layer_accepts(transfer_app):
    # The app's suggestions and the validator read one list (project.schema.choices_for):
    # the solutions by strength (glycol-water, seawater) included.
    from workbench.app.panes.form import FieldRow
    from workbench.project.schema import choices_for

    pilot = transfer_app
    app = pilot.app
    await choose_entry(pilot, "fluid")
    rows = [r for r in app.screen.query(FieldRow) if r.field.keypath == "fluid.kind"]
    offered = rows[0].choices if rows else None
    assert offered is not None
    assert set(offered) == set(choices_for("fluid", "kind"))
    assert {"water", "ethanol", "ethylene_glycol_water", "seawater", "custom"} <= set(offered)


async def test_a_new_line_and_tank_on_a_us_project_get_us_sizes(project_file):
    """On a US-units project (the network demo) the starting values of new elements are in
    feet and a nominal pipe size: 30 ft (9.144 m, 1 ft = 0.3048 m exact) for the SI 10 m, NPS
    2 (Schedule 40 bore 2.067 in = 52.5 mm, ASME B36.10M) for the SI 50 mm bore; the system
    they make still solves, and the line's form at 80x24 shows the feet."""
    from workbench.project.units import parse_quantity

    app = make(project_file(NETWORK))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert app.project.data["project"]["units"] == "US"
        await choose_entry(pilot, "reservoirs:TK-410")
        await pilot.press("a")
        await pilot.pause()
        await pilot.press("r")
        await pilot.pause()
        await answer_text(pilot, "TK-9")
        await settle(pilot)
        await pilot.press("a")
        await pilot.pause()
        await pilot.press("l")
        await pilot.pause()
        await answer_text(pilot, "L9")
        await settle(pilot)
        line = dict(app.project.data["lines"]["L9"])
        tank = dict(app.project.data["reservoirs"]["TK-9"])
        shown = field_input(app, "lines.L9.length")
        shown_length, shown_visible = shown.value, shown.region.height > 0
        steady_status = app.steady_status
    assert tank["level"] == "3 ft" and tank["bottom_elevation"] == "0 ft"
    assert line["length"] == "30 ft" and line["nominal_size"] == "2 in"
    assert "inner_diameter" not in line
    assert abs(parse_quantity(line["length"], "length") - 10.0) < 1.0
    assert abs(2.067 * 0.0254 - 0.050) < 0.003  # NPS 2 Sch 40 bore near the SI default
    assert line["roughness"] == "0.0018 in"
    assert steady_status == "fresh"
    assert shown_length == "30 ft" and shown_visible
