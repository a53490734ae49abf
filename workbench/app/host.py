"""What the app's helper modules need of the app: a small protocol, not the app class.

:mod:`workbench.app.files` (saving, opening, leaving) and :mod:`workbench.app.recovery_copy`
(the copy of unsaved edits) work on the open document the app owns. They are given the app
as a :class:`DocumentHost` and never import :mod:`workbench.app.app`, so the app imports
its helpers and no helper reaches back up into it.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import Any, Protocol


class DocumentHost(Protocol):
    """The open document and the few app services the file helpers call."""

    project: Any
    """The current ``Project`` (``None`` until one is loaded)."""
    path: Path | None
    """The project file, ``None`` for a project never saved."""
    modified: bool
    """True while there are unsaved edits."""
    disk_hash: str | None
    """sha256 of the project file as loaded or last saved."""
    history: Any
    """The undo history (``History``)."""
    recovery: Any
    """The app's ``RecoveryKeeper`` (its copy of unsaved edits)."""

    def notify(self, message: str, *, title: str = "", severity: str = "information",
               timeout: float | None = None) -> None:
        """Show a short notice."""

    def push_screen(self, screen: Any, callback: Callable[[Any], None] | None = None) -> Any:
        """Show a modal question; ``callback`` gets the answer."""

    def apply_edit(self, change: Callable[..., Any], *args: Any, label: str = "edit") -> Any:
        """Apply one document operation as an undoable edit."""

    def adopt(self, project: Any, path: Path | None, *, saved: bool = True,
              offer_recovery: bool = True) -> None:
        """Make ``project`` the open document with a fresh history."""

    def load_worker(self, path: Path | None) -> Any:
        """Read a project file in the background (``None``: the starter)."""

    def project_saved(self, project: Any) -> None:
        """Swap in the project as saved (same model, new path and hash)."""

    def action_open(self) -> None:
        """Ask for another project file to open."""

    def exit(self, result: Any = None) -> None:
        """End the app."""
