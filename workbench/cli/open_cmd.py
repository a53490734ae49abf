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
    if path is not None and not path.is_file():
        print(f"{path}: no such file (use 'workbench new {path}' to start one, or "
              "'workbench open' without a file)", file=sys.stderr)
        return ExitCode.INVALID
    from workbench.app.factory import make_app

    app = make_app(path=path, offer_new=path is None, unit_system=args.units)
    code = app.run()
    return ExitCode(code) if code in {c.value for c in ExitCode} else ExitCode.OK
