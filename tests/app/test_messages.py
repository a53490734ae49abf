"""Messages read whole at 80x24: the highlighted warning and event in a wrapping pane."""

from __future__ import annotations

from tests.app.conftest import SIZE, make, settle

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
        await pilot.press("ctrl+r")
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.press("f6")
        await pilot.pause()
        detail = app.screen.query_one("#event-detail")
        warning = sorted_findings(app.transient.warnings)[0]
        run_text = " ".join(finding_text(warning, "SI").split())
        assert len(run_text) > 80  # longer than a table row can show
        assert run_text in " ".join(str(detail.render()).split())
        assert _whole_on_screen(detail)
