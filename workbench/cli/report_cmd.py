"""``workbench report PROJECT``: the Markdown calculation record, and CSV exports of results."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from workbench.cli.exit_codes import ExitCode


def add_parser(subparsers, name: str, help_text: str) -> None:
    parser = subparsers.add_parser(
        name, help=help_text,
        description="Solve the project (and simulate it when it has a [simulation] section) and "
        "write a calculation record in Markdown: inputs as entered, fluid properties, methods "
        "with their sources and validity, results, events, warnings, cautions and sign-off "
        "lines. It reads well in a version-control web view and converts to PDF (e.g. pandoc).",
    )
    parser.add_argument("project", type=Path, help="project file (.toml)")
    from workbench.cli.common import add_units_option

    add_units_option(parser)
    parser.add_argument("--output", "-o", type=Path, metavar="PATH",
                        help="write the record to PATH (default: standard output)")
    parser.add_argument("--csv-dir", type=Path, metavar="DIR",
                        help="also write the result tables and time series as CSV files in DIR "
                        "(lines, nodes, profiles, warnings, events, timeseries; SI units)")
    parser.add_argument("--steady-only", action="store_true",
                        help="do not run the simulation even when the project has one")


def run(args: argparse.Namespace) -> ExitCode:
    from workbench.cli.common import load_or_report

    project = load_or_report(args.project, units=args.units)
    if project is None:
        return ExitCode.INVALID

    from workbench.core.network import solve_steady
    from workbench.core.sanity import check_steady, check_transient, describe
    from workbench.output.record import calculation_record, result_tables, write_result_csvs

    system = project.system
    steady = solve_steady(system)
    if not steady.success:
        from workbench.output.common import finding_message

        print(f"{args.project}: no steady solution: "
              f"{finding_message(steady, project.unit_system)}", file=sys.stderr)
    broken = check_steady(system, steady)
    if broken:  # the same refusal as solve's: a result that breaks the physics is a bug
        print(f"{args.project}: internal consistency check failed: {describe(broken)}; "
              "please report", file=sys.stderr)
        return ExitCode.INTERNAL
    transient = None
    incomplete = False  # the simulation failed or stopped short: exit 1, as simulate does
    if system.simulation is not None and not args.steady_only:
        from workbench.cli.common import terminal_progress
        from workbench.core.transient import simulate

        try:
            with terminal_progress("simulating") as progress:
                transient = simulate(system, progress=progress)
        except ValueError as exc:
            print(f"{args.project}: simulation not run: {exc}", file=sys.stderr)
            incomplete = True
        else:
            if not transient.success:
                print(f"{args.project}: simulation: {transient.message}", file=sys.stderr)
                incomplete = True
            if not transient.success and len(transient.t) < 2:
                transient = None  # it never started (no steady start): nothing to record
            elif check_transient(system, transient):
                print(f"{args.project}: internal consistency check failed: "
                      f"{describe(check_transient(system, transient))}; please report",
                      file=sys.stderr)
                return ExitCode.INTERNAL
    elastic = None
    if transient is not None:
        from workbench.core.elastic import elastic_line_ids, run_elastic

        ids = elastic_line_ids(system)
        if ids:
            from workbench.cli.common import terminal_progress

            with terminal_progress("elastic surge") as progress:
                elastic = run_elastic(system, ids, progress=progress)
            for lid, res in elastic.items():
                if res.status == -1:  # as simulate: said, kept in the record, exit 1
                    print(f"{args.project}: elastic surge, line {lid}: {res.message}",
                          file=sys.stderr)
                    incomplete = True
    text = calculation_record(project, steady, transient, elastic=elastic)
    if args.output is None:
        sys.stdout.write(text)
    else:
        try:
            args.output.write_text(text, encoding="utf-8")
        except OSError as exc:
            print(f"{args.output}: cannot write: {exc.strerror or exc}", file=sys.stderr)
            return ExitCode.INVALID
        print(f"wrote {args.output}", file=sys.stderr)
    if args.csv_dir is not None:
        try:
            written = write_result_csvs(args.csv_dir, result_tables(project, steady, transient, elastic))
        except OSError as exc:
            print(f"{args.csv_dir}: cannot write: {exc.strerror or exc}", file=sys.stderr)
            return ExitCode.INVALID
        print(f"wrote {len(written)} CSV files to {args.csv_dir}", file=sys.stderr)
    return ExitCode.OK if steady.success and not incomplete else ExitCode.INVALID
