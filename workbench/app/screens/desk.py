"""The desk: a status line, the five views in tabs, and the key footer."""

from __future__ import annotations

import importlib

from textual.app import ComposeResult
from textual.screen import Screen
from textual.widgets import Static, TabbedContent, TabPane

from workbench.app.panes.elements import ElementList
from workbench.app.panes.system import SystemPane
from workbench.app.widgets.keyfooter import KeyFooter

#: view id -> (tab title, "module:class" of the pane). The F-key is in the title so it
#: reads without the footer. Panes other than System are built the first time they are
#: shown, which keeps the first paint quick.
VIEWS = {
    "system": ("F2 System", "workbench.app.panes.system:SystemPane"),
    "flows": ("F3 Flows", "workbench.app.panes.flows:FlowsPane"),
    "grade": ("F4 Grade line", "workbench.app.panes.grade:GradePane"),
    "run": ("F5 Run", "workbench.app.panes.run:RunPane"),
    "events": ("F6 Events", "workbench.app.panes.events:EventsPane"),
    "surge": ("F10 Surge", "workbench.app.panes.surge:SurgePane"),
}


#: The tab that opens the sweep screen (the sweep is not a pane of the desk).
SWEEP_TAB = "sweep-tab"


def pane_class(view: str) -> type:
    module, _, name = VIEWS[view][1].partition(":")
    return getattr(importlib.import_module(module), name)

STEADY_WORDS = {"idle": "—", "stale": "STALE", "solving": "solving…", "fresh": "ok",
                "failed": "FAILED"}


class StatusLine(Static):
    """Steady and run state first (they must stay visible at 80 columns), then the display
    units, then the file name and its unsaved mark, shortened from the left to fit."""

    def on_mount(self) -> None:
        for name in ("path", "modified", "unit_system", "steady_status", "run_status",
                     "project", "transient"):
            self.watch(self.app, name, self._show, init=False)
        self._show()

    def on_resize(self) -> None:
        self._show()

    def _show(self, _value=None) -> None:
        app = self.app
        if app.project is None:
            self.update(" Gravity workbench · no project open")
            return
        # one row (the style sheet's #status): a new text needs no layout of the screen
        self.update(status_text(app, self.size.width or 80), layout=False)
        self.set_class(app.modified, "-modified")
        self.set_class(app.steady_status in {"stale", "solving"} or app.run_is_stale(),
                       "-stale")
        self.set_class(app.steady_status == "failed", "-failed")


def status_text(app, width: int) -> str:
    """The status line's text at ``width`` columns."""
    steady = STEADY_WORDS.get(app.steady_status, app.steady_status)
    run = ""
    if app.run_status != "idle":
        run = f" · run {app.run_status}"
        if app.run_status != "running" and app.run_is_stale():
            run += " STALE"
    head = f" steady {steady}{run} · {app.unit_system} · "
    name = app.path.name if app.path else "(new, unsaved)"
    mark = " [modified]" if app.modified else ""
    room = max(width - len(head) - len(mark) - 1, 8)
    if len(name) > room:
        name = "…" + name[-(room - 1):]
    return f"{head}{name}{mark}"


class DeskScreen(Screen):
    """The main screen of the workbench."""

    def compose(self) -> ComposeResult:
        yield StatusLine(id="status", markup=False)
        with TabbedContent(id="views", initial="system"):
            for view, (title, _pane) in VIEWS.items():
                with TabPane(title, id=view):
                    if view == "system":
                        yield SystemPane(id="system-pane")
            # the sweep has its own screen; its tab opens it, like F9
            with TabPane("F9 Sweep", id=SWEEP_TAB):
                yield Static("The sweep opens on its own screen (F9).", markup=False)
        yield KeyFooter(compact=True, show_command_palette=False)

    async def pane(self, view: str):
        """The pane of a view, built on first use."""
        found = self.query(f"#{view}-pane")
        if found:
            return found.first()
        pane = pane_class(view)(id=f"{view}-pane")
        await self.query_one(f"TabPane#{view}").mount(pane)
        return pane

    async def show_view(self, name: str) -> None:
        tabs = self.query_one(TabbedContent)
        tabs.active = name
        await self._activate(name)

    async def _activate(self, name: str) -> None:
        pane = await self.pane(name)
        if hasattr(pane, "activate"):
            pane.activate()
        elif name == "system":
            self.query_one(ElementList).focus()
        else:
            for widget in pane.query("*"):
                if widget.focusable:
                    widget.focus()
                    break

    async def on_tabbed_content_tab_activated(self, event: TabbedContent.TabActivated) -> None:
        if event.pane.id == SWEEP_TAB:
            self.query_one(TabbedContent).active = getattr(self, "_last_view", "system")
            await self.app.run_action("sweep")
            return
        self._last_view = event.pane.id
        await self._activate(event.pane.id)

    def on_mount(self) -> None:
        self.query_one(ElementList).focus()
        self.views_built = False
        # once the first result is on screen: building views sooner would delay it
        self.app.after_first_result(lambda: self.set_timer(0.1, self._build_views))

    async def _build_views(self) -> None:
        """Build the other views once the first frame is up, so switching is instant."""
        for view in VIEWS:
            await self.pane(view)
        self.views_built = True

    # --- palette actions on the element list -------------------------------------------
    async def _elements(self) -> ElementList:
        await self.show_view("system")
        return self.query_one(ElementList)

    async def action_add(self, section: str | None = None) -> None:
        if self.app.project is not None:
            (await self._elements()).action_add(section)

    async def action_duplicate(self) -> None:
        (await self._elements()).action_duplicate()

    async def action_rename(self) -> None:
        (await self._elements()).action_rename()

    async def action_delete(self) -> None:
        (await self._elements()).action_delete()
