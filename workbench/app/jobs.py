"""The work done off the UI thread: loading a file, the steady solve, a simulation.

Plain functions, no Textual: each imports its heavy modules on first use (so the app paints
before scipy, pint and the solvers load) and calls the project layer or the core only.
"""

from __future__ import annotations

import hashlib
from collections.abc import Callable
from pathlib import Path
from typing import Any


def load(path: Path) -> Any:
    """Load and validate a project file (raises ``ProjectError`` with every problem)."""
    from workbench.project.document import load_project

    return load_project(path)


def load_starter(units: str = "SI") -> Any:
    """A new, unsaved project made from the commented starter template, its figures in
    ``units`` ("SI" or "US")."""
    from workbench.project.document import load_project_text, starter_text

    return load_project_text(starter_text(units), name="<new project>")


def solve(system: Any) -> Any:
    """The steady solution of a system (a ``SteadyResult``), checked for physical sanity."""
    from workbench.core.network import solve_steady
    from workbench.core.sanity import check_steady

    result = solve_steady(system)
    _refuse_if_broken(check_steady(system, result))
    return result


def _refuse_if_broken(violations: list) -> None:
    """A result that breaks continuity or energy is a bug: never shown as a result."""
    if violations:
        from workbench.core.sanity import describe

        raise RuntimeError(f"internal consistency check failed: {describe(violations)}")


def simulate(
    system: Any,
    progress: Callable[[float], None],
    cancel: Callable[[], bool],
    junction_pressures: bool = False,
) -> tuple[Any, dict[str, Any]]:
    """Run the time simulation, then the elastic surge run of lines that ask for one.

    ``junction_pressures`` keeps each junction's pressure in time (for a site test's
    pressure readings).

    Returns the ``TransientResult`` and a dict line id -> ``ElasticResult`` (empty when no
    line has ``surge.model = "elastic"``). Progress is the fraction of the whole work: the
    rigid-column run takes the first half when an elastic run follows.
    """
    from workbench.core.elastic import elastic_line_ids, run_elastic
    from workbench.core.transient import simulate as run_rigid

    elastic_ids = elastic_line_ids(system)
    share = 0.5 if elastic_ids else 1.0
    result = run_rigid(system, progress=lambda f: progress(share * f), cancel=cancel,
                       junction_pressures=junction_pressures)
    from workbench.core.sanity import check_transient

    _refuse_if_broken(check_transient(system, result))
    elastic: dict[str, Any] = {}
    if elastic_ids and not cancel():
        elastic = run_elastic(system, elastic_ids, cancel=cancel,
                              progress=lambda f: progress(0.5 + 0.5 * f))
    return result, elastic


def elastic(
    system: Any,
    line_id: str,
    progress: Callable[[float], None],
    cancel: Callable[[], bool],
) -> dict[str, Any]:
    """The elastic surge run of one line's chain (``workbench simulate --elastic LINE``).

    Returns line id -> ``ElasticResult`` for every line of the chain; a chain that cannot
    be run gives a failed result whose message says why.
    """
    from workbench.core.elastic import run_elastic

    return run_elastic(system, [line_id], progress=progress, cancel=cancel)


def file_hash(path: Path) -> str | None:
    """sha256 of the file's bytes now, or ``None`` when it is gone."""
    try:
        return hashlib.sha256(Path(path).read_bytes()).hexdigest()
    except OSError:
        return None


def explain(error: BaseException) -> str:
    """A failure in words a user can act on, never a traceback.

    The project's own errors carry their problems (file, key path, message); anything else
    is a bug in the tool and says so, naming the exception.
    """
    problems = getattr(error, "problems", None)
    if problems:
        return "\n".join(str(p) for p in problems)
    if isinstance(error, ValueError):  # the core's input checks speak to the user
        return str(error)
    if isinstance(error, OSError):
        return f"{error.filename or 'file'}: {error.strerror or error}"
    text = str(error) or type(error).__name__
    return f"internal error ({type(error).__name__}): {text} — please report it"
