"""Recovery copies: unsaved edits kept on disk, so a crash never loses work.

While a project has unsaved edits the terminal workbench keeps their text in a hidden file
beside the project, one per running workbench (``plant.toml`` ->
``.plant.recovery.HOST-PID-TOKEN.toml``), written atomically after each edit. A project
never saved has no folder of its own: its copy goes to the user's state folder
(``$XDG_STATE_HOME/workbench/recovery``, by default ``~/.local/state/workbench/recovery``,
or ``$WORKBENCH_STATE_DIR``). A clean save or a quit removes the copy. If the program dies
instead (a crash, a lost SSH session, a killed process), the copy is still there when the
project is next opened, and the user is offered the edits back.

Each copy names its owner (host, process id and start time, and a token per workbench in
that process), so a second workbench opening the same file can tell a copy whose owner is
still running -- that workbench's live edits, never offered or touched -- from one left by
a workbench that died. A copy from another host (a shared folder) cannot be checked for
life from here and is offered with that said.

The copy is a project file with a short comment header naming the project and the sha256
of the project file the edits started from, so the offer can say whether the file on disk
changed since (someone else saved, or a merge landed).

This module does file I/O and imports nothing heavy.
"""

from __future__ import annotations

import glob
import hashlib
import os
import re
import socket
import time
import uuid
from dataclasses import dataclass, field
from pathlib import Path

from workbench.project.problems import Problem, ProjectError

__all__ = [
    "Owner",
    "Recovery",
    "RecoveryScan",
    "find_recovery",
    "recover_project",
    "recovery_path",
    "remove_recovery",
    "scan_recoveries",
    "state_folder",
    "write_recovery",
]

_HEADER = "# workbench recovery copy"
_FIELD = re.compile(r"^# (base-sha256|written|owner|project): (.*?)\s*$")
_SAFE = re.compile(r"[^A-Za-z0-9_-]+")
#: Live workbench tokens of this process (a process may run several, as the tests do).
_LIVE_TOKENS: set[str] = set()


def _start_ticks(pid: int) -> str:
    """A process's start time in clock ticks since boot (Linux), ``""`` where unknown.

    With the pid it tells a live owner from a new process that reuses a dead one's pid.
    """
    try:
        stat = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return ""
    # the command name (field 2) may hold spaces: count fields after its closing ')'
    fields = stat[stat.rfind(")") + 2:].split()
    return fields[19] if len(fields) > 19 else ""


@dataclass(frozen=True)
class Owner:
    """The running workbench a recovery copy belongs to."""

    host: str
    """Host name of the machine it runs on."""
    pid: int
    """Its process id."""
    token: str
    """One workbench of that process (several may run in one process)."""
    started: str = ""
    """The process's start time in clock ticks (Linux), ``""`` where unknown."""

    @classmethod
    def new(cls) -> "Owner":
        """A fresh owner for a workbench starting in this process, registered as live."""
        owner = cls(socket.gethostname(), os.getpid(), uuid.uuid4().hex[:8],
                    _start_ticks(os.getpid()))
        _LIVE_TOKENS.add(owner.token)
        return owner

    def release(self) -> None:
        """This workbench ends: its copy (if still there) is from now on a dead one's."""
        _LIVE_TOKENS.discard(self.token)

    @property
    def tag(self) -> str:
        """The owner as a file-name part."""
        return f"{_SAFE.sub('_', self.host)[:40]}-{self.pid}-{self.token}"

    def header(self) -> str:
        return f"{self.host} {self.pid} {self.token} {self.started or '-'}"

    @classmethod
    def parse(cls, text: str) -> "Owner | None":
        parts = text.split()
        if len(parts) != 4 or not parts[1].isdigit():
            return None
        return cls(parts[0], int(parts[1]), parts[2], "" if parts[3] == "-" else parts[3])

    def is_alive(self) -> bool | None:
        """True while that workbench runs, False once it died, None when it cannot be told
        (another host)."""
        if self.host != socket.gethostname():
            return None
        if self.pid == os.getpid():
            return self.token in _LIVE_TOKENS
        try:
            os.kill(self.pid, 0)
        except ProcessLookupError:
            return False
        except PermissionError:
            pass  # a process of another user: it exists
        except OSError:
            return None
        ticks = _start_ticks(self.pid)
        return not (self.started and ticks and ticks != self.started)

    def describe(self) -> str:
        return f"process {self.pid} on {self.host}"


