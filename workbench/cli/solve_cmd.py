"""``workbench solve PROJECT [--json]``: the steady flows, heads and warnings of a project.

Exit status 0 on a solution (even with warnings), 1 when the project is invalid or has no
steady solution (the reason on stderr), 2 for wrong usage. Tables go to stdout in the
project's unit system; ``--json`` prints the documented SI object instead.
"""

from __future__ import annotations

import argparse
import sys

from workbench.cli.exit_codes import ExitCode


def add_parser(subparsers, name: str, help_text: str) -> argparse.ArgumentParser:
    parser = subparsers.add_parser(
        name, help=help_text,
        description="Solve the steady flows and heads of a project at its stored levels and "
        "valve openings, and report every line, node and warning.")
    parser.add_argument("project", metavar="PROJECT", help="project file (.toml)")
    parser.add_argument("--json", action="store_true",
                        help="print the result as JSON (SI units) instead of tables")
    return parser


def run(args: argparse.Namespace) -> ExitCode:
    import json

    from workbench.core.network import solve_steady
    from workbench.output.steady import steady_tables, steady_to_json
    from workbench.cli.common import load_or_report

    project = load_or_report(args.project)
    if project is None:
        return ExitCode.INVALID
    system = project.system
    result = solve_steady(system)
    if not result.success:
        print(f"{args.project}: {result.message}", file=sys.stderr)
        return ExitCode.INVALID
    from workbench.core.sanity import check_steady, describe

    broken = check_steady(system, result)
    if broken:
        print(f"{args.project}: internal consistency check failed: {describe(broken)}; "
              "please report", file=sys.stderr)
        return ExitCode.INTERNAL
    if args.json:
        json.dump(steady_to_json(result, system), sys.stdout, indent=1, allow_nan=False)
        sys.stdout.write("\n")
        return ExitCode.OK
    from rich.console import Console

    from workbench.cautions import PREAMBLE

    console = Console(soft_wrap=False)
    for renderable in steady_tables(result, system, project.unit_system):
        console.print(renderable)
    console.print(f"\n{PREAMBLE} See 'workbench cautions'.")
    return ExitCode.OK
