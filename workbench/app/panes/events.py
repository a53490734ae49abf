"""The Events view: what happened during the last simulation, the surge summary and its warnings."""

from __future__ import annotations

import math
from typing import Any

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.widgets import DataTable, Static

from workbench.app import results
from workbench.app.results import _get


def event_rows(result: Any, units: str) -> list[tuple[str, str, str, str]]:
    """``(time, code, element, message)`` for each event, in time order."""
    from workbench.project.units import format_quantity

    rows = []
    for event in _get(result, "events", default=[]) or []:
        time = float(_get(event, "time", "time_s", default=math.nan))
        rows.append((format_quantity(time, "time", units) if math.isfinite(time) else "—",
                     _get(event, "code", default=""), _get(event, "element", default=""),
                     _get(event, "message", default="")))
    return rows


SURGE_FIELDS = (
    ("wave speed", ("wave_speed", "wave_speed_m_s"), "velocity"),
    ("Joukowsky", ("joukowsky", "joukowsky_pa"), "pressure"),
    ("eff. closure", ("effective_closure", "effective_closure_s"), "time"),
    ("2L/a", ("round_trip", "round_trip_s"), "time"),
    ("max p", ("max_pressure", "max_pressure_pa"), "pressure"),
    ("min p", ("min_pressure", "min_pressure_pa"), "pressure"),
)


def surge_rows(result: Any, units: str) -> list[tuple[str, ...]]:
    """Per line: wave speed, Joukowsky rise, effective closure, round trip, pressure extremes."""
    from workbench.project.units import format_quantity

    surge = _get(result, "surge", "surges", "surge_summaries", default={}) or {}
    extremes = _get(result, "line_extremes", "pressure_extremes", default={}) or {}
    lines = list(dict.fromkeys([*surge, *extremes]))
    rows = []
    for line in lines:
        record = surge.get(line)
        extreme = extremes.get(line)
        cells = [line]
        for _title, names, kind in SURGE_FIELDS:
            value = _get(record, *names) if record is not None else None
            if value is None and extreme is not None:
                value = _get(extreme, *names)
            ok = value is not None and math.isfinite(float(value))
            cells.append(format_quantity(float(value), kind, units) if ok else "—")
        rows.append(tuple(cells))
    return rows


class EventsPane(Vertical):
    """Events, surge summary and warnings of the last run."""

    def compose(self) -> ComposeResult:
        yield Static("Events of the last run", classes="pane-heading")
        yield DataTable(id="event-table", cursor_type="row", zebra_stripes=True)
        yield Static("Surge and pressure extremes (gauge)", classes="pane-heading")
        yield DataTable(id="surge-table", cursor_type="row", zebra_stripes=True)
        yield Static("Warnings", classes="pane-heading")
        yield DataTable(id="run-finding-table", cursor_type="row")

    def on_mount(self) -> None:
        self.watch(self.app, "transient", self._show)
        self.watch(self.app, "unit_system", self._show, init=False)

    def _show(self, _value=None) -> None:
        result = self.app.transient
        units = self.app.unit_system
        self._fill("#event-table", ["time", "code", "element", "message"],
                   event_rows(result, units) if result is not None else [])
        self._fill("#surge-table", ["line", *(t for t, _n, _k in SURGE_FIELDS)],
                   surge_rows(result, units) if result is not None else [])
        warnings = _get(result, "warnings", default=[]) if result is not None else []
        self._fill("#run-finding-table", results.FINDING_COLUMNS, results.finding_rows(warnings))

    def _fill(self, selector: str, columns: list[str], rows: list[tuple]) -> None:
        table = self.query_one(selector, DataTable)
        table.clear(columns=True)
        table.add_columns(*columns)
        table.add_rows(rows)
