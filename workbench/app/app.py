"""The workbench app: the open project, its edit history, and the background solves.

The app owns the state every view shows (the project, the steady result, the last
simulation, the display unit system) as reactive variables; the views watch them. Long
work runs in thread workers (:mod:`workbench.app.jobs`) that post a message named for what
happened; one handler turns any worker failure into words.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any, ClassVar

from textual import work
from textual.app import App
from textual.binding import Binding
from textual.message import Message
from textual.reactive import var
from textual.worker import Worker, WorkerState, get_current_worker

from workbench.app import jobs
from workbench.app.history import History
from workbench.app.recovery_copy import RecoveryKeeper
from workbench.app.typeahead import TypeAhead

#: Seconds between the last edit and the start of a steady solve.
DEBOUNCE = 0.3

VIEWS = ("system", "flows", "grade", "run", "events", "surge")


def _palette_commands():
    """Our palette commands, imported when the palette first opens (keeps start-up quick)."""
    from workbench.app.commands import WorkbenchCommands

    return WorkbenchCommands


class WorkbenchApp(TypeAhead, App[int]):
    """A gravity-system workbench around one project file."""

    CSS_PATH = "workbench.tcss"
    TITLE = "Gravity workbench"
    COMMANDS = App.COMMANDS | {_palette_commands}
    ENABLE_COMMAND_PALETTE = True

    BINDINGS: ClassVar = [
        # F1, F8, F9 and F11 open a screen: priority, so they run at once and the keys typed
        # right after them are held for that screen (not handed to the widget behind it)
        Binding("f1", "keys", "Keys", key_display="F1", id="app.keys", priority=True),
        Binding("f2", "view('system')", "System", key_display="F2", id="view.system",
                show=False),
        Binding("f3", "view('flows')", "Flows", key_display="F3", id="view.flows",
                show=False),
        Binding("f4", "view('grade')", "Grade", key_display="F4", id="view.grade",
                show=False),
        Binding("f5", "view('run')", "Run", key_display="F5", id="view.run",
                show=False),
        Binding("f6", "view('events')", "Events", key_display="F6", id="view.events",
                show=False),
        Binding("f10", "view('surge')", "Surge", key_display="F10", id="view.surge",
                show=False),
        Binding("f7", "toggle_units", "SI/US", key_display="F7", id="app.units"),
        Binding("f8", "cautions", "Cautions", key_display="F8", id="app.cautions",
                priority=True),
        Binding("f9", "sweep", "Sweep", key_display="F9", id="run.sweep", priority=True),
        Binding("f11", "calibrate", "Calibrate", key_display="F11", id="run.calibrate",
                show=False, priority=True),
        Binding("ctrl+s", "save", "Save", id="file.save"),
        Binding("ctrl+z", "undo", "Undo", id="edit.undo"),
        Binding("ctrl+y", "redo", "Redo", id="edit.redo"),
        Binding("ctrl+r", "simulate", "Simulate", id="run.simulate"),
        Binding("escape", "stop_run", "Stop", id="run.stop"),
        Binding("ctrl+o", "open", "Open", id="file.open"),
        Binding("ctrl+p", "command_palette", "Commands", id="app.palette"),
        Binding("ctrl+q", "quit", "Quit", id="app.quit", priority=True),
    ]

    # --- state the views watch ---------------------------------------------------------
    project: var[Any] = var(None, always_update=True)
    """The current ``Project`` (``None`` until one is loaded)."""
    unit_system: var[str] = var("SI")
    """Display units, ``"SI"`` or ``"US"``; never changes a stored value."""
    steady: var[Any] = var(None, always_update=True)
    """The last steady result (``SteadyResult``), possibly for an older edit."""
    steady_status: var[str] = var("idle")
    """``idle``, ``stale`` (an edit is waiting), ``solving``, ``fresh`` or ``failed``."""
    steady_message: var[str] = var("")
    run_status: var[str] = var("idle")
    """``idle``, ``running``, ``done``, ``cancelled`` or ``failed``."""
    run_progress: var[float] = var(0.0)
    transient: var[Any] = var(None, always_update=True)
    """The last ``TransientResult``."""
    elastic: var[Any] = var(None, always_update=True)
    """Line id -> ``ElasticResult`` of the last run's elastic surge runs (may be empty)."""
    elastic_status: var[str] = var("idle")
    """An elastic run asked for from the Surge view: ``idle``, ``running``, ``done``,
    ``cancelled`` or ``failed``."""
    elastic_progress: var[float] = var(0.0)
    modified: var[bool] = var(False)
    path: var[Path | None] = var(None)

    # --- messages posted by the workers ------------------------------------------------
    class ProjectLoaded(Message):
        """A project file was read and validated (``steady``: its steady result, when it
        was solved beside the load)."""

        def __init__(self, project: Any, path: Path | None, steady: Any = None) -> None:
            super().__init__()
            self.project = project
            self.path = path
            self.steady = steady

    class SteadySolved(Message):
        """A steady solve finished for the edit numbered ``generation``."""

        def __init__(self, generation: int, result: Any) -> None:
            super().__init__()
            self.generation = generation
            self.result = result

    class SimulationProgressed(Message):
        """The running simulation reached ``fraction`` (0..1) of its duration."""

        def __init__(self, fraction: float) -> None:
            super().__init__()
            self.fraction = fraction

    class ElasticProgressed(Message):
        """The elastic run asked for from the Surge view reached ``fraction`` (0..1)."""

        def __init__(self, fraction: float) -> None:
            super().__init__()
            self.fraction = fraction

    class ElasticFinished(Message):
        """An elastic run asked for from the Surge view ended."""

        def __init__(self, results: dict, system: Any, line_id: str, cancelled: bool) -> None:
            super().__init__()
            self.results = results
            self.system = system
            self.line_id = line_id
            self.cancelled = cancelled

    class SimulationFinished(Message):
        """A simulation ended (completed, stopped by an event, or cancelled)."""

        def __init__(self, result: Any, elastic: dict, system: Any, cancelled: bool) -> None:
            super().__init__()
            self.result = result
            self.elastic = elastic
            self.system = system
            self.cancelled = cancelled

    def __init__(
        self,
        project: Any = None,
        *,
        path: Path | None = None,
        offer_new: bool = False,
        unit_system: str | None = None,
        debounce: float = DEBOUNCE,
        prebuild_forms: bool = True,
        ahead: Any = None,
    ) -> None:
        super().__init__()
        if "TEXTUAL_ANIMATIONS" not in os.environ:
            # No sliding tab underline or other motion unless asked for: a view switch
            # drew ~20 frames instead of 2, CPU and bytes a busy server and a slow SSH
            # link do not have to spare (TEXTUAL_ANIMATIONS=full brings them back).
            self.animation_level = "none"
        self._ahead = ahead
        """The child process loading and solving ``path`` (``workbench.app.solve_ahead``)."""
        self._initial_project = project
        self._initial_path = Path(path) if path is not None else None
        self._offer_new = offer_new
        self._unit_override = unit_system
        self.debounce = debounce
        self.prebuild_forms = prebuild_forms
        self.history: History[Any] | None = None
        self.disk_hash: str | None = None
        self.transient_system: Any = None
        self.elastic_system: Any = None
        """The system the results in :attr:`elastic` were computed for."""
        self.elastic_line: str | None = None
        """The line of the elastic run asked for from the Surge view (running or last)."""
        self._generation = 0
        self._steady_timer = None
        self.recovery = RecoveryKeeper()
        """This workbench's copy of unsaved edits, and the offers of others' copies."""
        self._loading_path: Path | None = None

    def notify(self, message: str, *, title: str = "", severity="information",
               timeout: float | None = None, markup: bool = False) -> None:
        """Notifications carry file text (key paths, lists in brackets): no markup, and
        control characters shown escaped."""
        from workbench.printable import printable

        super().notify(printable(message, keep_lines=True), title=title, severity=severity,
                       timeout=timeout, markup=markup)

    def _refresh_notifications(self) -> None:
        super()._refresh_notifications()
        self.call_after_refresh(self._drop_empty_notice_holders)

    def _drop_empty_notice_holders(self) -> None:
        """Textual removes a cleared notice's toast but leaves its holder, which keeps its
        rows: after a few notices cleared at once the next ones crept down over a view's
        detail pane. Empty holders go."""
        try:
            holders = list(self.screen.query("ToastHolder"))
        except Exception:  # no screen yet, or one being replaced
            return
        for holder in holders:
            if not holder.children:
                holder.remove()

    def action_help_quit(self) -> None:
        """Ctrl+C: say how to quit in plain words (Textual's own reminder is markup, and
        notices here carry none, so it showed '[b]ctrl+q[/b]')."""
        self.notify("Press Ctrl+Q to quit the workbench", title="Do you want to quit?")

    # --- start-up ----------------------------------------------------------------------
    def get_default_screen(self):
        from workbench.app.screens.desk import DeskScreen

        return DeskScreen()

    def on_mount(self) -> None:
        if self._initial_project is not None:
            self.adopt(self._initial_project, self._initial_path or self._initial_project.path)
        elif self._initial_path is not None:
            # Start reading after the first frame is on screen, so the import of the
            # units and property libraries in the worker does not delay it.
            self.notify(f"loading {self._initial_path} …", timeout=2)
            self.hold_keys(limit=30.0)  # typed ahead of the load: answered once it shows
            self.call_after_refresh(self.load_worker, self._initial_path)
        elif self._offer_new:
            # asked at once, so that a key pressed as soon as the screen shows answers it
            self.recovery.offer_new(self, then=self._ask_new)

    def on_unmount(self) -> None:
        if self._ahead is not None:
            self._ahead.stop()
        self.recovery.close()

    def _ask_new(self) -> None:
        from workbench.app.screens.dialogs import AskScreen

        def answered(key: str | None) -> None:
            if key == "n":
                self.load_worker(None)
            elif key == "q":
                self.exit(0)

        self.push_screen(
            AskScreen(
                "No project file was given. Start a new project from the commented starter "
                "template? (It is saved only when you press Ctrl+S.)",
                [("n", "new project from the starter"), ("o", "open a file…"), ("q", "quit")],
                title="Open",
            ),
            lambda key: self.action_open() if key == "o" else answered(key),
        )

    @work(thread=True, exclusive=True, exit_on_error=False, group="load")
    def load_worker(self, path: Path | None) -> None:
        self._loading_path = path
        ahead = self._ahead  # stopped by on_unmount while it works; used once
        taken = ahead.take() if ahead is not None and ahead.path == path else None
        self._ahead = None
        if get_current_worker().is_cancelled:
            return  # the app is closing
        if taken is not None:  # read and solved in the child while the frame was drawn
            project, steady = taken
            self.post_message(self.ProjectLoaded(project, path, steady))
            return
        project = (jobs.load_starter(self._unit_override or "SI") if path is None
                   else jobs.load(path))
        self.post_message(self.ProjectLoaded(project, path))

    def on_workbench_app_project_loaded(self, message: ProjectLoaded) -> None:
        self.adopt(message.project, message.path, solved=message.steady)
        self.notify(f"opened {message.path}" if message.path else "new project from the starter",
                    timeout=3)
        # the System view releases the keys typed ahead once it shows the project

    def adopt(self, project: Any, path: Path | None, *, saved: bool = True,
              offer_recovery: bool = True, solved: Any = None) -> None:
        """Make ``project`` the open document with a fresh history (``saved``: as on disk;
        ``solved``: its steady result, already computed)."""
        self.history = History.start(project, saved=saved and path is not None)
        self.path = Path(path) if path is not None else None
        self.disk_hash = getattr(project, "loaded_hash", None) if path is not None else None
        if self.path is not None and self.disk_hash is None:
            self.disk_hash = jobs.file_hash(self.path)
        self.unit_system = self._unit_override or getattr(project, "unit_system", "SI") or "SI"
        self.transient = None
        self.elastic = None
        self.transient_system = None
        self.elastic_system = None
        self.elastic_status = "idle"
        self.run_status = "idle"
        self.run_progress = 0.0
        self.steady = None
        self._set_project(project, at_once=True, solved=solved)  # no pause for the first
        if offer_recovery:
            self.recovery.offer(self, self.path)  # unsaved edits of a session that died

    # --- edits -------------------------------------------------------------------------
    def apply_edit(self, change, *args: Any, label: str = "edit") -> Any:
        """Apply one document operation (``set_value``, ``add_element`` ...) to the project.

        Returns:
            The new project, or raises the project's ``ProjectError`` unchanged so the caller
            can show its problems beside the field; the model keeps its value then.
        """
        new = change(self.project, *args)
        self.history.push(new, label)
        self._set_project(new)
        return new

    def run_is_stale(self) -> bool:
        """True when the last run's results belong to another state of the project than
        the one on screen (an edit since, or an undo past it); False with no run."""
        if self.transient is None or self.project is None:
            return False
        return self.transient_system is not self.project.system

    def project_saved(self, project: Any) -> None:
        """Swap in the project as saved (same model, new path and hash); no re-solve."""
        self.set_reactive(WorkbenchApp.project, project)
        self.refresh_bindings()

    def _set_project(self, project: Any, *, at_once: bool = False, solved: Any = None) -> None:
        self.project = project
        self.modified = self.history.modified if self.history else False
        self.recovery.keep(self)  # unsaved edits kept beside the project until saved
        self.schedule_steady(at_once=at_once, solved=solved)
        self.refresh_bindings()

    def schedule_steady(self, *, at_once: bool = False, solved: Any = None) -> None:
        """Mark results stale and solve again once edits pause (newer edits win);
        ``at_once`` (a project just opened) starts without the pause; ``solved`` is the
        result of this very project, computed already (posted as a worker would)."""
        if self.project is None:
            return
        self._generation += 1
        self.workers.cancel_group(self, "steady")
        if self._steady_timer is not None:
            self._steady_timer.stop()
        self.steady_status = "stale"
        if solved is not None:
            self.post_message(self.SteadySolved(self._generation, solved))
            return
        self._steady_timer = self.set_timer(0.001 if at_once else self.debounce,
                                            self._start_steady)

    def _start_steady(self) -> None:
        self._steady_timer = None
        self.steady_status = "solving"
        self.steady_worker(self.project.system, self._generation)

    @work(thread=True, exclusive=True, exit_on_error=False, group="steady")
    def steady_worker(self, system: Any, generation: int) -> None:
        worker = get_current_worker()
        result = jobs.solve(system)
        if not worker.is_cancelled:
            self.post_message(self.SteadySolved(generation, result))

    def on_workbench_app_steady_solved(self, message: SteadySolved) -> None:
        if message.generation != self._generation:
            return  # an older edit's answer
        result = message.result
        self.steady = result
        if getattr(result, "success", True):
            self.steady_status = "fresh"
            self.steady_message = f"{getattr(result, 'iterations', '?')} iterations"
        else:
            self.steady_status = "failed"
            from workbench.output.common import finding_message

            self.steady_message = (finding_message(result, self.unit_system)
                                   if hasattr(result, "message") else "no solution")

    # --- simulation --------------------------------------------------------------------
    def action_simulate(self) -> None:
        if self.project is None or self.run_status == "running":
            return
        self.run_status = "running"
        self.run_progress = 0.0
        self.call_later(self.action_view, "run")
        from workbench.app.measurement_overlay import gauged_junctions

        self.simulation_worker(self.project.system, bool(gauged_junctions(self.project)))
        self.refresh_bindings()

    @work(thread=True, exclusive=True, exit_on_error=False, group="simulation")
    def simulation_worker(self, system: Any, junction_pressures: bool = False) -> None:
        worker = get_current_worker()
        last = [-1.0]

        def progress(fraction: float) -> None:
            if fraction - last[0] >= 0.005 or fraction >= 1.0:
                last[0] = fraction
                self.post_message(self.SimulationProgressed(float(fraction)))

        result, elastic = jobs.simulate(system, progress, lambda: worker.is_cancelled,
                                        junction_pressures)
        self.post_message(self.SimulationFinished(result, elastic, system, worker.is_cancelled))

    def on_workbench_app_simulation_progressed(self, message: SimulationProgressed) -> None:
        if self.run_status == "running":
            self.run_progress = message.fraction

    def on_workbench_app_simulation_finished(self, message: SimulationFinished) -> None:
        self.transient_system = message.system
        self.elastic_system = message.system
        self.elastic = message.elastic
        self.transient = message.result
        if message.cancelled:
            self.run_status = "cancelled"
        elif getattr(message.result, "success", True):
            self.run_status = "done"
            self.run_progress = 1.0
        else:
            self.run_status = "failed"
            self.notify(str(getattr(message.result, "message", "simulation failed")),
                        title="Simulation", severity="error", timeout=8)
        self.refresh_bindings()

    def action_stop_run(self) -> None:
        if self.run_status == "running":
            self.workers.cancel_group(self, "simulation")
            self.run_status = "cancelled"
            self.notify("simulation stopped")
            self.refresh_bindings()
        if self.elastic_status == "running":
            self.workers.cancel_group(self, "elastic")
            self.elastic_status = "cancelled"
            self.notify("elastic run stopped")
            self.refresh_bindings()

    # --- elastic run of one line, from the Surge view ----------------------------------
    def action_elastic_run(self, line_id: str | None) -> None:
        """Run the method of characteristics on a line's chain, as ``--elastic LINE`` does."""
        if self.project is None or self.elastic_status == "running" or not line_id:
            return
        if line_id not in self.project.system.lines:
            return
        self.elastic_line = line_id
        self.elastic_progress = 0.0
        self.elastic_status = "running"
        self.elastic_worker(self.project.system, line_id)
        self.refresh_bindings()

    @work(thread=True, exclusive=True, exit_on_error=False, group="elastic")
    def elastic_worker(self, system: Any, line_id: str) -> None:
        worker = get_current_worker()
        last = [-1.0]

        def progress(fraction: float) -> None:
            if fraction - last[0] >= 0.01 or fraction >= 1.0:
                last[0] = fraction
                self.post_message(self.ElasticProgressed(float(fraction)))

        results = jobs.elastic(system, line_id, progress, lambda: worker.is_cancelled)
        self.post_message(self.ElasticFinished(results, system, line_id, worker.is_cancelled))

    def on_workbench_app_elastic_progressed(self, message: ElasticProgressed) -> None:
        if self.elastic_status == "running":
            self.elastic_progress = message.fraction

    def on_workbench_app_elastic_finished(self, message: ElasticFinished) -> None:
        if message.cancelled or self.elastic_status != "running":
            return
        # keep the other lines' results only when they were computed for the same system
        merged = dict(self.elastic or {}) if self.elastic_system is message.system else {}
        merged.update(message.results)
        self.elastic_system = message.system
        self.elastic = merged
        result = message.results.get(message.line_id)
        ok = result is not None and result.success
        self.elastic_status = "done" if ok else "failed"
        if not ok:
            text = getattr(result, "message", "no result")
            self.notify(str(text), title="Elastic run", severity="error", timeout=10)
        self.refresh_bindings()

    # --- the one place worker failures become words ------------------------------------
    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        worker = event.worker
        if event.state != WorkerState.ERROR:
            return
        text = jobs.explain(worker.error)
        if worker.group == "steady":
            self.steady_status = "failed"
            self.steady_message = text.splitlines()[0] if text else "failed"
        elif worker.group == "simulation":
            self.run_status = "failed"
            self.refresh_bindings()
        elif worker.group == "elastic":
            self.elastic_status = "failed"
            self.refresh_bindings()
        elif worker.group == "load" and self.project is None:
            self.drop_keys()  # typed for a project that did not open: not for the dialog
            if not self.recovery.offer_after_failed_load(
                    self, self._loading_path, text, lambda: self._show_load_problems(text)):
                self._show_load_problems(text)
            return
        title = {"steady": "Steady solve", "simulation": "Simulation", "load": "Open",
                 "elastic": "Elastic run"}.get(
            worker.group, "Background work")
        self.notify(text, title=title, severity="error", timeout=10)

    def _show_load_problems(self, text: str) -> None:
        from workbench.app.screens.dialogs import AskScreen

        def answered(key: str | None) -> None:
            if key == "o":
                self.action_open()
            else:
                self.exit(1)

        self.push_screen(
            AskScreen(f"The project could not be opened:\n\n{text}",
                      [("o", "open another file…"), ("q", "quit")], title="Problems"),
            answered,
        )

    # --- actions -----------------------------------------------------------------------
    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """Grey out what cannot run now (``None`` shows the key dimmed)."""
        has_project = self.project is not None
        if action == "undo":
            return bool(self.history and self.history.can_undo) or None
        if action == "redo":
            return bool(self.history and self.history.can_redo) or None
        if action == "save":
            return has_project or None
        if action == "simulate":
            ready = has_project and getattr(self.project.system, "simulation", None) is not None
            return (ready and self.run_status != "running") or None
        if action == "toggle_units":
            return has_project or None
        if action == "stop_run":
            return (self.run_status == "running" or self.elastic_status == "running") or None
        return True

    async def action_view(self, name: str) -> None:
        from workbench.app.screens.desk import DeskScreen

        if isinstance(self.screen, DeskScreen):
            self.hold_keys(limit=10.0)  # keys typed meanwhile belong to the view shown
            try:
                await self.screen.show_view(name)
            finally:
                self.call_after_refresh(self.release_keys)

    async def _push_holding_keys(self, screen) -> None:
        """Push ``screen`` holding the keys typed meanwhile (a key path typed right after
        F9 goes into the sweep's first field, not to the view behind it or nowhere)."""
        if type(self.screen) is type(screen):
            close = getattr(self.screen, "action_close", None)
            if close is not None:
                close()  # F1 and F8 close their screens again
            return  # the sweep stays (F9 pressed again on it)
        self.hold_keys()
        try:
            await self.push_screen(screen)
        finally:
            self.call_after_refresh(self.release_keys)

    async def action_keys(self) -> None:
        from workbench.app.screens.keys import KeysScreen, key_contexts

        await self._push_holding_keys(KeysScreen(key_contexts(type(self))))

    async def action_cautions(self) -> None:
        from workbench.app.screens.cautions import CautionsScreen

        await self._push_holding_keys(CautionsScreen())

    async def action_sweep(self) -> None:
        from workbench.app.screens.sweep import SweepScreen

        if self.project is not None:
            await self._push_holding_keys(SweepScreen())

    def action_calibrate(self) -> None:
        from workbench.app.screens.calibrate import CalibrateScreen

        if self.project is not None and not isinstance(self.screen, CalibrateScreen):
            self.hold_keys()  # keys typed while the view is built go to it (it releases them)
            self.push_screen(CalibrateScreen())

    def action_toggle_units(self) -> None:
        self.unit_system = "US" if self.unit_system == "SI" else "SI"
        self.notify(f"showing {self.unit_system} units (the file is unchanged)", timeout=2)

    def action_undo(self) -> None:
        if self.history and self.history.can_undo:
            project, label = self.history.undo()
            self._set_project(project)
            self.notify(f"undid: {label}", timeout=2)

    def action_redo(self) -> None:
        if self.history and self.history.can_redo:
            project, label = self.history.redo()
            self._set_project(project)
            self.notify(f"redid: {label}", timeout=2)

    def action_save(self) -> None:
        from workbench.app import files

        files.save(self)

    def action_save_as(self) -> None:
        from workbench.app import files

        files.save(self, ask_name=True)

    def action_open(self) -> None:
        from workbench.app import files

        files.open_other(self)

    async def action_quit(self) -> None:
        from workbench.app import files

        # a screen holding work not yet in the project (the list editor) asks about it first
        guard = getattr(self.screen, "before_leaving", None)
        if guard is not None:
            guard(lambda: files.leave(self))
            return
        files.leave(self)
