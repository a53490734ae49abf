"""Loading project files: TOML text -> a validated :class:`Project`.

The text is read twice: by ``tomllib`` (the standard parser, whose data is what the
project means, and whose syntax errors give line and column) and by ``tomlkit`` (a
document that keeps comments and layout, so saves and edits change only what changed).
Version-control conflict markers are recognised and named as such.
"""

from __future__ import annotations

import hashlib
import os
import re
import stat
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

from workbench.project.problems import Problem, ProjectError

if TYPE_CHECKING:  # pragma: no cover
    import tomlkit

    from workbench.core.model import System

__all__ = ["MAX_FILE_BYTES", "KeyLines", "Project", "load_project", "read_project_bytes", "load_project_text", "locate_key", "parse_data", "parse_doc",
           "parse_toml", "project_from_doc"]

#: Largest project file read [bytes]: far beyond any plant's (the demos are a few kB).
MAX_FILE_BYTES = 64 * 1024 * 1024

_CONFLICT = re.compile(r"^(<{7}|={7}|>{7}|\|{7})(\s|$)")
_TOML_POSITION = re.compile(r"\s*\(at line (\d+), column (\d+)\)\s*$")
_TOML_END = re.compile(r"\s*\(at end of document\)\s*$")


@dataclass(frozen=True, eq=False)
class Project:
    """One loaded, validated project.

    Edits (:mod:`workbench.project.edit`) return new Project objects; a Project is never
    changed in place (its ``doc`` must be treated as read-only).
    """

    path: Path | None
    """File it was loaded from, or ``None`` for text."""
    text: str
    """The document's text (as loaded, or as edited)."""
    data: dict
    """Plain data, as ``tomllib`` reads ``text``."""
    system: "System"
    """The validated core model, SI units."""
    unit_system: str
    """Display preference: ``"SI"`` or ``"US"``."""
    loaded_hash: str
    """sha256 (hex) of the bytes as loaded from disk (or of the text given)."""
    name: str = "<text>"
    """File name used in messages."""
    _doc: Any = field(default=None, repr=False)
    """The comment-preserving document once parsed (see :attr:`doc`)."""

    @property
    def doc(self) -> "tomlkit.TOMLDocument":
        """Comment-preserving document of :attr:`text`; saves and edits use it.

        Parsed on first use (``tomlkit`` is slow; checking a file does not need it).
        """
        if self._doc is None:
            object.__setattr__(self, "_doc", parse_doc(self.text, self.name))
        return self._doc

    @property
    def modified(self) -> bool:
        """True when the text differs from what was loaded or last saved."""
        return hashlib.sha256(self.text.encode("utf-8")).hexdigest() != self.loaded_hash


def _syntax_problem(exc: tomllib.TOMLDecodeError, name: str) -> Problem:
    message = str(exc)
    match = _TOML_POSITION.search(message)
    if match:
        text = _TOML_POSITION.sub("", message)
        return Problem(name, "", f"TOML syntax error: {text}", int(match.group(1)),
                       int(match.group(2)))
    text = _TOML_END.sub("", message)
    return Problem(name, "", f"TOML syntax error at the end of the file: {text}")


def _conflict_markers(text: str, name: str) -> list[Problem]:
    problems = []
    for number, line in enumerate(text.splitlines(), start=1):
        match = _CONFLICT.match(line)
        if match:
            problems.append(Problem(
                name, "", f"version-control conflict marker '{match.group(1)}': the file was "
                "left in the middle of a merge; keep one side of each conflict and delete the "
                "marker lines", number, 1))
    return problems


def parse_data(text: str, name: str | None) -> dict:
    """Plain data of TOML text (``tomllib``), after a look for conflict markers.

    Raises
    ------
    ProjectError
        For conflict markers or syntax errors, with line and column.
    """
    label = name or "<text>"
    if not isinstance(text, str):
        raise ProjectError(Problem(label, "", f"expected text, got {type(text).__name__}"))
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        # A marker line outside a string is never valid TOML: a file that reads has its
        # marker-like lines inside multi-line strings, and they are text, not a conflict.
        markers = _conflict_markers(text, label)
        if markers:
            raise ProjectError(markers) from None
        raise ProjectError(_syntax_problem(exc, label)) from None
    except RecursionError:
        raise ProjectError(Problem(label, "", "lists or tables nested too deeply to read (a "
                                   "project file needs only a few levels)")) from None


def parse_doc(text: str, name: str | None) -> "tomlkit.TOMLDocument":
    """The layout-keeping document of TOML text (``tomlkit``); raises ProjectError."""
    import tomlkit
    from tomlkit.exceptions import TOMLKitError

    try:
        return tomlkit.parse(text)
    except (TOMLKitError, ValueError, KeyError, IndexError) as exc:
        line = getattr(exc, "line", None)
        col = getattr(exc, "col", None)
        raise ProjectError(Problem(name or "<text>", "", f"TOML the editor cannot keep: {exc}",
                                   line, col)) from None


def parse_toml(text: str, name: str | None) -> tuple[dict, "tomlkit.TOMLDocument"]:
    """Parse text as TOML twice: plain data (tomllib) and the layout-keeping document."""
    data = parse_data(text, name)
    return data, parse_doc(text, name)


