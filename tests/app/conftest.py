"""Helpers for driving the real workbench at 80x24 with Textual's pilot."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
import pytest_asyncio

PROJECTS = Path(__file__).resolve().parents[2] / "projects"
SIZE = (80, 24)

#: A demo project with one tank-to-tank line through a valve, and comments in it.
TRANSFER = "fellgate_process_water_transfer.toml"
#: The network demo: two sources, a junction, a line over a high point.
NETWORK = "fellgate_cooling_water_network.toml"


@pytest.fixture(autouse=True)
def private_state_folder(tmp_path: Path, monkeypatch):
    """Recovery copies of new projects go to a folder of the test's own, never the user's."""
    monkeypatch.setenv("WORKBENCH_STATE_DIR", str(tmp_path / "state"))


@pytest.fixture
def project_file(tmp_path: Path):
    """Copy a demo project into tmp_path (tests never touch the real demo files)."""

    def copy(name: str = TRANSFER) -> Path:
        target = tmp_path / name
        shutil.copy(PROJECTS / name, target)
        return target

    return copy


def make(path: Path, **kwargs):
    """The app as the CLI builds it, around an already loaded project."""
    from workbench.app.factory import make_app
    from workbench.project.document import load_project

    kwargs.setdefault("debounce", 0.05)
    kwargs.setdefault("prebuild_forms", False)
    return make_app(load_project(path), path=path, **kwargs)


async def settle(pilot, *, timeout: float = 30.0) -> None:
    """Wait until no steady solve is pending or running and the forms are built."""
    app = pilot.app
    waited = 0.0
    while waited < timeout:
        await pilot.pause()
        await app.workers.wait_for_complete()
        forms_ready = all(pane.prebuilt for pane in app.screen.query("SystemPane"))
        forms_ready = forms_ready and getattr(app.screen, "views_built", True)
        if (app.steady_status in {"fresh", "failed"} and app._steady_timer is None
                and forms_ready):
            await pilot.pause()
            return
        await pilot.pause(0.05)
        waited += 0.05
    raise AssertionError(f"steady solve never settled (status {app.steady_status})")


def table_cells(app, selector: str) -> list[list[str]]:
    """The text of every row of a DataTable, as shown."""
    from textual.widgets import DataTable

    table = app.screen.query_one(selector, DataTable)
    return [[str(c) for c in table.get_row_at(i)] for i in range(table.row_count)]


def field_input(app, keypath: str):
    from workbench.app.panes.form import FieldInput

    for widget in app.screen.query(FieldInput):
        if widget.field.keypath == keypath:
            return widget
    raise AssertionError(f"no field {keypath} on screen")


async def choose_entry(pilot, key: str) -> None:
    """Highlight ``key`` ("lines:L1") in the element list, as Up/Down do, and wait until
    its form is shown. It moves there at once, not row by row: the rows between would each
    show their form, which the test does not look at (tests of the keys press them)."""
    from workbench.app.panes.elements import ElementList
    from workbench.app.panes.form import FieldForm

    elements = pilot.app.screen.query_one(ElementList)
    elements.focus()
    keys = [elements.get_option_at_index(i).id for i in range(elements.option_count)]
    if key not in keys:
        raise AssertionError(f"{key} is not in the element list")
    elements.highlighted = keys.index(key)
    form = pilot.app.screen.query_one(FieldForm)
    for _ in range(200):
        await pilot.pause()
        if (elements.entry is not None and elements.entry.key == key
                and form.entry is not None and form.entry.key == key):
            break
    else:
        raise AssertionError(f"the form of {key} was never shown")
    await pilot.pause()


async def type_into(pilot, keypath: str, text: str, enter: bool = True) -> None:
    """Focus a field, clear it with keys, type ``text`` and (unless told not to) press Enter."""
    widget = field_input(pilot.app, keypath)
    widget.focus()
    await pilot.pause()
    await pilot.press("end", "ctrl+u")
    await pilot.press(*["space" if c == " " else c for c in text])
    if enter:
        await pilot.press("enter")
        await pilot.pause()


async def run_to_end(pilot) -> None:
    """Ctrl+R (simulate) and wait until the run's worker is done and its result is shown."""
    await pilot.press("ctrl+r")
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


