"""``workbench calibrate PROJECT --fit KEYPATH[=LOW..HIGH] ... [--measurement NAME] [--units SI|US]
[--json] [--plot] [--write]``.

Fits one to three numbers of the project (a line's roughness or bore, a fixed-K fitting, the
valve's loss or Kv) to the project's site tests (``[measurements.NAME]``) by bounded
nonlinear least squares, and prints the fitted values with their 95 % confidence
intervals, the residuals before and after, the correlation between the parameters and a
plot of the readings against the model. ``--write`` writes the fitted values into the file
as one edit, each with a comment naming the measurements and the date; without it nothing
changes. ``--units`` shows the result in other display units than the project's (the JSON
stays SI, and ``--write`` writes in the file's own units).

Progress (model runs and the current residual) goes to stderr. Exit status as for
``simulate``: 0 for a fit that converged, 1 for an invalid project or request, or a fit
that did not converge (the reason on stderr), 2 for wrong usage, 130 when interrupted.
"""

from __future__ import annotations

import argparse
import os
import sys

from workbench.cli.exit_codes import ExitCode

_EPILOG = (
    "Example: workbench calibrate projects/fellgate_wash_tank_drain_test.toml "
    "--fit 'lines.420-DR-07.roughness=0.01..3 mm'. "
    "A calibrated model holds near the tested conditions; the output states the range tested."
)


def add_parser(subparsers, name: str, help_text: str) -> argparse.ArgumentParser:
    from workbench.cli.common import add_json_option, add_project_command, add_units_option

    parser = add_project_command(
        subparsers, name, help_text, epilog=_EPILOG,
        description="Fit uncertain numbers of the model (roughness, bore, loss "
        "coefficients) to what was measured on the plant ([measurements.NAME] tables).")
    add_units_option(parser)
    parser.add_argument("--fit", metavar="KEYPATH[=LOW..HIGH]", action="append", default=[],
                        help="a number to fit and its range in the file's units, e.g. "
                        "'lines.L1.roughness=0.01..3 mm' (one to three; repeat the option)")
    parser.add_argument("--measurement", metavar="NAME", action="append", default=None,
                        help="fit to this measurement only (repeatable; default: all)")
    add_json_option(parser)
    parser.add_argument("--plot", action="store_true",
                        help="plot the readings against the model before and after the fit")
    parser.add_argument("--write", action="store_true",
                        help="write the fitted values into the project file (one edit, "
                        "comments kept) when the fit converged")
    return parser


def _progress(enabled: bool):
    if not enabled:
        return None

    def report(evaluations: int, rms: float) -> None:
        print(f"\rcalibrating: model run {evaluations}, relative RMS residual {rms:.4g}   ",
              end="", file=sys.stderr, flush=True)
    return report


def run(args: argparse.Namespace) -> ExitCode:
    import json

    from workbench.cli.common import load_or_report

    if not args.fit:
        print("workbench calibrate: give at least one --fit KEYPATH[=LOW..HIGH], e.g. "
              "--fit 'lines.L1.roughness=0.01..3 mm'", file=sys.stderr)
        return ExitCode.USAGE
    project = load_or_report(args.project)
    if project is None:
        return ExitCode.INVALID
    own = project  # --write writes in the file's own units, whatever --units shows
    if args.units is not None and args.units != project.unit_system:
        import dataclasses

        project = dataclasses.replace(project, unit_system=args.units)
    from workbench.core.calibration import CalibrationError
    from workbench.project.calibration import FitSpecError, calibrate
    from workbench.project.problems import ProjectError

    progress = _progress(sys.stderr.isatty() or bool(os.environ.get("WORKBENCH_PROGRESS")))
    try:
        calibration = calibrate(project, args.fit, args.measurement, progress=progress)
    except FitSpecError as exc:
        print(f"{args.project}: {exc}", file=sys.stderr)
        return ExitCode.INVALID
    except ProjectError as exc:
        for problem in exc.problems:
            print(problem, file=sys.stderr)
        return ExitCode.INVALID
    except CalibrationError as exc:
        print(f"{args.project}: the model cannot be run at the project's own values: {exc}",
              file=sys.stderr)
        return ExitCode.INVALID
    finally:
        if progress is not None:
            print(file=sys.stderr)
    result = calibration.result
    if args.json:
        from workbench.output.calibration import calibration_to_json

        json.dump(calibration_to_json(calibration), sys.stdout, indent=1, allow_nan=False)
        sys.stdout.write("\n")
    else:
        from rich.console import Console

        from workbench.output.calibration import calibration_tables

        console = Console(soft_wrap=False)
        for renderable in calibration_tables(calibration):
            console.print(renderable)
    if args.plot:
        from workbench.output.calibration import calibration_plot

        stream = sys.stderr if args.json else sys.stdout
        colour = stream.isatty() and not os.environ.get("NO_COLOR")
        print(calibration_plot(calibration, colour=colour), file=stream)
    if not result.success:
        print(f"{args.project}: {_failure(calibration)}", file=sys.stderr)
        return ExitCode.INVALID
    if args.write:
        return _write(args.project, own, calibration)
    return ExitCode.OK


def _failure(calibration) -> str:
    """Why the fit did not succeed (a bound is named in the file's units by
    :func:`workbench.project.calibration.bound_words`)."""
    result = calibration.result
    if result.status != -1:
        return f"the fit did not succeed: {result.message}"
    return result.message


def _write(path: str, project, calibration) -> ExitCode:
    from workbench.project.calibration import apply_fit
    from workbench.project.problems import ProjectError
    from workbench.project.save import save_project

    try:
        updated = apply_fit(project, calibration)
        save_project(updated, check_unchanged=True)
    except ProjectError as exc:
        for problem in exc.problems:
            print(problem, file=sys.stderr)
        return ExitCode.INVALID
    print(f"{path}: fitted values written ({', '.join(p.key for p in calibration.result.parameters)})",
          file=sys.stderr)
    return ExitCode.OK
