"""The Surge view: the elastic (water-hammer) run of a line, against its profile and rating.

Two pictures, switched with ``v``:

* the envelope along the chainage: pipe elevation, the highest and lowest head reached,
  the steady head at the start, the head at which the pipe reaches its pressure rating
  ``z + p_rating/(rho*g)`` and the vapour limit ``z + (p_vap - p_atm)/(rho*g)``;
* the pressure at the valve in time, with the rating and the vapour pressure (gauge).

Points above the rating are marked ``!``, points at or below the vapour limit ``V``.

The list on the left holds every line of the project; ``●`` marks those with an elastic
result, ``✗`` those whose elastic run failed (the note says why). ``e`` runs the method of characteristics on the highlighted line and the lines in
series with it (as ``workbench simulate --elastic LINE``); Ctrl+R runs the lines whose surge
model is ``elastic`` together with the simulation.
"""

from __future__ import annotations

from typing import Any

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option

G = 9.80665  # standard gravity [m/s^2] (CGPM 1901)


def envelope_series(result: Any, system: Any, line_id: str) -> dict[str, Any] | None:
    """Chainage, pipe, heads, rating and vapour heads of a line's envelope, SI [m]."""
    env = (getattr(result, "envelopes", {}) or {}).get(line_id)
    if env is None:
        return None
    rho = system.fluid.density
    z = [float(v) for v in env.elevation]
    out: dict[str, Any] = {
        "distance": [float(v) for v in env.distance], "elevation": z,
        "max_head": [float(v) for v in env.max_head], "min_head": [float(v) for v in env.min_head],
        "initial_head": [float(v) for v in env.initial_head],
        "rating": None, "vapour": None, "over": [], "vapour_hits": [],
    }
    rating = system.lines[line_id].pressure_rating
    if rating is not None:
        out["rating"] = [zi + rating / (rho * G) for zi in z]
        out["over"] = [i for i, p in enumerate(env.max_pressure) if p > rating]
    p_vap = system.fluid.vapor_pressure
    if p_vap is not None:
        offset = (p_vap - system.atmospheric_pressure) / (rho * G)
        out["vapour"] = [zi + offset for zi in z]
        out["vapour_hits"] = [i for i, h in enumerate(out["min_head"]) if h <= z[i] + offset]
    return out