async def run_elastic_in_the_surge_view(pilot, *keys: str) -> None:
    """F10 (the Surge view), then ``keys`` (``"down", "e"``: the next line, run it), and
    wait until the elastic run's worker is done."""
    await pilot.press("f10")
    await pilot.pause()
    await pilot.press(*keys)
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


# --- one started app shared by the tests of a module --------------------------------------
#
# Starting the app and waiting for its first result costs about 1.5 s of CPU, and a form
# is composed the first time it is shown. Tests that only read (they look, move the focus,
# type and take it back with Esc, open a view or a dialog and close it) can drive one app
# that was started once per module and per pytest-xdist worker (with every form built, if
# the module visits many).
# Rules (SharedApp.left_dirty checks them after each test, and a test that breaks one
# gets a fresh app for the next test, so no test depends on what ran before it):
#   - the test puts the app where it needs it (choose_entry, a view key): it is handed
#     over on the System view with the focus on the element list;
#   - it applies no edit (an applied edit fails the test: it belongs on its own app);
#   - whatever else it changes (a dialog left open, a value typed and not applied, a
#     folded heading, a run, the display units) makes the app be started afresh.
# Tests that edit, save, quit or watch the start-up keep their own app (make(...)).


class SharedApp:
    """A started app, held open in a task of its own (the one that entered
    ``run_test`` must leave it), that the tests of one module drive in turn."""

    def __init__(self, source: Path, folder: Path, **kwargs) -> None:
        self.source = source
        self.folder = folder
        self.path: Path | None = None
        self.kwargs = kwargs
        self.pilot = None
        self.starts = 0
        self._task = None
        self._stop = None
        self._initial: dict = {}

    async def start(self) -> None:
        import asyncio

        # a fresh copy each time: an app stopped with edits leaves its recovery copy beside
        # the file, which the next start would offer
        self.path = self.folder / f"start-{self.starts + 1}" / self.source.name
        self.path.parent.mkdir(parents=True, exist_ok=True)
        shutil.copy(self.source, self.path)
        app = make(self.path, **self.kwargs)
        ready, self._stop = asyncio.Event(), asyncio.Event()

        async def hold() -> None:
            async with app.run_test(size=SIZE) as pilot:
                self.pilot = pilot
                ready.set()
                await self._stop.wait()

        self._task = asyncio.create_task(hold(), name=f"shared app {self.source.name}")
        waiting = asyncio.create_task(ready.wait())
        await asyncio.wait({self._task, waiting}, return_when=asyncio.FIRST_COMPLETED)
        if not ready.is_set():
            waiting.cancel()
            self._task.result()  # raises what stopped the app
        await settle(self.pilot)
        self.starts += 1
        self._initial = self._state()

    async def stop(self) -> None:
        if self._task is not None:
            self._stop.set()
            task, self._task, self.pilot = self._task, None, None
            await task

    def stopped(self) -> bool:
        return self._task is None or self._task.done() or self.pilot is None

    def _state(self) -> dict:
        app = self.pilot.app
        return {"steady": app.steady_status, "run": app.run_status,
                "elastic": app.elastic_status, "units": app.unit_system}

    def edits(self) -> str:
        """What was applied to the project since it was opened ("" when nothing)."""
        app = self.pilot.app
        history = app.history
        if history is None:
            return "no project"
        if history.can_undo or history.can_redo or history.modified or app.modified:
            return "edits applied: " + ", ".join(history.labels[1:])
        return ""

    def left_dirty(self) -> list[str]:
        """Why this app cannot be handed to the next test as it is ([] when it can)."""
        from workbench.app.panes.form import FieldRow, GroupHeading, value_text
        from workbench.app.screens.desk import DeskScreen

        if self.stopped():
            return ["the app has stopped"]
        app = self.pilot.app
        reasons = [text for text in (self.edits(),) if text]
        if not isinstance(app.screen, DeskScreen):
            reasons.append(f"{type(app.screen).__name__} left open")
        if any(not worker.is_finished for worker in app.workers):
            reasons.append("a worker still running")
        state = self._state()
        reasons += [f"{key} is {state[key]}, was {value}"
                    for key, value in self._initial.items() if state[key] != value]
        for row in app.screen.query(FieldRow):
            editor = row.editor
            typed = getattr(editor, "value", None)
            if row.problem or (isinstance(typed, str) and typed != value_text(row.stored)):
                reasons.append(f"{row.field.keypath} typed and not applied")
        if any(heading.folded for heading in app.screen.query(GroupHeading)):
            reasons.append("a heading left folded")
        return reasons

    async def hand_over(self):
        """The pilot of a clean app on the System view, the element list focused."""
        from textual.widgets import TabbedContent

        from workbench.app.panes.elements import ElementList
        from workbench.app.panes.form import FieldForm

        if self.pilot is None or self.left_dirty():
            await self.stop()
            await self.start()
        pilot = self.pilot
        # the fixture and the test run in tasks of their own: make the app the active one
        # there too (a widget drawn or scrolled from them asks for it); pytest-asyncio
        # carries the fixture's context over to the test
        from textual.app import active_app  # the app module's own name for it

        active_app.set(pilot.app)
        if pilot.app.screen.query_one(TabbedContent).active != "system":
            await pilot.press("f2")
        # the first row highlighted and its form shown from the top, as at the start
        elements = pilot.app.screen.query_one(ElementList)
        await choose_entry(pilot, elements.get_option_at_index(0).id)
        form = pilot.app.screen.query_one(FieldForm)
        form.scroll_home(animate=False)
        await pilot.pause()
        assert form.scroll_y == 0 and pilot.app.focused is elements
        return pilot


