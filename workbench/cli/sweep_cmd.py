"""``workbench sweep PROJECT --vary KEYPATH=VALUES ...``: what-if sweeps from the command line."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from workbench.cli.exit_codes import ExitCode

_EPILOG = """\
values:   a comma-separated list as the file would hold them ('80 mm,100 mm,150 mm',
          '3 in,4 in,6 in', 'linear,equal_percentage') or a range with a point count,
          ends included ('0.5 m..4 m/8'). Several --vary make a grid; the first --vary
          changes slowest (sweep order).
require:  METRIC(ID) OP THRESHOLD, with OP one of < <= > >=, or 'no CODE' / 'no CODE(ID)'.
          Metrics: flow, velocity, head_loss, reynolds, lowest_pressure (lines, steady);
          pressure, head (nodes);
          drain_time, overflow_time, max_level, min_level, final_level (tanks, from the
          simulation); max_pressure, min_pressure (lines, from the simulation). Every
          --require must hold for a case to pass; the first passing case in sweep order is
          named, and what each criterion measured is shown in the table.
examples:
  workbench sweep drain.toml --vary lines.L1.nominal_size='2 in,3 in,4 in' \\
      --require 'drain_time(T1) < 30 min' --require 'no profile.vapor'
  workbench sweep transfer.toml --vary reservoirs.T1.level='0.5 m..4 m/8' --json
  workbench sweep clearwell.toml --vary lines.L1.valve.opening='0.3..0.6/7' \\
      --require 'max_level(T1) < 3.4 m' --require 'min_level(T1) > 1.5 m'
