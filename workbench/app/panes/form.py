"""Forms built from the schema: one row per key, the value as typed, the display unit beside it.

An entry goes to the project only through ``set_value``; when that refuses, the reason is
shown under the field and the model keeps its value.
"""

from __future__ import annotations

import asyncio
from typing import Any

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.geometry import Size
from textual.message import Message
from textual.reactive import Reactive
from textual.strip import Strip
from textual.widget import Widget
from textual.widgets import Input, Select, Static

from workbench.app.outline import (
    Entry,
    EntryError,
    Field,
    edit_target,
    form_fields,
    lookup,
    typed_value,
    value_text,
)
from workbench.app.panes.form_text import (
    choices_for,
    companion_keys,
    hint,
    placeholder,
    problem_text,
)

#: Columns of a key's name in a form, at least.
NAME_WIDTH = 18
#: Columns of a field's value while it is not being edited (the unit hint follows).
EDITOR_WIDTH = 22


class FieldInput(Input):
    """A text field bound to one key path of the project.

    Its width and height come from the style sheet, never from its text, so a change of
    its value needs a repaint, not a layout: Textual's Input sets ``virtual_size`` (the
    scrollable width of the text) on every keystroke, and on a Widget that reactive asks
    for a layout of the whole screen (~0.05 s CPU per key with a line form shown).
    """

    virtual_size: Reactive[Size] = Reactive(Size(0, 0), layout=False, repaint=True)

    BINDINGS = [
        Binding("enter", "submit", "Apply", id="field.apply"),
        Binding("escape", "back", "Revert/back", id="field.revert"),
        Binding("up", "step(-1)", "Prev field", show=False, id="field.previous"),
        Binding("down", "step(1)", "Next field", show=False, id="field.next"),
        Binding("ctrl+t", "table", "Table", id="field.table"),
    ]

    def __init__(self, field: Field, value: str, choices: tuple[str, ...] | None = None) -> None:
        suggester = None
        if choices:
            from textual.suggester import SuggestFromList

            suggester = SuggestFromList(choices, case_sensitive=False)
        # One line, no border (the style sheet's .field-editor; Input's compact switch
        # would restyle each new field once more as it mounts). validate_on=(): no
        # validators, so no -valid class set on every change; our checks run on Enter.
        super().__init__(value, placeholder=placeholder(field),
                         suggester=suggester, classes="field-editor", validate_on=())
        self.field = field
        self.choices = choices

    def render_line(self, y: int) -> Strip:
        """The value; while the field is not being edited, its first :data:`EDITOR_WIDTH`
        columns and then the row's unit hint (no message showing)."""
        strip = super().render_line(y)
        row = self.parent
        if (y or self.has_focus or not isinstance(row, FieldRow) or row.problem
                or strip.cell_length <= EDITOR_WIDTH):
            return strip
        from rich.segment import Segment
        from rich.style import Style

        room = strip.cell_length - EDITOR_WIDTH
        text = f" {row.hint_text}"[:room].ljust(room)
        # the row's background (the hint sits beside the editor, not in it), the hint colour
        colour = form_style(self, "field-form--hint").color
        style = row.rich_style + Style(color=colour)
        return Strip.join([strip.crop(0, EDITOR_WIDTH), Strip([Segment(text, style)], room)])

    def on_blur(self) -> None:
        """Left: show a long value from its start again (editing left it scrolled to
        where the cursor was)."""
        self.scroll_to(x=0, animate=False)

    def action_revert(self) -> None:
        """Put back the stored value and clear the message."""
        row = self.parent
        if isinstance(row, FieldRow):
            row.revert()

    def action_back(self) -> None:
        """Esc: put back a value typed but not applied; with nothing to put back, leave the
        form for the element list."""
        row = self.parent
        if isinstance(row, FieldRow) and (row.problem or self.value != value_text(row.stored)):
            row.revert()
            return
        form = next((n for n in self.ancestors if isinstance(n, FieldForm)), None)
        if form is not None:
            form.post_message(FieldForm.Left())

    def action_step(self, step: int) -> None:
        form = next((n for n in self.ancestors if isinstance(n, FieldForm)), None)
        if form is not None:
            form.step_focus(self, step)

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """The table editor is offered on list fields only (hidden elsewhere)."""
        if action == "table":
            return self.field.spec.kind == "list"
        return True

    def action_table(self) -> None:
        """Edit a list field as a table (a line's fittings, its profile, a schedule)."""
        row = self.parent
        form = next((n for n in self.ancestors if isinstance(n, FieldForm)), None)
        if isinstance(row, FieldRow) and form is not None:
            form.open_table(row)


