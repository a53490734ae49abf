"""The Run view: the simulation's progress, and trend plots of the series the user picks.

Levels are drawn against the left axis and flows against the right one, each in the
display unit; the series list (Space toggles) chooses what is drawn.
"""

from __future__ import annotations

from typing import Any

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import ProgressBar, SelectionList, Static

from workbench.app.results import SCREENING, STALE_RUN, _get, decimate
from workbench.app.trends import trend_series

RUN_WORDS = {
    "idle": "not run yet: Ctrl+R simulates",
    "running": "running … Esc stops",
    "done": "done",
    "cancelled": "stopped by the user (partial results)",
    "failed": "FAILED",
}


class RunPane(Vertical):
    """Simulation progress and trends."""

    BINDINGS = [
        Binding("space", "toggle_series", "Show/hide", id="run.toggle_series"),
    ]

    def compose(self) -> ComposeResult:
        with Horizontal(id="run-head"):
            yield Static("", id="run-status", markup=False)
            yield ProgressBar(total=1.0, show_eta=False, id="run-progress")
        yield Static("", id="run-stale", classes="stale-mark", markup=False)
        with Horizontal(id="run-body"):
            yield SelectionList[str](id="run-series")
            with Vertical(id="run-plot-side"):
                yield Vertical(id="run-plot-holder")
                yield Static("", id="run-legend", classes="plot-legend", markup=False)
        yield Static(SCREENING, classes="screening", markup=False)

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self._plot = None
        self._series: list[tuple[str, str, str, Any]] = []
        self._chosen: set[str] | None = None

    def on_mount(self) -> None:
        self.watch(self.app, "run_status", self._show_status)
        self.watch(self.app, "run_progress", self._show_progress)
        self.watch(self.app, "transient", self._show_result)
        self.watch(self.app, "unit_system", self._redraw, init=False)
        self.watch(self.app, "project", self._show_stale)

    def _show_status(self, status: str) -> None:
        self.query_one("#run-status", Static).update(f"Run: {RUN_WORDS.get(status, status)}")
        self.set_class(status == "running", "-running")
        self._show_stale()
        if self.app.transient is None:
            self._redraw()  # the empty plot's title follows the run's state

    def _show_stale(self, _value=None) -> None:
        stale = self.app.run_is_stale() and self.app.run_status != "running"
        mark = self.query_one("#run-stale", Static)
        mark.update(STALE_RUN if stale else "")
        mark.display = stale

    def _show_progress(self, fraction: float) -> None:
        self.query_one("#run-progress", ProgressBar).update(progress=fraction)

    def activate(self) -> None:
        if not self.query("#run-plot-holder"):  # mounted but not composed yet
            self.call_after_refresh(self.activate)
            return
        if self._plot is None:
            from textual_plotext import PlotextPlot

            self._plot = PlotextPlot(id="run-plot")
            self.query_one("#run-plot-holder").mount(self._plot)
        self.query_one("#run-series").focus()
        self.call_after_refresh(self._redraw)

    def _show_result(self, result) -> None:
        self._show_stale()
        box = self.query_one("#run-series", SelectionList)
        self._series = trend_series(result) if result is not None else []
        if self._chosen is None and self._series:
            # first run: every level, the first line flow, any feed or spill, gas pressures
            flows = [k for k, _l, kind, _v in self._series if k.startswith("flow:")]
            self._chosen = {k for k, _l, kind, _v in self._series if kind == "length"}
            self._chosen |= set(flows[:1])
            self._chosen |= {k for k, _l, _kind, _v in self._series
                             if k.startswith(("feeds:", "spills:", "gas:"))}
        box.clear_options()
        box.add_options([(self._prompt(n, key, label), key, key in (self._chosen or set()))
                         for n, (key, label, _kind, _values) in enumerate(self._series)])
        self._redraw()

    def _prompt(self, n: int, key: str, label: str) -> str:
        """A series' row: shown or hidden in words' stead a mark, and its plot marker."""
        on = key in (self._chosen or set())
        return f"{'✓' if on else '·'} {MARKERS[n % len(MARKERS)]} {label}"

    def on_selection_list_selected_changed(self, event: SelectionList.SelectedChanged) -> None:
        event.stop()
        self._chosen = set(event.selection_list.selected)
        box = event.selection_list
        for n, (key, label, _kind, _values) in enumerate(self._series):
            if n < box.option_count:
                box.replace_option_prompt_at_index(n, self._prompt(n, key, label))
        self._redraw()

    def action_toggle_series(self) -> None:
        box = self.query_one("#run-series", SelectionList)
        if box.highlighted is not None:
            box.toggle(box.get_option_at_index(box.highlighted))

    def _redraw(self, _value=None) -> None:
        if self._plot is None:
            return
        plt = self._plot.plt
        plt.clear_data()
        plt.clear_figure()
        legend = self.query_one("#run-legend", Static)
        result = self.app.transient
        if result is None:
            running = self.app.run_status == "running"
            plt.title("the trends show when the run ends" if running
                      else "no simulation yet: Ctrl+R runs one")
            legend.update("")
            self._plot.refresh()
            return
        import numpy as np

        from workbench.app import plotaxes
        from workbench.project.units import display_unit, to_display

        units = self.app.unit_system
        t = np.asarray(_get(result, "t", default=[]), dtype=float)
        x, time_unit, divisor = plotaxes.time_axis(t)
        x = np.asarray(x)
        items = []
        for n, (key, label, kind, values) in enumerate(self._series):
            if key not in (self._chosen or set()) or len(values) != len(x):
                continue
            side = "left" if kind == "length" else "right"
            marker = MARKERS[n % len(MARKERS)]
            xs, y = decimate(x, to_display(np.asarray(values, dtype=float), kind, units))
            plt.plot(xs, y, marker=marker, yside=side)
            axis = "left" if side == "left" else "right"
            items.append((marker, f"{label} [{display_unit(kind, units)}, {axis}]"))
        from workbench.app.measurement_overlay import draw_readings  # site tests, as points

        items += draw_readings(plt, self.app.project, self._chosen or set(), divisor, units,
                               result)
        if len(x):
            ticks = plotaxes.nice_ticks(float(x[0]), float(x[-1]))
            plt.xticks(ticks, plotaxes.tick_labels(ticks))
        plt.xlabel(f"time [{time_unit}]")
        plt.ylabel(f"level [{display_unit('length', units)}]", yside="left")
        right = sorted({("gas" if key.startswith("gas:") else kind, kind)
                        for key, _l, kind, _v in self._series
                        if kind != "length" and key in (self._chosen or set())}) or [("flow", "flow")]
        plt.ylabel(", ".join(f"{word} [{display_unit(k, units)}]" for word, k in right),
                   yside="right")
        legend.update(plotaxes.legend_text(items) or "no series shown: Space shows one")
        self._plot.refresh()


#: One plot marker per series, shown in the series list and the legend as well.
MARKERS = "•+ox*#@%&"
