"""Recovery copies: unsaved edits kept beside the project, so a crash never loses work.

While a project has unsaved edits the terminal workbench keeps their text in a hidden file
beside the project (``plant.toml`` -> ``.plant.recovery.toml``), written atomically after
each edit. A clean save or a quit removes it. If the program dies instead (a crash, a lost
SSH session, a killed process), the copy is still there when the project is next opened,
and the user is offered the edits back.

The copy is a project file with a short comment header naming the project and the
sha256 of the project file the edits started from, so the offer can say whether the file
on disk changed since (someone else saved, or a merge landed).

This module does file I/O and imports nothing heavy.
"""

from __future__ import annotations

import hashlib
import os
import re
import time
from dataclasses import dataclass
from pathlib import Path

from workbench.project.problems import Problem, ProjectError

__all__ = [
    "Recovery",
    "find_recovery",
    "recover_project",
    "recovery_path",
    "remove_recovery",
    "write_recovery",
]

_HEADER = "# workbench recovery copy"
_BASE = re.compile(r"^# base-sha256: ([0-9a-f]{64}|none)\s*$", re.M)
_WHEN = re.compile(r"^# written: (\d+(?:\.\d+)?)\s*$", re.M)


@dataclass(frozen=True)
class Recovery:
    """A recovery copy found beside a project."""

    path: Path
    """The hidden recovery file."""
    project_path: Path
    """The project file it belongs to."""
    text: str
    """The unsaved document text (without the recovery header)."""
    written: float
    """When the copy was written [s since the epoch]."""
    base_hash: str | None
    """sha256 of the project file the edits started from; ``None`` for a new file."""
    disk_hash: str | None
    """sha256 of the project file on disk now; ``None`` when it does not exist."""

    @property
    def disk_changed(self) -> bool:
        """True when the project file on disk is not the one the edits started from."""
        return self.base_hash != self.disk_hash

    def describe(self) -> str:
        """One sentence for the offer to the user."""
        when = time.strftime("%Y-%m-%d %H:%M", time.localtime(self.written))
        text = f"unsaved edits to {self.project_path.name} from {when} were kept in {self.path.name}"
        if self.disk_changed:
            text += "; the project file has changed on disk since those edits began"
        return text


def recovery_path(project_path: str | os.PathLike) -> Path:
    """The hidden recovery file of a project: ``plant.toml`` -> ``.plant.recovery.toml``."""
    path = Path(project_path)
    return path.with_name(f".{path.stem}.recovery.toml")


def _sha256_of_file(path: Path) -> str | None:
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except (FileNotFoundError, IsADirectoryError):
        return None


def write_recovery(project_path: str | os.PathLike, text: str, base_hash: str | None) -> Path:
    """Keep ``text`` (the document with unsaved edits) beside the project, atomically.

    Parameters
    ----------
    project_path : path
        The project file the edits belong to.
    text : str
        The whole document text as edited.
    base_hash : str or None
        sha256 (hex) of the project file as loaded, ``None`` for a file not yet saved.

    Returns
    -------
    Path
        The recovery file.

    Raises
    ------
    ProjectError
        When the copy cannot be written (the message names the recovery file).
    """
    from workbench.project.save import atomic_write

    target = recovery_path(project_path)
    header = (f"{_HEADER} of {Path(project_path).name}: unsaved edits. Open the project to "
              "get them back; delete this file to drop them.\n"
              f"# base-sha256: {base_hash or 'none'}\n"
              f"# written: {time.time():.3f}\n")
    try:
        atomic_write(target, header + text)
    except OSError as exc:
        raise ProjectError(Problem(str(target), "", f"cannot keep a recovery copy: "
                                   f"{exc.strerror or exc}")) from None
    return target


def remove_recovery(project_path: str | os.PathLike) -> bool:
    """Remove the recovery copy of a project (after a clean save or quit).

    Returns True when there was one.
    """
    try:
        recovery_path(project_path).unlink()
    except FileNotFoundError:
        return False
    return True


def find_recovery(project_path: str | os.PathLike) -> Recovery | None:
    """The recovery copy beside a project, if there is one worth offering.

    A copy whose text equals the project file on disk is stale (the edits were saved but
    the copy was not removed): it is removed and ``None`` returned. A copy that is not one
    of ours (no header) or cannot be read is left alone and not offered.
    """
    project_path = Path(project_path)
    path = recovery_path(project_path)
    try:
        raw = path.read_text(encoding="utf-8")
    except (FileNotFoundError, IsADirectoryError, UnicodeDecodeError, PermissionError):
        return None
    if not raw.startswith(_HEADER):
        return None
    lines = raw.split("\n", 3)
    if len(lines) < 4:
        return None
    head, text = "\n".join(lines[:3]), lines[3]
    base = _BASE.search(head)
    when = _WHEN.search(head)
    base_hash = None if base is None or base.group(1) == "none" else base.group(1)
    try:
        written = float(when.group(1)) if when else path.stat().st_mtime
    except OSError:
        written = 0.0
    try:
        on_disk = project_path.read_text(encoding="utf-8")
    except (FileNotFoundError, IsADirectoryError, UnicodeDecodeError, PermissionError):
        on_disk = None
    if on_disk is not None and on_disk.removeprefix("\ufeff") == text:
        remove_recovery(project_path)
        return None
    return Recovery(path=path, project_path=project_path, text=text, written=written,
                    base_hash=base_hash, disk_hash=_sha256_of_file(project_path))


def recover_project(recovery: Recovery):
    """The project with the recovered edits, as unsaved changes to its file.

    The returned :class:`~workbench.project.load.Project` has the project's path and the
    hash of the file on disk now, so it shows as modified and a save writes the project
    file (and a save that checks for changes on disk compares with what is there now).

    Raises
    ------
    ProjectError
        When the recovered text is not a valid project (the problems name the recovery file).
    """
    import dataclasses

    from workbench.project.load import project_from_doc

    project = project_from_doc(recovery.text, path=recovery.project_path,
                               name=str(recovery.path), loaded_hash=recovery.disk_hash or "")
    return dataclasses.replace(project, name=str(recovery.project_path))
