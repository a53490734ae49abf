"""Pieces every command shares: loading a project with its problems reported on stderr."""

from __future__ import annotations

import sys


def load_or_report(path: str):
    """The loaded project, or ``None`` after printing every problem (file, key path, words)
    on stderr; the caller then returns ``ExitCode.INVALID``."""
    from workbench.project.document import ProjectError, load_project

    try:
        return load_project(path)
    except ProjectError as exc:
        for problem in exc.problems:
            print(problem, file=sys.stderr)
    except OSError as exc:
        print(f"{path}: cannot read the file: {exc.strerror or exc}", file=sys.stderr)
    return None
