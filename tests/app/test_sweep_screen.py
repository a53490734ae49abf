"""The sweep screen at 80x24, mounted in a tiny test app around a demo project.

It is checked against the program's own steady solver run directly in the test (the screen
must show what the solver says for each case), and the criterion logic against the plain
comparison of those numbers.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.app import App

PROJECTS = Path(__file__).resolve().parents[2] / "projects"
SIZE = (80, 24)

DRAIN = PROJECTS / "fellgate_neutraliser_drain.toml"
TANK = "TK-210"
LINE = "210-DR-04"


class SweepTestApp(App[None]):
    """Just enough app to hold the screen: the project and the display units."""

    def __init__(self, project) -> None:
        super().__init__()
        self.project = project
        self.unit_system = "SI"

    def on_mount(self) -> None:
        from workbench.app.screens.sweep import SweepScreen

        self.push_screen(SweepScreen())


async def _type(pilot, selector: str, text: str) -> None:
    """Put ``text`` in a field as a terminal pastes it (one event: the screen is checked,
    not the typing of each character)."""
    from textual import events

    widget = pilot.app.screen.query_one(selector)
    widget.value = ""
    widget.focus()
    widget.post_message(events.Paste(text))
    await pilot.pause()
    assert widget.value == text


async def _wait_for_sweep(pilot) -> None:
    screen = pilot.app.screen
    for _ in range(600):
        await pilot.pause(0.05)
        await screen.workers.wait_for_complete()
        if not screen.running:
            await pilot.pause()
            return
    raise AssertionError("the sweep never finished")


def _load(path: Path = DRAIN):
    from workbench.project.document import load_project

    return load_project(path)


async def test_a_steady_sweep_fills_the_table_in_sweep_order_and_names_the_first_passing_case() -> None:
    from textual.widgets import DataTable

    from workbench.core.network import solve_steady
    from workbench.project.document import set_value

    project = _load()
    levels = ["0.5 m", "1.5 m", "2.5 m"]
    app = SweepTestApp(project)
    async with app.run_test(size=SIZE) as pilot:
        await _type(pilot, "#sweep-vary-1", f"reservoirs.{TANK}.level={','.join(levels)}")
        # Threshold between the flows of the first and second level (the solver, run here).
        flows = [solve_steady(set_value(project, f"reservoirs.{TANK}.level", lv).system).lines[LINE].flow
                 for lv in levels]
        threshold = (flows[0] + flows[1]) / 2 * 1000.0
        await _type(pilot, "#sweep-require", f"flow({LINE}) > {threshold:.6f} L/s")
        pilot.app.screen.query_one("#sweep-steady-only").value = True
        await pilot.press("ctrl+r")
        await _wait_for_sweep(pilot)
        screen = pilot.app.screen
        table = screen.query_one("#sweep-table", DataTable)
        keys = [key.value for key in table.columns]
        at = keys.index(f"value:reservoirs.{TANK}.level")
        shown_levels = [str(table.get_row_at(i)[at]) for i in range(table.row_count)]
        # the pass column and the criterion's value lead, inside the table's width at 80
        # columns, with no scrolling
        pass_at = keys.index("pass")
        columns = list(table.columns.values())
        right_edge = sum(c.get_render_width(table) for c in columns[:pass_at + 2])
        pass_cells = [str(table.get_row_at(i)[pass_at]) for i in range(table.row_count)]
        visible_width = table.scrollable_content_region.width
        detail = " ".join(str(screen.query_one("#sweep-detail").render()).split())
        status = str(screen.query_one("#sweep-status").render())
        sweep = screen.sweep
    assert shown_levels == levels
    got = [c["steady"]["lines"][LINE]["flow_m3_s"] for c in sweep["cases"]]
    for a, b in zip(got, flows, strict=True):
        assert abs(a - b) <= 1e-9 * abs(b)
    assert [c["pass"] for c in sweep["cases"]] == [f * 1000.0 > threshold for f in flows]
    assert sweep["first_passing"] == 1
    assert "first passing: #2" in status
    assert pass_at <= 1 and right_edge <= visible_width
    assert pass_cells == ["yes" if f * 1000.0 > threshold else "no" for f in flows]
    assert detail.startswith("# 1 · pass no")  # the highlighted case, every column


async def test_the_plot_puts_the_chosen_result_against_the_swept_value() -> None:
    project = _load()
    app = SweepTestApp(project)
    async with app.run_test(size=SIZE) as pilot:
        await _type(pilot, "#sweep-vary-1", f"reservoirs.{TANK}.level=0.5 m..2.5 m/5")
        pilot.app.screen.query_one("#sweep-quick").value = True
        await pilot.press("ctrl+r")
        await _wait_for_sweep(pilot)
        screen = pilot.app.screen
        x_label, y_label, series = screen.plot_series(f"flow:{LINE}")
    assert x_label == f"reservoirs.{TANK}.level [m]"
    assert y_label == f"flow {LINE} [L/s]"
    (_, xs, ys), = series
    assert xs == [0.5, 1.0, 1.5, 2.0, 2.5]
    # Common practice, no source: more head over the outlet drives more flow.
    assert ys == sorted(ys) and ys[0] < ys[-1]


async def test_a_bad_key_path_is_shown_in_words_and_nothing_runs() -> None:
    app = SweepTestApp(_load())
    async with app.run_test(size=SIZE) as pilot:
        await _type(pilot, "#sweep-vary-1", f"lines.{LINE}.lenght=10 m")
        await pilot.press("ctrl+r")
        await _wait_for_sweep(pilot)
        status = str(pilot.app.screen.query_one("#sweep-status").render())
        assert pilot.app.screen.sweep is None
    assert "did you mean 'length'" in status


async def test_escape_closes_the_screen_when_nothing_runs() -> None:
    from workbench.app.screens.sweep import SweepScreen

    app = SweepTestApp(_load())
    async with app.run_test(size=SIZE) as pilot:
        assert isinstance(pilot.app.screen, SweepScreen)
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(pilot.app.screen, SweepScreen)


async def test_f9_in_the_workbench_opens_the_sweep_screen_on_the_open_project() -> None:
    from workbench.app.factory import make_app
    from workbench.app.screens.sweep import SweepScreen

    app = make_app(_load(), path=DRAIN, debounce=0.05)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("f9")
        await pilot.pause()
        assert isinstance(pilot.app.screen, SweepScreen)
        assert pilot.app.screen.project is pilot.app.project


@pytest.mark.slow
async def test_a_simulated_sweep_runs_in_worker_processes_and_reports_drain_times() -> None:
    from workbench.core.transient import simulate
    from workbench.project.document import set_value

    project = _load()
    levels = ["1 m", "2 m"]
    app = SweepTestApp(project)
    async with app.run_test(size=SIZE) as pilot:
        await _type(pilot, "#sweep-vary-1", f"reservoirs.{TANK}.level={','.join(levels)}")
        await pilot.press("ctrl+r")
        await _wait_for_sweep(pilot)
        sweep = pilot.app.screen.sweep
        x_label, _, series = pilot.app.screen.plot_series(f"drain:{TANK}")
    # Outside the screen: the simulation run directly for each case.
    for case, level in zip(sweep["cases"], levels, strict=True):
        expected = simulate(set_value(project, f"reservoirs.{TANK}.level", level).system).drain_times[TANK]
        got = next(e["time_s"] for e in case["simulation"]["events"] if e["code"] == "tank.drained")
        assert abs(got - expected) <= 1e-9 * expected
    (_, xs, ys), = series
    assert xs == [1.0, 2.0] and ys[0] < ys[1]
