"""A footer that shows every key of the moment on up to two rows, dimming what cannot run.

Textual's footer keeps to one row, which at 80 columns hides most keys; this one wraps
onto a second row. It also redraws when the terminal has not reported focus (a detached
multiplexer), so the keys are never missing.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import HorizontalGroup
from textual.widgets import Footer
from textual.widgets._footer import FooterKey


class KeyFooter(Footer):
    """Key footer on two rows."""

    DEFAULT_CSS = """
    KeyFooter {
        layout: vertical;
        height: 2;
    }
    KeyFooter HorizontalGroup.footer-row {
        height: 1;
        width: 1fr;
    }
    """

    def bindings_changed(self, screen) -> None:
        self._bindings_ready = True
        if self.is_attached and screen is self.screen:
            self.call_after_refresh(self.recompose)

    def compose(self) -> ComposeResult:
        if not self._bindings_ready:
            return
        seen: dict[str, tuple] = {}
        for _node, binding, enabled, tooltip in self.screen.active_bindings.values():
            if binding.show and binding.action not in seen:
                seen[binding.action] = (binding, enabled, tooltip)
        width = max(self.app.size.width, 40)
        rows: list[list[FooterKey]] = [[], []]
        used = [0, 0]
        row = 0
        for binding, enabled, tooltip in seen.values():
            key_display = self.app.get_key_display(binding)
            need = len(key_display) + len(binding.description) + 2
            if row == 0 and used[0] + need > width:
                row = 1
            used[row] += need
            rows[row].append(
                FooterKey(binding.key, key_display, binding.description, binding.action,
                          disabled=not enabled, tooltip=tooltip).data_bind(
                              compact=Footer.compact))
        for keys in rows:
            yield HorizontalGroup(*keys, classes="footer-row")
