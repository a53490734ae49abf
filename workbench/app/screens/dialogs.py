"""Small modal questions: choose one answer, or type a name.

Each dialog dismisses with the answer (a choice key or the text) or ``None`` when the user
backs out with Escape, so callers use ``push_screen(dialog, callback)``.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, OptionList, Static
from textual.widgets.option_list import Option


class AskScreen(ModalScreen[str | None]):
    """A question with a few answers, each on its own key.

    Args:
        question: what is being asked, in words.
        answers: ``(key, label)`` pairs; pressing ``key`` (or choosing the line) answers.
    """

    BINDINGS = [Binding("escape", "dismiss_none", "Back", id="dialog.back")]

    def __init__(self, question: str, answers: Sequence[tuple[str, str]], title: str = "") -> None:
        super().__init__(classes="dialog")
        self.question = question
        self.answers = list(answers)
        self.box_title = title

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog-box") as box:
            box.border_title = self.box_title
            yield Static(self.question, classes="dialog-question", markup=False)
            yield OptionList(
                *(Option(Text(f"[{key}] {label}"), id=key) for key, label in self.answers),
                id="answers",
            )

    def on_key(self, event) -> None:
        for key, _label in self.answers:
            if event.key == key:
                event.stop()
                self.dismiss(key)
                return

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(event.option.id)

    def action_dismiss_none(self) -> None:
        self.dismiss(None)


class TextScreen(ModalScreen[str | None]):
    """Ask for one line of text (a new id, a file name), checked before it is accepted.

    Args:
        prompt: what to type.
        value: the starting text.
        check: returns an error message for bad text, or ``""`` when it is fine.
    """

    BINDINGS = [Binding("escape", "dismiss_none", "Back", id="dialog.back")]

    def __init__(
        self,
        prompt: str,
        value: str = "",
        check: Callable[[str], str] | None = None,
        title: str = "",
    ) -> None:
        super().__init__(classes="dialog")
        self.prompt = prompt
        self.value = value
        self.check = check
        self.box_title = title

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog-box") as box:
            box.border_title = self.box_title
            yield Label(self.prompt, classes="dialog-question", markup=False)
            yield Input(self.value, id="answer")
            yield Static("", id="answer-problem", classes="problem", markup=False)
            yield Static("Enter to accept, Escape to go back", classes="dialog-hint", markup=False)

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        text = event.value.strip()
        problem = self.check(text) if self.check else ("" if text else "type something first")
        if problem:
            self.query_one("#answer-problem", Static).update(f"✗ {problem}")
            return
        self.dismiss(text)

    def action_dismiss_none(self) -> None:
        self.dismiss(None)
