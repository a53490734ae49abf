"""The Grade line view: along one line, the pipe, the hydraulic grade line and the vapour limit.

The vapour limit is the grade line at which the absolute pressure in the pipe would fall
to the liquid's vapour pressure: ``z + (p_vap - p_atm)/(rho*g)``. Where the grade line
drops below the pipe the pressure is sub-atmospheric; where it nears the vapour limit the
column can separate. Points where the steady checks fire are marked on the plot.
"""

from __future__ import annotations

from typing import Any

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option

from workbench.app.results import SCREENING, _get

G = 9.80665  # standard gravity [m/s^2] (CGPM 1901)


def profile_series(result: Any, system: Any, line_id: str) -> dict[str, Any] | None:
    """Chainage, pipe elevation, grade line and vapour limit of a line, SI [m].

    Returns ``None`` when the result holds no profile for the line.
    """
    profiles = _get(result, "profiles", default={}) or {}
    prof = profiles.get(line_id)
    if prof is None:
        return None
    distance = [float(x) for x in _get(prof, "distance")]
    elevation = [float(x) for x in _get(prof, "elevation")]
    hgl = [float(x) for x in _get(prof, "hgl")]
    p_gauge = [float(x) for x in _get(prof, "pressure_gauge", default=[])]
    p_abs = [float(x) for x in _get(prof, "pressure_abs", default=[])]
    fluid = system.fluid
    p_atm = system.atmospheric_pressure
    vapour = None
    if fluid.vapor_pressure is not None:
        offset = (fluid.vapor_pressure - p_atm) / (fluid.density * G)
        vapour = [z + offset for z in elevation]
    # Below atmospheric by more than rounding: 1 Pa is far below anything that matters.
    below_atm = [i for i, p in enumerate(p_gauge) if p < -1.0]
    near_vapour = []
    if fluid.vapor_pressure is not None:
        # The same margin as the steady check that raises ``profile.vapor``.
        from workbench.core.checks import VAPOR_MARGIN_PA as margin

        near_vapour = [i for i, p in enumerate(p_abs) if p <= fluid.vapor_pressure + margin]
    return {"distance": distance, "elevation": elevation, "hgl": hgl, "vapour": vapour,
            "below_atm": below_atm, "near_vapour": near_vapour, "p_gauge": p_gauge}


