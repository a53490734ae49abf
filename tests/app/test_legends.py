"""Plot legends sit outside the data at 80x24: the sweep plot (F9) and the site-test
readings drawn over the Run view's trends (F5) name their series in a line under the plot,
never inside the plot box (plotext's own legend is drawn over the data)."""

from __future__ import annotations

from tests.app.conftest import SIZE, make, run_to_end, settle
from tests.app.test_sweep_screen import DRAIN, LINE, TANK, SweepTestApp, _load, _type, _wait_for_sweep

DRAIN_TEST = "fellgate_wash_tank_drain_test.toml"


def plot_text(plot) -> str:
    """What the plot widget draws, as plain text (plotext's figure at the widget's size)."""
    return plot.render().plain


async def test_the_sweep_plot_names_its_series_under_the_plot_not_on_the_data() -> None:
    from textual_plotext import PlotextPlot

    app = SweepTestApp(_load(DRAIN))
    async with app.run_test(size=SIZE) as pilot:
        await _type(pilot, "#sweep-vary-1", f"lines.{LINE}.nominal_size=3 in,6 in")
        await _type(pilot, "#sweep-vary-2", f"reservoirs.{TANK}.level=1 m,3 m")
        pilot.app.screen.query_one("#sweep-steady-only").value = True
        await pilot.press("ctrl+r")
        await _wait_for_sweep(pilot)
        await pilot.pause()
        screen = pilot.app.screen
        drawn = plot_text(screen.query_one("#sweep-plot", PlotextPlot))
        legend = str(screen.query_one("#sweep-legend").render())
        series = [label for label, _xs, _ys in screen.plot_series(f"flow:{LINE}")[2]]
    assert series == [f"reservoirs.{TANK}.level = 1 m", f"reservoirs.{TANK}.level = 3 m"]
    # the series' names and values are in the legend line, each with its marker ...
    assert f"reservoirs.{TANK}.level: • 1 m + 3 m" in " ".join(legend.split())
    # ... and none of it inside the plot box
    assert "reservoirs" not in drawn and "=" not in drawn and " m" not in drawn
    assert "┌" in drawn  # the plot itself was drawn


async def test_site_test_readings_on_the_run_trends_are_named_under_the_plot(project_file):
    import shutil

    from textual_plotext import PlotextPlot

    from tests.app.conftest import PROJECTS

    path = project_file(DRAIN_TEST)
    shutil.copy(PROJECTS / DRAIN_TEST.replace(".toml", "_levels.csv"), path.parent)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        await pilot.press("f5")
        await pilot.pause()
        await pilot.pause()
        drawn = plot_text(app.screen.query_one("#run-plot", PlotextPlot))
        legend = " ".join(str(app.screen.query_one("#run-legend").render()).split())
    assert "measured" in legend and "◆" in legend
    assert "◆" in drawn  # the readings are drawn ...
    assert "measured" not in drawn and "drain_test" not in drawn  # ... but not named there
