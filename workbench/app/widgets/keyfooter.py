"""A footer that shows every key of the moment on up to two rows, dimming what cannot run.

Textual's footer keeps to one row, which at 80 columns hides most keys; this one wraps
onto a second row. It also redraws when the terminal has not reported focus (a detached
multiplexer), so the keys are never missing. Each key is a :class:`KeyCap` of our own
(Textual's key widget is in a private module), drawn with the footer's theme variables.
"""

from __future__ import annotations

from typing import ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import HorizontalGroup
from textual.geometry import Size
from textual.reactive import Reactive, reactive
from textual.widget import Widget
from textual.widgets import Footer


class KeyCap(Widget):
    """One key of the footer: the key as on the key cap, then what it does.

    A click runs the key as if pressed; a key that cannot run now is dimmed and rings the bell.
    """

    ALLOW_SELECT = False
    COMPONENT_CLASSES = {"keycap--key", "keycap--description"}
    DEFAULT_CSS = """
    KeyCap {
        width: auto;
        height: 1;
        text-wrap: nowrap;
        background: $footer-item-background;
        .keycap--key {
            color: $footer-key-foreground;
            background: $footer-key-background;
            text-style: bold;
            padding: 0 1;
        }
        .keycap--description {
            padding: 0 1 0 0;
            color: $footer-description-foreground;
            background: $footer-description-background;
        }
        &:hover {
            color: $footer-key-foreground;
            background: $block-hover-background;
        }
        &.-disabled {
            text-style: dim;
        }
        &.-compact {
            margin-right: 1;
            .keycap--key {
                padding: 0;
            }
            .keycap--description {
                padding: 0 0 0 1;
            }
        }
    }
    """

    compact = reactive(True)
    """Keys without padding, one space apart."""

    virtual_size: Reactive[Size] = Reactive(Size(0, 0), layout=False, repaint=True)
    """Nothing scrolls in a key: a new size needs no second layout of the screen (on a
    Widget this reactive asks for one each time a layout changes the widget's size)."""

    def __init__(self, key: str, key_display: str, description: str, action: str = "", *,
                 disabled: bool = False, tooltip: str = "") -> None:
        # born compact (the usual case), so binding ``compact`` restyles nothing: a style
        # update per key made every redraw of the footer cost a large part of start-up
        super().__init__(classes="-compact -disabled" if disabled else "-compact")
        self.key = key
        self.action = action
        self.key_display = key_display
        self.description = description
        self._key_disabled = disabled
        self.set_reactive(Widget.shrink, False)
        if tooltip:
            self.tooltip = tooltip

    _drawn: ClassVar[dict[tuple, Text]] = {}
    """Keys as drawn, by what they depend on: the footer is rebuilt whenever the keys of
    the moment change (list to form, a view switch), and looking the two component
    styles up cost ~1.5 ms a key on every draw."""

    def render(self) -> Text:
        key = (self.key_display, self.description, tuple(sorted(self.classes)),
               self.rich_style, self.app.theme, self.app.ansi_color)
        drawn = self._drawn.get(key)
        if drawn is None:
            if len(self._drawn) > 512:
                self._drawn.clear()
            drawn = self._drawn[key] = self._draw()
        return drawn.copy()

    def _draw(self) -> Text:
        key_pad = self.get_component_styles("keycap--key").padding
        text_pad = self.get_component_styles("keycap--description").padding
        parts = [(" " * key_pad.left + self.key_display + " " * key_pad.right,
                  self.get_component_rich_style("keycap--key"))]
        if self.description:
            parts.append((" " * text_pad.left + self.description + " " * text_pad.right,
                          self.get_component_rich_style("keycap--description")))
        text = Text.assemble(*parts)
        text.stylize_before(self.rich_style)
        return text

    def on_mouse_down(self) -> None:
        if self._key_disabled:
            self.app.bell()
        else:
            self.app.simulate_key(self.key)

    def watch_compact(self, compact: bool) -> None:
        self.set_class(compact, "-compact")


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
            self.call_after_refresh(self._recompose_if_changed)

    def _shown_keys(self) -> dict[str, tuple]:
        """Action -> (binding, enabled, tooltip) of every key to show now."""
        seen: dict[str, tuple] = {}
        for _node, binding, enabled, tooltip in self.screen.active_bindings.values():
            if binding.show and binding.action not in seen:
                seen[binding.action] = (binding, enabled, tooltip)
        return seen

    def _signature(self, seen: dict[str, tuple]) -> tuple:
        return (max(self.app.size.width, 40),
                tuple((b.key, b.description, a, e, t) for a, (b, e, t) in seen.items()))

    async def _recompose_if_changed(self) -> None:
        """Rebuild the keys only when what they show changed: the focus moving between
        widgets with the same keys (field to field) rebuilds nothing (a rebuild restyles
        every key, a large part of start-up and of a Tab). When each row keeps its number
        of keys (a field to a heading), the keys are rewritten in place: no widgets
        removed and mounted, and no layout unless a key's width changed."""
        if not self.is_attached:
            return
        seen = self._shown_keys()
        signature = self._signature(seen)
        if signature == getattr(self, "_shown", None):
            return
        if self._rewrite(seen):
            self._shown = signature
            return
        await self.recompose()

    def _arrange(self, seen: dict[str, tuple]) -> list[list[tuple]]:
        """The keys of each row: (binding, enabled, tooltip, key as shown)."""
        width = max(self.app.size.width, 40)
        rows: list[list[tuple]] = [[], []]
        used = [0, 0]
        row = 0
        for binding, enabled, tooltip in seen.values():
            key_display = self.app.get_key_display(binding)
            need = len(key_display) + len(binding.description) + 2
            if row == 0 and used[0] + need > width:
                row = 1
            used[row] += need
            rows[row].append((binding, enabled, tooltip, key_display))
        return rows

    def _rewrite(self, seen: dict[str, tuple]) -> bool:
        """Show ``seen`` in the keys already mounted; False when a row's count differs."""
        groups = list(self.query("HorizontalGroup.footer-row"))
        rows = self._arrange(seen)
        caps = [list(group.query_children(KeyCap)) for group in groups]
        if len(groups) != len(rows) or any(len(c) != len(r) for c, r in zip(caps, rows)):
            return False
        for row_caps, row in zip(caps, rows):
            for cap, (binding, enabled, tooltip, key_display) in zip(row_caps, row):
                resized = (len(cap.key_display) + len(cap.description)
                           != len(key_display) + len(binding.description))
                cap.key, cap.action = binding.key, binding.action
                cap.key_display, cap.description = key_display, binding.description
                cap._key_disabled = not enabled
                cap.set_class(not enabled, "-disabled")
                cap.tooltip = tooltip or None
                cap.refresh(layout=resized)
        return True

    def compose(self) -> ComposeResult:
        if not self._bindings_ready:
            return
        seen = self._shown_keys()
        self._shown = self._signature(seen)
        for row in self._arrange(seen):
            yield HorizontalGroup(
                *(KeyCap(binding.key, key_display, binding.description, binding.action,
                         disabled=not enabled, tooltip=tooltip).data_bind(compact=Footer.compact)
                  for binding, enabled, tooltip, key_display in row),
                classes="footer-row")