@dataclass(frozen=True)
class Recovery:
    """A recovery copy found beside a project (or in the state folder for a new one)."""

    path: Path
    """The hidden recovery file."""
    project_path: Path | None
    """The project file it belongs to; ``None`` for a project never saved."""
    text: str
    """The unsaved document text (without the recovery header)."""
    written: float
    """When the copy was written [s since the epoch]."""
    base_hash: str | None
    """sha256 of the project file the edits started from; ``None`` for a new file."""
    disk_hash: str | None
    """sha256 of the project file on disk now; ``None`` when it does not exist."""
    owner: Owner | None = None
    """The workbench that wrote it (``None``: an older copy that does not say)."""
    owner_alive: bool | None = False
    """Whether that workbench still runs (``None``: cannot be told from this host)."""

    @property
    def disk_changed(self) -> bool:
        """True when the project file on disk is not the one the edits started from."""
        return self.project_path is not None and self.base_hash != self.disk_hash

    def describe(self, full_path: bool = False) -> str:
        """One sentence for the offer to the user (``full_path``: the copy's whole path,
        not only its name beside the project)."""
        when = time.strftime("%Y-%m-%d %H:%M", time.localtime(self.written))
        what = (self.project_path.name if self.project_path is not None
                else "a new project (never saved)")
        where = (self.path.name if self.project_path is not None and not full_path
                 else str(self.path))
        text = f"unsaved edits to {what} from {when} were kept in {where}"
        if self.disk_changed:
            text += "; the project file has changed on disk since those edits began"
        if self.owner_alive is None and self.owner is not None:
            text += (f"; they were made on {self.owner.host}, where that workbench may "
                     "still be running")
        return text


@dataclass(frozen=True)
class RecoveryScan:
    """What a workbench opening a project finds of other workbenches' copies."""

    offers: list[Recovery] = field(default_factory=list)
    """Copies left by workbenches that ended without saving (newest first)."""
    live: list[Owner] = field(default_factory=list)
    """Other workbenches running with unsaved edits of the same project."""


def state_folder() -> Path:
    """Where copies of projects never saved are kept (the user's state folder)."""
    explicit = os.environ.get("WORKBENCH_STATE_DIR")
    if explicit:
        return Path(explicit)
    base = os.environ.get("XDG_STATE_HOME") or str(Path.home() / ".local" / "state")
    return Path(base) / "workbench" / "recovery"


def recovery_path(project_path: str | os.PathLike | None, owner: Owner | None = None) -> Path:
    """The hidden recovery file of a project for one workbench.

    ``plant.toml`` -> ``.plant.recovery.TAG.toml`` beside it; a project never saved
    (``project_path=None``) -> ``untitled.TAG.toml`` in :func:`state_folder`. Without an
    owner, the name older versions used (``.plant.recovery.toml``).
    """
    if project_path is None:
        if owner is None:
            raise ValueError("a new project's recovery copy needs its owner")
        return state_folder() / f"untitled.{owner.tag}.toml"
    path = Path(project_path)
    if owner is None:
        return path.with_name(f".{path.stem}.recovery.toml")
    return path.with_name(f".{path.stem}.recovery.{owner.tag}.toml")


def _regular_file(path: Path) -> bool:
    """Whether ``path`` is a regular file (never read a pipe or a device: the read would
    block, or never end)."""
    import stat

    try:
        return stat.S_ISREG(os.stat(path).st_mode)
    except (OSError, ValueError):
        return False


def _sha256_of_file(path: Path | None) -> str | None:
    if path is None or not _regular_file(path):
        return None
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except OSError:
        return None


