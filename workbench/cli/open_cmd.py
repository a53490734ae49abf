"""``workbench open [PROJECT]``: the terminal workbench."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from workbench.cli.exit_codes import ExitCode


def add_parser(subparsers, name: str, help_text: str) -> None:
    parser = subparsers.add_parser(
        name, help=help_text,
        description="Open a project in the keyboard-driven workbench (F1 lists the keys). "
        "Without a file, offers to start a new project from the starter template.",
    )
    parser.add_argument("project", nargs="?", type=Path, help="project file (.toml)")
    parser.add_argument("--units", choices=("SI", "US"), help="display units (the file keeps "
                        "its values)")


def run(args: argparse.Namespace) -> ExitCode:
    path: Path | None = args.project
    if path is not None and path.exists() and not path.is_file():  # never read a pipe
        what = ("is a folder, not a project file" if path.is_dir() else "is not a regular "
                "file (a pipe, device or socket): give the path of a project file")
        print(f"{path}: {what}", file=sys.stderr)
        return ExitCode.INVALID
    if path is not None and not path.is_file():
        print(f"{path}: no such file (use 'workbench new {path}' to start one, or "
              "'workbench open' without a file)", file=sys.stderr)
        return ExitCode.INVALID
    from workbench.cli.typed_ahead import keys_kept

    with keys_kept():  # Ctrl+R typed while Textual loads is a key for the app, not the terminal
        from workbench.app.factory import make_app

        # the file is read and solved on the other core while Textual loads here
        app = make_app(path=path, offer_new=path is None, unit_system=args.units,
                       solve_ahead=True)
        result = app.run()
    return exit_status(result, app.return_code)


def exit_status(result: object, return_code: int | None) -> ExitCode:
    """The process status of a finished app.

    ``result`` is what the app exited with (``app.exit(1)`` after a project that could not
    be opened); ``return_code`` is Textual's: non-zero when the app died of an unhandled
    exception (its traceback is already printed), and then ``run()`` returns ``None``.
    """
    if return_code:
        print("workbench open: internal error: the workbench stopped on an unexpected "
              "exception (above). This is a bug: please report it with the project file; "
              "unsaved edits are offered again from the recovery copy on the next open.", file=sys.stderr)
        return ExitCode.INTERNAL
    return ExitCode(result) if result in {c.value for c in ExitCode} else ExitCode.OK
