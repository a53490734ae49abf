"""``workbench check PROJECT...``: validate project files and report every problem.

Exit status 0 when every file is valid (a one-line summary per file on stdout), 1 when any
is not (every problem on stderr, as ``FILE: KEY: MESSAGE``), 2 for wrong usage. ``--json``
prints one object instead: ``{"valid": bool, "files": [{"file", "valid", "summary",
"problems": [{"key", "line", "column", "message", "text"}], "notes", "recovery"}]}``.

Unsaved edits kept beside a file by a workbench that ended without saving (a crash, a lost
session) are noted on stderr with the copy's path, valid file or not (``recovery``:
``[{"path", "written", "message"}]``); so is a workbench still running with unsaved edits
of it. The exit status is the file's verdict alone; ``check`` never touches a copy.
"""

from __future__ import annotations

import argparse
import sys

from workbench.cli.exit_codes import ExitCode


def add_parser(subparsers, name: str, help_text: str) -> argparse.ArgumentParser:
    parser = subparsers.add_parser(
        name, help=help_text, description="Validate project files. Every problem is reported, "
        "each with its file, key path, what was found and what was expected.")
    parser.add_argument("projects", nargs="+", metavar="PROJECT", help="project file (.toml)")
    from workbench.cli.common import add_units_option

    add_units_option(parser)
    parser.add_argument("--json", action="store_true",
                        help="print one JSON object: every file, whether it is valid, its "
                        "problems (file, key path, line, message) and notes")
    return parser


def summary(project) -> str:
    """One line describing a valid project."""
    from workbench.project.units import format_quantity

    system = project.system
    counts = []
    for label, items in (("reservoir", system.reservoirs), ("junction", system.junctions),
                         ("receiver", system.receivers), ("line", system.lines)):
        if items:
            counts.append(f"{len(items)} {label}{'' if len(items) == 1 else 's'}")
    fluid = system.fluid.name
    if system.fluid.temperature is not None:
        fluid += " at " + format_quantity(system.fluid.temperature, "temperature",
                                          project.unit_system, 3)
    parts = [", ".join(counts), fluid]
    if system.simulation is not None:
        parts.append("simulation " + _duration(system.simulation.duration))
    # the title is already shown escaped (control characters as \x1b): quote it as it is
    return f"{project.name}: valid — '{system.title}': " + "; ".join(parts)


def _duration(seconds: float) -> str:
    if seconds >= 3600:
        return f"{seconds / 3600:.4g} h"
    if seconds >= 60:
        return f"{seconds / 60:.4g} min"
    return f"{seconds:.4g} s"


def run(args: argparse.Namespace) -> ExitCode:
    reports = [_check(path, args.units) for path in args.projects]
    valid = all(r["valid"] for r in reports)
    if args.json:
        import json

        json.dump({"valid": valid, "files": reports}, sys.stdout, indent=1, ensure_ascii=False)
        sys.stdout.write("\n")
    else:
        for report in reports:
            for problem in report["problems"]:
                print(problem["text"], file=sys.stderr)
            if report["valid"]:
                print(report["summary"])
            for note in report["notes"]:
                print(f"{report['file']}: fluid: note: {note}", file=sys.stderr)
            for copy in report["recovery"]:
                print(f"{report['file']}: note: {copy['message']}", file=sys.stderr)
    return ExitCode.OK if valid else ExitCode.INVALID


def _check(path: str, units: str | None = None) -> dict:
    """One file's verdict: ``file``, ``valid``, ``summary`` (or ``None``), ``problems``
    (each with ``key``, ``line``, ``column``, ``message`` and the one-line ``text``) and the
    fluid's ``notes``; numbers in the display units ``units`` ("SI"/"US", default the
    file's own)."""
    from workbench.project.document import ProjectError, load_project

    report = {"file": str(path), "valid": False, "summary": None, "problems": [], "notes": [],
              "recovery": _recovery_notes(path)}
    try:
        project = load_project(path, units)
        if units is not None and units != project.unit_system:
            import dataclasses

            project = dataclasses.replace(project, unit_system=units)
        if "measurements" in project.data:  # site tests: their CSV files are read here
            from workbench.project.measurements import measurements_of

            measurements_of(project)
    except ProjectError as exc:
        report["problems"] = [{"key": p.key, "line": p.line, "column": p.column,
                               "message": p.message, "text": str(p)} for p in exc.problems]
        return report
    from workbench.output.common import finding_message

    report.update(valid=True, summary=summary(project),
                  notes=[finding_message(n, project.unit_system) for n in project.system.fluid.notes])
    return report


def _recovery_notes(path: str) -> list[dict]:
    """Unsaved edits of the file kept by other workbenches: each copy left by one that
    ended without saving (``path``, ``written`` as ISO 8601 UTC, ``message``), then each
    one still running (``path`` and ``written`` ``None``). Changes nothing on disk."""
    import datetime

    from workbench.project.recovery import scan_recoveries

    scan = scan_recoveries(path, tidy=False)
    notes = [{"path": str(r.path),
              "written": datetime.datetime.fromtimestamp(r.written, datetime.timezone.utc)
              .isoformat(timespec="seconds"),
              "message": r.describe(full_path=True) + f"; 'workbench open {path}' offers them "
              "back"} for r in scan.offers]
    notes += [{"path": None, "written": None,
               "message": f"the file is open in another workbench ({owner.describe()}) with "
               "unsaved edits of its own"} for owner in scan.live]
    return notes
