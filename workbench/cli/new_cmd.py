"""``workbench new PATH``: write a commented starter project (never over an existing file)."""

from __future__ import annotations

import argparse
import sys

from workbench.cli.exit_codes import ExitCode


def add_parser(subparsers, name: str, help_text: str) -> argparse.ArgumentParser:
    parser = subparsers.add_parser(
        name, help=help_text, description="Write a commented starter project file that passes "
        "'workbench check'. An existing file is never overwritten.")
    parser.add_argument("path", metavar="PATH", help="file to create, e.g. drain.toml")
    parser.add_argument("--units", choices=("SI", "US"), default="SI",
                        help="units of the figures in the file and its display units "
                        "(default SI)")
    return parser


def run(args: argparse.Namespace) -> ExitCode:
    from workbench.project.starter import starter_text

    try:
        with open(args.path, "x", encoding="utf-8", newline="\n") as handle:
            handle.write(starter_text(args.units))
    except FileExistsError:
        print(f"{args.path}: already exists; not overwritten (choose another name)",
              file=sys.stderr)
        return ExitCode.INVALID
    except OSError as exc:
        print(f"{args.path}: cannot write: {exc.strerror or exc}", file=sys.stderr)
        return ExitCode.INVALID
    print(f"wrote {args.path}; edit it, then run: workbench check {args.path}")
    return ExitCode.OK
