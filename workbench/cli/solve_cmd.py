"""``workbench solve PROJECT [--json] [--csv PATH] [--units SI|US]``: the steady flows, heads and warnings of a project.

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
    from workbench.cli.common import add_units_option

    add_units_option(parser)
    parser.add_argument("--json", action="store_true",
                        help="print the result as JSON (SI units) instead of tables")
    parser.add_argument("--csv", metavar="PATH",
                        help="also write the lines table as CSV (SI units; the columns of "
                        "'workbench report --csv-dir' lines.csv)")
    return parser


def run(args: argparse.Namespace) -> ExitCode:
    import json

    from workbench.cli.common import load_or_report
    from workbench.core.network import solve_steady
    from workbench.output.steady import steady_tables, steady_to_json

    project = load_or_report(args.project, units=args.units)
    if project is None:
        return ExitCode.INVALID
    system = project.system
    result = solve_steady(system)
    if not result.success:
        from workbench.output.common import finding_message

        print(f"{args.project}: {finding_message(result, project.unit_system)}", file=sys.stderr)
        return ExitCode.INVALID
    from workbench.core.sanity import check_steady, describe

    broken = check_steady(system, result)
    if broken:
        print(f"{args.project}: internal consistency check failed: {describe(broken)}; "
              "please report", file=sys.stderr)
        return ExitCode.INTERNAL
    if args.csv:
        try:
            _write_lines_csv(args.csv, project, result)
        except OSError as exc:
            print(f"{args.csv}: cannot write the CSV file: {exc.strerror or exc}", file=sys.stderr)
            return ExitCode.INVALID
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


def _write_lines_csv(path: str, project, result) -> None:
    """The lines table of the calculation record's CSV exports, written to ``path``."""
    import csv

    from workbench.output.record import result_tables

    rows = result_tables(project, result)["lines.csv"]
    with open(path, "w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        for row in rows:
            writer.writerow(["" if v is None else (repr(v) if isinstance(v, float) else v)
                             for v in row])
