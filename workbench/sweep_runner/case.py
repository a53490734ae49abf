"""One case of a sweep, where it runs: apply the case's settings to the base project, solve,
simulate, and return the JSON objects with the error text.

A :class:`SweepTask` carries everything a worker needs (the project file's text and the
case), so a task can run in this process, in a local worker process, or on a cluster
worker on another machine. Each worker keeps the projects it has loaded, keyed by a hash of
the text (:func:`cached_project`): a sweep's cases share one base project, loaded once per
worker.
"""

from __future__ import annotations

import hashlib
import threading
from collections import OrderedDict
from dataclasses import dataclass
from typing import TYPE_CHECKING

from workbench.sweep_runner.plan import problems_text

if TYPE_CHECKING:  # pragma: no cover
    from workbench.project.document import Project

__all__ = ["PROJECT_CACHE_SIZE", "SweepTask", "cached_project", "remember_project", "run_task",
           "solve_case"]

Solved = tuple  # (steady json | None, simulation json | None, error | None)


@dataclass(frozen=True)
class SweepTask:
    """One case as sent to a worker."""

    text: str
    """The base project file's text (after :func:`~workbench.sweep_runner.plan.prepared_base`)."""
    name: str
    """The project's file name, for messages."""
    settings: tuple[tuple[str, object], ...]
    """The case's ``(keypath, value)`` settings, as in :class:`~workbench.project.sweep_spec.Case`."""
    simulate: bool
    """Simulate the case as well as solving it steadily."""
    units: str | None = None
    """Display units of the case's messages ("SI"/"US"); ``None``: the file's own."""


#: Base projects a worker keeps loaded (a worker serves one sweep at a time; a few allow for
#: sweeps of several projects sharing a cluster).
PROJECT_CACHE_SIZE = 4

_PROJECTS: OrderedDict[tuple[str, str], Project] = OrderedDict()
_PROJECTS_LOCK = threading.Lock()


def _key(text: str, name: str, units: str | None = None) -> tuple[str, str]:
    return hashlib.sha256(text.encode("utf-8")).hexdigest(), f"{name}\0{units or ''}"


def remember_project(project: Project) -> None:
    """Put an already loaded project in this process's cache (under its own text)."""
    with _PROJECTS_LOCK:
        _PROJECTS[_key(project.text, project.name, project.unit_system)] = project
        while len(_PROJECTS) > PROJECT_CACHE_SIZE:
            _PROJECTS.popitem(last=False)


def cached_project(text: str, name: str, units: str | None = None) -> Project:
    """The project of ``text``, loaded once per process and kept (least recently used
    dropped beyond :data:`PROJECT_CACHE_SIZE`); ``units`` overrides its display units."""
    key = _key(text, name, units)
    with _PROJECTS_LOCK:
        project = _PROJECTS.get(key)
        if project is not None:
            _PROJECTS.move_to_end(key)
            return project
    from workbench.project.document import load_project_text

    if units is None:
        project = load_project_text(text, name)
    else:
        import dataclasses

        project = dataclasses.replace(load_project_text(text, name, units), unit_system=units)
    with _PROJECTS_LOCK:
        _PROJECTS[key] = project
        while len(_PROJECTS) > PROJECT_CACHE_SIZE:
            _PROJECTS.popitem(last=False)
    return project


def run_task(task: SweepTask) -> Solved:
    """Solve one task: what :func:`solve_case` returns. Runs on any worker."""
    return solve_case(cached_project(task.text, task.name, task.units), task.settings,
                      task.simulate)


def _unexpected(exc: Exception) -> str:
    """Words for a solver exception: a set-up problem (ValueError) as is, else a bug."""
    if isinstance(exc, ValueError):
        return str(exc) or type(exc).__name__
    return f"internal error ({type(exc).__name__}): {exc} - please report it"


def apply_settings(project: Project, settings) -> Project:
    """The project with each ``(keypath, value)`` set through the document (validated)."""
    from workbench.project.document import set_value

    for keypath, value in settings:
        project = set_value(project, keypath, value)
    return project


def solve_case(project: Project, settings, simulate: bool) -> Solved:
    """Apply one case's settings and solve it: ``(steady json, simulation json, error)``.

    Never raises for a case's own failure: the error text says what went wrong.
    """
    from workbench.project.document import ProjectError

    try:
        case_project = apply_settings(project, settings)
    except (ProjectError, ValueError) as exc:
        return None, None, problems_text(exc)
    system = case_project.system
    errors: list[str] = []
    steady_json = _steady(system, errors)
    sim_json = _simulation(system, errors) if simulate else None
    return steady_json, sim_json, ("; ".join(errors) or None)


def _steady(system, errors: list[str]) -> dict | None:
    """The ``solve --json`` object, or ``None`` with the reason appended to ``errors``."""
    try:
        from workbench.core.network import solve_steady
        from workbench.output.steady import steady_to_json

        result = solve_steady(system)
        if result.success:
            return steady_to_json(result, system)
        errors.append(f"steady: {result.message}")
    except Exception as exc:  # noqa: BLE001 - a case's failure is reported, the sweep goes on
        errors.append(f"steady: {_unexpected(exc)}")
    return None


def _simulation(system, errors: list[str]) -> dict | None:
    """The ``simulate --json`` object without time series (elastic lines included), or
    ``None``, with what went wrong appended to ``errors``."""
    sim_json = None
    try:
        from workbench.core.transient import simulate as run_simulation
        from workbench.output.transient import transient_to_json

        sim = run_simulation(system)
        sim_json = transient_to_json(sim, system, include_series=False)
        if not sim.success:
            errors.append(f"simulation: {sim.message}")
    except Exception as exc:  # noqa: BLE001 - reported per case
        errors.append(f"simulation: {_unexpected(exc)}")
    if sim_json is not None:
        try:
            _add_elastic(sim_json, system)
        except Exception as exc:  # noqa: BLE001 - reported per case
            errors.append(f"elastic surge: {_unexpected(exc)}")
    return sim_json


def _add_elastic(sim_json: dict, system) -> None:
    """Run the elastic surge model on lines the project marks ``model = "elastic"``.

    Adds what ``simulate --json`` adds (``surge.ID.elastic`` and the elastic findings among
    the warnings), without the time series.
    """
    from workbench.core.elastic import elastic_line_ids, run_elastic

    ids = elastic_line_ids(system)
    if not ids:
        return
    from workbench.output.simulate_json import add_elastic_json, drop_elastic_series

    drop_elastic_series(add_elastic_json(sim_json, run_elastic(system, ids)))
