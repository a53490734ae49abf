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

    rows = []
    for event in _get(result, "events", default=[]) or []:
        time = float(_get(event, "time", "time_s", default=math.nan))
        rows.append((results.duration_text(time),
                     _get(event, "code", default=""), _get(event, "element", default=""),
                     results.finding_text(event, units)))
    return rows


#: Surge summary columns: title, attribute of ``LineSurge`` (or of the result), kind.
SURGE_FIELDS = (
    ("a", "wave_speed", "velocity"),
    ("Joukowsky", "joukowsky", "pressure"),
    ("closure", "effective_closure", "time"),
    ("2L/a", "round_trip", "time"),
    ("max p", "max_pressure", "pressure"),
    ("min p", "min_pressure", "pressure"),
)


def surge_rows(result: Any, units: str) -> list[tuple[str, ...]]:
    """Per line: wave speed, Joukowsky rise, effective closure, round trip, pressure extremes.

    A rigid-column peak that was capped at static plus Joukowsky is marked ``cap``; an
    effective closure shorter than five round trips is marked ``FAST``.
    """
    from workbench.project.units import format_quantity

    surge = _get(result, "surge", default={}) or {}
    max_p = _get(result, "max_pressure", default={}) or {}
    min_p = _get(result, "min_pressure", default={}) or {}
    rows = []
    for line in dict.fromkeys([*surge, *max_p, *min_p]):
        record = surge.get(line)
        cells = [line]
        for _title, name, kind in SURGE_FIELDS:
            if name == "max_pressure":
                value = max_p.get(line)
            elif name == "min_pressure":
                value = min_p.get(line)
            else:
                value = _get(record, name) if record is not None else None
            ok = value is not None and math.isfinite(float(value))
            text = format_quantity(float(value), kind, units, digits=3) if ok else "—"
            if name == "effective_closure" and record is not None and record.rapid_closure:
                text += " FAST"
            if name == "max_pressure" and record is not None and record.capped:
                text += " cap"
            cells.append(text)
        rows.append(tuple(cells))
    return rows


def drain_rows(result: Any, units: str) -> list[tuple[str, str]]:
    """``(tank, time)`` for every tank that drained during the run."""
    times = _get(result, "drain_times", default={}) or {}
    return [(tank, results.duration_text(float(t))) for tank, t in times.items()]


class EventsPane(Vertical):
    """Events, surge summary and warnings of the last run."""

    def compose(self) -> ComposeResult:
        yield Static("", id="events-stale", classes="stale-mark", markup=False)
        yield Static("", id="run-summary", classes="pane-heading", markup=False)
        yield DataTable(id="event-table", cursor_type="row", zebra_stripes=True)
        yield Static("Surge and pressure extremes (gauge)", classes="pane-heading", markup=False)
        yield DataTable(id="surge-table", cursor_type="row", zebra_stripes=True)
        yield Static("Warnings", classes="pane-heading", markup=False)
        yield DataTable(id="run-finding-table", cursor_type="row")
        yield Static("", id="event-detail", markup=False)
        yield Static(results.SCREENING, classes="screening", markup=False)

    def on_mount(self) -> None:
        self.watch(self.app, "transient", self._show)
        self.watch(self.app, "elastic", self._show, init=False)  # elastic DANGER findings
        self.watch(self.app, "unit_system", self._show, init=False)
        self.watch(self.app, "elastic", self._show, init=False)
        self.watch(self.app, "project", self._show_stale, init=False)
        self.watch(self.app, "run_status", self._show_stale, init=False)

    def _show_stale(self, _value=None) -> None:
        stale = self.app.run_is_stale() and self.app.run_status != "running"
        mark = self.query_one("#events-stale", Static)
        mark.update(results.STALE_RUN if stale else "")
        mark.display = stale

    def _show(self, _value=None) -> None:
        result = self.app.transient
        units = self.app.unit_system
        summary = "Events: no simulation yet (Ctrl+R runs one)"
        if result is not None:
            summary = f"Events · {_get(result, 'message', default='')}"
            drained = drain_rows(result, units)
            if drained:
                summary += " · drained " + ", ".join(f"{k} at {t}" for k, t in drained)
        self.query_one("#run-summary", Static).update(summary)
        self._show_stale()
        self._fill("#event-table", ["time", "code", "element", "message"],
                   event_rows(result, units) if result is not None else [])
        self._fill("#surge-table", ["line", *(t for t, _n, _k in SURGE_FIELDS)],
                   surge_rows(result, units) if result is not None else [])
        warnings = list(_get(result, "warnings", default=[]) or []) if result is not None else []
        seen: set[int] = set()
        for elastic in (self.app.elastic or {}).values():  # one result per chain
            if id(elastic) not in seen:
                seen.add(id(elastic))
                warnings += list(getattr(elastic, "findings", ()) or ())
        self._fill("#run-finding-table", results.FINDING_COLUMNS, results.finding_rows(warnings, units))
        self._warnings = results.sorted_findings(warnings)
        self._events = list(_get(result, "events", default=[]) or []) if result is not None else []
        self._detail("#run-finding-table", 0)

    def _detail(self, table: str, index: int) -> None:
        """The highlighted event or warning, whole and wrapped, under the tables."""
        detail = self.query_one("#event-detail", Static)
        units = self.app.unit_system
        if table == "#event-table" and self._events:
            event = self._events[min(index, len(self._events) - 1)]
            time = results.duration_text(float(_get(event, "time", "time_s", default=math.nan)))
            detail.update(f"{time} {_get(event, 'code', default='')} @ "
                          f"{_get(event, 'element', default='')}: "
                          f"{_get(event, 'message', default='')}")
        elif self._warnings:
            f = self._warnings[min(index, len(self._warnings) - 1)]
            source = _get(f, "source", default="")
            detail.update(f"{results.severity_label(_get(f, 'severity', default=''))} "
                          f"{_get(f, 'code', default='')} @ {_get(f, 'element', default='')}: "
                          f"{results.finding_text(f, units)}" + (f" [{source}]" if source else ""))
        else:
            detail.update("")

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        if event.data_table.id in {"event-table", "run-finding-table"}:
            self._detail(f"#{event.data_table.id}", event.cursor_row)

    def _fill(self, selector: str, columns: list[str], rows: list[tuple]) -> None:
        table = self.query_one(selector, DataTable)
        table.clear(columns=True)
        table.add_columns(*columns)
        table.add_rows(rows)
