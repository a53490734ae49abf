"""The Surge view (F10): envelope and traces drawn within the physically possible, limits
named when off the scale, time axes by span, elastic DANGER findings on the events view.

The physical bound checked is the vapour pressure (IAPWS IF97 for water at 20 degC): no
head below the vapour head, i.e. no absolute pressure below the vapour pressure (and so never
below absolute zero), is drawn or printed.
"""

from __future__ import annotations

import pytest

from tests.core.elastic_systems import WATER, closing, reservoir_line
from workbench.app.panes.surge import (
    axis_range,
    envelope_series,
    limits_in_words,
    time_scale,
)
from workbench.core.elastic import simulate_elastic
from workbench.core.model import System

P_ATM = 101325.0


def separating_line() -> System:
    """Reservoir (20 m) -> 600 m frictionless line -> valve shut at once -> free discharge:
    the downsurge reaches the vapour head (tests/core/elastic_systems.py)."""
    return reservoir_line(valve=closing(1e-6), friction_factor=0.0, entrance_k=0.0, name="sep")


@pytest.mark.parametrize("cavities", [True, False])
def test_no_envelope_value_below_the_vapour_head_is_drawn(cavities):
    # Without the cavity model the computed minimum falls far below vapour (impossible):
    # the view clamps it to the vapour head and lists the clamped points; with the model
    # nothing needs clamping and the cavity sections are listed for the C marks.
    system = separating_line()
    res = simulate_elastic(system, "L1", wave_speeds={"L1": 1300.0}, duration=3.0,
                           cavities=cavities, grid_check=False)
    s = envelope_series(res, system, "L1")
    hv = s["vapour"]
    assert all(h >= v - 1e-9 for h, v in zip(s["min_head"], hv))
    p_abs = [WATER.density * 9.80665 * (h - z) + P_ATM
             for h, z in zip(s["min_head"], s["elevation"])]
    assert min(p_abs) >= WATER.vapor_pressure - 1e-6 > 0.0
    if cavities:
        assert s["cavities"] and not s["clamped"]
    else:
        assert s["clamped"] and not s["cavities"]
        assert float(res.envelopes["L1"].min_head.min()) < min(hv) - 10.0  # premise


def test_time_axes_read_in_seconds_minutes_or_hours_by_span():
    assert time_scale(50.0) == (1.0, "s")
    assert time_scale(1800.0) == (60.0, "min")
    assert time_scale(6 * 3600.0) == (3600.0, "h")


def test_limits_off_the_scale_are_named_in_words():
    lo, hi = axis_range([[10.0, 20.0], [12.0, 15.0]])
    assert lo < 10.0 and hi > 20.0 and hi - lo < 12.0  # scaled to the data, not the rating
    words = limits_in_words({"rating": [500.0, 500.0], "vapour limit": [-10.0, -10.0],
                             "inside": [15.0, 15.0]}, lo, hi)
    assert [w.split(" (")[0] for w in words] == ["rating above the plot",
                                                 "vapour limit below the plot"]


async def test_elastic_danger_findings_reach_the_events_view(project_file):
    from tests.app.conftest import SIZE, TRANSFER, make, settle, table_cells

    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        system = separating_line()
        res = simulate_elastic(system, "L1", wave_speeds={"L1": 1300.0}, duration=3.0,
                               grid_check=False)
        app.elastic_system = system
        app.elastic = {"L1": res}
        await pilot.press("f6")
        await pilot.pause()
        rows = table_cells(app, "#run-finding-table")
    codes = [cell for row in rows for cell in row]
    assert any("surge.column_separation" in c for c in codes)
    assert any("surge.cavity_collapse" in c for c in codes)


async def test_v_steps_from_the_envelope_through_the_valve_and_junction_traces(project_file):
    # A branched project: e runs the whole part joined through junctions; v shows the
    # envelope, then each valve's and junction's pressure in time, then the envelope again.
    from tests.app.conftest import NETWORK, SIZE, make, run_elastic_in_the_surge_view, settle

    app = make(project_file(NETWORK))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_elastic_in_the_surge_view(pilot, "down", "e")
        pane = app.screen.query_one("SurgePane")
        pictures = pane._pictures()
        titles = []
        for _ in pictures:
            titles.append(str(app.screen.query_one("#surge-title").render()))
            await pilot.press("v")
            await pilot.pause()
        back = str(app.screen.query_one("#surge-title").render())
    assert pictures[0] == "envelope" and any(p.startswith("junction ") for p in pictures)
    assert "head envelope" in titles[0] and "head envelope" in back
    assert any("pressure at the junction" in t for t in titles)
