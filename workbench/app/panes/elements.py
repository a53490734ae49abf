"""The element list: settings and every element, with add, duplicate, rename and delete."""

from __future__ import annotations

import copy

from textual.binding import Binding
from textual.message import Message
from textual.widgets import OptionList
from textual.widgets.option_list import Option

from workbench.app.outline import NOUN, STEMS, Entry, check_new_id, entries, starting_fields, suggest_id
from workbench.app.screens.dialogs import AskScreen, TextScreen

#: What each row starts with, so a kind reads in monochrome too (our own short words).
TAG = {"project": "set", "fluid": "set", "simulation": "set", "reservoirs": "res",
       "junctions": "jct", "receivers": "rcv", "lines": "line"}


class ElementList(OptionList):
    """Settings sections, then reservoirs, junctions, receivers and lines."""

    BINDINGS = [
        Binding("a", "add", "Add", id="element.add"),
        Binding("d", "duplicate", "Dup", id="element.duplicate"),
        Binding("n", "rename", "Rename", id="element.rename"),
        Binding("delete,x", "delete", "Delete", id="element.delete"),
        Binding("enter", "edit", "Edit", id="element.edit"),
    ]

    class Chosen(Message):
        """The highlighted row changed to ``entry``."""

        def __init__(self, entry: Entry) -> None:
            super().__init__()
            self.entry = entry

    class EditRequested(Message):
        """The user asked to edit the fields of the highlighted row."""

    KEYS_THAT_MOVE_FOCUS = frozenset({"enter"})
    """Keys this list answers by moving the focus to a form (the keys typed after one are
    held until the form has the focus: :mod:`workbench.app.typeahead`)."""

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self._keys: list[str] = []

    @property
    def entry(self) -> Entry | None:
        if self.highlighted is None or not self._keys:
            return None
        option = self.get_option_at_index(self.highlighted)
        return Entry.from_key(option.id) if option.id else None

    def show(self, data: dict, keep: str | None = None) -> None:
        """List the project's entries, keeping (or moving to) the row ``keep``."""
        current = keep or (self.entry.key if self.entry else None)
        rows = entries(data)
        keys = [e.key for e in rows]
        if keys != self._keys:
            self._keys = keys
            self.clear_options()
            self.add_options([Option(self._label(e), id=e.key) for e in rows])
        if current in keys:
            self.highlighted = keys.index(current)
        elif keys:
            self.highlighted = min(self.highlighted or 0, len(keys) - 1)

    @staticmethod
    def _label(entry: Entry) -> str:
        name = entry.element or entry.section
        return f"{TAG[entry.section]:>4} {name}"

    def on_option_list_option_highlighted(self, event: OptionList.OptionHighlighted) -> None:
        event.stop()
        if event.option.id:
            self.post_message(self.Chosen(Entry.from_key(event.option.id)))

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self._edit_requested()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action in {"duplicate", "rename", "delete"}:
            entry = self.entry
            return (entry is not None and entry.element is not None) or None
        if action == "add":
            return self.app.project is not None or None
        return True

    def _edit_requested(self) -> None:
        # the keys typed after Enter belong to the form it opens: hold them from here on
        # (the System view shows the form and releases them)
        hold = getattr(self.app, "hold_keys", None)
        if hold is not None:
            hold()
        self.post_message(self.EditRequested())

    # --- actions -----------------------------------------------------------------------
    def action_edit(self) -> None:
        self._edit_requested()

    def action_add(self, section: str | None = None) -> None:
        if section is None:
            answers = [("r", "reservoir or tank"), ("j", "junction"),
                       ("v", "receiver (discharge or vessel)"), ("l", "line")]
            sections = {"r": "reservoirs", "j": "junctions", "v": "receivers", "l": "lines"}
            self.app.push_screen(
                AskScreen("Add which kind of element?", answers, title="Add"),
                lambda key: self.action_add(sections[key]) if key in sections else None,
            )
            return
        data = self.app.project.data
        start = self.entry.element if self.entry and self.entry.section != "lines" else None

        def named(new_id: str | None) -> None:
            if not new_id:
                return
            fields = starting_fields(self.app.project.data, section)
            if section == "junctions":
                # A junction is valid only with a line on it: add one from the chosen node.
                from workbench.app.edits import add_elements

                line_id = suggest_id(self.app.project.data, STEMS["lines"])
                line = starting_fields(self.app.project.data, "lines")
                line["from"] = start or line["from"]
                line["to"] = new_id
                self._edit(add_elements, [(section, new_id, fields), ("lines", line_id, line)],
                           label=f"add junction {new_id} with line {line_id}",
                           keep=f"{section}:{new_id}")
                return
            from workbench.project.document import add_element

            self._edit(add_element, section, new_id, fields,
                       label=f"add {NOUN[section]} {new_id}", keep=f"{section}:{new_id}")

        prompt = f"Id of the new {NOUN[section]}:"
        if section == "junctions":
            prompt += (f" (a line from {start or 'the first node'} to it is added too; "
                       "set its length and size next)")
        self.app.push_screen(
            TextScreen(prompt, suggest_id(data, STEMS[section]),
                       check=lambda t: check_new_id(self.app.project.data, t), title="Add"),
            named,
        )

    def action_duplicate(self) -> None:
        entry = self.entry
        if entry is None or entry.element is None:
            return
        data = self.app.project.data
        fields = copy.deepcopy(data[entry.section][entry.element])

        def named(new_id: str | None) -> None:
            if new_id:
                from workbench.project.document import add_element

                self._edit(add_element, entry.section, new_id, fields,
                           label=f"duplicate {entry.element} as {new_id}",
                           keep=f"{entry.section}:{new_id}")

        self.app.push_screen(
            TextScreen(f"Id of the copy of {entry.element}:", suggest_id(data, entry.element),
                       check=lambda t: check_new_id(self.app.project.data, t),
                       title="Duplicate"),
            named,
        )

    def action_rename(self) -> None:
        entry = self.entry
        if entry is None or entry.element is None:
            return

        def named(new_id: str | None) -> None:
            if new_id and new_id != entry.element:
                from workbench.project.document import rename_element

                self._edit(rename_element, entry.element, new_id,
                           label=f"rename {entry.element} to {new_id}",
                           keep=f"{entry.section}:{new_id}")

        self.app.push_screen(
            TextScreen(f"New id for {entry.element} (lines that use it follow):",
                       entry.element,
                       check=lambda t: "" if t == entry.element else check_new_id(
                           self.app.project.data, t),
                       title="Rename"),
            named,
        )

    def action_delete(self) -> None:
        entry = self.entry
        if entry is None or entry.element is None:
            return
        from workbench.project.document import delete_element, dependents

        users = dependents(self.app.project, entry.element)
        question = f"Delete {NOUN[entry.section]} {entry.element}?"
        if users:
            question += (f"\n\nThese lines connect to it and will be deleted with it: "
                         f"{', '.join(users)}. (Ctrl+Z brings everything back.)")

        def answered(key: str | None) -> None:
            if key == "y":
                self._edit(lambda project, element: delete_element(
                    project, element, cascade=bool(users)), entry.element,
                    label=f"delete {entry.element}" + (f" and {', '.join(users)}" if users
                                                       else ""))

        self.app.push_screen(
            AskScreen(question, [("y", "yes, delete"), ("c", "cancel")], title="Delete"),
            answered,
        )

    def _edit(self, change, *args, label: str, keep: str | None = None) -> None:
        from workbench.project.problems import ProjectError

        try:
            self.app.apply_edit(change, *args, label=label)
        except ProjectError as error:
            self.app.notify(str(error), title=label, severity="error", timeout=10)
            return
        self.show(self.app.project.data, keep=keep)
