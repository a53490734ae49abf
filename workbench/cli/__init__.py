"""Command-line front end: ``workbench COMMAND ...``.

Each command lives in its own module under :mod:`workbench.cli` and exposes
``add_parser(subparsers)`` and ``run(args) -> ExitCode``. Modules are imported only when
their command runs, so ``workbench --help`` and ``workbench open`` start fast.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
import warnings
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
    "calibrate": ("workbench.cli.calibrate_cmd", "fit roughness, bore or losses to what was measured on the plant"),
    "report": ("workbench.cli.report_cmd", "write the Markdown calculation record (and CSV exports) of a project"),
    "cautions": ("workbench.cli.cautions_cmd", "print the safety cautions that go with every result"),
}


def build_parser(only: str | None = None) -> argparse.ArgumentParser:
    """The command-line parser; with ``only``, the other commands are listed (names and
    help, for ``--help`` and usage errors) but their modules are not imported and their
    options not built (a few hundredths of a second at every start)."""
    parser = argparse.ArgumentParser(
        prog="workbench",
        description="Terminal workbench for plant gravity-flow systems (screening estimates; "
        "see 'workbench cautions').",
    )
    parser.add_argument("--version", action="version", version=f"workbench {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, (module_name, help_text) in COMMANDS.items():
        if only is not None and name != only:
            sub.add_parser(name, help=help_text)
            continue
        module = importlib.import_module(module_name)
        module.add_parser(sub, name, help_text)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the CLI; return the process exit code."""
    words = sys.argv[1:] if argv is None else list(argv)
    # The first word that is not an option is the command (the top level takes no values).
    command = next((w for w in words if not w.startswith("-")), None)
    parser = build_parser(command if command in COMMANDS else None)
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse exits 2 on usage errors, 0 on --help
        return int(exc.code or 0)
    if not getattr(args, "command", None):
        parser.print_help(sys.stderr)
        return int(ExitCode.USAGE)
    module = importlib.import_module(COMMANDS[args.command][0])
    try:
        with warnings.catch_warnings():
            if not sys.warnoptions:
                # numpy's overflow notes and scipy's singular-matrix note would print ahead of
                # the real message; results are checked for finiteness and physical sanity
                # instead (workbench.core.sanity). ``python -W default`` shows them again.
                warnings.simplefilter("ignore", RuntimeWarning)
                warnings.filterwarnings("ignore", message="Matrix is exactly singular")
            return int(module.run(args))
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return int(ExitCode.INTERRUPTED)
    except BrokenPipeError:  # the reader went away (``workbench solve ... | head``)
        _silence_stdout()
        return int(ExitCode.INVALID)
    except Exception as exc:  # last resort: a bug must not greet the user with a traceback
        if os.environ.get("WORKBENCH_DEBUG"):
            raise
        from workbench.printable import printable

        print(f"workbench {args.command}: internal error: {type(exc).__name__}: "
              f"{printable(exc)}. "
              "This is a bug: please report it with the project file (WORKBENCH_DEBUG=1 "
              "shows the traceback).", file=sys.stderr)
        return int(ExitCode.INTERNAL)


def _silence_stdout() -> None:
    """Point stdout at the null device so the flush at exit raises no second error."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError, AttributeError):  # not a real file (captured output)
        pass
