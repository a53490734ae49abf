"""Snapshots of the main screens at 80x24 (pytest-textual-snapshot; files under __snapshots__).

Regenerate after a deliberate change of the look with ``pytest tests/app --snapshot-update``
and read the new SVGs before committing them.
"""

from __future__ import annotations

from tests.app.conftest import NETWORK, SIZE, TRANSFER, choose_entry, make, settle


def test_the_system_view_shows_a_line_form(snap_compare, project_file):
    async def before(pilot):
        await settle(pilot)
        await choose_entry(pilot, "lines:310-PW-12")

    assert snap_compare(make(project_file(TRANSFER)), terminal_size=SIZE, run_before=before)


def test_the_flows_view_shows_lines_nodes_and_findings(snap_compare, project_file):
    async def before(pilot):
        await settle(pilot)
        await pilot.press("f3")
        await pilot.pause()

    assert snap_compare(make(project_file(NETWORK)), terminal_size=SIZE, run_before=before)


def test_the_grade_line_view_draws_the_profile(snap_compare, project_file):
    async def before(pilot):
        await settle(pilot)
        await pilot.press("f4")
        await pilot.pause(0.2)

    assert snap_compare(make(project_file(NETWORK)), terminal_size=SIZE, run_before=before)


def test_the_key_list(snap_compare, project_file):
    async def before(pilot):
        await settle(pilot)
        await pilot.press("f1")
        await pilot.pause()

    assert snap_compare(make(project_file(TRANSFER)), terminal_size=SIZE, run_before=before)