"""


def add_parser(subparsers, name: str, help_text: str) -> None:
    parser = subparsers.add_parser(
        name, help=help_text, epilog=_EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter,
        description="Solve the project once per combination of the varied values and judge each "
        "case against the criteria. Cases run in parallel when the project has a simulation; "
        "results come back in sweep order, and a case that fails does not stop the sweep.",
    )
    parser.add_argument("project", type=Path, help="project file (.toml)")
    from workbench.cli.common import add_units_option

    add_units_option(parser)
    parser.add_argument("--vary", action="append", default=[], metavar="KEYPATH=VALUES",
                        help="a key to vary and its values (repeat for a grid)")
    parser.add_argument("--require", action="append", default=[], metavar="CRITERION",
                        help="a pass criterion, e.g. 'drain_time(T1) < 30 min' (repeatable)")
    out = parser.add_mutually_exclusive_group()
    out.add_argument("--json", action="store_true", help="print the results as JSON on stdout")
    out.add_argument("--csv", type=Path, metavar="PATH", help="write the results table as CSV (SI units)")
    parser.add_argument("--steady-only", action="store_true",
                        help="skip the simulation even when the project has one")
    parser.add_argument("--quick", action="store_true",
                        help="steady flows of a one-line project only, all cases in one vectorised "
                        "solve (for dense sweeps; no profiles, warnings or simulation)")
    parser.add_argument("--workers", type=int, default=None, metavar="N",
                        help="processes for simulated cases on this machine (default: its "
                        "cores); not with --scheduler, where the cluster's workers run them")
    parser.add_argument("--scheduler", metavar="ADDRESS", default=None,
                        help="run the cases on the Dask cluster whose scheduler is at ADDRESS "
                        "(e.g. tcp://10.0.0.5:8786; needs the 'cluster' extra)")


def _progress_bar():
    """A rich progress bar on stderr, or ``None`` when stderr is not a terminal."""
    if not sys.stderr.isatty():
        return None
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeRemainingColumn

    # No refresh thread (auto_refresh off; the callback refreshes): worker processes can then
    # be forked from this single-threaded process and start warm.
    return Progress(TextColumn("sweep"), BarColumn(), MofNCompleteColumn(), TimeRemainingColumn(),
                    console=Console(stderr=True), transient=True, auto_refresh=False)


def _print_table(project, sweep: dict, keypaths) -> None:
    from rich.console import Console
    from rich.table import Table

    from workbench.output.sweep_table import display_rows, sweep_table

    columns, rows = sweep_table(sweep, keypaths)
    # Columns with nothing in any case (no errors, a quick sweep's pressures) are left out.
    columns = [c for c in columns
               if c.swept or c.key == "case" or any(row.get(c.key) not in (None, "") for row in rows)]
    console = Console()
    titles = []
    for col in columns:
        title = col.title
        if col.swept and title.split(".")[0] in ("reservoirs", "junctions", "receivers", "lines"):
            title = title.split(".", 1)[1]  # the element id already says which section
        titles.append(title)
    cells_by_row = display_rows(columns, rows, project.unit_system)
    widths = [max([len(t)] + [len(line) for r in cells_by_row for line in r[i].split(", ")])
              for i, t in enumerate(titles)]
    tables = []
    if sum(w + 3 for w in widths) > console.width:
        # Too many results for one row a case at this width: one column a case instead,
        # in blocks of as many cases as fit, so every value stays whole at 80 columns.
        from rich.text import Text

        label_width = max(len(t) for t in titles[1:]) + 4
        case_width = max([9] + [len(line) for cells in cells_by_row for c in cells[1:]
                                for line in c.split(", ")]) + 3
        per_block = max(1, (console.width - label_width) // case_width)
        for start in range(0, len(cells_by_row), per_block):
            block = cells_by_row[start:start + per_block]
            title = f"Sweep of {project.system.title}"
            if len(cells_by_row) > per_block:
                which = (f"case {block[0][0]}" if len(block) == 1
                         else f"cases {block[0][0]}-{block[-1][0]}")
                title += f" ({which} of {len(cells_by_row)})"
            table = Table(title=title, title_justify="left")
            table.add_column("result", no_wrap=True)
            for cells in block:
                table.add_column(f"case #{cells[0]}", justify="right", overflow="fold")
            for i, name in enumerate(titles[1:], start=1):
                # numbers line up on the right; words (values typed, warnings, errors) read
                # left
                justify = "right" if columns[i].kind else "left"
                split = columns[i].key == "warnings"  # one warning code a line
                table.add_row(name, *[Text(cells[i].replace(", ", "\n") if split else cells[i],
                                           justify=justify) for cells in block])
            tables.append(table)
    else:
        table = Table(title=f"Sweep of {project.system.title}", title_justify="left")
        for col, title in zip(columns, titles):
            table.add_column(title, justify="right" if col.kind or col.key == "case" else "left",
                             overflow="fold", no_wrap=col.swept,
                             min_width=24 if col.key == "warnings" else None)
        warn = [i for i, col in enumerate(columns) if col.key == "warnings"]
        for cells in cells_by_row:
            for i in warn:
                cells[i] = cells[i].replace(", ", "\n")
            table.add_row(*cells)
        tables.append(table)
    for table in tables:
        console.print(table)
    first = sweep.get("first_passing")
    if any(c.get("pass") is not None for c in sweep["cases"]) or sweep.get("criteria"):
        if first is None:
            console.print("No case passes every criterion.")
        else:
            values = ", ".join(f"{k} = {v}" for k, v in sweep["cases"][first]["values"].items())
            console.print(f"First passing case in sweep order: #{first + 1} ({values}).")


def run(args: argparse.Namespace) -> ExitCode:
    if not args.vary:
        print("workbench sweep: give at least one --vary KEYPATH=VALUES", file=sys.stderr)
        return ExitCode.USAGE
    if args.workers is not None and args.workers < 1:
        print("workbench sweep: --workers must be at least 1", file=sys.stderr)
        return ExitCode.USAGE
    if args.workers is not None and args.scheduler:
        print("workbench sweep: --workers sets the processes of this machine's pool and does "
              "not apply with --scheduler: the cluster's workers run the cases; set how many "
              "where they are started (dask worker ADDRESS --nworkers N --nthreads 1)",
              file=sys.stderr)
        return ExitCode.USAGE
    from workbench.cli.common import load_or_report
    from workbench.project.sweep_spec import SweepSpecError
    from workbench.sweep_runner import plan_sweep, quick_sweep_json, run_quick_sweep

    project = load_or_report(args.project, units=args.units)
    if project is None:
        return ExitCode.INVALID
    try:
        plan = plan_sweep(project, args.vary, args.require,
                          simulate=False if (args.steady_only or args.quick) else None)
    except SweepSpecError as exc:
        print(f"{args.project}: {exc}", file=sys.stderr)
        return ExitCode.USAGE

    if args.quick:
        try:
            sweep = quick_sweep_json(run_quick_sweep(project, plan), plan)
        except SweepSpecError as exc:
            print(f"{args.project}: {exc}", file=sys.stderr)
            return ExitCode.USAGE
    else:
        try:
            sweep = _run_cases(args, project, plan).to_json()
        except _ClusterUnusable as exc:
            print(f"workbench sweep: --scheduler: {exc}", file=sys.stderr)
            return ExitCode.USAGE
        except SweepSpecError as exc:
            print(f"{args.project}: {exc}", file=sys.stderr)
            return ExitCode.USAGE
    if plan.criteria:
        sweep["criteria"] = [c.text for c in plan.criteria]

    keypaths = [a.keypath for a in plan.axes]
    if args.json:
        json.dump(_finite(sweep), sys.stdout, indent=2, allow_nan=False)
        sys.stdout.write("\n")
    elif args.csv:
        from workbench.output.sweep_table import sweep_table, write_csv

        columns, rows = sweep_table(sweep, keypaths)
        try:
            write_csv(args.csv, columns, rows)
        except OSError as exc:
            print(f"{args.csv}: cannot write: {exc.strerror or exc}", file=sys.stderr)
            return ExitCode.INVALID
        print(f"wrote {len(rows)} cases to {args.csv}", file=sys.stderr)
    else:
        _print_table(project, sweep, keypaths)

    failed = [c for c in sweep["cases"] if c["error"]]
    for i, c in enumerate(sweep["cases"], start=1):  # numbered as in the table
        if c["error"]:
            print(f"case {i} ({', '.join(f'{k} = {v}' for k, v in c['values'].items())}): {c['error']}",
                  file=sys.stderr)
    if sweep["cases"] and len(failed) == len(sweep["cases"]):
        return ExitCode.INVALID
    return ExitCode.OK


class _ClusterUnusable(Exception):
    """The ``--scheduler`` cluster cannot be used (the message says why)."""


def _run_cases(args: argparse.Namespace, project, plan):
    """Every case, on the Dask cluster of ``--scheduler`` or the local pool, with a progress
    bar on a terminal."""
    from contextlib import ExitStack

    from workbench.sweep_runner import ClusterError, cluster_executor, run_sweep

    with ExitStack() as stack:
        executor = None
        if args.scheduler:
            try:
                executor = stack.enter_context(cluster_executor(args.scheduler))
            except ClusterError as exc:
                raise _ClusterUnusable(str(exc)) from None
        bar = _progress_bar()
        if bar is None:
            return run_sweep(project, plan, workers=args.workers, executor=executor)
        with bar:
            task = bar.add_task("sweep", total=len(plan.cases))

            def advance(done: int, total: int) -> None:
                bar.update(task, completed=done)
                bar.refresh()

            return run_sweep(project, plan, workers=args.workers, progress=advance,
                             executor=executor)


def _finite(obj):
    """Replace non-finite floats by None, recursively (JSON has no inf or nan)."""
    import math

    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if isinstance(obj, dict):
        return {k: _finite(v) for k, v in obj.items()}
    if isinstance(obj, list | tuple):
        return [_finite(v) for v in obj]
    return obj