def write_recovery(project_path: str | os.PathLike | None, text: str, base_hash: str | None,
                   owner: Owner | None = None) -> Path:
    """Keep ``text`` (the document with unsaved edits) as a recovery copy, atomically.

    Parameters
    ----------
    project_path : path or None
        The project file the edits belong to; ``None`` for a project never saved.
    text : str
        The whole document text as edited.
    base_hash : str or None
        sha256 (hex) of the project file as loaded, ``None`` for a file not yet saved.
    owner : Owner, optional
        The workbench keeping the copy (see :func:`recovery_path`).

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

    target = recovery_path(project_path, owner)
    name = Path(project_path).name if project_path is not None else "a new project"
    header = (f"{_HEADER} of {name}: unsaved edits. Open the project to "
              "get them back; delete this file to drop them.\n"
              f"# base-sha256: {base_hash or 'none'}\n"
              f"# written: {time.time():.3f}\n")
    if owner is not None:
        header += f"# owner: {owner.header()}\n"
    if project_path is not None:
        header += f"# project: {Path(project_path).name}\n"
    try:
        if project_path is None:
            target.parent.mkdir(parents=True, exist_ok=True)
        atomic_write(target, header + text, follow_links=False)
    except OSError as exc:
        raise ProjectError(Problem(str(target), "", f"cannot keep a recovery copy: "
                                   f"{exc.strerror or exc}")) from None
    return target


def remove_recovery(project_path: str | os.PathLike | None, owner: Owner | None = None) -> bool:
    """Remove a workbench's recovery copy of a project (after a clean save or quit).

    Returns True when there was one.
    """
    try:
        recovery_path(project_path, owner).unlink()
    except FileNotFoundError:
        return False
    return True


def _read_copy(path: Path) -> tuple[dict[str, str], str] | None:
    """The header fields and the document text of a copy; ``None`` if not one of ours."""
    if not _regular_file(path):
        return None
    try:
        raw = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return None
    if not raw.startswith(_HEADER):
        return None
    lines = raw.split("\n")
    fields: dict[str, str] = {}
    index = 1
    while index < len(lines) and (match := _FIELD.match(lines[index])):
        fields[match.group(1)] = match.group(2)
        index += 1
    if index >= len(lines) or "base-sha256" not in fields:
        return None
    return fields, "\n".join(lines[index:])


def _candidates(project_path: Path | None) -> list[Path]:
    if project_path is None:
        folder, pattern = state_folder(), "untitled.*.toml"
    else:
        stem = glob.escape(project_path.stem)
        folder, pattern = project_path.parent, f".{stem}.recovery.*toml"
    try:
        return [p for p in folder.glob(pattern) if p.is_file()]
    except OSError:
        return []


def _recovery_of(path: Path, project_path: Path | None, on_disk: str | None,
                 mine: Owner | None, tidy: bool = True) -> Recovery | Owner | None:
    """One copy as an offer, as a live owner, or ``None`` (not ours, stale, or our own);
    a stale copy is removed when ``tidy``."""
    read = _read_copy(path)
    if read is None:
        return None
    fields, text = read
    if project_path is not None and fields.get("project", project_path.name) != project_path.name:
        return None  # a copy of another project whose name starts the same way
    owner = Owner.parse(fields.get("owner", ""))
    if owner is not None and mine is not None and owner.token == mine.token:
        return None
    alive = owner.is_alive() if owner is not None else False
    if alive:
        return owner
    if on_disk is not None and on_disk.removeprefix("\ufeff") == text:
        if tidy:
            try:  # the edits were saved but the copy was not removed: stale
                path.unlink()
            except OSError:
                pass
        return None
    base = fields.get("base-sha256", "none")
    try:
        written = float(fields["written"]) if "written" in fields else path.stat().st_mtime
    except (OSError, ValueError):
        written = 0.0
    return Recovery(path=path, project_path=project_path, text=text, written=written,
                    base_hash=None if base == "none" else base,
                    disk_hash=_sha256_of_file(project_path), owner=owner, owner_alive=alive)


def scan_recoveries(project_path: str | os.PathLike | None,
                    mine: Owner | None = None, *, tidy: bool = True) -> RecoveryScan:
    """Every other workbench's copy of a project: the ones to offer, and the live owners.

    A copy whose owner still runs is that workbench's live edits: it is listed in
    ``live`` and never offered or touched. A copy whose text equals the project file on
    disk is stale (the edits were saved but the copy was not removed): it is removed
    (left in place with ``tidy=False``, for a look that changes nothing, as ``check``'s).
    A file that is not one of our copies, or cannot be read, is left alone.
    """
    path = Path(project_path) if project_path is not None else None
    try:
        on_disk = (path.read_text(encoding="utf-8")
                   if path is not None and _regular_file(path) else None)
    except (OSError, UnicodeDecodeError):
        on_disk = None
    offers: list[Recovery] = []
    live: list[Owner] = []
    for candidate in _candidates(path):
        found = _recovery_of(candidate, path, on_disk, mine, tidy)
        if isinstance(found, Owner):
            live.append(found)
        elif found is not None:
            offers.append(found)
    offers.sort(key=lambda r: r.written, reverse=True)
    return RecoveryScan(offers=offers, live=live)


def find_recovery(project_path: str | os.PathLike | None) -> Recovery | None:
    """The newest recovery copy worth offering for a project, if there is one."""
    offers = scan_recoveries(project_path).offers
    return offers[0] if offers else None


def recover_project(recovery: Recovery):
    """The project with the recovered edits, as unsaved changes to its file.

    The returned :class:`~workbench.project.load.Project` has the project's path and the
    hash of the file on disk now, so it shows as modified and a save writes the project
    file (and a save that checks for changes on disk compares with what is there now). A
    new project's edits come back with no path: saving asks for a name.

    Raises
    ------
    ProjectError
        When the recovered text is not a valid project (the problems name the recovery file).
    """
    import dataclasses

    from workbench.project.load import project_from_doc

    project = project_from_doc(recovery.text, path=recovery.project_path,
                               name=str(recovery.path), loaded_hash=recovery.disk_hash or "")
    name = str(recovery.project_path) if recovery.project_path is not None else "<new project>"
    return dataclasses.replace(project, name=name)
