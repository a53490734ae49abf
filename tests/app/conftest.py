"""Helpers for driving the real workbench at 80x24 with Textual's pilot."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

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
    """Move the element list to ``key`` ("lines:L1") with the arrow keys."""
    from workbench.app.panes.elements import ElementList

    elements = pilot.app.screen.query_one(ElementList)
    elements.focus()
    await pilot.press("home")
    for _ in range(elements.option_count):
        if elements.entry is not None and elements.entry.key == key:
            await pilot.pause()
            return
        await pilot.press("down")
    raise AssertionError(f"{key} is not in the element list")


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


async def run_elastic_in_the_surge_view(pilot, *keys: str) -> None:
    """F10 (the Surge view), then ``keys`` (``"down", "e"``: the next line, run it), and
    wait until the elastic run's worker is done."""
    await pilot.press("f10")
    await pilot.pause()
    await pilot.press(*keys)
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()
