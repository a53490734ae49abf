"""At 80x24: results from an older state of the project are marked, the status line keeps
the steady and run state, and keys typed before the screen is ready are not lost."""

from __future__ import annotations

from tests.app.conftest import (
    SHARED_LOOP,
    SIZE,
    choose_entry,
    make,
    run_to_end,
    settle,
    shared_app,
    type_into,
)

DRAIN = "fellgate_neutraliser_drain.toml"
LINE = "210-DR-04"
drain_app = shared_app(DRAIN, prebuild_forms=False)


def text(app, selector: str) -> str:
    return str(app.screen.query_one(selector).render())


async def test_after_an_edit_every_result_view_says_its_result_is_stale_and_undo_clears_it(
        project_file):
    app = make(project_file(DRAIN), debounce=30.0)  # the re-solve waits: the edit stays unsolved
    async with app.run_test(size=SIZE) as pilot:
        app.debounce = 0.05
        await settle(pilot)
        await run_to_end(pilot)
        for view in ("f3", "f4", "f5", "f6"):  # build every view
            await pilot.press(view)
            await pilot.pause()
        assert "STALE" not in text(app, "#run-stale") + text(app, "#events-stale")
        await pilot.press("f2")
        app.debounce = 30.0
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.nominal_size", "6 in")
        await pilot.pause()
        assert app.modified
        marks = {
            "flows": text(app, "#steady-banner"),
            "grade": text(app, "#grade-title"),
            "run": text(app, "#run-stale"),
            "events": text(app, "#events-stale"),
        }
        for view, mark in marks.items():
            assert "STALE" in mark, (view, mark)
        status = text(app, "#status")
        await pilot.press("ctrl+z")
        await pilot.pause()
        after_undo = text(app, "#run-stale")
    # at 80 columns the status line keeps both states in sight beside [modified]
    assert len(status) <= 80 and "steady STALE" in status and "run done STALE" in status
    assert "[modified]" in status
    # undo returns to the state the run was made for: its results are current again
    assert "STALE" not in after_undo


async def test_keys_typed_while_the_project_loads_are_answered_once_it_is_shown(project_file):
    from workbench.app.factory import make_app
    from workbench.app.panes.form import FieldInput

    path = project_file(DRAIN)
    app = make_app(path=path, debounce=0.05, prebuild_forms=False)
    async with app.run_test(size=SIZE) as pilot:
        # typed at once, before the file has been read: down to the line, into its form,
        # three fields on
        await pilot.press(*["down"] * 5, "enter", "down", "down", "down")
        while app.project is None or app._held_keys is not None:
            await pilot.pause(0.05)
        await app.workers.wait_for_complete()
        for _ in range(20):
            await pilot.pause()
        focused = app.focused
    assert isinstance(focused, FieldInput)
    assert focused.field.keypath == f"lines.{LINE}.nominal_size"


@SHARED_LOOP
async def test_every_result_view_carries_the_one_line_screening_notice(drain_app):
    from workbench.app.results import SCREENING

    pilot = drain_app
    app = pilot.app
    shown = {}
    for key, view in (("f3", "flows"), ("f4", "grade"), ("f5", "run"), ("f6", "events")):
        await pilot.press(key)
        await pilot.pause()
        pane = app.screen.query_one(f"#{view}-pane")
        notes = [w for w in pane.query(".screening") if str(w.render()) == SCREENING]
        shown[view] = bool(notes) and notes[0].region.height == 1 and \
            notes[0].region.bottom <= SIZE[1]
    assert all(shown.values()), shown


@SHARED_LOOP
async def test_the_sweep_is_listed_in_the_tab_bar_like_the_other_views_and_its_tab_opens_it(
        drain_app):
    from textual.widgets import Tabs

    from workbench.app.screens.sweep import SweepScreen

    pilot = drain_app
    app = pilot.app
    tabs = app.screen.query_one(Tabs)
    titles = [str(tab.label) for tab in tabs.query("Tab")]
    tabs.active = "--content-tab-sweep-tab"
    await pilot.pause()
    opened = isinstance(app.screen, SweepScreen)
    await pilot.press("escape")  # nothing runs: Esc closes the sweep
    await pilot.pause()
    assert "F9 Sweep" in titles
    assert opened


@SHARED_LOOP
async def test_f9_sweep_is_in_the_key_footer_of_every_view_and_every_key_shows_whole(
        drain_app):
    from workbench.app.widgets.keyfooter import KeyCap, KeyFooter

    pilot = drain_app
    app = pilot.app
    seen = {}
    for view in ("f2", "f3", "f4", "f5", "f6", "f10"):
        await pilot.press(view)
        await pilot.pause()
        await pilot.pause()
        footer = app.screen.query_one(KeyFooter)
        caps = list(footer.query(KeyCap))
        sweep = [c for c in caps if c.key == "f9"]
        seen[view] = bool(sweep) and all(
            c.region.right <= SIZE[0] and footer.region.contains_region(c.region)
            for c in caps)
    assert all(seen.values()), seen