class GroupHeading(Static):
    """A heading of the form; Enter or Space folds its fields away or shows them."""

    can_focus = True
    BINDINGS = [
        Binding("enter,space", "toggle", "Fold/unfold", id="field.fold"),
        Binding("up", "step(-1)", "Prev field", show=False),
        Binding("down", "step(1)", "Next field", show=False),
        Binding("escape", "back", "Back", id="field.back"),
    ]

    def __init__(self, title: str, count: int) -> None:
        super().__init__("", classes="field-group", markup=False)
        self.title = title
        self.count = count
        self.folded = False
        self._label()

    def _label(self) -> None:
        mark = "▸" if self.folded else "▾"
        extra = f"  ({self.count} fields, Enter shows them)" if self.folded else ""
        self.update(f"{mark} {self.title}{extra}")

    def _form(self) -> "FieldForm | None":
        return next((n for n in self.ancestors if isinstance(n, FieldForm)), None)

    def action_toggle(self) -> None:
        form = self._form()
        if form is not None:
            self.folded = not self.folded
            self._label()
            form.fold(self, self.folded)

    def action_step(self, step: int) -> None:
        form = self._form()
        if form is not None:
            form.step_focus(self, step)

    def action_back(self) -> None:
        form = self._form()
        if form is not None:
            form.post_message(FieldForm.Left())

    def on_focus(self) -> None:
        form = self._form()
        if form is not None:
            form.scroll_to_widget(self, animate=False)


