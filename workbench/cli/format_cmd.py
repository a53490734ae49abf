"""``workbench format PROJECT... [--check]``: rewrite project files in canonical form.

The canonical form keeps every value and comment; it only normalises spelling and spacing
(see :func:`workbench.project.save.format_text`). With ``--check`` nothing is written and
the exit status is 1 when a file is not canonical. Through a symbolic link the file the link
points to is written (and named); a read-only file is refused, never replaced.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from workbench.cli.exit_codes import ExitCode


def add_parser(subparsers, name: str, help_text: str) -> argparse.ArgumentParser:
    parser = subparsers.add_parser(
        name, help=help_text, description="Rewrite project files in canonical form (values "
        "and comments kept). Formatting twice gives identical bytes.")
    parser.add_argument("projects", nargs="+", metavar="PROJECT", help="project file (.toml)")
    parser.add_argument("--check", action="store_true",
                        help="write nothing; exit 1 if a file is not in canonical form")
    return parser


def run(args: argparse.Namespace) -> ExitCode:
    from workbench.project.document import ProjectError, format_text
    from workbench.project.load import read_project_bytes
    from workbench.project.problems import Problem
    from workbench.project.save import atomic_write, is_read_only, link_note, read_only_message

    status = ExitCode.OK
    for name in args.projects:
        path = Path(name)
        try:
            try:
                text = read_project_bytes(path, name).decode("utf-8")
            except UnicodeDecodeError:
                raise ProjectError(Problem(name, "", "cannot read: not UTF-8 text")) from None
            try:
                formatted = format_text(text)
            except ProjectError as exc:
                raise ProjectError([Problem(name, p.key, p.message, p.line, p.column)
                                    for p in exc.problems]) from None
            if formatted == text:
                print(f"{name}: already canonical")
            elif args.check:
                print(f"{name}: not in canonical form (run: workbench format {name})",
                      file=sys.stderr)
                status = ExitCode.INVALID
            elif is_read_only(path):
                raise ProjectError(Problem(name, "", read_only_message()))
            else:
                try:
                    atomic_write(path, formatted)
                except OSError as exc:
                    raise ProjectError(Problem(name, "", f"cannot write: {exc.strerror or exc}")) from None
                print(f"{name}: formatted{link_note(path)}")
        except ProjectError as exc:
            for problem in exc.problems:
                print(problem, file=sys.stderr)
            status = ExitCode.INVALID
    return status