class SurgePane(Horizontal):
    """Pick a line run elastically; see its envelope or its valve pressure trace."""

    BINDINGS = [
        Binding("v", "switch_picture", "Envelope/valve", id="surge.picture"),
        Binding("e", "elastic_run", "Elastic run", id="surge.run"),
    ]

    def compose(self) -> ComposeResult:
        yield OptionList(id="surge-lines")
        with Vertical(id="surge-side"):
            yield Static("", id="surge-title", markup=False)
            yield Vertical(id="surge-plot-holder")
            yield Static("", id="surge-note", markup=False)

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self._plot = None
        self._line: str | None = None
        self.picture = "envelope"

    def on_mount(self) -> None:
        self.watch(self.app, "elastic", self._list_lines)
        self.watch(self.app, "project", self._list_lines, init=False)
        self.watch(self.app, "elastic_status", self._redraw, init=False)
        self.watch(self.app, "elastic_progress", self._redraw, init=False)
        self.watch(self.app, "unit_system", self._redraw, init=False)

    def _list_lines(self, _value=None) -> None:
        box = self.query_one("#surge-lines", OptionList)
        project = self.app.project
        lines = list(project.system.lines) if project is not None else []
        elastic = self.app.elastic or {}
        for lid in elastic:  # results of a system the project no longer has lines of
            if lid not in lines:
                lines.append(lid)
        box.clear_options()
        box.add_options([
            Option(f"{self._mark(elastic.get(lid))} {lid}", id=lid) for lid in lines
        ])
        if lines:
            if self._line not in lines:
                self._line = next((lid for lid in lines if lid in elastic), lines[0])
            box.highlighted = lines.index(self._line)
        else:
            self._line = None
        self._redraw()

    @staticmethod
    def _mark(result) -> str:
        """``●`` a line with an elastic result, ``✗`` one whose run failed, blank: none."""
        if result is None:
            return " "
        return "●" if result.success else "✗"

    def action_elastic_run(self) -> None:
        self.app.action_elastic_run(self._line)

    def on_option_list_option_highlighted(self, event: OptionList.OptionHighlighted) -> None:
        event.stop()
        self._line = event.option.id
        self._redraw()

    def action_switch_picture(self) -> None:
        self.picture = "valve" if self.picture == "envelope" else "envelope"
        self._redraw()

    def activate(self) -> None:
        if not self.query("#surge-plot-holder"):  # mounted but not composed yet
            self.call_after_refresh(self.activate)
            return
        if self._plot is None:
            from textual_plotext import PlotextPlot

            self._plot = PlotextPlot(id="surge-plot")
            self.query_one("#surge-plot-holder").mount(self._plot)
        self.query_one("#surge-lines", OptionList).focus()
        self.call_after_refresh(self._redraw)

    def _redraw(self, _value=None) -> None:
        if self._plot is None:
            return
        title = self.query_one("#surge-title", Static)
        note = self.query_one("#surge-note", Static)
        plt = self._plot.plt
        plt.clear_data()
        plt.clear_figure()
        app = self.app
        elastic = app.elastic or {}
        system = app.elastic_system
        if self._line is None:
            title.update("Surge: the project has no lines")
            note.update("")
            self._plot.refresh()
            return
        if app.elastic_status == "running" and app.elastic_line == self._line:
            title.update(f"{self._line}: elastic run {100 * app.elastic_progress:.0f} % "
                         "(Esc stops)")
            note.update("method of characteristics on this line and the lines in series "
                        "with it")
            self._plot.refresh()
            return
        if self._line not in elastic or system is None:
            title.update(f"{self._line}: no elastic run yet · e runs it")
            note.update("e: method of characteristics on this line and the lines in series "
                        "with it. Ctrl+R also runs lines whose surge model is 'elastic'.")
            self._plot.refresh()
            return
        result = elastic[self._line]
        if not result.success:
            title.update(f"Surge {self._line}: the elastic run failed")
            note.update(str(result.message))
            self._plot.refresh()
            return
        if self.picture == "envelope":
            self._draw_envelope(plt, result, system, title, note)
        else:
            self._draw_valve(plt, result, system, title, note)
        self._plot.refresh()

    def _draw_envelope(self, plt, result, system, title, note) -> None:
        from workbench.project.units import display_unit, to_display

        units = self.app.unit_system
        s = envelope_series(result, system, self._line)
        if s is None:
            title.update(f"Surge {self._line}: no envelope in the result")
            return
        conv = lambda v: [float(to_display(x, "head", units)) for x in v]  # noqa: E731
        x = conv(s["distance"])
        plt.plot(x, conv(s["elevation"]), label="pipe", marker="=")
        plt.plot(x, conv(s["max_head"]), label="max head", marker="^")
        plt.plot(x, conv(s["initial_head"]), label="start head", marker="-")
        plt.plot(x, conv(s["min_head"]), label="min head", marker="v")
        if s["rating"] is not None:
            plt.plot(x, conv(s["rating"]), label="rating", marker="#")
        if s["vapour"] is not None:
            plt.plot(x, conv(s["vapour"]), label="vapour limit", marker=".")
        top = conv(s["max_head"])
        if s["over"]:
            plt.scatter([x[i] for i in s["over"]], [top[i] for i in s["over"]], marker="!",
                        label="over rating")
        bottom = conv(s["min_head"])
        if s["vapour_hits"]:
            plt.scatter([x[i] for i in s["vapour_hits"]], [bottom[i] for i in s["vapour_hits"]],
                        marker="V", label="vapour")
        head = display_unit("head", units)
        plt.xlabel(f"chainage [{head}]")
        plt.ylabel(f"head [{head}]")
        title.update(f"Surge {self._line}: head envelope (v: valve trace){self._stale()}")
        note.update(self._summary(result, s))

    def _draw_valve(self, plt, result, system, title, note) -> None:
        from workbench.project.units import display_unit, to_display

        units = self.app.unit_system
        if result.valve_line is None or not len(result.valve_pressure):
            title.update(f"Surge {self._line}: no valve in this chain (v: envelope)")
            note.update("")
            return
        from workbench.app.results import decimate

        t = [float(result.time[0]), float(result.time[-1])]
        conv = lambda v: [float(to_display(p, "pressure", units)) for p in v]  # noqa: E731
        xs, ys = decimate(result.time, result.valve_pressure)
        plt.plot(xs, conv(ys), label="at valve", marker="hd")
        rating = system.lines[result.valve_line].pressure_rating
        if rating is not None:
            plt.plot([t[0], t[-1]], conv([rating, rating]), label="rating", marker="#")
        if system.fluid.vapor_pressure is not None:
            p_vap_g = system.fluid.vapor_pressure - system.atmospheric_pressure
            plt.plot([t[0], t[-1]], conv([p_vap_g, p_vap_g]), label="vapour", marker=".")
        plt.xlabel("time [s]")
        plt.ylabel(f"p [{display_unit('pressure', units)} g]")
        title.update(f"Surge {result.valve_line}: pressure at the valve (v: envelope)"
                     f"{self._stale()}")
        note.update(self._summary(result, None))

    def _stale(self) -> str:
        """A mark when the results were computed before the project's last edit."""
        app = self.app
        current = getattr(app.project, "system", None)
        return "" if app.elastic_system is current else "  (STALE: e reruns)"

    def _summary(self, result, series) -> str:
        from workbench.project.units import format_quantity

        units = self.app.unit_system
        env = result.envelopes.get(self._line)
        parts = []
        if env is not None:
            parts.append(f"peak {format_quantity(float(max(env.max_pressure)), 'pressure', units)} g")
            parts.append(f"low {format_quantity(float(min(env.min_pressure)), 'pressure', units)} g")
        if series is not None and series["over"]:
            parts.append(f"! over rating at {len(series['over'])} pt")
        sep = result.column_separation
        if sep is not None:
            parts.append(f"‼ column separation at {sep.time:.2f} s, {sep.distance:.0f} m on "
                         f"{sep.line}: results after it not reliable")
        return " · ".join(parts)