class FieldRow(Widget):
    """One key of the form in one line: its name, its editor, and beside them the value in
    the display unit or what is wrong with the entry.

    Two widgets a key (this row and its :class:`FieldInput`) rather than four: the row
    draws the name and any message itself, and the editor, as wide as the rest of the row,
    draws the unit hint beside the value while it is not being edited. So moving the focus
    from field to field repaints two editors and lays nothing out, and a form of 30 keys
    builds and is walked in far less time.

    A refused entry shows its reason beside the field (wrapping onto more lines as
    needed); the editor then keeps to :data:`EDITOR_WIDTH` columns, or half the room
    while it is being edited, so the reason stays in sight.
    """

    virtual_size: Reactive[Size] = Reactive(Size(0, 0), layout=False, repaint=True)
    """Nothing scrolls in a row: a new size (a form shown, a message) needs no second
    layout of the screen, which this reactive asks for on a Widget."""

    class Focused(Message):
        """One of the row's widgets got the focus."""

        def __init__(self, row: "FieldRow") -> None:
            super().__init__()
            self.row = row
            self.field = row.field

    def __init__(self, field: Field, stored: Any, choices: tuple[str, ...] | None) -> None:
        super().__init__(classes="field-row")
        self.field = field
        self.stored = stored
        self.choices = choices
        self.problem = ""
        self.heading = ""
        """The form heading this row sits under."""
        self.name_width = NAME_WIDTH
        """Columns for the key's name, so the longest name of the form shows whole."""
        self.hint_text = ""
        """The stored value in the display unit (or the unit expected), shown beside it."""
        self._editor: Input | Select | None = None
        self._fitted: int | None = None

    @property
    def name_text(self) -> str:
        """The key's name as shown, ``*`` after a required one."""
        spec = self.field.spec
        return f"{spec.name}{'*' if spec.required else ' '}"

    def compose(self) -> ComposeResult:
        # Choices are typed, with the rest of a matching word suggested (Right accepts);
        # a plain input is far lighter to build than a drop-down, which keeps forms fast.
        self._editor = FieldInput(self.field, value_text(self.stored), self.choices)
        self._editor.styles.margin = (0, 0, 0, self.name_width)
        yield self._editor

    @property
    def editor(self) -> Input | Select:
        return self._editor

    # --- the message beside the field ---------------------------------------------------
    def _editor_width(self, width: int) -> int | None:
        """The editor's columns in a row ``width`` wide (``None``: the rest of the row)."""
        if not self.problem:
            return None
        room = max(width - self.name_width, 2)
        editing = self._editor is not None and self._editor.has_focus
        return max(room // 2, 1) if editing else min(EDITOR_WIDTH, room)

    def _problem_lines(self, width: int) -> list:
        """The message's lines, wrapped to the room beside the editor."""
        if not self.problem:
            return []
        from rich.text import Text

        room = width - self.name_width - (self._editor_width(width) or 0) - 1
        text = Text(f"✗ {self.problem}", no_wrap=False)
        return list(text.wrap(self.app.console, max(room, 8)))

    def _fit_editor(self) -> None:
        """Size the editor for the row's state (a no-op when nothing changes)."""
        editor = self._editor
        if editor is None or not self.size.width:
            return
        width = self._editor_width(self.size.width)
        if width != self._fitted:  # None: the style sheet's width, the rest of the row
            self._fitted = width
            editor.styles.width = width  # lays the screen out

    def get_content_height(self, container: Size, viewport: Size, width: int) -> int:
        return max(1, len(self._problem_lines(width))) if width else 1

    def render(self):
        from rich.text import Text

        width = self.size.width
        name = Text(self.name_text.ljust(self.name_width))
        if self.problem:
            name.stylize(form_style(self, "field-form--refused-name"))
        lines = self._problem_lines(width)
        if not lines:
            return name
        column = self.name_width + (self._editor_width(width) or 0) + 1
        style = form_style(self, "field-form--problem")
        out = Text(no_wrap=True, overflow="crop")
        for index, line in enumerate(lines):
            if index:
                out.append("\n" + " " * self.name_width)
            else:
                out.append_text(name)
            out.append(" " * (column - self.name_width))
            line.stylize(style)
            out.append_text(line)
        return out

    def on_resize(self) -> None:
        self._fit_editor()

    def show_problem(self, text: str) -> None:
        if text == self.problem:
            return
        self.problem = text
        self.set_class(bool(text), "-invalid")
        self._fit_editor()
        self.refresh(layout=True)  # the message may take more lines
        if self._editor is not None:
            self._editor.refresh()

    def set_stored(self, stored: Any, unit_system: str) -> None:
        """Show a new stored value (after an edit, undo or redo elsewhere)."""
        changed = stored != self.stored
        self.stored = stored
        editor = self._editor
        if editor is None or not editor.is_mounted:
            return
        text = value_text(stored)
        if isinstance(editor, Select):
            target = text if text else Select.NULL
            if editor.value != target:
                with editor.prevent(Select.Changed):
                    if text and text not in (self.choices or ()):
                        editor.set_options([(c, c) for c in (*self.choices, text)])
                    editor.value = target
        elif changed or not self.problem:
            if editor.value != text and not (editor.has_focus and self.problem):
                with editor.prevent(Input.Changed):  # nobody listens: not posted up the tree
                    editor.value = text
        if changed:
            self.show_problem("")
        self.show_hint(unit_system)

    def rebind(self, field: Field, choices: tuple[str, ...] | None) -> None:
        """Point the row at the same key of another element (values follow in set_stored)."""
        self.field = field
        self.show_problem("")
        editor = self._editor
        if isinstance(editor, FieldInput):
            editor.field = field
            if choices != self.choices and choices:
                from textual.suggester import SuggestFromList

                editor.suggester = SuggestFromList(choices, case_sensitive=False)
            self.choices = editor.choices = choices
        elif isinstance(editor, Select) and choices != self.choices:
            self.choices = choices
            with editor.prevent(Select.Changed):
                editor.set_options([(c, c) for c in (choices or ())])
        self.stored = object()  # forces the value to be shown afresh

    def revert(self) -> None:
        if isinstance(self._editor, Input):
            self._editor.value = value_text(self.stored)
        self.show_problem("")

    def show_hint(self, unit_system: str) -> None:
        text = hint(self.field, self.stored, unit_system)
        if text != self.hint_text:
            self.hint_text = text
            if self._editor is not None and not self.problem:
                self._editor.refresh()

    def on_descendant_focus(self) -> None:
        if self.problem:
            self._fit_editor()
            self.refresh()
        self.post_message(self.Focused(self))

    def on_descendant_blur(self) -> None:
        if self.problem:
            self._fit_editor()
            self.refresh()


class FormSection(Vertical):
    """The rows of one section's form (shown while an element of the section is)."""

    virtual_size: Reactive[Size] = Reactive(Size(0, 0), layout=False, repaint=True)
    """Nothing scrolls in here (the form does): a new size needs no second layout of the
    screen, which this reactive asks for on a Widget."""


def form_style(widget: Widget, name: str):
    """A style of the form ``widget`` sits in (its component classes: one set for all the
    rows rather than a set a row, which the style sheet would apply row by row)."""
    from rich.style import Style

    form = next((n for n in widget.ancestors if isinstance(n, FieldForm)), None)
    return form.get_component_rich_style(name) if form is not None else Style()


class FieldForm(VerticalScroll):
    """The form for one entry of the element list."""

    COMPONENT_CLASSES = {"field-form--hint", "field-form--problem", "field-form--refused-name"}

    class Committed(Message):
        """A field's new value was accepted into the project."""

        def __init__(self, keypath: str) -> None:
            super().__init__()
            self.keypath = keypath

    class Left(Message):
        """Esc with nothing to revert: the user is done with the form."""

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.entry: Entry | None = None
        self._building = asyncio.Lock()
        self._rows: dict[str, list[FieldRow]] = {}
        self._holders: dict[str, FormSection] = {}
        """Each built section's rows, by section (a query walks the whole screen)."""
        self._focus_chain: list = []
        """Widgets :meth:`step_focus` asked to focus that have not got the focus yet."""

    async def show(self, entry: Entry | None, data: dict, unit_system: str) -> None:
        """Build the form for ``entry`` (or refresh values when it is already shown)."""
        async with self._building:
            await self._show(entry, data, unit_system)

    async def _show(self, entry: Entry | None, data: dict, unit_system: str) -> None:
        """One set of rows per section, built once; moving between elements of a section
        only rebinds the rows to the new key paths (mounting widgets is the slow part)."""
        self.entry = entry
        if entry is None:
            return
        holder = await self._holder(entry, data)
        for other in self._holders.values():
            other.display = other is holder
        self.refresh_values(data, unit_system)
        self.scroll_home(animate=False)

    async def _holder(self, entry: Entry, data: dict, hidden: bool = False):
        """The rows of ``entry``'s section, built if needed, bound to ``entry``'s keys."""
        holder_id = "form-" + entry.section
        holder = self._holders.get(entry.section)
        fields = form_fields(entry)
        if holder is None:
            rows: list = []
            group = ""
            # the longest key name of the section, its required mark and a space
            width = max([NAME_WIDTH, *(len(f.spec.name) + 2 for f in fields)])
            for field in fields:
                heading = field.heading or field.group
                if heading != group:
                    group = heading
                    count = sum(1 for f in fields if (f.heading or f.group) == heading)
                    rows.append(GroupHeading(heading, count))
                row = FieldRow(field, lookup(data, field.keypath), choices_for(field, data))
                row.heading = heading
                row.name_width = width
                rows.append(row)
            holder = FormSection(*rows, id=holder_id, classes="form-section")
            holder.display = not hidden
            await self.mount(holder)
            self._holders[entry.section] = holder
            self._rows[entry.section] = [r for r in rows if isinstance(r, FieldRow)]
        elif not hidden:
            for row, field in zip(self._rows[entry.section], fields):
                row.rebind(field, choices_for(field, data))
        return holder

    async def prebuild(self, entries: list[Entry], data: dict) -> None:
        """Build the forms of other sections while the user reads (mounting is slow)."""
        for entry in entries:
            async with self._building:
                if entry.section not in self._holders:
                    await self._holder(entry, data, hidden=True)

    def focusables(self) -> list:
        """The headings and field editors of the shown form, top to bottom, that can
        take the focus now (a folded group's fields cannot)."""
        if self.entry is None:
            return []
        holder = self._holders.get(self.entry.section)
        if holder is None:
            return []
        found = []
        for child in holder.children:
            if isinstance(child, GroupHeading):
                found.append(child)
            elif isinstance(child, FieldRow) and child.display and child.editor is not None:
                found.append(child.editor)
        return found

    def step_focus(self, widget, step: int) -> None:
        """Up/Down: the previous or next heading or field (stays put at either end).

        Textual moves the focus after the key that asked for it, so keys typed quickly
        still reach the widget being left: each step starts from the last target asked
        for and not yet reached (:attr:`_focus_chain`), so no press is lost."""
        items = self.focusables()
        chain = [w for w in self._focus_chain if w in items]
        start = chain[-1] if chain else widget
        if start not in items:
            return
        index = items.index(start) + step
        if 0 <= index < len(items):
            self._focus_chain = [*chain, items[index]]
            items[index].focus()

    def on_descendant_focus(self, event) -> None:
        """A focus asked for by :meth:`step_focus` arrived (drop it and those before it
        from the chain), or the focus went elsewhere (Tab, a click: forget the chain)."""
        widget = event.widget
        chain = self._focus_chain
        self._focus_chain = chain[chain.index(widget) + 1:] if widget in chain else []

    def fold(self, heading: GroupHeading, folded: bool) -> None:
        """Hide or show the fields under ``heading``."""
        holder = heading.parent
        if holder is None:
            return
        for child in holder.children:
            if isinstance(child, FieldRow) and getattr(child, "heading", "") == heading.title:
                child.display = not folded

    def on_field_row_focused(self, message: "FieldRow.Focused") -> None:
        self.scroll_to_widget(message.row, animate=False)

    def current_rows(self) -> list[FieldRow]:
        if self.entry is None:
            return []
        return self._rows.get(self.entry.section, [])

    def refresh_values(self, data: dict, unit_system: str) -> None:
        for row in self.current_rows():
            row.set_stored(lookup(data, row.field.keypath), unit_system)
            field = row.field
            if field.group and isinstance(row.editor, Input):
                # a sub-table that is absent: its keys are not "required" until it exists
                absent = not isinstance(lookup(data, field.keypath.rsplit(".", 1)[0]), dict)
                # short enough for the field; the help line says typing adds one
                row.editor.placeholder = (f"(no {field.group} yet)" if absent
                                          else placeholder(field))

    def focus_first(self) -> None:
        rows = [row for row in self.current_rows() if row.editor is not None]
        if rows:
            rows[0].editor.focus()

    # --- committing --------------------------------------------------------------------
    def on_input_submitted(self, event: Input.Submitted) -> None:
        if isinstance(event.input, FieldInput):
            event.stop()
            row = event.input.parent
            if row.field.spec.kind == "list" and event.value == value_text(row.stored):
                self.open_table(row)  # Enter on an unchanged list opens the table
                return
            self._commit(row, event.value)

    def open_table(self, row: FieldRow) -> None:
        """Edit ``row``'s list as a table; text typed in the field is applied first
        (when it is refused, the reason shows beside the field and no table opens)."""
        if self.app.project is None or row.field.spec.kind != "list":
            return
        editor = row.editor
        if isinstance(editor, Input) and editor.value != value_text(row.stored):
            if not self._commit(row, editor.value):
                return
        from workbench.app.screens.list_editor import ListEditorScreen

        self.app.push_screen(
            ListEditorScreen(row.field, lookup(self.app.project.data, row.field.keypath)))

    def on_descendant_blur(self, event) -> None:
        widget = event.control if hasattr(event, "control") else None
        if isinstance(widget, FieldInput):
            row = widget.parent
            if isinstance(row, FieldRow) and widget.value != value_text(row.stored):
                self._commit(row, widget.value)

    def on_select_changed(self, event: Select.Changed) -> None:
        event.stop()
        row = event.select.parent
        if isinstance(row, FieldRow):
            value = "" if event.value is Select.NULL else str(event.value)
            self._commit(row, value)

    def _commit(self, row: FieldRow, text: str) -> bool:
        """Apply ``text`` to ``row``'s key; False (with the reason shown) when refused."""
        if self.app.project is None:
            return False
        if text == value_text(row.stored):  # as shown: nothing to apply (a table as text)
            row.show_problem("")
            return True
        try:
            value = typed_value(text, row.field.spec)
        except EntryError as error:
            row.show_problem(str(error))
            return False
        if value == row.stored or (value is None and row.stored is None):
            row.show_problem("")
            return True
        from workbench.project.document import set_value
        from workbench.project.problems import ProjectError

        keypath, target = edit_target(self.app.project.data, row.field, value)
        label = f"{row.field.keypath} = {text.strip() or '(removed)'}"
        try:
            self.app.apply_edit(set_value, keypath, target, label=label)
        except ProjectError as error:
            if self._complete({keypath: target}, error, row, label):
                row.show_problem("answer the question to finish this change")
            else:
                row.show_problem(problem_text(error, row.field.keypath))
            return False
        row.show_problem("")
        self.post_message(self.Committed(row.field.keypath))
        return True

    def _complete(self, changes: dict, error: Exception, row: FieldRow, label: str,
                  rounds: int = 6) -> bool:
        """A change that needs other keys of the same table to be valid (a fluid kind and its
        strength, a tank and its shape): ask for each missing key in turn, drop keys that
        no longer apply, and apply everything as one edit. False when the refusal is of
        another sort (then the caller shows it beside the field)."""
        table = row.field.keypath.rsplit(".", 1)[0] + "."
        missing, stale = companion_keys(error, table)
        if not (missing or stale) or rounds <= 0:
            return False
        changes = {**changes, **{key: None for key in stale}}
        if not missing:
            self._apply_together(changes, row, label, rounds)
            return True
        key, message = missing[0]

        def answered(text: str | None) -> None:
            if not text:
                row.show_problem(f"not changed: {key} is needed too ({message})")
                return
            self._apply_together({**changes, key: text}, row, label, rounds)

        from workbench.app.screens.dialogs import TextScreen

        dropped = f" ({', '.join(stale)} will be removed: no longer used)" if stale else ""
        why = message.split("' ", 1)[1] if message.startswith("missing required key '") else message
        self.app.push_screen(
            TextScreen(f"{label} needs {key} too: {why}{dropped}. Its value:", "",
                       title="One more value"), answered)
        return True

    def _apply_together(self, changes: dict, row: FieldRow, label: str, rounds: int) -> None:
        from workbench.project.document import set_values
        from workbench.project.problems import ProjectError

        try:
            self.app.apply_edit(set_values, changes, label=label)
        except ProjectError as error:
            if not self._complete(changes, error, row, label, rounds - 1):
                row.show_problem(problem_text(error, row.field.keypath))
            return
        row.show_problem("")
        gone = [k for k, v in changes.items() if v is None]
        if gone:
            self.app.notify(f"removed {', '.join(gone)}: no longer used", timeout=4)
        self.post_message(self.Committed(row.field.keypath))
