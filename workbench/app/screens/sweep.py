"""The sweep screen: vary inputs, run every case in the background, read the table and a plot.

The screen only gathers text and shows results; planning and solving are the plain
functions of :mod:`workbench.sweep_runner` (the same as ``workbench sweep``), run in a thread
worker that reports progress and can be stopped.
"""

from __future__ import annotations

import re
from typing import Any, ClassVar

from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.screen import Screen
from textual.suggester import SuggestFromList
from textual.widgets import Checkbox, DataTable, Input, Label, ProgressBar, Select, Static
from textual.worker import Worker, WorkerState, get_current_worker

from workbench.app.widgets.keyfooter import KeyFooter

_LEADING_NUMBER = re.compile(r"\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)")


def keypath_suggestions(project: Any) -> list[str]:
    """``KEYPATH=`` texts for every field of every element, for the vary inputs' completion."""
    from workbench.project.schema import ELEMENT_SECTIONS, SECTIONS

    data = getattr(project, "data", {}) or {}
    out: list[str] = []
    for section in ("fluid", "project", "simulation"):
        out += [f"{section}.{f.name}=" for f in SECTIONS[section] if f.kind not in ("list", "table", "text")]
    for section in ELEMENT_SECTIONS:
        for element_id in data.get(section, {}) or {}:
            out += [f"{section}.{element_id}.{f.name}=" for f in SECTIONS[section]
                    if f.kind not in ("list", "table") and f.name not in ("from", "to", "description")]
            if section == "lines":
                out += [f"lines.{element_id}.nominal_size="]
                if "valve" in data[section][element_id]:
                    out += [f"lines.{element_id}.valve.{f.name}=" for f in SECTIONS["lines.valve"]
                            if f.kind not in ("list", "table")]
            if section == "reservoirs" and isinstance(data[section][element_id].get("vent"), dict):
                out += [f"reservoirs.{element_id}.vent.{f.name}=" for f in SECTIONS["reservoirs.vent"]
                        if f.kind != "text" or f.name == "nominal_size"]
    return list(dict.fromkeys(out))


def leading_columns(columns: list) -> list:
    """The table's columns in the order an engineer reads a sweep at 80 columns: the case,
    whether it passes, what each criterion measured, the varied values, then the rest."""
    def rank(column) -> int:
        key = column.key
        if key == "case":
            return 0
        if key == "pass":
            return 1
        if key.startswith("criterion:"):
            return 2
        if key.startswith("value:"):
            return 3
        return 4
    return sorted(columns, key=rank)


def axis_number(text: str) -> float | None:
    """The number a swept value starts with (``'80 mm'`` -> 80.0), or ``None`` for a name."""
    match = _LEADING_NUMBER.match(text)
    return float(match.group(1)) if match else None


