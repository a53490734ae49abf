"""Messages read whole at 80x24: the highlighted warning and event in a wrapping pane."""

from __future__ import annotations

from tests.app.conftest import SIZE, make, run_to_end, settle

DRAIN = "fellgate_neutraliser_drain.toml"


def _whole_on_screen(widget) -> bool:
    """Every wrapped line of the widget inside its region, and the region on the screen."""
    lines = widget.render_lines(widget.region.reset_offset)
    return (widget.region.height >= widget.get_content_height(
        widget.outer_size, widget.outer_size, widget.region.width)
        and widget.region.bottom <= SIZE[1] - 2 and len(lines) == widget.region.height)


async def test_the_highlighted_warning_is_shown_whole_in_the_detail_pane_of_both_views(
        project_file):
    from workbench.app.results import finding_text, sorted_findings

    app = make(project_file(DRAIN))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("f3")
        await pilot.pause()
        flows_detail = app.screen.query_one("#finding-detail")
        first = sorted_findings(app.steady.warnings)[0]
        steady_text = finding_text(first, "SI")
        shown = " ".join(str(flows_detail.render()).split())
        assert " ".join(steady_text.split()) in shown
        assert _whole_on_screen(flows_detail)
        await run_to_end(pilot)
        await pilot.press("f6")
        await pilot.pause()
        detail = app.screen.query_one("#event-detail")
        warning = sorted_findings(app.transient.warnings)[0]
        run_text = " ".join(finding_text(warning, "SI").split())
        assert len(run_text) > 80  # longer than a table row can show
        assert run_text in " ".join(str(detail.render()).split())
        assert _whole_on_screen(detail)


async def test_notices_never_cover_the_status_line_the_keys_or_a_detail_pane(project_file):
    """Saved, undid and an error notice stacked at once, on the System view (help line
    under the form) and on Flows and Events (detail panes at the foot of the view)."""
    from tests.app.conftest import choose_entry, type_into
    from workbench.app.widgets.keyfooter import KeyFooter

    app = make(project_file(DRAIN))
    async with app.run_test(size=SIZE, notifications=True) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        await choose_entry(pilot, "lines:210-DR-04")
        await type_into(pilot, "lines.210-DR-04.length", "90 m")
        await settle(pilot)
        for view, guarded in (("f2", "#field-help"), ("f3", "#finding-detail"),
                              ("f6", "#event-detail")):
            await pilot.press(view)
            await pilot.pause()
            await pilot.press("ctrl+z", "ctrl+s")  # "undid: …" and "saved /tmp/…"
            # the same words again, long-lived: on a busy machine the real ones (2-3 s) can
            # be gone before the screen is read
            app.notify(f"saved {app.path}", timeout=30)
            app.notify("a problem written at length " * 4, title="Simulation",
                       severity="error", timeout=30)
            await pilot.pause()
            await pilot.pause()
            # Toast by its type name: Textual keeps the class in a private module
            toasts = [t.region for t in app.screen.query("Toast")]
            assert len(toasts) >= 2, view
            keep = [app.screen.query_one("#status").region,
                    app.screen.query_one(KeyFooter).region,
                    app.screen.query_one(guarded).region]
            assert all(region.height for region in keep)
            for toast in toasts:
                for region in keep:
                    assert not toast.overlaps(region), (view, toast, region)
            app.clear_notifications()
            await pilot.press("ctrl+y")


async def test_ctrl_c_says_how_to_quit_in_plain_words_without_markup(project_file):
    """Ctrl+C does not quit (Textual binds it to a reminder); the reminder is shown with
    the app's markup-free notices, so it must carry no markup tags such as '[b]'
    (common practice, no source: a notice is read as words)."""
    app = make(project_file(DRAIN))
    async with app.run_test(size=SIZE, notifications=True) as pilot:
        await settle(pilot)
        await pilot.press("ctrl+c")
        await pilot.pause()
        messages = [n.message for n in app._notifications]
        assert any("Ctrl+Q" in m for m in messages), messages
        assert not any("[b]" in m or "[/b]" in m for m in messages), messages
        assert app.is_running
