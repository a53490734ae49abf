"""The list editor: a list-valued key (fittings, a profile, a valve schedule) as a table.

One row per entry, one column per entry key the schema knows, cells as the user typed
them, and beside each quantity column its values in the display unit. Changes stay in
the editor until Ctrl+A applies the whole list through the project layer's ``set_value``,
exactly as the form's inline field does, so validation, undo, the modified mark, the
recovery copy and the steady re-solve work unchanged. A refused list keeps the editor
open with each problem beside the row and column its key path names.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import DataTable, Input, Label, Static

from workbench.app.listtable import (
    Column,
    Row,
    columns_for,
    display_text,
    items_from,
    new_row,
    place_text,
    places,
    quantity_problem,
    rows_from,
)
from workbench.app.outline import NOUN, Field, edit_target
from workbench.app.widgets.keyfooter import KeyFooter

#: Keys that are commands on the table; any other printable key starts editing the cell.
COMMAND_KEYS = {"a", "d", "[", "]"}


def _unit_of(text: str) -> str | None:
    """The unit as typed after a cell's number (``"20 m"`` -> ``"m"``); ``None`` if empty."""
    text = text.strip()
    if not text:
        return None
    number = len(text) - len(text.lstrip("+-.0123456789eE"))
    return text[number:].strip()


class CellInput(Input):
    """The text of the current cell, edited under the table."""

    BINDINGS = [
        Binding("enter", "submit", "Set cell", id="list.cell.set"),
        Binding("escape", "cancel", "Cancel", id="list.cell.cancel"),
    ]

    def __init__(self, **kwargs) -> None:
        super().__init__(compact=True, select_on_focus=False, **kwargs)

    def action_cancel(self) -> None:
        """Put back the cell's text and return to the table."""
        screen = self.screen
        if isinstance(screen, ListEditorScreen):
            screen.cancel_cell()

    def on_focus(self) -> None:
        screen = self.screen
        if isinstance(screen, ListEditorScreen):
            screen.edit_pending = False


class ListTable(DataTable):
    """The rows of the list; Enter or typing edits the current cell.

    Keys that reach the table after an edit has started but before the cell's input has
    the focus (fast typing, keys sent by a script) go into the input, so none is lost.
    """

    def on_key(self, event) -> None:
        screen = self.screen
        if not isinstance(screen, ListEditorScreen):
            return
        character = event.character if event.is_printable else None
        if screen.edit_pending:
            if event.key in ("enter", "escape") or character:
                event.stop()
                event.prevent_default()
                if event.key == "enter":
                    screen.set_cell(screen.query_one(CellInput).value)
                    self.focus()
                elif event.key == "escape":
                    screen.cancel_cell()
                else:
                    screen.type_pending(character)
            return
        if character and character not in COMMAND_KEYS:
            event.stop()
            event.prevent_default()
            screen.start_edit(character)


