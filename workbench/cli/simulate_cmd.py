"""``workbench simulate PROJECT [--duration D] [--json] [--csv PATH] [--plot]``.

Runs the rigid-column transient of a project (tanks draining or transferring, valves
moving by their schedules) and prints a summary: drain or transfer times, peak and minimum
flows and pressures per line, surge screening of valve closures, events and warnings.
``--json`` prints the documented SI object on stdout instead; ``--csv`` writes the time
series; ``--plot`` draws trend plots of levels and flows in the terminal.

A progress bar (fraction of simulated time) goes to stderr when stderr is a terminal.
Exit status 0 when the run completes (with or without warnings), 1 for an invalid project
or a failed integration (the reason on stderr), 130 when interrupted.

The model is a lumped rigid column: for viscous liquids its laminar start-up (time constant
rho D^2/(32 mu)) is 1.3 to 1.4 times quicker than the exact laminar start-up (Szymanski's
series solution) over 63 to 99 % of the final flow.
"""

from __future__ import annotations

import argparse
import sys

from workbench.cli.exit_codes import ExitCode

_EPILOG = (
    "Rigid-column model: valid for slow valve moves; fast closures are flagged "
    "(surge.rapid_closure) and need an elastic analysis. The lumped laminar start-up "
    "(time constant rho*D^2/(32*mu)) is 1.3-1.4 times quicker than the exact laminar start-up "
    "(Szymanski's series solution) to reach 63-99 % of the final flow. A computed drained "
    "time is never proof that a tank is empty."
)


def add_parser(subparsers, name: str, help_text: str) -> argparse.ArgumentParser:
    from workbench.cli.common import add_json_option, add_project_command, add_units_option

    parser = add_project_command(
        subparsers, name, help_text, epilog=_EPILOG,
        description="Simulate a project in time: tank levels, line flows, valve moves, "
        "events (drained, overflow, reversal, valve closed) and surge screening.")
    add_units_option(parser)
    parser.add_argument("--duration", metavar="D",
                        help="simulated time, with units ('2 h', '90 min'; a plain number is "
                        "seconds); default: the project's [simulation] duration")
    add_json_option(parser)
    parser.add_argument("--csv", metavar="PATH",
                        help="write the time series (flows, levels; SI units) as CSV")
    parser.add_argument("--plot", action="store_true",
                        help="draw trend plots of tank levels and line flows in the terminal")
    from workbench.cli.elastic_option import add_elastic_option

    add_elastic_option(parser)
    return parser


def _duration(text: str | None) -> float | None:
    if text is None:
        return None
    try:
        value = float(text)
    except ValueError:
        from workbench.project.units import parse_quantity

        value = parse_quantity(text, "time")
    if not value > 0.0:
        raise ValueError(f"--duration must be a positive time, got {text!r}")
    return value


def run(args: argparse.Namespace) -> ExitCode:
    import json

    from workbench.cli.common import load_or_report, want_colour

    try:
        duration = _duration(args.duration)
    except ValueError as exc:
        print(f"--duration: {exc}", file=sys.stderr)
        return ExitCode.USAGE
    project = load_or_report(args.project, units=args.units)
    if project is None:
        return ExitCode.INVALID
    system = project.system
    if duration is None and system.simulation is None:
        print(f"{args.project}: simulation.duration: no duration: add a [simulation] table "
              "with duration = '...' or give --duration", file=sys.stderr)
        return ExitCode.INVALID

    from workbench.cli.elastic_option import check_elastic_names, run_elastic_lines

    elastic_names_problem = check_elastic_names(args, system)
    if elastic_names_problem:
        print(elastic_names_problem, file=sys.stderr)
        return ExitCode.USAGE

    from workbench.core.topology import TopologyError
    from workbench.core.transient import simulate

    try:
        with _progress_bar() as progress:
            result = simulate(system, duration=duration, progress=progress)
    except (TopologyError, ValueError) as exc:
        print(f"{args.project}: {exc}", file=sys.stderr)
        return ExitCode.INVALID
    if not result.success and result.status == -1 and len(result.t) < 2:
        print(f"{args.project}: {result.message}", file=sys.stderr)
        return ExitCode.INVALID
    from workbench.core.sanity import check_transient, describe

    broken = check_transient(system, result)
    if broken:
        print(f"{args.project}: internal consistency check failed: {describe(broken)}; "
              "please report", file=sys.stderr)
        return ExitCode.INTERNAL

    if args.csv:
        from workbench.output.transient import transient_csv

        try:
            with open(args.csv, "w", encoding="utf-8", newline="") as stream:
                transient_csv(result, stream, system)
        except OSError as exc:
            print(f"{args.csv}: cannot write the CSV file: {exc.strerror or exc}",
                  file=sys.stderr)
            return ExitCode.INVALID

    elastic, elastic_problem = run_elastic_lines(args, system, max_duration=duration)
    from workbench.output.measurements import compare_or_problems  # site tests, if any

    measured, unreadable = compare_or_problems(project, result)
    if unreadable:
        print(unreadable, file=sys.stderr)
        return ExitCode.INVALID
    if args.json:
        from workbench.output.simulate_json import add_elastic_json
        from workbench.output.transient import transient_to_json

        out = add_elastic_json(transient_to_json(result, system), elastic)
        if measured:
            from workbench.output.measurements import comparisons_to_json

            out["measurements"] = comparisons_to_json(measured)
        json.dump(out, sys.stdout, indent=1, allow_nan=False)
        sys.stdout.write("\n")
    else:
        from rich.console import Console

        from workbench.cautions import PREAMBLE
        from workbench.output.transient import transient_tables

        console = Console(soft_wrap=False)
        for renderable in transient_tables(result, system, project.unit_system):
            console.print(renderable)
        from workbench.cli.elastic_option import print_elastic_tables

        print_elastic_tables(console, elastic, system, project.unit_system)
        from workbench.output.measurements import comparison_tables

        for renderable in comparison_tables(measured, project.unit_system):
            console.print(renderable)
        console.print(f"\n{PREAMBLE} See 'workbench cautions'.")
    if args.plot:
        # plots go with the tables on stdout, or to stderr when stdout carries JSON
        stream = sys.stderr if args.json else sys.stdout
        print(_plots(result, project.unit_system, colour=want_colour(stream), measured=measured),
              file=stream)
    if not result.success:
        print(f"{args.project}: {result.message}", file=sys.stderr)
        return ExitCode.INVALID
    if elastic_problem:
        print(elastic_problem, file=sys.stderr)
        return ExitCode.INVALID
    return ExitCode.OK


