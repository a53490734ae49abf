"""The safety cautions, the same words as the README and the CLI (workbench.cautions)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

from workbench.cautions import CAUTIONS, PREAMBLE


class CautionsScreen(ModalScreen[None]):
    """Read the cautions; any of Escape, q or F8 closes them."""

    BINDINGS = [Binding("escape,q,f8", "close", "Close", id="cautions.close")]

    def compose(self) -> ComposeResult:
        with Vertical(classes="sheet") as box:
            box.border_title = "Cautions"
            box.border_subtitle = "Esc closes"
            with VerticalScroll(id="cautions-body"):
                yield Static(PREAMBLE, classes="caution-preamble", markup=False)
                for caution in CAUTIONS:
                    yield Static(f"▲ {caution.topic}", classes="caution-topic", markup=False)
                    yield Static(caution.text, classes="caution-text", markup=False)

    def on_mount(self) -> None:
        self.query_one("#cautions-body").focus()

    def action_close(self) -> None:
        self.dismiss(None)
