"""The Surge view: the elastic (water-hammer) run of a line, against its profile and rating.

Pictures, switched with ``v``:

* the envelope along the chainage of the highlighted line: pipe elevation (where the gauge
  pressure is atmospheric), the highest and lowest head reached, the steady head at the
  start; the rating head ``z + p_rating/(rho*g)`` and the vapour head
  ``z + (p_vap - p_atm)/(rho*g)`` where they fall within the data, named in words in the
  note when they are off the scale;
* the head in time at each valve and junction of the lines run together (their traces).

The axes are scaled to the data; the legend is written under the plot, not on it. Points
above the rating are marked ``!``, vapour cavities ``C`` (and listed in words); no head below
the vapour head (below absolute zero pressure) is drawn or printed: such a value from a run
without the cavity model is clamped to the vapour head and said so.

The list on the left holds every line of the project; ``●`` marks those with an elastic
result, ``✗`` those whose elastic run failed (the note says why). ``e`` runs the method of
characteristics on the highlighted line and every line joined to it through junctions (as
``workbench simulate --elastic LINE``); Ctrl+R runs the lines whose surge model is
``elastic`` together with the simulation. A result computed before the project's last edit
is marked STALE.
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
    """Chainage, pipe, heads, rating and vapour heads of a line's envelope, SI [m].

    ``min_head`` is never below the vapour head: lower values (a run without the cavity
    model) are clamped to it and their nodes listed in ``clamped``. ``cavities`` lists the
    nodes that held a vapour cavity.
    """
    env = (getattr(result, "envelopes", {}) or {}).get(line_id)
    if env is None:
        return None
    rho = system.fluid.density
    z = [float(v) for v in env.elevation]
    out: dict[str, Any] = {
        "distance": [float(v) for v in env.distance], "elevation": z,
        "max_head": [float(v) for v in env.max_head], "min_head": [float(v) for v in env.min_head],
        "initial_head": [float(v) for v in env.initial_head],
        "rating": None, "vapour": None, "over": [], "vapour_hits": [], "clamped": [],
        "cavities": [],
    }
    rating = system.lines[line_id].pressure_rating
    if rating is not None:
        out["rating"] = [zi + rating / (rho * G) for zi in z]
        out["over"] = [i for i, p in enumerate(env.max_pressure) if p > rating]
    p_vap = system.fluid.vapor_pressure
    if p_vap is not None:
        offset = (p_vap - system.atmospheric_pressure) / (rho * G)
        out["vapour"] = [zi + offset for zi in z]
        hv = out["vapour"]
        out["clamped"] = [i for i, h in enumerate(out["min_head"]) if h < hv[i] - 1e-9]
        out["min_head"] = [max(h, hv[i]) for i, h in enumerate(out["min_head"])]
        out["vapour_hits"] = [i for i, h in enumerate(out["min_head"]) if h <= hv[i] + 1e-9]
    cav = getattr(env, "cavity_max_volume", None)
    if cav is not None:
        out["cavities"] = [i for i, v in enumerate(cav) if v > 0.0]
    return out


def time_scale(span: float) -> tuple[float, str]:
    """Divisor and unit for a time axis of ``span`` seconds: s, min or h (the rule of
    :func:`workbench.app.plotaxes.time_axis`, shared by every plot)."""
    from workbench.app.plotaxes import time_axis

    _, unit, divisor = time_axis([0.0, span])
    return divisor, unit


def axis_range(series: list[list[float]]) -> tuple[float, float]:
    """Lower and upper limits around the data (:func:`workbench.app.plotaxes.data_range`)."""
    from workbench.app.plotaxes import data_range

    return data_range(*series) or (0.0, 1.0)


def limits_in_words(limits: dict[str, list[float]], lo: float, hi: float,
                    fmt=lambda v: f"{v:.3g}") -> list[str]:
    """Notes for the limits that lie wholly above or below the plotted range
    (:func:`workbench.app.plotaxes.place_limits`)."""
    from workbench.app.plotaxes import Limit, place_limits

    _, words = place_limits([Limit(name, values) for name, values in limits.items()],
                            (lo, hi), fmt)
    return words


LEGEND_ENVELOPE = ("key: ^ max v min - start = pipe (atmospheric) # rating . vapour "
                   "C cavity ! over rating")


class SurgePane(Horizontal):
    """Pick a line run elastically; see its envelope or the valve and junction traces."""

    BINDINGS = [
        Binding("v", "switch_picture", "Envelope/traces", id="surge.picture"),
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

    def _pictures(self) -> list[str]:
        """``envelope`` then the labels of the valve and junction traces of the result."""
        result = (self.app.elastic or {}).get(self._line)
        traces = list(getattr(result, "traces", {}) or {})
        if not traces and result is not None and getattr(result, "valve_line", None):
            traces = [f"valve {result.valve_line}"]
        return ["envelope", *traces]

    def action_switch_picture(self) -> None:
        pictures = self._pictures()
        i = pictures.index(self.picture) if self.picture in pictures else 0
        self.picture = pictures[(i + 1) % len(pictures)]
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
        elif app.elastic_status == "running" and app.elastic_line == self._line:
            title.update(f"{self._line}: elastic run {100 * app.elastic_progress:.0f} % "
                         "(Esc stops)")
            note.update("method of characteristics on this line and every line joined to "
                        "it through junctions")
        elif self._line not in elastic or system is None:
            title.update(f"{self._line}: no elastic run yet · e runs it")
            note.update("e: method of characteristics on this line and every line joined to "
                        "it through junctions. Ctrl+R also runs lines whose surge model is "
                        "'elastic'.")
        elif not elastic[self._line].success:
            title.update(f"Surge {self._line}: the elastic run failed")
            note.update(str(elastic[self._line].message))
        elif self.picture not in self._pictures() or self.picture == "envelope":
            self.picture = "envelope"
            self._draw_envelope(plt, elastic[self._line], system, title, note)
        else:
            self._draw_trace(plt, elastic[self._line], system, title, note)
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
        data = [conv(s[k]) for k in ("elevation", "max_head", "initial_head", "min_head")]
        lo, hi = axis_range(data)
        for values, marker in zip(data, ("=", "^", "-", "v")):
            plt.plot(x, values, marker=marker)
        limits = {}
        for key, name, marker in (("rating", "rating", "#"), ("vapour", "vapour limit", ".")):
            if s[key] is None:
                continue
            values = conv(s[key])
            limits[name] = values
            if max(values) >= lo and min(values) <= hi:
                plt.plot(x, values, marker=marker)
        top, bottom = data[1], data[3]
        if s["over"]:
            plt.scatter([x[i] for i in s["over"]], [top[i] for i in s["over"]], marker="!")
        if s["cavities"]:
            plt.scatter([x[i] for i in s["cavities"]], [bottom[i] for i in s["cavities"]],
                        marker="C")
        plt.ylim(lo, hi)
        head = display_unit("head", units)
        plt.xlabel(f"chainage [{head}]")
        plt.ylabel(f"head [{head}]")
        title.update(f"Surge {self._line}: head envelope (v: traces){self._stale()}")
        words = limits_in_words(limits, lo, hi, lambda v: f"{v:.4g} {head}")
        note.update(" · ".join([self._summary(result, s), *words, LEGEND_ENVELOPE]))

    def _draw_trace(self, plt, result, system, title, note) -> None:
        from workbench.app.results import decimate
        from workbench.project.units import display_unit, to_display

        units = self.app.unit_system
        label = self.picture
        heads = (getattr(result, "traces", {}) or {}).get(label)
        kind, name = label.split(" ", 1)
        rho = system.fluid.density
        if heads is None:  # a result from before the traces: the valve's pressure series
            pressure = list(result.valve_pressure)
        else:
            z = self._trace_elevation(result, system, kind, name)
            pressure = [rho * G * (h - z) for h in heads]
        p_vap_g = (None if system.fluid.vapor_pressure is None
                   else system.fluid.vapor_pressure - system.atmospheric_pressure)
        clamped = p_vap_g is not None and min(pressure) < p_vap_g - 1e-6
        if p_vap_g is not None:
            pressure = [max(p, p_vap_g) for p in pressure]
        div, unit = time_scale(float(result.time[-1]))
        xs, ys = decimate([t / div for t in result.time], pressure)
        conv = lambda v: [float(to_display(p, "pressure", units)) for p in v]  # noqa: E731
        values = conv(ys)
        lo, hi = axis_range([values, conv([0.0])])
        plt.plot(xs, values, marker="hd")
        t = [xs[0], xs[-1]]
        limits = {"atmospheric": conv([0.0, 0.0])}
        plt.plot(t, limits["atmospheric"], marker="=")
        line_id = name if kind == "valve" else self._line
        rating = system.lines[line_id].pressure_rating if line_id in system.lines else None
        for key, value, marker in (("rating", rating, "#"), ("vapour", p_vap_g, ".")):
            if value is None:
                continue
            limits[key] = conv([value, value])
            if lo <= limits[key][0] <= hi:
                plt.plot(t, limits[key], marker=marker)
        plt.ylim(lo, hi)
        plt.xlabel(f"time [{unit}]")
        plt.ylabel(f"p [{display_unit('pressure', units)} g]")
        where = "pressure at the valve" if kind == "valve" else "pressure at the junction"
        title.update(f"Surge {name}: {where} (v: next){self._stale()}")
        p_unit = display_unit("pressure", units)
        words = limits_in_words(limits, lo, hi, lambda v: f"{v:.4g} {p_unit} g")
        if clamped:
            words.append("values below vapour pressure (column separation, run without "
                         "the cavity model) are drawn at the vapour limit")
        legend = "key: = atmospheric # rating . vapour"
        note.update(" · ".join([self._summary(result, None), *words, legend]))

    @staticmethod
    def _trace_elevation(result, system, kind: str, name: str) -> float:
        """Pipe elevation at a valve (its line's end) or a junction [m]."""
        if kind == "junction":
            return float(system.node_elevation(name))
        env = result.envelopes.get(name)
        line = system.lines.get(name)
        if env is None or line is None or line.valve is None:
            return 0.0
        return float(env.elevation[0] if line.valve.position == "from" else env.elevation[-1])

    def _stale(self) -> str:
        """A mark when the results were computed before the project's last edit."""
        app = self.app
        current = getattr(app.project, "system", None)
        return "" if app.elastic_system is current else "  (STALE: e reruns)"

    def _summary(self, result, series) -> str:
        """DANGER (column separation, cavities) first, then the peak and the low point."""
        from workbench.project.units import format_quantity

        units = self.app.unit_system
        env = result.envelopes.get(self._line)
        parts = []
        sep = result.column_separation
        if sep is not None:
            zones = [z for z in getattr(result, "cavity_zones", ()) or () if z.line == self._line]
            def x(value, kind="length"):
                return format_quantity(value, kind, units, 3)

            text = f"DANGER column separation {sep.time:.2f} s at {x(sep.distance)} on {sep.line}"
            for z in zones:
                where = x(z.start) if z.sections == 1 else f"{x(z.start)} to {x(z.end)}"
                text += f"; vapour cavities {where}, largest {x(z.max_volume, 'small_volume')}"
            parts.append(text + ": figures after it not reliable, get a specialist surge "
                         "study")
        if env is not None:
            parts.append(f"peak {format_quantity(float(max(env.max_pressure)), 'pressure', units)} g")
            if series is not None:
                low = min(h - z for h, z in zip(series["min_head"], series["elevation"]))
                rho = self.app.elastic_system.fluid.density
                parts.append(f"low {format_quantity(rho * G * low, 'pressure', units)} g")
        if series is not None and series["over"]:
            parts.append(f"! over rating at {len(series['over'])} pt")
        return " · ".join(parts)
