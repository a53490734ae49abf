"""The desk: a status line, the five views in tabs, and the key footer."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.screen import Screen
from textual.widgets import Static, TabbedContent, TabPane

from workbench.app.panes.elements import ElementList
from workbench.app.panes.events import EventsPane
from workbench.app.panes.flows import FlowsPane
from workbench.app.panes.grade import GradePane
from workbench.app.panes.run import RunPane
from workbench.app.panes.surge import SurgePane
from workbench.app.panes.system import SystemPane
from workbench.app.widgets.keyfooter import KeyFooter

#: view id -> (tab title, the pane class). The F-key is in the title so it reads without
#: the footer.
VIEWS = {
    "system": ("F2 System", SystemPane),
    "flows": ("F3 Flows", FlowsPane),
    "grade": ("F4 Grade line", GradePane),
    "run": ("F5 Run", RunPane),
    "events": ("F6 Events", EventsPane),
    "surge": ("F10 Surge", SurgePane),
}

STEADY_WORDS = {"idle": "—", "stale": "STALE", "solving": "solving…", "fresh": "ok",
                "failed": "FAILED"}


class StatusLine(Static):
    """File name, unsaved mark, display units, steady and run state — in words."""

    def on_mount(self) -> None:
        for name in ("path", "modified", "unit_system", "steady_status", "run_status", "project"):
            self.watch(self.app, name, self._show, init=False)
        self._show()

    def _show(self, _value=None) -> None:
        app = self.app
        if app.project is None:
            self.update(" Gravity workbench · no project open")
            return
        name = app.path.name if app.path else "(new, unsaved)"
        mark = " [modified]" if app.modified else ""
        run = "" if app.run_status == "idle" else f" · run {app.run_status}"
        steady = STEADY_WORDS.get(app.steady_status, app.steady_status)
        self.update(f" {name}{mark} · units {app.unit_system} · steady {steady}{run}")
        self.set_class(app.modified, "-modified")
        self.set_class(app.steady_status in {"stale", "solving"}, "-stale")
        self.set_class(app.steady_status == "failed", "-failed")


class DeskScreen(Screen):
    """The main screen of the workbench."""

    def compose(self) -> ComposeResult:
        yield StatusLine(id="status")
        with TabbedContent(id="views", initial="system"):
            for view, (title, pane) in VIEWS.items():
                with TabPane(title, id=view):
                    yield pane(id=f"{view}-pane")
        yield KeyFooter(compact=True, show_command_palette=False)

    def show_view(self, name: str) -> None:
        tabs = self.query_one(TabbedContent)
        tabs.active = name
        pane = self.query_one(f"#{name}-pane")
        if hasattr(pane, "activate"):
            pane.activate()
        elif name == "system":
            self.query_one(ElementList).focus()
        else:
            for widget in pane.query("*"):
                if widget.focusable:
                    widget.focus()
                    break

    def on_tabbed_content_tab_activated(self, event: TabbedContent.TabActivated) -> None:
        pane = self.query_one(f"#{event.pane.id}-pane")
        if hasattr(pane, "activate"):
            pane.activate()

    def on_mount(self) -> None:
        self.query_one(ElementList).focus()

    # --- palette actions on the element list -------------------------------------------
    def _elements(self) -> ElementList:
        self.show_view("system")
        return self.query_one(ElementList)

    def action_add(self, section: str | None = None) -> None:
        if self.app.project is not None:
            self._elements().action_add(section)

    def action_duplicate(self) -> None:
        self._elements().action_duplicate()

    def action_rename(self) -> None:
        self._elements().action_rename()

    def action_delete(self) -> None:
        self._elements().action_delete()
