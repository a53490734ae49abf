"""The System view: the element list on the left, the chosen element's form on the right."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Static

from workbench.app.outline import NOUN, Entry, entries
from workbench.app.panes.elements import ElementList
from workbench.app.panes.form import FieldForm, FieldRow, hint


class SystemPane(Horizontal):
    """Browse and edit every element and setting of the project."""

    def compose(self) -> ComposeResult:
        yield ElementList(id="elements")
        with Vertical(id="form-side"):
            yield Static("", id="form-title", markup=False)
            yield FieldForm(id="form")
            yield Static("", id="field-help", markup=False)

    def on_mount(self) -> None:
        self._prebuilt = False
        self.prebuilt = False
        """True once every section's form is built (tests wait for it)."""
        self.watch(self.app, "project", self._project_changed)
        self.watch(self.app, "unit_system", self._units_changed, init=False)

    async def _project_changed(self, project) -> None:
        if project is None:
            return
        elements = self.query_one(ElementList)
        elements.show(project.data)
        await self._show_entry(elements.entry)
        # keys typed ahead of the load, once the list has been laid out (two refreshes:
        # an option list moves its cursor only after its rows are measured)
        self.call_after_refresh(self.call_after_refresh, self.app.release_keys)
        if not self._prebuilt:
            self._prebuilt = True
            if getattr(self.app, "prebuild_forms", True):
                # once the first result is on screen: sooner would delay it
                self.app.after_first_result(lambda: self.set_timer(0.3, self._prebuild))
            else:
                self.prebuilt = True

    async def _prebuild(self) -> None:
        project = self.app.project
        if project is None:
            return
        firsts: dict[str, Entry] = {}
        for entry in entries(project.data):
            firsts.setdefault(entry.section, entry)
        order = ["lines", "reservoirs", "receivers", "junctions", "fluid", "simulation"]
        await self.query_one(FieldForm).prebuild(
            [firsts[s] for s in order if s in firsts], project.data)
        self.prebuilt = True

    async def _units_changed(self, _units: str) -> None:
        if self.app.project is not None:
            self.query_one(FieldForm).refresh_values(self.app.project.data, self.app.unit_system)

    async def _show_entry(self, entry: Entry | None) -> None:
        if entry is None or self.app.project is None:
            return
        title = (f"{NOUN[entry.section]} {entry.element}" if entry.element
                 else f"{entry.section} settings")
        self.query_one("#form-title", Static).update(
            f"{title}  · ↑↓ Tab move · Enter applies · Esc back", layout=False)  # 1 row
        await self.query_one(FieldForm).show(entry, self.app.project.data, self.app.unit_system)

    async def on_element_list_chosen(self, message: ElementList.Chosen) -> None:
        if message.entry != self.query_one(ElementList).entry:
            return  # the list has moved on (keys typed quickly): show only where it is
        await self._show_entry(message.entry)

    async def on_element_list_edit_requested(self, _message: ElementList.EditRequested) -> None:
        # The highlighted element's form may still be waiting behind a form being built in
        # idle time: show it first (that waits its turn), so the focus lands in the fields
        # of the element the user chose and never in another section's hidden form.
        self.app.hold_keys()  # keys typed now belong to the form, not to the list
        try:
            await self._show_entry(self.query_one(ElementList).entry)
            self.query_one(FieldForm).focus_first()
        finally:
            self.call_after_refresh(self.app.release_keys)

    def on_field_form_left(self, message: FieldForm.Left) -> None:
        message.stop()
        self.query_one(ElementList).focus()

    def on_field_row_focused(self, message: FieldRow.Focused) -> None:
        spec = message.field.spec
        row = message.row
        shown = hint(message.field, row.stored, self.app.unit_system)
        text = f"{message.field.keypath}{' ' + shown if shown else ''}: {spec.help}"
        if spec.example:
            from workbench.project.units import example_text

            text += f" · example: {example_text(spec.example, spec.kind, self.app.unit_system)}"
        if row.choices:
            text += " · one of: " + ", ".join(row.choices)
        if spec.kind == "list":
            text += " · Enter or Ctrl+T edits it as a table"
        editor = row.editor
        group = message.field.group
        if group and row.stored is None and getattr(editor, "placeholder", "").startswith("(no "):
            text += f" · no {group} yet: a value typed here adds one"
        show_help(self.query_one("#field-help", Static), text)
        # a longer help line takes rows from the form: keep the field in sight after it
        self.call_after_refresh(self._keep_focus_in_sight)

    def _keep_focus_in_sight(self) -> None:
        """Scroll the form to what has the focus now: with keys typed quickly that may be
        a heading below the field this was asked for (which it used to scroll back to)."""
        form = self.query_one(FieldForm)
        focused = self.app.focused
        if focused is None or form not in focused.ancestors:
            return
        target = focused.parent if isinstance(focused.parent, FieldRow) else focused
        form.scroll_to_widget(target, animate=False)


def show_help(help_line: Static, text: str) -> None:
    """Put ``text`` on the help line under the form, laying the screen out again only when
    it needs more rows than it has (a field's focus then costs a repaint, not a layout)."""
    from rich.text import Text

    width = help_line.content_region.width
    if not width:
        help_line.update(text)
        return
    rows = len(Text(text).wrap(help_line.app.console, width))
    styles = help_line.styles
    tall = rows + styles.gutter.height  # min/max heights count the border and padding
    low = int(styles.min_height.value) if styles.min_height else tall
    high = int(styles.max_height.value) if styles.max_height else tall
    # a shorter text keeps the rows it has until the next layout (one that happens anyway)
    help_line.update(text, layout=min(max(tall, low), high) > help_line.outer_size.height)