class _progress_bar:
    """A rich progress bar on stderr when it is a terminal; otherwise nothing."""

    def __enter__(self):
        if not sys.stderr.isatty():
            return None
        from rich.console import Console
        from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn

        self._progress = Progress(
            TextColumn("simulating"), BarColumn(), TextColumn("{task.percentage:>5.1f} %"),
            TimeElapsedColumn(), console=Console(stderr=True), transient=True)
        self._progress.start()
        task = self._progress.add_task("simulating", total=1.0)
        return lambda fraction: self._progress.update(task, completed=fraction)

    def __exit__(self, *exc):
        progress = getattr(self, "_progress", None)
        if progress is not None:
            progress.stop()
        return False


def _plots(result, unit_system: str, colour: bool = True, measured=()) -> str:
    """Terminal trend plots (plotext) of tank levels and line flows, display units, with the
    readings of site tests compared on this run as points."""
    import plotext as plt

    from workbench.project.units import display_unit, to_display

    t = result.t
    scale, t_unit = (3600.0, "h") if t[-1] >= 7200 else (60.0, "min") if t[-1] >= 120 else (1.0, "s")
    tt = (t / scale).tolist()
    texts = []

    def start():
        plt.clf()
        plt.plotsize(80, 20)
        if not colour:
            plt.theme("clear")

    if result.tank_ids:
        start()
        for k, tid in enumerate(result.tank_ids):
            plt.plot(tt, [float(v) for v in to_display(result.levels[k], "elevation", unit_system)],
                     label=tid)
        _readings(plt, measured, "level", scale, unit_system)
        plt.title("Tank levels")
        plt.xlabel(f"time [{t_unit}]")
        plt.ylabel(f"level [{display_unit('elevation', unit_system)}]")
        texts.append(plt.build())
    start()
    for i, lid in enumerate(result.line_ids):
        plt.plot(tt, [float(v) for v in to_display(result.flows[i], "flow", unit_system)], label=lid)
    _readings(plt, measured, "flow", scale, unit_system)
    plt.title("Line flows")
    plt.xlabel(f"time [{t_unit}]")
    plt.ylabel(f"flow [{display_unit('flow', unit_system)}]")
    texts.append(plt.build())
    plt.clf()
    text = "\n".join(texts)
    return text if colour else plt.uncolorize(text)  # the clear theme still writes resets


def _readings(plt, measured, quantity: str, scale: float, unit_system: str) -> None:
    """Scatter the readings of the site tests of ``quantity`` compared on this run."""
    from workbench.project.units import to_display

    kind = "elevation" if quantity == "level" else "flow"
    for c in measured:
        if c.measurement.quantity == quantity and c.compared_on == "this run" and len(c.readings):
            plt.scatter((c.times / scale).tolist(),
                        [float(v) for v in to_display(c.readings, kind, unit_system)],
                        label=f"{c.measurement.name} (measured)", marker="o")