async def test_a_sweep_run_before_an_undo_says_it_is_stale_and_redo_makes_it_current(
        project_file):
    from workbench.app.screens.sweep import SweepScreen

    app = make(project_file(DRAIN))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await choose_entry(pilot, f"lines:{LINE}")
        await type_into(pilot, f"lines.{LINE}.length", "90 m")
        await settle(pilot)
        await pilot.press("f9")
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, SweepScreen)
        screen.query_one("#sweep-vary-1").value = "reservoirs.TK-210.level=1 m,2 m"
        screen.query_one("#sweep-steady-only").value = True
        await pilot.press("ctrl+r")
        for _ in range(600):
            await pilot.pause(0.05)
            await screen.workers.wait_for_complete()
            if not screen.running:
                break
        await pilot.pause()
        fresh = text(app, "#sweep-status")
        await pilot.press("ctrl+z")  # undo works on this screen: the sweep is now of another state
        await pilot.pause()
        stale = text(app, "#sweep-status")
        await pilot.press("ctrl+y")
        await pilot.pause()
        again = text(app, "#sweep-status")
    assert "2 cases" in fresh and "STALE" not in fresh
    assert "STALE" in stale and "2 cases" in stale
    assert "STALE" not in again


async def test_the_run_summary_on_the_events_view_reads_whole_at_80_columns(project_file):
    app = make(project_file(DRAIN))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        await pilot.press("f6")
        await pilot.pause()
        summary = app.screen.query_one("#run-summary")
        lines = summary.render_lines(summary.region.reset_offset)
        shown = " ".join("".join(s.text for s in line).strip() for line in lines)
        whole = " ".join(str(summary.render()).split())
        drained = list(app.transient.drain_times)
    assert len(whole) > SIZE[0]  # longer than one row: it must wrap, not be cut
    assert drained and all(tank in shown for tank in drained)
    assert " ".join(shown.split()) == whole


async def test_the_events_view_shows_its_first_event_row_with_the_stale_mark_at_80x24(
        project_file):
    app = make(project_file(DRAIN), debounce=30.0)
    async with app.run_test(size=SIZE) as pilot:
        app.debounce = 0.05
        await settle(pilot)
        await run_to_end(pilot)
        await choose_entry(pilot, f"lines:{LINE}")
        app.debounce = 30.0
        await type_into(pilot, f"lines.{LINE}.length", "90 m")  # the run is now stale
        await pilot.press("f6")
        await pilot.pause()
        await pilot.pause()
        table = app.screen.query_one("#event-table")
        first = [str(c) for c in table.get_row_at(0)]
        shown = [
            "".join(s.text for s in line)
            for line in table.render_lines(table.region.reset_offset)
        ]
        warnings = app.screen.query_one("#run-finding-table")
        warnings_height = warnings.region.height
        # rows the table can show, less a sideways scroll bar: its header and an event
        room = table.scrollable_content_region.height
        stale = text(app, "#events-stale")
    assert "STALE" in stale
    # the header and the first event's time and code are drawn inside the table
    assert any(first[0] in row and first[1] in row for row in shown), shown
    assert warnings_height >= 3
    assert room >= 2


@SHARED_LOOP
async def test_the_run_view_never_says_no_simulation_while_one_runs(drain_app):
    pilot = drain_app
    app = pilot.app
    await pilot.press("f5")
    await pilot.pause()
    await pilot.pause()
    plot = app.screen.query_one("#run-plot")
    idle = plot.render().plain.splitlines()[0]
    app.run_status = "running"  # as Ctrl+R sets it, before the first result arrives
    await pilot.pause()
    running = plot.render().plain.splitlines()[0]
    app.run_status = "idle"  # no run was started: as it was
    await pilot.pause()
    assert "Ctrl+R runs one" in idle
    assert "no simulation" not in running and "when the run ends" in running


async def test_keys_typed_while_a_broken_file_loads_do_not_answer_the_dialog_that_says_why(
        project_file, monkeypatch):
    """Enter typed during the load was meant for the element list; when the file does not
    open it must not pick the Problems dialog's first answer ('open another file'), so the
    TOML syntax error stays on screen to be read (common practice, no source: a message
    the user has not seen is not an answer)."""
    import threading

    from workbench.app import jobs
    from workbench.app.factory import make_app
    from workbench.app.screens.dialogs import AskScreen

    path = project_file(DRAIN)
    path.write_text('title = "x"\n[lines.L1\nlength = "3 m"\n', encoding="utf-8")
    typed = threading.Event()
    real_load = jobs.load

    def load_after_the_keys(p):  # the read ends only once the keys were typed
        typed.wait(30)
        return real_load(p)

    monkeypatch.setattr(jobs, "load", load_after_the_keys)
    app = make_app(path=path, debounce=0.05, prebuild_forms=False)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.press("enter", "down")
        typed.set()
        for _ in range(600):  # the load fails in its worker; the dialog follows
            await pilot.pause(0.05)
            if not isinstance(app.screen, AskScreen):
                continue
            for _ in range(20):  # time for any replayed key to reach the dialog
                await pilot.pause(0.02)
            break
        screen = app.screen
        shown = getattr(screen, "question", "")
        is_problems = isinstance(screen, AskScreen)
    assert is_problems, type(screen).__name__
    assert "could not be opened" in shown and "TOML syntax error" in shown, shown
