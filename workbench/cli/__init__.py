"""Command-line front end: ``workbench COMMAND ...``.

Each command lives in its own module under :mod:`workbench.cli` and exposes
``add_parser(subparsers)`` and ``run(args) -> ExitCode``. Modules are imported only when
their command runs, so ``workbench --help`` and ``workbench open`` start fast.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Sequence

from workbench import __version__
from workbench.cli.exit_codes import ExitCode

#: command name -> (module, one-line help). Order is the order shown in ``--help``.
COMMANDS: dict[str, tuple[str, str]] = {
    "check": ("workbench.cli.check_cmd", "validate project files and report every problem"),
    "new": ("workbench.cli.new_cmd", "write a commented starter project"),
    "format": ("workbench.cli.format_cmd", "rewrite project files in canonical form"),
    "solve": ("workbench.cli.solve_cmd", "solve the steady flows, heads and warnings of a project"),
    "simulate": ("workbench.cli.simulate_cmd", "simulate a project in time: levels, flows, events, surge screening"),
    "open": ("workbench.cli.open_cmd", "open a project in the keyboard-driven terminal workbench"),
    "sweep": ("workbench.cli.sweep_cmd", "what-if sweeps: vary inputs, judge each case, name the first that passes"),
    "report": ("workbench.cli.report_cmd", "write the Markdown calculation record (and CSV exports) of a project"),
}


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="workbench",
        description="Terminal workbench for plant gravity-flow systems (screening estimates; "
        "see 'workbench cautions').",
    )
    parser.add_argument("--version", action="version", version=f"workbench {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, (module_name, help_text) in COMMANDS.items():
        module = importlib.import_module(module_name)
        module.add_parser(sub, name, help_text)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the CLI; return the process exit code."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse exits 2 on usage errors, 0 on --help
        return int(exc.code or 0)
    if not getattr(args, "command", None):
        parser.print_help(sys.stderr)
        return int(ExitCode.USAGE)
    module = importlib.import_module(COMMANDS[args.command][0])
    try:
        return int(module.run(args))
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return int(ExitCode.INTERRUPTED)