class ListEditorScreen(ModalScreen[bool]):
    """Edit one list-valued key as a table; dismisses with ``True`` when it was applied.

    Args:
        field: the form field of the list (its key path and schema entry).
        stored: the list as the project holds it (``None`` when the key is absent).
    """

    BINDINGS = [
        Binding("ctrl+a", "apply", "Apply list", id="list.apply", priority=True),
        Binding("escape", "leave", "Back", id="list.back"),
        Binding("a", "add_row", "Add row", id="list.add"),
        Binding("d,delete", "delete_row", "Delete row", id="list.delete"),
        Binding("left_square_bracket,ctrl+up", "move_row(-1)", "Row up", id="list.up"),
        Binding("right_square_bracket,ctrl+down", "move_row(1)", "Row down", id="list.down"),
    ]

    def __init__(self, field: Field, stored: list | None) -> None:
        super().__init__(classes="list-editor")
        self.field = field
        self.keypath = field.keypath
        self.stored = stored
        self.columns: list[Column] = columns_for(field.keypath, stored or [])
        self.rows: list[Row] = rows_from(stored, self.columns)
        self._start = [dict(r.cells) for r in self.rows]
        self.local: dict[tuple[int, str], str] = {}
        """Cells that cannot be read (``(row, column) -> message``), found as they are set."""
        self.refused: list = []
        """Places of the problems of the last refused apply (``listtable.Place``)."""
        self._table_keys: list[tuple[str, Column, bool]] = []
        self.edit_pending = False
        """An edit has started and the cell's input is about to take the focus."""

    # --- building ----------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        with Vertical(classes="sheet", id="list-sheet") as box:
            box.border_title = self.keypath
            box.border_subtitle = "Ctrl+A applies to the project · Esc leaves"
            yield Static(self._heading(), id="list-heading", markup=False)
            yield ListTable(id="list-table", cursor_type="cell", zebra_stripes=True)
            yield Static("", id="list-problems", markup=False)
            with Horizontal(id="cell-line"):
                yield Label("", id="cell-name", markup=False)
                yield CellInput(id="cell-input")
                yield Static("", id="cell-hint", markup=False)
            yield Static("", id="cell-help", markup=False)
        yield KeyFooter(compact=True, show_command_palette=False)

    def _heading(self) -> str:
        parts = self.keypath.split(".")
        owner = f"{NOUN.get(parts[0], parts[0])} {parts[1]} · " if len(parts) > 2 else ""
        return f"{owner}{self.field.spec.name}: {self.field.spec.help}"

    def on_mount(self) -> None:
        table = self.query_one(ListTable)
        table.show_row_labels = True
        self._fill()
        table.focus()
        self._show_cell()

    def _wanted_columns(self) -> list[tuple[str, Column, bool]]:
        """The table's columns: every entry key, and after a quantity its values in the
        display unit where that says something new (some cell is in another unit)."""
        from workbench.project.units import display_unit

        unit_system = getattr(self.app, "unit_system", "SI")
        out = []
        for column in self.columns:
            out.append((column.name, column, False))
            if column.is_quantity:
                unit = display_unit(column.spec.kind, unit_system)
                units = {_unit_of(r.cells.get(column.name, "")) for r in self.rows} - {None}
                if units - {unit}:
                    out.append((column.name + "=", column, True))
        return out

    def _fill(self, row: int = 0, column: int = 0) -> None:
        """(Re)build the table from the rows and put the cursor at ``(row, column)``."""
        table = self.query_one(ListTable)
        wanted = self._wanted_columns()
        current_key = self._table_keys[column][0] if column < len(self._table_keys) else ""
        if [k for k, _, _ in wanted] != [k for k, _, _ in self._table_keys]:
            from workbench.project.units import display_unit

            table.clear(columns=True)
            unit_system = getattr(self.app, "unit_system", "SI")
            for key, col, shown in wanted:
                heading = (f"= {display_unit(col.spec.kind, unit_system)}" if shown
                           else col.heading)
                table.add_column(heading, key=key)
            self._table_keys = wanted
            keys = [k for k, _, _ in wanted]
            column = keys.index(current_key) if current_key in keys else 0
        else:
            table.clear()
        for index in range(len(self.rows)):
            table.add_row(*self._cells(index), key=str(index), label=self._label(index))
        if self.rows:
            table.move_cursor(row=min(row, len(self.rows) - 1), column=column)
        self._show_problems()
        self.refresh_bindings()

    def _cells(self, index: int) -> list[Text]:
        row = self.rows[index]
        unit_system = getattr(self.app, "unit_system", "SI")
        out = []
        for _key, column, shown in self._table_keys:
            text = row.cells.get(column.name, "")
            if shown:
                out.append(Text(display_text(text, column, unit_system), style="dim"))
                continue
            if self._problem_at(index, column.name):
                out.append(Text(f"✗ {text}" if text else "✗ (empty)", style="bold reverse"))
            else:
                out.append(Text(text))
        return out

    def _label(self, index: int) -> Text:
        bad = any(p.row == index for p in self.refused) or any(
            r == index for r, _ in self.local)
        return Text(f"✗{index + 1}" if bad else str(index + 1),
                    style="bold reverse" if bad else "")

    # --- where the cursor is -----------------------------------------------------------
    def _current(self) -> tuple[int, Column] | None:
        table = self.query_one(ListTable)
        if not self.rows:
            return None
        coordinate = table.cursor_coordinate
        _key, column, _shown = self._table_keys[coordinate.column]
        return coordinate.row, column

    def _problem_at(self, index: int, name: str) -> str:
        if (index, name) in self.local:
            return self.local[(index, name)]
        found = [p.message for p in self.refused if p.row == index and p.column == name]
        return "; ".join(found)

    def _show_cell(self) -> None:
        """The current cell's name, text and, beside it, its problem or display value."""
        name = self.query_one("#cell-name", Label)
        editor = self.query_one(CellInput)
        hint = self.query_one("#cell-hint", Static)
        help_line = self.query_one("#cell-help", Static)
        current = self._current()
        if current is None:
            name.update("(no rows)")
            editor.value = ""
            editor.suggester = None
            hint.update("")
            help_line.update("a adds the first row")
            return
        index, column = current
        name.update(f"row {index + 1} {column.heading}")
        if not editor.has_focus:
            editor.value = self.rows[index].cells.get(column.name, "")
        problem = self._problem_at(index, column.name)
        row_problems = [p.message for p in self.refused if p.row == index and p.column is None]
        if problem or row_problems:
            hint.update("✗ " + "; ".join([problem] * bool(problem) + row_problems))
            hint.add_class("-invalid")
        else:
            text = self._unit_hint(index, column)
            hint.update(text)
            hint.set_class(text.startswith("✗"), "-invalid")
        words = column.spec.help
        if len(column.choices) > 6:
            words += (f" · one of {len(column.choices)} names: type the start of one, "
                      "Right takes the suggestion")
        elif column.choices:
            words += " · one of: " + ", ".join(column.choices)
        help_line.update(words)

    def _unit_hint(self, index: int, column: Column) -> str:
        if not column.is_quantity:
            return ""
        from workbench.project.units import display_unit

        unit_system = getattr(self.app, "unit_system", "SI")
        text = self.rows[index].cells.get(column.name, "")
        unreadable = quantity_problem(text, column)
        if unreadable:
            return f"✗ {unreadable}"
        shown = display_text(text, column, unit_system)
        unit = display_unit(column.spec.kind, unit_system)
        return f"[{unit}]" if shown == "" else f"= {shown} {unit}"

    def on_data_table_cell_highlighted(self, _event: DataTable.CellHighlighted) -> None:
        self._show_cell()

    def on_data_table_cell_selected(self, event: DataTable.CellSelected) -> None:
        event.stop()
        self.start_edit()

    # --- editing a cell ----------------------------------------------------------------
    def start_edit(self, typed: str | None = None) -> None:
        """Edit the current cell under the table; ``typed`` replaces its text."""
        current = self._current()
        if current is None:
            return
        index, column = current
        editor = self.query_one(CellInput)
        if column.choices:
            from textual.suggester import SuggestFromList

            editor.suggester = SuggestFromList(column.choices, case_sensitive=False)
        else:
            editor.suggester = None
        editor.value = typed if typed is not None else self.rows[index].cells.get(column.name, "")
        editor.cursor_position = len(editor.value)
        self.edit_pending = True
        editor.focus()

    def type_pending(self, character: str) -> None:
        """A key typed before the cell's input had the focus: it goes into the input."""
        editor = self.query_one(CellInput)
        editor.insert_text_at_cursor(character)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if isinstance(event.input, CellInput):
            event.stop()
            self.set_cell(event.value)
            self.query_one(ListTable).focus()

    def set_cell(self, text: str) -> None:
        """Put ``text`` in the current cell (kept as typed, even when it cannot be read)."""
        current = self._current()
        if current is None:
            return
        index, column = current
        self.edit_pending = False
        self.rows[index].cells[column.name] = text
        self.refused = [p for p in self.refused
                        if not (p.row == index and p.column in (column.name, None))]
        self._check_cells()
        self._fill(*self._row_and_column())
        self._show_cell()

    def cancel_cell(self) -> None:
        """Leave the cell as it was and go back to the table."""
        self.edit_pending = False
        current = self._current()
        if current is not None:
            index, column = current
            self.query_one(CellInput).value = self.rows[index].cells.get(column.name, "")
        self.query_one(ListTable).focus()
        self._show_cell()

    def _check_cells(self) -> None:
        _items, self.local = items_from(self.rows, self.columns)

    # --- rows --------------------------------------------------------------------------
    def _row_and_column(self) -> tuple[int, int]:
        coordinate = self.query_one(ListTable).cursor_coordinate
        return coordinate.row, coordinate.column

    def action_add_row(self) -> None:
        row, column = self._row_and_column()
        after = row if self.rows else -1
        unit_system = getattr(self.app, "unit_system", "SI")
        self.rows.insert(after + 1, new_row(self.rows, after, self.columns, unit_system))
        self._rows_moved()
        self._fill(after + 1, column)

    def action_delete_row(self) -> None:
        if not self.rows:
            return
        row, column = self._row_and_column()
        del self.rows[row]
        self._rows_moved()
        self._fill(max(0, min(row, len(self.rows) - 1)), column)

    def action_move_row(self, step: int) -> None:
        row, column = self._row_and_column()
        target = row + step
        if not self.rows or not 0 <= target < len(self.rows):
            return
        self.rows[row], self.rows[target] = self.rows[target], self.rows[row]
        self._rows_moved()
        self._fill(target, column)

    def _rows_moved(self) -> None:
        """Row numbers of the last refusal no longer hold: drop them, check cells again."""
        self.refused = [p for p in self.refused if p.row is None]
        self._check_cells()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "delete_row":
            return bool(self.rows) or None
        if action == "move_row":
            tables = self.query(ListTable)  # asked by the key footer, maybe before it is built
            if not self.rows or not tables:
                return None
            row = tables.first().cursor_coordinate.row
            step = parameters[0] if parameters else 0
            return (0 <= row + int(step) < len(self.rows)) or None
        if action == "apply":
            return self.changed or None
        return True

    # --- applying and leaving ----------------------------------------------------------
    @property
    def changed(self) -> bool:
        """True when the rows differ from the list the editor opened with."""
        return [r.cells for r in self.rows] != self._start

    def _show_problems(self) -> None:
        lines = [f"✗ row {r + 1} · {name}: {message}" for (r, name), message
                 in sorted(self.local.items())]
        lines += [place_text(p, self.keypath) for p in self.refused]
        box = self.query_one("#list-problems", Static)
        box.update("\n".join(lines))
        box.display = bool(lines)

    def action_apply(self) -> bool:
        """Apply the list to the project; on refusal show why and stay open.

        Returns:
            True when the list was applied (or nothing had changed).
        """
        editor = self.query_one(CellInput)
        if editor.has_focus:
            self.set_cell(editor.value)
            self.query_one(ListTable).focus()
        items, self.local = items_from(self.rows, self.columns)
        if self.local:
            self._fill(*self._row_and_column())
            self._show_cell()
            self.app.notify("some cells cannot be read: see the marks in the table",
                            title="Not applied", severity="warning", timeout=4)
            return False
        if not self.changed:
            self.dismiss(False)
            return True
        from workbench.project.document import set_value
        from workbench.project.problems import ProjectError

        app: Any = self.app
        value = items or None  # no rows: the key goes
        keypath, target = edit_target(app.project.data, self.field, value)
        label = f"{self.keypath} = table of {len(items)} row{'s' * (len(items) != 1)}"
        try:
            app.apply_edit(set_value, keypath, target, label=label)
        except ProjectError as error:
            self.refused = places(error.problems, self.keypath)
            self._fill(*self._row_and_column())
            self._show_cell()
            return False
        app.notify(f"applied {self.field.spec.name}: {len(items)} row"
                   f"{'s' * (len(items) != 1)}", timeout=2)
        self.dismiss(True)
        return True

    def action_leave(self) -> None:
        self.before_leaving(None)

    def before_leaving(self, then: Callable[[], Any] | None) -> None:
        """Close, asking first when the table has changes not applied; then call ``then``."""
        if not self.changed:
            self.dismiss(False)
            if then is not None:
                then()
            return
        from workbench.app.screens.dialogs import AskScreen

        def answered(key: str | None) -> None:
            if key == "a":
                if self.action_apply() and then is not None:
                    then()
            elif key == "d":
                self.dismiss(False)
                if then is not None:
                    then()

        self.app.push_screen(
            AskScreen(f"The table of {self.keypath} has changes not applied to the project.",
                      [("a", "apply them"), ("d", "discard them"), ("k", "keep editing")],
                      title="Table"),
            answered,
        )