@pytest_asyncio.fixture(scope="module", loop_scope="module")
async def shared_apps(tmp_path_factory):
    """The module's shared apps, by demo name, started when first asked for."""
    folder = tmp_path_factory.mktemp("shared")
    patch = pytest.MonkeyPatch()
    patch.setenv("WORKBENCH_STATE_DIR", str(folder / "state"))
    apps: dict[str, SharedApp] = {}

    def get(name: str, **kwargs) -> SharedApp:
        if name not in apps:
            apps[name] = SharedApp(PROJECTS / name, folder / name.removesuffix(".toml"), **kwargs)
        return apps[name]

    yield get
    for shared in apps.values():
        await shared.stop()
    patch.undo()


def shared_app(*names: str, prebuild_forms: bool = True):
    """A fixture handing the module's shared app of demo ``names[0]`` to a test, or, given
    several names, parametrized over them (the tests that use it carry ``SHARED_LOOP``).
    ``prebuild_forms``: build every form at the start (worth it when the module's tests
    visit many forms; one form is built faster when first shown)."""

    several = len(names) > 1

    @pytest_asyncio.fixture(loop_scope="module", params=names if several else None,
                            ids=[n.removesuffix(".toml") for n in names] if several else None)
    async def handed(shared_apps, request):
        shared = shared_apps(getattr(request, "param", names[0]), prebuild_forms=prebuild_forms)
        pilot = await shared.hand_over()
        yield pilot
        if shared.stopped():
            await shared.stop()  # the app ended during this test: what ended it is raised here
            return
        applied = shared.edits()
        if applied:
            await shared.stop()
            pytest.fail(f"a test on the shared app must not edit ({applied}); give it its own")

    return handed


#: The mark of a test that uses a shared app (or `pytestmark = SHARED_LOOP` in a module of
#: async tests only): the test runs in the module's event loop, where the shared apps run.
SHARED_LOOP = pytest.mark.asyncio(loop_scope="module")
