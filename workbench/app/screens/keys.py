"""The key list: every binding the workbench defines, read from the classes themselves.

Reading ``BINDINGS`` rather than keeping a separate table means the list cannot drift from
what the keys actually do.
"""

from __future__ import annotations

from collections.abc import Iterable

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import DataTable


def binding_rows(contexts: Iterable[tuple[str, type]]) -> list[tuple[str, str, str]]:
    """``(where, keys, what)`` for every described binding of each class, in order."""
    rows: list[tuple[str, str, str]] = []
    for where, cls in contexts:
        for binding in getattr(cls, "BINDINGS", []):
            if not isinstance(binding, Binding) or not binding.description:
                continue
            keys = " / ".join(_key_label(k) for k in binding.key.split(","))
            rows.append((where, keys, binding.description))
    return rows


def _key_label(key: str) -> str:
    key = key.strip()
    for prefix, shown in (("ctrl+", "Ctrl+"), ("shift+", "Shift+")):
        if key.startswith(prefix):
            rest = key[len(prefix):]
            # a letter with a modifier is written as on the key cap: Ctrl+S
            return shown + (rest.upper() if len(rest) == 1 else _key_label(rest))
    names = {"escape": "Esc", "enter": "Enter", "delete": "Del", "space": "Space",
             "left_square_bracket": "[", "right_square_bracket": "]", "question_mark": "?",
             "up": "Up", "down": "Down"}
    if key in names:
        return names[key]
    if key.startswith("f") and key[1:].isdigit():
        return key.upper()
    return key


def key_contexts(app_class: type) -> list[tuple[str, type]]:
    """Where keys work, and the class that defines them.

    ``app_class`` is the app's own class (given by the app, so this screen never imports it).
    """
    from workbench.app.panes.elements import ElementList
    from workbench.app.panes.form import FieldInput
    from workbench.app.panes.grade import GradePane
    from workbench.app.panes.run import RunPane
    from workbench.app.panes.surge import SurgePane
    from workbench.app.screens.dialogs import AskScreen
    from workbench.app.screens.list_editor import CellInput, ListEditorScreen

    return [
        ("anywhere", app_class),
        ("element list", ElementList),
        ("field", FieldInput),
        ("list table", ListEditorScreen),
        ("table cell", CellInput),
        ("grade line", GradePane),
        ("run", RunPane),
        ("surge", SurgePane),
        ("questions", AskScreen),
    ]


class KeysScreen(ModalScreen[None]):
    """Every key, where it works and what it does. Escape, q or F1 closes it."""

    BINDINGS = [Binding("escape,q,f1", "close", "Close", id="keys.close")]

    def __init__(self, contexts: list[tuple[str, type]]) -> None:
        super().__init__()
        self.contexts = contexts

    def compose(self) -> ComposeResult:
        with Vertical(classes="sheet") as box:
            box.border_title = "Keys"
            box.border_subtitle = "Esc closes · Ctrl+P finds any command by name"
            yield DataTable(id="keys-table", cursor_type="row", zebra_stripes=True)

    def on_mount(self) -> None:
        table = self.query_one(DataTable)
        table.add_columns("where", "key", "does")
        for where, keys, what in binding_rows(self.contexts):
            table.add_row(where, keys, what)
        table.add_row("anywhere", "Ctrl+P", "command palette")
        table.add_row("anywhere", "Tab / Shift+Tab", "next / previous field or table")
        table.focus()

    def action_close(self) -> None:
        self.dismiss(None)