class GradePane(Horizontal):
    """Pick a line on the left; its grade line is drawn on the right."""

    BINDINGS = [
        Binding("left_square_bracket", "step(-1)", "Prev line", id="grade.previous"),
        Binding("right_square_bracket", "step(1)", "Next line", id="grade.next"),
    ]

    def compose(self) -> ComposeResult:
        yield OptionList(id="grade-lines")
        with Vertical(id="grade-side"):
            yield Static("", id="grade-title", markup=False)
            yield Vertical(id="grade-plot-holder")
            yield Static("", id="grade-legend", classes="plot-legend", markup=False)
            yield Static("", id="grade-note", markup=False)
            yield Static(SCREENING, classes="screening", markup=False)

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self._plot = None
        self._line: str | None = None

    def on_mount(self) -> None:
        self.watch(self.app, "steady", self._redraw, init=False)
        # the status changes after the result arrives: redraw so the STALE mark goes
        self.watch(self.app, "steady_status", self._redraw, init=False)
        self.watch(self.app, "unit_system", self._redraw, init=False)
        self.watch(self.app, "project", self._list_lines)

    def _list_lines(self, project) -> None:
        if project is None:
            return
        lines = list(project.system.lines) if project.system else []
        box = self.query_one("#grade-lines", OptionList)
        current = self._line
        box.clear_options()
        box.add_options([Option(line_id, id=line_id) for line_id in lines])
        if lines:
            index = lines.index(current) if current in lines else 0
            box.highlighted = index
            self._line = lines[index]

    def on_option_list_option_highlighted(self, event: OptionList.OptionHighlighted) -> None:
        event.stop()
        self._line = event.option.id
        self._redraw()

    def action_step(self, step: int) -> None:
        box = self.query_one("#grade-lines", OptionList)
        if box.option_count:
            box.highlighted = ((box.highlighted or 0) + step) % box.option_count

    def activate(self) -> None:
        """Called when the view is shown: build the plot on first use, then draw."""
        if not self.query("#grade-plot-holder"):  # mounted but not composed yet
            self.call_after_refresh(self.activate)
            return
        if self._plot is None:
            from textual_plotext import PlotextPlot

            self._plot = PlotextPlot(id="grade-plot")
            self.query_one("#grade-plot-holder").mount(self._plot)
        self.query_one("#grade-lines", OptionList).focus()
        self.call_after_refresh(self._redraw)

    def _redraw(self, _value=None) -> None:
        if self._plot is None or not self.display:
            return
        app = self.app
        title = self.query_one("#grade-title", Static)
        note = self.query_one("#grade-note", Static)
        legend = self.query_one("#grade-legend", Static)
        plt = self._plot.plt
        plt.clear_data()
        plt.clear_figure()
        legend.update("")
        if app.project is None or app.steady is None or self._line is None:
            title.update("Grade line: waiting for a steady solution")
            self._plot.refresh()
            return
        series = profile_series(app.steady, app.project.system, self._line)
        if series is None:
            title.update(f"Grade line {self._line}: no profile in the result")
            self._plot.refresh()
            return
        stale = "" if app.steady_status == "fresh" else "  ◌ STALE: older than the edits"
        title.update(f"Grade line {self._line}{stale}")
        words = self._draw(plt, series)
        legend.update(words)
        note.update(self._note_text(series))
        self._plot.refresh()

    def _draw(self, plt, series: dict) -> str:
        """Draw the pipe, grade line, valve and limits; return the legend line."""
        from workbench.app import plotaxes
        from workbench.project.units import display_unit, to_display

        units = self.app.unit_system
        head = display_unit("head", units)
        conv = lambda values: [float(to_display(v, "head", units)) for v in values]  # noqa: E731
        x = conv(series["distance"])
        pipe, hgl = conv(series["elevation"]), conv(series["hgl"])
        items = [("=", "pipe"), ("▪", "grade line")]
        plt.plot(x, pipe, marker="=")
        plt.plot(x, hgl, marker="hd")
        valve = valve_drop(self.app.steady, self.app.project.system, self._line)
        extra: list[float] = []
        if valve is not None:
            at_end, upstream, downstream = valve
            vx = x[-1] if at_end else x[0]
            ys = conv([upstream, downstream])
            plt.plot([vx, vx], ys, marker="X")
            extra = ys
            items.append(("X", "valve loss"))
        span = plotaxes.data_range(pipe, hgl, extra)
        limits = []
        if series["vapour"] is not None:
            limits.append(plotaxes.Limit("vapour limit", conv(series["vapour"]), "."))
        drawn, off = plotaxes.place_limits(limits, span, fmt=lambda v: f"{v:.4g} {head}")
        for limit in drawn:
            plt.plot(x, list(limit.values), marker=limit.marker)
            items.append((limit.marker, limit.name))
        if series["below_atm"]:
            idx = series["below_atm"]
            plt.scatter([x[i] for i in idx], [hgl[i] for i in idx], marker="x")
            items.append(("x", "below atm"))
        if series["near_vapour"]:
            idx = series["near_vapour"]
            plt.scatter([x[i] for i in idx], [hgl[i] for i in idx], marker="V")
            items.append(("V", "near vapour"))
        if span is not None:
            plt.ylim(*span)
        plt.xlabel(f"chainage [{head}]")
        plt.ylabel(f"[{head}]")
        text = plotaxes.legend_text(items)
        if off:
            text += "  · " + "; ".join(off)
        return text

    def _note_text(self, series: dict) -> str:
        from workbench.project.units import format_quantity

        units = self.app.unit_system
        p = series["p_gauge"]
        if not p:
            return ""
        i = min(range(len(p)), key=p.__getitem__)
        flags = []
        if series["below_atm"]:
            flags.append(f"x sub-atmospheric at {len(series['below_atm'])} pt")
        if series["near_vapour"]:
            flags.append(f"V near vapour at {len(series['near_vapour'])} pt")
        return (f"lowest p {format_quantity(p[i] if abs(p[i]) >= 1.0 else 0.0, 'pressure', units)}"
                f" g at {format_quantity(series['distance'][i], 'length', units)}"
                + ("  ·  " + ", ".join(flags) if flags else "  ·  no pressure flags"))


def valve_drop(result: Any, system: Any, line_id: str) -> tuple[bool, float, float] | None:
    """A valve at a line's end as drawn: ``(at the to-end, head upstream, head downstream)``
    [m], the heads on either face (the profile's end and the node beyond the valve).

    ``None`` when the line has no valve or the result has no head for the node.
    """
    line = system.lines.get(line_id) if system is not None else None
    if line is None or line.valve is None:
        return None
    profiles = _get(result, "profiles", default={}) or {}
    prof = profiles.get(line_id)
    nodes = _get(result, "nodes", default={}) or {}
    at_end = line.valve.position != "from"
    node = nodes.get(line.to_node if at_end else line.from_node)
    if prof is None or node is None:
        return None
    hgl = [float(v) for v in _get(prof, "hgl")]
    node_head = _get(node, "head", "head_m")
    if not hgl or node_head is None:
        return None
    return at_end, (hgl[-1] if at_end else hgl[0]), float(node_head)