class SweepScreen(Screen[None]):
    """Set up a what-if sweep, run it in the background, and see its table and plot."""

    BINDINGS: ClassVar = [
        Binding("ctrl+r", "run_sweep", "Run sweep", id="sweep.run"),
        Binding("escape", "stop_or_close", "Stop / close", id="sweep.close"),
    ]

    DEFAULT_CSS = """
    SweepScreen { layout: vertical; }
    SweepScreen #sweep-form { height: auto; padding: 0 1; }
    SweepScreen #sweep-form Input { width: 1fr; height: 1; border: none; padding: 0 1; }
    SweepScreen #sweep-form Input:focus { background: $boost; }
    SweepScreen #sweep-form Checkbox { height: 1; border: none; padding: 0 1; margin-right: 2; }
    SweepScreen .sweep-row { height: 1; margin-bottom: 0; }
    SweepScreen .sweep-row Label { width: 10; }
    SweepScreen #sweep-status.-error { color: $error; }
    SweepScreen #sweep-head { height: auto; }
    SweepScreen #sweep-status { width: 1fr; height: auto; max-height: 2; padding: 0 1; }
    SweepScreen #sweep-progress { width: 22; padding: 0 1; }
    SweepScreen #sweep-progress Bar { width: 12; }
    SweepScreen #sweep-results { height: 1fr; }
    SweepScreen #sweep-table-box { width: 1fr; height: 1fr; }
    SweepScreen #sweep-table { width: 1fr; height: 1fr; }
    SweepScreen #sweep-detail { height: auto; max-height: 5; padding: 0 1; color: $text-muted; }
    SweepScreen #sweep-plot-box { width: 1fr; }
    SweepScreen #sweep-plot-box Select { width: 1fr; }
    SweepScreen #sweep-plot-holder { height: 1fr; }
    """

    class Progressed(Message):
        """``done`` of ``total`` cases have finished."""

        def __init__(self, done: int, total: int) -> None:
            super().__init__()
            self.done = done
            self.total = total

    class Finished(Message):
        """The sweep ended: ``sweep`` is the ``sweep --json`` object (``None`` on a setup error)."""

        def __init__(self, sweep: dict | None, keypaths: list[str], error: str | None) -> None:
            super().__init__()
            self.sweep = sweep
            self.keypaths = keypaths
            self.error = error

    def __init__(self, project: Any = None) -> None:
        super().__init__()
        self._project = project
        self.sweep: dict | None = None
        """The last outcome, as the ``sweep --json`` object."""
        self.keypaths: list[str] = []
        self.running = False
        self._ran_on: Any = None
        """The project the shown sweep was run on (an edit or undo since makes it stale)."""
        self._words = ""

    @property
    def project(self) -> Any:
        return self._project if self._project is not None else getattr(self.app, "project", None)

    def compose(self) -> ComposeResult:
        suggester = SuggestFromList(keypath_suggestions(self.project), case_sensitive=True)
        with Vertical(id="sweep-form"):
            with Horizontal(classes="sweep-row"):
                yield Label("Vary")
                yield Input(placeholder="KEYPATH=VALUES, e.g. lines.L1.nominal_size=2 in,3 in,4 in",
                            id="sweep-vary-1", suggester=suggester)
            with Horizontal(classes="sweep-row"):
                yield Label("and vary")
                yield Input(placeholder="optional second key for a grid, e.g. reservoirs.T1.level=0.5 m..4 m/8",
                            id="sweep-vary-2", suggester=suggester)
            with Horizontal(classes="sweep-row"):
                yield Label("Require")
                yield Input(placeholder="criteria separated by ';', e.g. drain_time(T1) < 30 min; no profile.vapor",
                            id="sweep-require")
            with Horizontal(classes="sweep-row"):
                yield Checkbox("steady only", id="sweep-steady-only")
                yield Checkbox("quick (one line, flows only, vectorised)", id="sweep-quick")
        with Horizontal(id="sweep-head"):
            yield Static("Ctrl+R runs the sweep; Esc stops it or closes this screen.",
                         id="sweep-status")
            yield ProgressBar(id="sweep-progress", show_eta=False)
        with Horizontal(id="sweep-results"):
            with Vertical(id="sweep-table-box"):
                yield DataTable(id="sweep-table", zebra_stripes=True, cursor_type="row")
            with Vertical(id="sweep-plot-box"):
                yield Select([], prompt="result to plot", id="sweep-plot-choice", allow_blank=True,
                             compact=True)
                yield Vertical(id="sweep-plot-holder")
                yield Static("", id="sweep-legend", classes="plot-legend", markup=False)
        # the highlighted case across the whole width, so its every column reads whole
        yield Static("", id="sweep-detail", markup=False)
        yield KeyFooter(compact=True, show_command_palette=False)

    def on_mount(self) -> None:
        self.query_one("#sweep-vary-1", Input).focus()
        from textual.reactive import Reactive

        if isinstance(getattr(type(self.app), "project", None), Reactive):
            self.watch(self.app, "project", self._show_stale, init=False)

    def is_stale(self) -> bool:
        """True when the table shows a sweep of another state of the project than the
        open one (Ctrl+Z or Ctrl+Y work on this screen too)."""
        return self.sweep is not None and self._ran_on is not self.project

    def _show_stale(self, _project=None) -> None:
        if self.sweep is not None and not self.running:
            self._status(self._words)

    # --- running ---------------------------------------------------------------------
    def _texts(self) -> tuple[list[str], list[str]]:
        vary = [self.query_one(f"#sweep-vary-{i}", Input).value.strip() for i in (1, 2)]
        require = [t.strip() for t in self.query_one("#sweep-require", Input).value.split(";")]
        return [v for v in vary if v], [r for r in require if r]

    def action_run_sweep(self) -> None:
        if self.running or self.project is None:
            return
        vary, require = self._texts()
        if not vary:
            self._status("Give at least one key to vary, as KEYPATH=VALUES.", error=True)
            return
        self.running = True
        self._ran_on = self.project
        self._status("running…")
        self.query_one("#sweep-progress", ProgressBar).update(total=None, progress=0)
        self.run_worker_sweep(self.project, vary, require,
                              self.query_one("#sweep-steady-only", Checkbox).value,
                              self.query_one("#sweep-quick", Checkbox).value)

    @work(thread=True, exclusive=True, exit_on_error=False, group="sweep")
    def run_worker_sweep(self, project: Any, vary: list[str], require: list[str],
                         steady_only: bool, quick: bool) -> None:
        from workbench.project.sweep_spec import SweepSpecError
        from workbench.sweep_runner import plan_sweep, quick_sweep_json, run_quick_sweep, run_sweep

        worker = get_current_worker()
        try:
            plan = plan_sweep(project, vary, require, simulate=False if (steady_only or quick) else None)
            keypaths = [a.keypath for a in plan.axes]
            if quick:
                sweep = quick_sweep_json(run_quick_sweep(project, plan), plan)
            else:
                sweep = run_sweep(
                    project, plan,
                    progress=lambda done, total: self.post_message(self.Progressed(done, total)),
                    cancel=lambda: worker.is_cancelled,
                ).to_json()
        except SweepSpecError as exc:
            self.post_message(self.Finished(None, [], str(exc)))
            return
        if plan.criteria:
            sweep["criteria"] = [c.text for c in plan.criteria]
        self.post_message(self.Finished(sweep, keypaths, None))

    def on_sweep_screen_progressed(self, message: Progressed) -> None:
        self.query_one("#sweep-progress", ProgressBar).update(total=message.total, progress=message.done)
        self._status(f"running… {message.done} of {message.total} cases")

    def on_sweep_screen_finished(self, message: Finished) -> None:
        self.running = False
        if message.error is not None:
            self._status(message.error, error=True)
            return
        self.sweep, self.keypaths = message.sweep, message.keypaths
        cases = self.sweep["cases"]
        failed = sum(1 for c in cases if c["error"])
        first = self.sweep.get("first_passing")
        words = [f"{len(cases)} cases", f"{failed} failed" if failed else "none failed"]
        if self.sweep.get("cancelled"):
            words.append("stopped before the end")
        if self.sweep.get("criteria"):
            words.append("no case passes" if first is None else f"first passing: #{first + 1} "
                         + ", ".join(f"{k} = {v}" for k, v in cases[first]["values"].items()))
        self._words = "; ".join(words)
        self._status(self._words)
        self.query_one("#sweep-progress", ProgressBar).update(total=max(len(cases), 1), progress=len(cases))
        self._fill_table()
        self._fill_plot_choices()

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.group == "sweep" and event.state == WorkerState.ERROR:
            from workbench.app.jobs import explain

            self.running = False
            self._status(explain(event.worker.error), error=True)

    def action_stop_or_close(self) -> None:
        if self.running:
            self.workers.cancel_group(self, "sweep")
            self._status("stopping… (cases already started finish first)")
            return
        self.dismiss(None)

    def _status(self, text: str, *, error: bool = False) -> None:
        status = self.query_one("#sweep-status", Static)
        if not error and not self.running and self.is_stale():
            text = "◌ STALE: run before the latest edits (Ctrl+R runs again) · " + text
        status.update(("✖ " if error else "") + text)
        status.set_class(error, "-error")

    # --- results ---------------------------------------------------------------------
    def _units(self) -> str:
        return getattr(self.app, "unit_system", None) or getattr(self.project, "unit_system", "SI")

    def _fill_table(self) -> None:
        from workbench.output.sweep_table import display_rows, sweep_table

        columns, rows = sweep_table(self.sweep, self.keypaths)
        columns = leading_columns(columns)
        table = self.query_one("#sweep-table", DataTable)
        table.clear(columns=True)
        for col in columns:
            table.add_column(col.title, key=col.key)
        self._shown = (columns, display_rows(columns, rows, self._units()))
        for cells in self._shown[1]:
            table.add_row(*cells)
        self._detail(0)

    def _detail(self, index: int) -> None:
        """Every column of the highlighted case, wrapped under the table."""
        columns, rows = getattr(self, "_shown", ([], []))
        detail = self.query_one("#sweep-detail", Static)
        if not rows:
            detail.update("")
            return
        cells = rows[min(index, len(rows) - 1)]
        detail.update(" · ".join(f"{c.title} {v}" for c, v in zip(columns, cells)
                                 if str(v) not in ("", "—")))

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        if event.data_table.id == "sweep-table":
            self._detail(event.cursor_row)

    def plottable(self) -> list[tuple[str, str, str]]:
        """``(title, key, kind)`` of the numeric result columns."""
        from workbench.output.sweep_table import sweep_table

        columns, _ = sweep_table(self.sweep or {"cases": []}, self.keypaths)
        return [(c.title, c.key, c.kind) for c in columns if c.kind is not None]

    def _fill_plot_choices(self) -> None:
        choices = self.plottable()
        select = self.query_one("#sweep-plot-choice", Select)
        select.set_options([(title, key) for title, key, _ in choices])
        if choices:
            select.value = choices[0][1]
        self.draw_plot()

    def on_select_changed(self, event: Select.Changed) -> None:
        event.stop()
        self.draw_plot()

    def plot_series(self, key: str) -> tuple[str, str, list[tuple[str, list[float], list[float]]]]:
        """``(x label, y label, [(series label, x, y)])`` of one result against the first swept key.

        With two swept keys, one series per value of the second.
        """
        import math

        from workbench.output.sweep_table import sweep_table
        from workbench.project.units import display_unit, to_display

        columns, rows = sweep_table(self.sweep, self.keypaths)
        kind = next(c.kind for c in columns if c.key == key)
        title = next(c.title for c in columns if c.key == key)
        units = self._units()
        first = self.keypaths[0]
        second = self.keypaths[1] if len(self.keypaths) > 1 else None
        groups: dict[str, tuple[list[float], list[float]]] = {}
        for n, row in enumerate(rows):
            value = row.get(key)
            if value is None or not math.isfinite(float(value)):
                continue
            x_text = str(row[f"value:{first}"])
            x = axis_number(x_text)
            label = f"{second} = {row[f'value:{second}']}" if second else title
            xs, ys = groups.setdefault(label, ([], []))
            xs.append(float(n) if x is None else x)
            ys.append(float(value) / 60.0 if kind == "time" else float(to_display(float(value), kind, units)))
        unit = "min" if kind == "time" else display_unit(kind, units)
        x_unit = ""
        if rows:
            text = str(rows[0][f"value:{first}"])
            match = _LEADING_NUMBER.match(text)
            x_unit = f" [{text[match.end():].strip()}]" if match and text[match.end():].strip() else ""
        return f"{first}{x_unit}", f"{title} [{unit}]", [(lab, xs, ys) for lab, (xs, ys) in groups.items()]

    def draw_plot(self) -> None:
        from textual_plotext import PlotextPlot

        holder = self.query_one("#sweep-plot-holder")
        plots = list(holder.query(PlotextPlot))
        if plots:
            plot = plots[0]
        else:
            plot = PlotextPlot(id="sweep-plot")
            holder.mount(plot)
        plt = plot.plt
        plt.clear_data()
        plt.clear_figure()
        legend = self.query_one("#sweep-legend", Static)
        key = self.query_one("#sweep-plot-choice", Select).value
        if not self.sweep or not isinstance(key, str):
            plt.title("run a sweep to plot its results")
            legend.update("")
            plot.refresh()
            return
        from workbench.app import plotaxes

        x_label, y_label, series = self.plot_series(key)
        markers = "•+ox*#@%&"
        items = []
        xs_all: list[float] = []
        # a grid's series are "KEY = value": the key once, then each value with its marker
        heads = {label.partition(" = ")[0] for label, _xs, _ys in series}
        common = heads.pop() if len(heads) == 1 and len(series) > 1 else ""
        for n, (label, xs, ys) in enumerate(series):
            marker = markers[n % len(markers)]
            plt.plot(xs, ys, marker=marker)  # no label: plotext would draw it on the data
            items.append((marker, label.partition(" = ")[2] if common else label))
            xs_all += xs
        if xs_all:
            ticks = plotaxes.nice_ticks(min(xs_all), max(xs_all))
            plt.xticks(ticks, plotaxes.tick_labels(ticks))
        # the legend and both axis names, outside the plot (at 40 columns plotext drops
        # an axis name that does not fit beside the other)
        if len(items) == 1:
            words = f"{items[0][0]} {y_label} against {x_label}"
        else:
            lead = f"{common}: " if common else ""
            words = f"{lead}{plotaxes.legend_text(items)} · y: {y_label} · x: {x_label}"
        legend.update(words)
        plot.refresh()
