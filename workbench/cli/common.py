"""Pieces every command shares: loading a project with its problems reported on stderr, the
``--units`` option, and whether to write colour."""

from __future__ import annotations

import dataclasses
import os
import sys


def add_project_command(subparsers, name: str, help_text: str, description: str,
                        epilog: str | None = None):
    """A subcommand's parser with the argument every such command takes first: the
    project file."""
    parser = subparsers.add_parser(name, help=help_text, epilog=epilog,
                                   description=description)
    parser.add_argument("project", metavar="PROJECT", help="project file (.toml)")
    return parser


def add_json_option(parser) -> None:
    """``--json``: the documented SI object on stdout instead of the tables."""
    parser.add_argument("--json", action="store_true",
                        help="print the result as JSON (SI units) instead of tables")


def add_units_option(parser) -> None:
    """``--units SI|US``: the display units of this run, over the project's preference."""
    parser.add_argument("--units", choices=("SI", "US"), default=None,
                        help="display units for this run (default: the project's [project] "
                        "units; the file is not changed; JSON and CSV stay SI)")


def want_colour(stream) -> bool:
    """Colour only on a terminal, and never when ``NO_COLOR`` is set to anything but empty
    (the convention of no-color.org)."""
    if os.environ.get("NO_COLOR"):
        return False
    isatty = getattr(stream, "isatty", None)
    return bool(isatty and isatty())


def load_or_report(path: str, units: str | None = None):
    """The loaded project, or ``None`` after printing every problem (file, key path, words)
    on stderr; the caller then returns ``ExitCode.INVALID``. ``units`` (``"SI"``/``"US"``)
    overrides the project's display preference."""
    from workbench.project.document import ProjectError, load_project

    try:
        project = load_project(path, units)
        if units is not None and units != project.unit_system:
            project = dataclasses.replace(project, unit_system=units)
        return project
    except ProjectError as exc:
        for problem in exc.problems:
            print(problem, file=sys.stderr)
    except OSError as exc:
        print(f"{path}: cannot read the file: {exc.strerror or exc}", file=sys.stderr)
    return None


class terminal_progress:
    """``with terminal_progress("simulating") as progress:`` gives a callable taking the
    fraction done (0..1) that draws a rich progress bar on stderr when stderr is a
    terminal, or ``None`` (nothing drawn) when it is not."""

    def __init__(self, label: str) -> None:
        self.label = label
        self._progress = None

    def __enter__(self):
        if not sys.stderr.isatty():
            return None
        from rich.console import Console
        from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn

        self._progress = Progress(TextColumn(self.label), BarColumn(), TimeElapsedColumn(),
                                  console=Console(file=sys.stderr), transient=True)
        self._progress.start()
        task = self._progress.add_task(self.label, total=1.0)
        return lambda fraction: self._progress.update(task, completed=fraction)

    def __exit__(self, *exc) -> None:
        if self._progress is not None:
            self._progress.stop()
