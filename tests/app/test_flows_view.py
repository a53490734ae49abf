"""The Flows view's tank balance: shown for tanks with a feed or draw-off, and only then."""

from __future__ import annotations

import pytest

from tests.app.conftest import SIZE, TRANSFER, make, settle, table_cells

CLEARWELL = "fellgate_clearwell_filter_feed.toml"


async def test_a_fed_tank_shows_its_balance_and_how_fast_its_level_moves(project_file):
    # Mass balance of an incompressible liquid (common practice, no source): the level of a
    # rectangular tank moves at (lines in + feed - draw-off) / (length x width). The demo's
    # clearwell is 6 m x 4 m, fed 40 L/s, drawn 5 L/s; the line flow is the steady solver's.
    app = make(project_file(CLEARWELL))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("f3")
        await pilot.pause()
        rows = table_cells(app, "#tank-table")
        shown = app.screen.query_one("#tank-table").display
        flow = app.steady.lines["501-TW-03"].flow
    assert shown and len(rows) == 1 and rows[0][0] == "CW-501"
    rate_mm_min = (0.040 - 0.005 - flow) / (6.0 * 4.0) * 1000.0 * 60.0
    assert rows[0][4] == f"{rate_mm_min:+.3g} mm/min"
    assert rows[0][1] == f"{-flow * 1000:.2f}"
    assert float(rows[0][2]) == pytest.approx(40.0)


async def test_without_a_feed_the_tank_balance_is_not_shown(project_file):
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("f3")
        await pilot.pause()
        shown = app.screen.query_one("#tank-table").display
        rows = table_cells(app, "#tank-table")
    assert not shown and rows == []


async def test_the_grade_line_loses_its_stale_mark_once_the_solve_is_current(project_file):
    # The Grade line view opened before the first steady solve has finished is marked
    # STALE; when the solution arrives and is current, the mark must go.
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await pilot.press("f4")
        await settle(pilot)
        await pilot.pause()
        title = str(app.screen.query_one("#grade-title").render())
        status = app.steady_status
    assert status == "fresh"
    assert "Grade line 310-PW-12" in title and "STALE" not in title