def locate_key(text: str, key: str) -> int | None:
    """Best-effort line number (1-based) of a key path such as ``lines.L1.length``."""
    return KeyLines(text).find(key)


class KeyLines:
    """Where each table header and key of a text is, read once.

    :meth:`find` is then a few dictionary look-ups per key path, so locating the lines of
    many problems takes time linear in their number (a rescan of the text per problem made
    ``check`` quadratic: 10,000 problems took minutes).
    """

    _HEADER = re.compile(r"^\s*\[\s*([^\[\]]+?)\s*\]\s*(#.*)?$")
    _ASSIGN = re.compile(r"^\s*(\"[^\"]*\"|'[^']*'|[A-Za-z0-9_-]+)\s*=")

    def __init__(self, text: str) -> None:
        self.first: dict[tuple[str, ...], int] = {}
        current: tuple[str, ...] = ()
        for number, line in enumerate(text.splitlines(), start=1):
            h = self._HEADER.match(line)
            if h:
                current = tuple(p.strip().strip("\"'") for p in h.group(1).split("."))
                self.first.setdefault(current, number)
                continue
            a = self._ASSIGN.match(line)
            if a:
                self.first.setdefault((*current, a.group(1).strip("\"'")), number)

    def find(self, key: str) -> int | None:
        """The line of the longest leading part of ``key`` found (its first occurrence)."""
        parts = tuple(re.sub(r"\[\d+\]$", "", p) for p in key.split(".") if p)
        for size in range(len(parts), 0, -1):
            line = self.first.get(parts[:size])
            if line is not None:
                return line
        return None


def _with_lines(problems: list[Problem], text: str) -> list[Problem]:
    out = []
    index = KeyLines(text) if any(p.line is None and p.key for p in problems) else None
    for p in problems:
        if p.line is None and p.key:
            out.append(Problem(p.file, p.key, p.message, index.find(p.key), None))
        else:
            out.append(p)
    return out


def project_from_doc(text: str, *, path: Path | None, name: str, loaded_hash: str,
                     doc: Any = None, data: dict | None = None,
                     units: str | None = None) -> Project:
    """Validate text (already parsed when ``doc``/``data`` are given) into a Project;
    ``units`` ("SI"/"US") overrides the file's display units in the problems' numbers."""
    from workbench.project.validate import check_data

    if data is None:
        data = parse_data(text, name)
    system, problems = check_data(data, name, units)
    if problems or system is None:
        raise ProjectError(_with_lines(problems, text) or [Problem(name, "", "cannot build")])
    units = data.get("project", {}).get("units", "SI")
    return Project(path=path, text=text, data=data, system=system, unit_system=units,
                   loaded_hash=loaded_hash, name=name, _doc=doc)


def load_project_text(text: str, name: str = "<text>", units: str | None = None) -> Project:
    """Load a project from TOML text; raises :class:`ProjectError` with every problem."""
    digest = hashlib.sha256(text.encode("utf-8")).hexdigest() if isinstance(text, str) else ""
    return project_from_doc(text, path=None, name=name, loaded_hash=digest, units=units)


def read_project_bytes(path: Path, name: str) -> bytes:
    """The bytes of a project file, refusing anything that is not a regular file.

    A pipe would block the read forever and a device such as ``/dev/zero`` never ends, so
    the path must name a regular file (through links) of at most :data:`MAX_FILE_BYTES`.

    Raises
    ------
    ProjectError
        For a missing, unreadable, non-regular or oversized file.
    """
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except FileNotFoundError:
        raise ProjectError(Problem(name, "", "no such file")) from None
    except IsADirectoryError:
        raise ProjectError(Problem(name, "", "is a folder, not a project file")) from None
    except OSError as exc:
        raise ProjectError(Problem(name, "", f"cannot read: {exc.strerror or exc}")) from None
    try:
        info = os.fstat(fd)
        if stat.S_ISDIR(info.st_mode):
            raise ProjectError(Problem(name, "", "is a folder, not a project file"))
        if not stat.S_ISREG(info.st_mode):
            raise ProjectError(Problem(name, "", "is not a regular file (a pipe, device or "
                                       "socket): give the path of a project file"))
        if info.st_size > MAX_FILE_BYTES:
            raise ProjectError(Problem(name, "", f"is {info.st_size / 1e6:,.0f} MB: far larger "
                                       "than any project file (at most "
                                       f"{MAX_FILE_BYTES // 2**20} MiB)"))
        with os.fdopen(fd, "rb", closefd=False) as handle:
            return handle.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise ProjectError(Problem(name, "", f"cannot read: {exc.strerror or exc}")) from None
    finally:
        os.close(fd)


def load_project(path, units: str | None = None) -> Project:
    """Load a project file; raises :class:`ProjectError` with every problem (never another
    exception for bad input)."""
    path = Path(path)
    name = str(path)
    raw = read_project_bytes(path, name)
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise ProjectError(Problem(name, "", "not UTF-8 text (project files are UTF-8)", line,
                                   None)) from None
    if text.startswith("\ufeff"):
        text = text[1:]
    return project_from_doc(text, path=path, name=name,
                            loaded_hash=hashlib.sha256(raw).hexdigest(), units=units)
