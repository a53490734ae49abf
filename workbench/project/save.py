"""Writing project files: atomic saves that keep the user's layout, and the canonical form.

A save writes the comment-preserving document (``tomlkit``) kept with the project, so
comments, key order and untouched lines stay as the user wrote them and a version-control
diff shows only what changed. The write is atomic: a temporary file in the same folder is
written, flushed and fsynced, then put in place with :func:`os.replace`, so a crash leaves
either the old file or the complete new one. A save through a symbolic link writes the
file the link points to (the link stays); a file with other hard links is written in place
so that every link keeps naming it; a read-only file is replaced only when asked to.

:func:`format_text` gives a file's canonical form (what ``workbench format`` writes):
``key = value`` with single spaces, double-quoted strings, inline tables as
``{ key = value, ... }``, long lists one entry per line, comments kept in place, one blank
line before each table, no trailing spaces, one newline at the end. Formatting is
idempotent and never changes the data: when a construct cannot be canonicalised safely the
file keeps its own spelling of it.
"""

from __future__ import annotations

import math
import os
import re
import tempfile
import tomllib
from pathlib import Path
from typing import Any

from workbench.project.problems import Problem, ProjectError

__all__ = ["ReadOnlyFile", "atomic_write", "format_text", "is_read_only", "link_note",
           "render_key", "render_value", "save_project", "written_path"]

#: Longest one-line list before it is written one entry per line.
LINE_WIDTH = 88

_BARE_KEY = re.compile(r"[A-Za-z0-9_-]+\Z")


def written_path(path: str | os.PathLike) -> Path:
    """The file a save to ``path`` writes: the end of its chain of symbolic links.

    A project opened through a link is saved to the file the link points to, and the link
    stays a link (replacing the link with a plain file would leave the real file unchanged
    while saying "saved").
    """
    return Path(os.path.realpath(path))


def is_read_only(path: str | os.PathLike) -> bool:
    """True when the file exists and nobody may write it (no write bit in its mode).

    Read from the mode rather than :func:`os.access`, which answers yes to root whatever
    the mode says.
    """
    try:
        mode = Path(path).stat().st_mode
    except OSError:
        return False
    return mode & 0o222 == 0


def atomic_write(path: str | os.PathLike, text: str, *, follow_links: bool = True) -> Path:
    """Write ``text`` (UTF-8) to ``path`` so that a crash never leaves it half-written.

    The text goes to a temporary file in the same folder, flushed and fsynced, which then
    replaces the file (:func:`os.replace`). Through a symbolic link (``follow_links``) the
    file the link points to is written and the link kept. A file with other hard links is
    written in place instead, so every name keeps showing the same file: the temporary
    copy of the new text is kept until the file is complete, so even then a crash leaves
    the complete new text beside the project.

    Returns
    -------
    Path
        The file written (the link's target when ``path`` is a link).
    """
    target = written_path(path) if follow_links else Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    mode = None
    links = 1
    try:
        info = target.stat() if follow_links else target.lstat()
        mode, links = info.st_mode & 0o777, info.st_nlink
    except FileNotFoundError:
        pass
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    data = text.encode("utf-8")
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        if mode is not None:
            os.chmod(tmp, mode)
        if links > 1:
            _write_in_place(target, data)
            os.unlink(tmp)
        else:
            os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    _sync_folder(folder)
    return target


def _write_in_place(target: Path, data: bytes) -> None:
    """Overwrite a hard-linked file's contents (the inode, and so every link, kept)."""
    with open(target, "r+b") as handle:
        handle.write(data)
        handle.truncate()
        handle.flush()
        os.fsync(handle.fileno())


def _sync_folder(folder: Path) -> None:
    """Make a rename durable (POSIX); not possible everywhere."""
    try:
        dir_fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(dir_fd)
    except OSError:
        pass
    finally:
        os.close(dir_fd)


def save_project(project, path: str | os.PathLike | None = None, *, check_unchanged: bool = False,
                 replace_read_only: bool = False):
    """Save a project atomically, keeping comments and layout.

    Parameters
    ----------
    project : Project
        The project to write (its comment-preserving document).
    path : path, optional
        Where to write; the path the project was loaded from by default.
    check_unchanged : bool
        Refuse to overwrite when the file on disk changed since the project was loaded.
    replace_read_only : bool
        Replace a read-only file (keeping it read-only); refused otherwise.

    Returns
    -------
    Project
        The project as saved (its ``path`` and ``loaded_hash`` updated). Callers that only
        need the side effect may ignore it.

    Raises
    ------
    ProjectError
        When there is no path, the file changed on disk (with ``check_unchanged``), the
        file is read-only (:class:`ReadOnlyFile`, unless ``replace_read_only``), or the
        write fails.
    """
    import dataclasses
    import hashlib

    target = Path(path) if path is not None else project.path
    if target is None:
        raise ProjectError(Problem(None, "", "the project has no file name: give a path to save to"))
    name = str(target)
    if check_unchanged and project.path is not None and Path(target) == Path(project.path):
        try:
            on_disk = hashlib.sha256(Path(target).read_bytes()).hexdigest()
        except FileNotFoundError:
            on_disk = None
        if on_disk is not None and on_disk != project.loaded_hash:
            raise ProjectError(Problem(name, "", "the file changed on disk since it was loaded; "
                                       "reload it or save under another name"))
    if not replace_read_only and is_read_only(target):
        raise ReadOnlyFile(Problem(name, "", read_only_message()))
    text = project.doc.as_string()
    try:
        atomic_write(target, text)
    except OSError as exc:
        raise ProjectError(Problem(name, "", f"cannot save: {exc.strerror or exc}")) from None
    digest = hashlib.sha256(text.encode("utf-8")).hexdigest()
    return dataclasses.replace(project, path=Path(target), text=text, loaded_hash=digest,
                               name=name)


