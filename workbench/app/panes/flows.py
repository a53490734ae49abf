"""The Flows view: steady flows in every line, heads at every node, the balance of tanks
with a feed or draw-off, and the findings."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Vertical
from textual.widgets import DataTable, Static

from workbench.app import results

#: status -> banner text; the word carries the meaning, colour only helps.
BANNER = {
    "idle": "· no steady solution yet",
    "stale": "◌ STALE: an edit is waiting to be solved …",
    "solving": "◌ STALE: solving …",
    "fresh": "● current",
    "failed": "✗ NO SOLUTION",
}


class FlowsPane(Vertical):
    """Live steady results: re-solved in the background after every valid edit."""

    def compose(self) -> ComposeResult:
        yield Static("", id="steady-banner", markup=False)
        yield DataTable(id="line-table", cursor_type="row", zebra_stripes=True)
        yield DataTable(id="node-table", cursor_type="row", zebra_stripes=True)
        yield DataTable(id="tank-table", cursor_type="row", zebra_stripes=True)
        yield DataTable(id="finding-table", cursor_type="row")
        yield Static("", id="finding-detail", markup=False)
        yield Static(results.SCREENING, classes="screening", markup=False)

    def on_mount(self) -> None:
        self.watch(self.app, "steady", self._show, init=False)
        self.watch(self.app, "unit_system", self._show, init=False)
        self.watch(self.app, "steady_status", self._show_status)
        self._show()

    def _show_status(self, _status: str = "") -> None:
        status = self.app.steady_status
        text = BANNER.get(status, status)
        if status in {"fresh", "failed"} and self.app.steady_message:
            text += f" — {self.app.steady_message}"
        banner = self.query_one("#steady-banner", Static)
        banner.update(f"Steady  {text}", layout=False)  # one row: nothing moves
        for name in ("stale", "failed"):
            banner.set_class(status == name or (name == "stale" and status == "solving"),
                             f"-{name}")
        self.set_class(status in {"stale", "solving", "failed"}, "-stale")

    def _show(self, _value=None) -> None:
        units = self.app.unit_system
        result = self.app.steady
        self._fill("#line-table", results.line_columns(units),
                   results.line_rows(result, units) if result is not None else [])
        self._fill("#node-table", results.node_columns(units),
                   results.node_rows(result, units) if result is not None else [])
        # tanks with a feed or a draw-off: their balance and how fast the level moves
        system = getattr(self.app.project, "system", None)
        tanks = results.tank_rows(result, system, units) if result is not None else []
        self._fill("#tank-table", results.tank_columns(units), tanks)
        self.query_one("#tank-table", DataTable).display = bool(tanks)
        findings = getattr(result, "warnings", []) if result is not None else []
        self._findings = results.sorted_findings(findings)
        self._fill("#finding-table", results.FINDING_COLUMNS, results.finding_rows(findings, units))
        self._detail(0)
        self._show_status()

    def _fill(self, selector: str, columns: list[str], rows: list[tuple]) -> None:
        table = self.query_one(selector, DataTable)
        cursor = table.cursor_row
        table.clear(columns=True)
        table.add_columns(*columns)
        table.add_rows(rows)
        if rows:
            table.move_cursor(row=min(cursor, len(rows) - 1))

    def _detail(self, index: int) -> None:
        detail = self.query_one("#finding-detail", Static)
        if not self._findings:
            detail.update("no findings")
            return
        f = self._findings[min(index, len(self._findings) - 1)]
        source = getattr(f, "source", "")
        detail.update(f"{results.severity_label(f.severity)} {f.code} @ {f.element}: "
                      f"{results.finding_text(f, self.app.unit_system)}" + (f" [{source}]" if source else ""))

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        if event.data_table.id == "finding-table":
            self._detail(event.cursor_row)
