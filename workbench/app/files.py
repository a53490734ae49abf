"""Saving, opening and leaving: the questions asked before anything is lost.

Plain functions over the app, so the rules read in one place:

* a save writes atomically through the project layer and keeps the user's comments;
* if the file changed on disk since it was loaded (or last saved), say so before
  overwriting it;
* quitting or opening another file with unsaved edits asks first.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

from workbench.app import jobs, recovery_copy
from workbench.app.screens.dialogs import AskScreen, TextScreen

if TYPE_CHECKING:
    from workbench.app.app import WorkbenchApp

DEFAULT_NEW_NAME = "new-system.toml"


def save(app: "WorkbenchApp", ask_name: bool = False, then: Callable[[], None] | None = None) -> None:
    """Save the project, asking for a file name when it has none (or when asked to)."""
    if app.project is None:
        return
    if app.path is None or ask_name:
        app.push_screen(
            TextScreen("Save as (a .toml file):", str(app.path or DEFAULT_NEW_NAME),
                       check=_check_new_path, title="Save"),
            lambda text: _save_checked(app, Path(text), then) if text else None,
        )
        return
    _save_checked(app, app.path, then)


def _check_new_path(text: str) -> str:
    if not text:
        return "type a file name"
    path = Path(text).expanduser()
    if path.suffix != ".toml":
        return "the name must end in .toml"
    if not path.parent.exists():
        return f"folder {path.parent} does not exist"
    return ""


def _save_checked(app: "WorkbenchApp", path: Path, then: Callable[[], None] | None) -> None:
    """Save to ``path``, first asking if someone else changed the file since we read it."""
    now = jobs.file_hash(path)
    expected = app.disk_hash if path == app.path else None
    if now is not None and now != expected:
        why = ("changed on disk since it was loaded" if path == app.path
               else "already exists")
        app.push_screen(
            AskScreen(f"{path} {why}. Overwrite it with the version open here?",
                      [("o", "overwrite"), ("c", "cancel")], title="File changed"),
            lambda key: _write(app, path, then) if key == "o" else None,
        )
        return
    _write(app, path, then)


def _write(app: "WorkbenchApp", path: Path, then: Callable[[], None] | None) -> None:
    from workbench.project.document import save_project

    try:
        saved = save_project(app.project, path)
    except Exception as error:  # noqa: BLE001 - shown to the user in words
        app.notify(jobs.explain(error), title="Save failed", severity="error", timeout=10)
        return
    # The saved project is the same model with its new path and hash: it replaces the
    # current snapshot so later edits and saves carry them.
    history = app.history
    history.snapshots[history.index] = saved
    history.mark_saved()
    old_path = app.path
    app.path = Path(path)
    app.disk_hash = jobs.file_hash(path)
    app.modified = False
    recovery_copy.saved(app, old_path)
    app.project_saved(saved)
    app.notify(f"saved {path}", timeout=3)
    if then is not None:
        then()


def guard_unsaved(app: "WorkbenchApp", doing: str, proceed: Callable[[], None]) -> None:
    """Run ``proceed`` now, or after asking what to do with unsaved edits."""
    if not app.modified:
        proceed()
        return
    name = app.path.name if app.path else "the new project"

    def answered(key: str | None) -> None:
        if key == "s":
            save(app, then=proceed)
        elif key == "d":
            proceed()

    app.push_screen(
        AskScreen(f"{name} has unsaved edits. Save them before you {doing}?",
                  [("s", "save, then " + doing), ("d", "discard the edits and " + doing),
                   ("c", "cancel: keep working")], title="Unsaved edits"),
        answered,
    )


def leave(app: "WorkbenchApp") -> None:
    """Quit, asking first about unsaved edits."""
    def quit_cleanly() -> None:
        recovery_copy.quitting(app)
        app.exit(0)

    guard_unsaved(app, "quit", quit_cleanly)


def open_other(app: "WorkbenchApp") -> None:
    """Open another project file, asking first about unsaved edits."""

    def ask_path() -> None:
        start = str(app.path.parent) + "/" if app.path else ""
        app.push_screen(
            TextScreen("Open project file:", start, check=_check_existing, title="Open"),
            lambda text: app.load_worker(Path(text).expanduser()) if text else None,
        )

    guard_unsaved(app, "open another file", ask_path)


def _check_existing(text: str) -> str:
    path = Path(text).expanduser()
    if not path.is_file():
        return f"no file {path}"
    return ""
