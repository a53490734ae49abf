"""Simulations from the workbench: progress, completion, events, cancelling, surge views."""

from __future__ import annotations

import math

import pytest

from tests.app.conftest import SIZE, TRANSFER, make, run_to_end, settle, table_cells

DRAIN = "fellgate_neutraliser_drain.toml"


def independent_drain_time(system) -> float:
    """Quasi-steady drain of TK-210 integrated with scipy, the tank area worked by hand.

    dV/dt = -Q(h): Q from the steady solution at each level (the line's inertia is left
    out: its start-up lasts seconds against a drain of minutes), V(h) of a cone with its
    apex at the outlet under a vertical cylinder. Cone with a 90 deg included angle: the
    radius equals the depth up to 1.8 m (geometry of a right circular cone).
    """
    from scipy.integrate import solve_ivp

    from workbench.core.network import solve_steady

    tank = system.reservoirs["TK-210"]
    radius = tank.shape.diameter / 2
    cone = tank.shape.cone_height

    def area(h: float) -> float:
        r = radius * min(h, cone) / cone
        return math.pi * r * r

    def rate(_t, y):
        h = max(y[0], 1e-6)
        q = solve_steady(system, levels={"TK-210": h}).lines["210-DR-04"].flow
        return [-q / area(h)]

    def drained(_t, y):
        return y[0] - tank.min_level

    drained.terminal = True
    # 1e-6: the drain time moves by 1e-5 of itself from 1e-8, far inside the 1 % compared,
    # at half the steady solves
    sol = solve_ivp(rate, (0.0, 3 * 3600.0), [tank.level], events=drained, rtol=1e-6,
                    atol=1e-6, method="LSODA")
    return float(sol.t_events[0][0])


async def test_a_simulation_runs_to_completion_and_lists_its_events(project_file):
    app = make(project_file(DRAIN))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        assert app.run_status == "done"
        assert app.run_progress == 1.0
        await pilot.press("f6")
        await pilot.pause()
        events = table_cells(app, "#event-table")
        summary = str(app.screen.query_one("#run-summary").render())
    drained = [row for row in events if row[1] == "tank.drained"]
    assert drained and drained[0][2] == "TK-210"
    assert "TK-210 at" in summary
    event_time = next(e.time for e in app.transient.events if e.code == "tank.drained")
    # Independent quasi-steady integration (scipy solve_ivp); inertia and the at-rest start
    # make the simulated drain a little longer; 1 % covers it.
    assert math.isclose(event_time, independent_drain_time(app.project.system), rel_tol=0.01)


async def test_the_run_view_plots_the_series_the_user_picks(project_file):
    from textual.widgets import SelectionList

    app = make(project_file(DRAIN))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        box = app.screen.query_one("#run-series", SelectionList)
        assert "level:TK-210" in box.selected
        box.focus()
        await pilot.press("home", "space")  # hide the level
        await pilot.pause()
        assert "level:TK-210" not in box.selected
        pane = app.screen.query_one("#run-pane")
        assert "level:TK-210" not in pane._chosen


async def test_escape_stops_a_running_simulation(project_file):
    from workbench.project.document import load_project, save_project, set_value

    path = project_file(DRAIN)
    # A fine output grid (145,000 points) makes the run last long enough to stop it.
    save_project(set_value(load_project(path), "simulation.output_interval", "0.01 s"), path)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        # Start the run without waiting for the app to go idle (the pilot's key press
        # would wait for the run to end), then press Escape while it runs.
        app.action_simulate()
        assert app.run_status == "running"
        await pilot.press("escape")
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert app.run_status == "cancelled"
        assert "stopped" in str(app.screen.query_one("#run-status").render())


async def test_a_valve_trip_shows_its_closure_event_and_the_elastic_surge_view(project_file):
    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        await pilot.press("f6")
        await pilot.pause()
        events = table_cells(app, "#event-table")
        surge = table_cells(app, "#surge-table")
        await pilot.press("f10")
        await pilot.pause()
        title = str(app.screen.query_one("#surge-title").render())
        await pilot.press("v")
        await pilot.pause()
        title_after = str(app.screen.query_one("#surge-title").render())
    # The file's schedule shuts the valve at 42 s.
    closed = [row for row in events if row[1] == "valve.closed"]
    assert closed and closed[0][0] == "42.0 s"
    assert surge and surge[0][0] == "310-PW-12"
    assert "envelope" in title
    assert "pressure at the valve" in title_after


async def test_e_in_the_surge_view_runs_the_highlighted_line_and_marks_it(project_file):
    from workbench.core.elastic import simulate_elastic
    from workbench.project.document import set_value

    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("f10")
        await pilot.pause()
        before = str(app.screen.query_one("#surge-title").render())
        await pilot.press("e")
        await app.workers.wait_for_complete()
        await pilot.pause()
        title = str(app.screen.query_one("#surge-title").render())
        note = str(app.screen.query_one("#surge-note").render())
        listed = [str(o.prompt) for o in app.screen.query_one("#surge-lines").options]
        shown = app.elastic["310-PW-12"]
        system = app.project.system
        app.apply_edit(set_value, "lines.310-PW-12.length", "250 m")
        await settle(pilot)
        stale = str(app.screen.query_one("#surge-title").render())
    assert "no elastic run yet" in before
    assert app.elastic_status == "done"
    assert "head envelope" in title and "STALE" not in title
    assert listed == ["● 310-PW-12"]
    # the view shows what the core gives for the same line run on its own
    direct = simulate_elastic(system, "310-PW-12")
    assert shown.envelopes["310-PW-12"].max_head == pytest.approx(
        direct.envelopes["310-PW-12"].max_head, abs=1e-9)
    peak_kpa = direct.envelopes["310-PW-12"].max_pressure.max() / 1e3
    assert f"peak {peak_kpa:.0f} kPa g" in note
    assert "STALE" in stale


async def test_e_on_a_branched_line_runs_the_whole_connected_part(project_file):
    from tests.app.conftest import NETWORK, run_elastic_in_the_surge_view

    app = make(project_file(NETWORK))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_elastic_in_the_surge_view(pilot, "down", "e")
        title = str(app.screen.query_one("#surge-title").render())
        note = str(app.screen.query_one("#surge-note").render())
        listed = [str(o.prompt) for o in app.screen.query_one("#surge-lines").options]
    assert app.elastic_status == "done", note
    assert "head envelope" in title
    ran = app.elastic[listed[1][2:]]
    assert ran.success and len(ran.line_ids) >= 3  # the branches joined through junctions
    assert all(app.elastic[lid] is ran for lid in ran.line_ids)
    assert listed[1].startswith("●")


async def test_the_run_view_offers_a_fed_tanks_feed_draw_off_and_spill(project_file):
    # The clearwell demo: fed by the filters, drawn by a pump, and it overflows late in the
    # run. Its feed and spill are drawn from the first run; the series are the run's own.
    app = make(project_file("fellgate_clearwell_filter_feed.toml"))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        box = app.screen.query_one("#run-series")
        offered = [box.get_option_at_index(i).value for i in range(box.option_count)]
        chosen = set(box.selected)
        pane = app.screen.query_one("#run-pane")
        series = {key: values for key, _label, _kind, values in pane._series}
    assert {"feeds:CW-501", "draw_offs:CW-501", "spills:CW-501"} <= set(offered)
    assert {"level:CW-501", "feeds:CW-501", "spills:CW-501"} <= chosen
    result = app.transient
    k = list(result.tank_ids).index("CW-501")
    assert list(series["feeds:CW-501"]) == list(result.feeds[k])
    assert max(series["spills:CW-501"]) > 0.0  # it overflows in this run