class ReadOnlyFile(ProjectError):
    """The save would replace a read-only file: refused unless the user says so."""


def read_only_message() -> str:
    """Why a save stopped at a read-only file, and what to do."""
    return ("the file is read-only: not overwritten; make it writable (chmod u+w) or save "
            "under another name")


def link_note(path: str | os.PathLike) -> str:
    """`` (through the link to REAL)`` when a save to ``path`` wrote another file, else ``""``."""
    real = written_path(path)
    if real == Path(os.path.abspath(path)):
        return ""
    return f" (through the link to {real})"


# ---------------------------------------------------------------------------------------
# Canonical form


def render_key(key: str) -> str:
    """A key as TOML: bare when it can be, else a basic string."""
    return key if _BARE_KEY.match(key) else _render_string(key)


def _render_string(value: str) -> str:
    import json

    text = json.dumps(value, ensure_ascii=False)
    return text.replace("\x7f", "\\u007f")


def render_value(value: Any, *, width: int = LINE_WIDTH, indent: str = "") -> str:
    """A plain value as canonical TOML text (lists of tables become inline tables)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return _render_string(value)
    if isinstance(value, dict):
        if not value:
            return "{}"
        inner = ", ".join(f"{render_key(k)} = {render_value(v, width=10**9)}" for k, v in value.items())
        return "{ " + inner + " }"
    if isinstance(value, list):
        items = [render_value(v, width=10**9) for v in value]
        one_line = "[" + ", ".join(items) + "]"
        if len(one_line) + len(indent) <= width or not items:
            return one_line
        return "[\n" + "".join(f"{indent}    {item},\n" for item in items) + f"{indent}]"
    if hasattr(value, "isoformat"):
        return value.isoformat()
    raise TypeError(f"cannot write {type(value).__name__} to a project file")


class _Unsupported(Exception):
    """A construct the canonical writer leaves to the plain whitespace clean-up."""


def _emit_body(body, prefix: tuple[str, ...], out: list[str]) -> None:
    from tomlkit import items

    for key, item in body:
        if isinstance(item, items.Whitespace):
            out.extend([""] * item.as_string().count("\n"))
            continue
        if isinstance(item, items.Comment):
            out.append(item.trivia.comment.strip())
            continue
        if key is None:
            raise _Unsupported
        if key.is_dotted():
            raise _Unsupported
        name = (*prefix, key.key)
        if isinstance(item, items.Table):
            if not item.is_super_table():
                header = "[" + ".".join(render_key(k) for k in name) + "]"
                comment = item.trivia.comment.strip()
                out.append(header + (f"  {comment}" if comment else ""))
            _emit_body(item.value.body, name, out)
            continue
        if isinstance(item, items.AoT):
            raise _Unsupported
        out.append(_emit_key_value(key.key, item))


def _emit_key_value(key: str, item) -> str:
    from tomlkit import items

    value = item.unwrap()
    original = item.as_string()
    keep = False
    if isinstance(item, items.String) and "\n" in value:
        keep = True  # a multi-line string keeps its own spelling
    elif isinstance(item, (items.Array, items.InlineTable)) and "#" in original:
        # comments inside a list: keep the list as written, if it still reads the same
        keep = "#" not in render_value(value, width=10**9)
    elif isinstance(item, (items.Date, items.Time, items.DateTime)):
        keep = True
    text = original.strip() if keep else render_value(value, indent="")
    line = f"{render_key(key)} = {text}"
    comment = item.trivia.comment.strip()
    return line + (f"  {comment}" if comment else "")


def _tidy(lines: list[str]) -> str:
    """Trailing spaces off, blank lines collapsed, one blank line before each table."""
    out: list[str] = []
    in_multiline = False
    for raw in lines:
        for line in raw.split("\n"):
            stripped = line.rstrip() if not in_multiline else line
            if line.count('"""') % 2 == 1 or line.count("'''") % 2 == 1:
                in_multiline = not in_multiline
            out.append(stripped)
    # Blank-line rules, by line index (never inside multi-line strings: those lines are kept).
    result: list[str] = []
    for line in out:
        if line == "" and (not result or result[-1] == ""):
            continue
        result.append(line)
    # One blank line before each table header (before the comment block that leads it).
    final: list[str] = []
    for i, line in enumerate(result):
        if line.startswith("[") and not line.startswith("[["):
            j = len(final)
            while j > 0 and final[j - 1].startswith("#"):
                j -= 1
            if j > 0 and final[j - 1] != "":
                final.insert(j, "")
        final.append(line)
    while final and final[-1] == "":
        final.pop()
    return "\n".join(final) + "\n"


def _tidy_text(text: str) -> str:
    return _tidy(text.split("\n"))


def format_text(text: str) -> str:
    """The canonical form of a project file's text (same data, same comments).

    Raises
    ------
    ProjectError
        When the text is not valid TOML (with line and column).
    """
    from workbench.project.load import parse_toml

    data, doc = parse_toml(text, None)
    try:
        out: list[str] = []
        _emit_body(doc.body, (), out)
        formatted = _tidy(out)
        if tomllib.loads(formatted) != data:
            raise _Unsupported
    except (_Unsupported, tomllib.TOMLDecodeError, TypeError):
        formatted = _tidy_text(text)
        try:
            if tomllib.loads(formatted) != data:
                return text
        except tomllib.TOMLDecodeError:
            return text
    return formatted
