"""The workbench's recovery copy of unsaved edits: kept, dropped, and offered back.

Plain functions over the app (like :mod:`workbench.app.files`), built on
:mod:`workbench.project.recovery`:

* :func:`keep` -- after every change of the open document: while it has unsaved edits,
  their text is kept in a hidden file beside the project; once nothing is unsaved again
  (undo back to the saved state), the copy this session wrote is removed;
* :func:`saved` and :func:`quitting` -- a clean save or quit removes the copy;
* :func:`offer` -- when a project is opened and a copy from an earlier session is found
  (that session crashed or was killed), ask whether to take the edits back.

Only copies this session wrote are removed without asking; a copy found at open is
removed only when the user drops it or takes it back and saves.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from workbench.app.app import WorkbenchApp

#: Attribute set on the app while it has a recovery copy of its own on disk.
_WRITTEN = "_recovery_copy_written"


def keep(app: "WorkbenchApp") -> None:
    """Write (or remove) the recovery copy to match the document's unsaved state."""
    from workbench.project.recovery import remove_recovery, write_recovery

    path, project = app.path, app.project
    if path is None or project is None:
        return
    try:
        if app.modified:
            write_recovery(path, project.text, app.disk_hash)
            setattr(app, _WRITTEN, True)
        elif getattr(app, _WRITTEN, False):
            remove_recovery(path)
            setattr(app, _WRITTEN, False)
    except Exception as error:  # noqa: BLE001 - a copy that cannot be kept must not stop editing
        if not getattr(app, "_recovery_copy_warned", False):
            from workbench.app import jobs

            app._recovery_copy_warned = True
            app.notify(f"unsaved edits cannot be kept in a recovery copy: {jobs.explain(error)}",
                       title="Recovery copy", severity="warning", timeout=8)


def saved(app: "WorkbenchApp", old_path: Path | None) -> None:
    """After a clean save: the copy of the edits just saved is no longer needed."""
    from workbench.project.recovery import remove_recovery

    for path in {old_path, app.path} - {None}:
        if getattr(app, _WRITTEN, False) or path == old_path:
            remove_recovery(path)
    setattr(app, _WRITTEN, False)


def quitting(app: "WorkbenchApp") -> None:
    """On a clean quit (edits saved, or discarded by the user): remove this session's copy."""
    from workbench.project.recovery import remove_recovery

    if app.path is not None and getattr(app, _WRITTEN, False):
        remove_recovery(app.path)
        setattr(app, _WRITTEN, False)


def offer(app: "WorkbenchApp", path: Path | None) -> None:
    """If unsaved edits of an earlier session were kept beside ``path``, offer them back."""
    from workbench.project.recovery import find_recovery, remove_recovery

    if path is None:
        return
    found = find_recovery(path)
    if found is None:
        return
    from workbench.app.screens.dialogs import AskScreen

    def answered(key: Any) -> None:
        if key == "r":
            restore(app, found)
        elif key == "d":
            remove_recovery(path)
            app.notify(f"dropped the edits kept in {found.path.name}", timeout=4)

    app.push_screen(
        AskScreen(f"Unsaved edits found: {found.describe()}. Take them back? (They stay "
                  "unsaved until you save; undo returns to the file as saved.)",
                  [("r", "restore the unsaved edits"), ("d", "drop them (delete the copy)"),
                   ("k", "keep the copy for later; open the file as saved")],
                  title="Recover unsaved edits"),
        answered,
    )


def restore(app: "WorkbenchApp", found) -> None:
    """Make the recovered edits the current state, as one undoable edit."""
    from workbench.app import jobs
    from workbench.project.recovery import recover_project

    try:
        recovered = recover_project(found)
    except Exception as error:  # noqa: BLE001 - shown to the user in words
        app.notify(jobs.explain(error), title="Recovery copy refused", severity="error",
                   timeout=10)
        return
    app.apply_edit(lambda _project: recovered, label="restore unsaved edits")
    setattr(app, _WRITTEN, True)  # the copy now holds this session's edits
    app.notify(f"restored the unsaved edits from {found.path.name}", timeout=4)
