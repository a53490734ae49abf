"""Saving, opening and leaving: the questions asked before anything is lost.

Plain functions over the app, so the rules read in one place:

* a save writes atomically through the project layer and keeps the user's comments;
  through a symbolic link it writes the file the link points to, and says so;
* if the file changed on disk since it was loaded (or last saved), or is read-only, say so
  before overwriting it;
* quitting or opening another file with unsaved edits asks first.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from workbench.app import jobs
from workbench.app.host import DocumentHost
from workbench.app.screens.dialogs import AskScreen, TextScreen

DEFAULT_NEW_NAME = "new-system.toml"


def save(app: DocumentHost, ask_name: bool = False, then: Callable[[], None] | None = None) -> None:
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


def _save_checked(app: DocumentHost, path: Path, then: Callable[[], None] | None) -> None:
    """Save to ``path``, first asking if someone else changed the file since we read it."""
    now = jobs.file_hash(path)
    expected = app.disk_hash if path == app.path else None
    if now is not None and now != expected:
        why = ("changed on disk since it was loaded" if path == app.path
               else "already exists")
        app.push_screen(
            AskScreen(f"{path} {why}. Overwrite it with the version open here?",
                      [("o", "overwrite"), ("c", "cancel")], title="File changed"),
            lambda key: _write_unless_read_only(app, path, then) if key == "o" else None,
        )
        return
    _write_unless_read_only(app, path, then)


def _write_unless_read_only(app: DocumentHost, path: Path,
                            then: Callable[[], None] | None) -> None:
    """Save, first asking before replacing a read-only file."""
    from workbench.project.save import is_read_only, written_path

    if not is_read_only(path):
        _write(app, path, then)
        return
    real = written_path(path)
    app.push_screen(
        AskScreen(f"{real} is read-only (someone may have protected it on purpose). Replace "
                  "it anyway with the version open here? It stays read-only.",
                  [("r", "replace the read-only file"), ("a", "save under another name…"),
                   ("c", "cancel")], title="Read-only file"),
        lambda key: (_write(app, path, then, replace_read_only=True) if key == "r"
                     else save(app, ask_name=True, then=then) if key == "a" else None),
    )


def _write(app: DocumentHost, path: Path, then: Callable[[], None] | None, *,
           replace_read_only: bool = False) -> None:
    from workbench.project.document import save_project
    from workbench.project.save import link_note

    try:
        saved = save_project(app.project, path, replace_read_only=replace_read_only)
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
    app.recovery.saved(app, old_path)
    app.project_saved(saved)
    app.notify(f"saved {path}{link_note(path)}", timeout=3 if not link_note(path) else 6)
    if then is not None:
        then()


def guard_unsaved(app: DocumentHost, doing: str, proceed: Callable[[], None]) -> None:
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


def leave(app: DocumentHost) -> None:
    """Quit, asking first about unsaved edits."""
    def quit_cleanly() -> None:
        app.recovery.quitting(app)
        app.exit(0)

    guard_unsaved(app, "quit", quit_cleanly)


def open_other(app: DocumentHost) -> None:
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
