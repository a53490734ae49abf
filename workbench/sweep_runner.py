"""Running a what-if sweep: apply each case to the project, solve, judge, keep the order.

This is orchestration between the layers, with no UI: the CLI's ``sweep`` command and the
app's sweep screen both call :func:`plan_sweep` then :func:`run_sweep` (or
:func:`run_quick_sweep` for dense steady sweeps of a single line).

* Each case is the base project with the case's values set through
  :func:`workbench.project.document.set_value` (so it is validated exactly as a file would
  be), then solved by :func:`workbench.core.network.solve_steady` and, when the project
  has a ``[simulation]`` section, :func:`workbench.core.transient.simulate`.
* Cases with a simulation run in a :class:`concurrent.futures.ProcessPoolExecutor`; the
  outcomes are put back in sweep order whatever order they finish in.
* A case that fails (bad value, no solution, solver error) is reported with its error and the
  sweep goes on.
"""

from __future__ import annotations

import math
import os
import sys
from collections.abc import Callable, Sequence
from contextlib import contextmanager
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from workbench.project.sweep_spec import (
    Axis,
    Case,
    Criterion,
    Judgement,
    SweepSpecError,
    check_criteria,
    judge,
    parse_criterion,
    parse_vary,
    sweep_cases,
)

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.sweep import LineCases, LineCasesResult
    from workbench.project.document import Project

__all__ = [
    "CaseOutcome",
    "QuickSweep",
    "SweepOutcome",
    "SweepPlan",
    "plan_sweep",
    "prepared_base",
    "quick_sweep_json",
    "run_quick_sweep",
    "run_sweep",
]

Progress = Callable[[int, int], None]
"""``progress(done, total)``, called in the caller's thread after each finished case."""


@dataclass(frozen=True)
class SweepPlan:
    """A checked sweep: the axes, every case in sweep order, the criteria."""

    axes: tuple[Axis, ...]
    cases: tuple[Case, ...]
    criteria: tuple[Criterion, ...]
    simulate: bool
    """True when the project has a ``[simulation]`` section: each case is simulated too."""


def plan_sweep(project: Project, vary: Sequence[str], require: Sequence[str] = (),
               *, simulate: bool | None = None) -> SweepPlan:
    """Parse and check ``--vary`` and ``--require`` texts against the project.

    Raises
    ------
    SweepSpecError
        With a message naming the option and what was wrong.
    """
    data = project.data
    axes = tuple(parse_vary(text, data) for text in vary)
    cases = tuple(sweep_cases(axes))
    criteria = tuple(parse_criterion(text) for text in require)
    has_sim = project.system.simulation is not None
    run_sim = has_sim if simulate is None else (simulate and has_sim)
    check_criteria(criteria, data, run_sim)
    return SweepPlan(axes, cases, criteria, run_sim)


@dataclass(frozen=True)
class CaseOutcome:
    """The result of one case, in the JSON shape of ``workbench sweep --json``."""

    index: int
    values: dict[str, str]
    steady: dict | None
    """The ``solve --json`` object, or ``None`` when the steady solve failed."""
    simulation: dict | None
    """The ``simulate --json`` object without the time series, or ``None``."""
    passed: bool | None
    """All criteria met; ``None`` without criteria or when the case failed."""
    error: str | None
    judgements: tuple[Judgement, ...] = ()

    def to_json(self) -> dict:
        return {
            "values": dict(self.values),
            "steady": self.steady,
            "simulation": self.simulation,
            "pass": self.passed,
            "error": self.error,
            "checks": [
                {"criterion": j.criterion.text, "pass": j.passed,
                 "value": None if j.value is None or not math.isfinite(j.value) else j.value,
                 "note": j.note}
                for j in self.judgements
            ],
        }


@dataclass(frozen=True)
class SweepOutcome:
    """Every case in sweep order, and the first that passed."""

    cases: tuple[CaseOutcome, ...]
    first_passing: int | None
    cancelled: bool = False
    criteria: tuple[Criterion, ...] = field(default=())

    def to_json(self) -> dict:
        out: dict[str, Any] = {
            "cases": [c.to_json() for c in self.cases],
            "first_passing": self.first_passing,
        }
        if self.cancelled:
            out["cancelled"] = True
        return out


# --- one case (runs in this process or in a worker process) ----------------------------------


def _problems_text(exc: Exception) -> str:
    problems = getattr(exc, "problems", None)
    if problems:
        return "; ".join(str(p) for p in problems)
    return str(exc) or type(exc).__name__


#: Keys that replace others when swept: a line sized by inner diameter swept over nominal
#: sizes (and back) must lose the other way of giving its size.
_SWAPS = {"nominal_size": ("inner_diameter",), "inner_diameter": ("nominal_size", "schedule")}


def prepared_base(project: Project, axes: Sequence[Axis]) -> Project:
    """The base project with keys that conflict with a swept key removed.

    Sweeping ``lines.L1.nominal_size`` over a line given by ``inner_diameter`` means "size
    the line by nominal size": the inner diameter is dropped (and the other way round),
    with the key set to the axis' first value so the base stays valid.
    """
    for axis in axes:
        parts = axis.keypath.split(".")
        if len(parts) != 3 or parts[0] != "lines" or parts[2] not in _SWAPS:
            continue
        line = project.data.get("lines", {}).get(parts[1], {})
        drop = [k for k in _SWAPS[parts[2]] if k in line]
        if not drop:
            continue
        import tomlkit

        from workbench.project.document import load_project_text

        doc = tomlkit.parse(project.text)
        table = doc["lines"][parts[1]]
        for key in drop:
            del table[key]
        table[parts[2]] = axis.values[0]
        project = load_project_text(tomlkit.dumps(doc), project.name)
    return project


def _unexpected(exc: Exception) -> str:
    """Words for a solver exception: a set-up problem (ValueError) as is, else a bug."""
    if isinstance(exc, ValueError):
        return str(exc) or type(exc).__name__
    return f"internal error ({type(exc).__name__}): {exc} - please report it"


def _apply(project: Project, settings) -> Project:
    from workbench.project.document import set_value

    for keypath, value in settings:
        project = set_value(project, keypath, value)
    return project


def solve_case(project: Project, settings, simulate: bool) -> tuple[dict | None, dict | None, str | None]:
    """Apply one case's settings and solve it: ``(steady json, simulation json, error)``.

    Never raises for a case's own failure: the error text says what went wrong.
    """
    from workbench.project.document import ProjectError

    try:
        case_project = _apply(project, settings)
    except (ProjectError, ValueError) as exc:
        return None, None, _problems_text(exc)
    system = case_project.system
    errors: list[str] = []
    steady_json = sim_json = None
    try:
        from workbench.core.network import solve_steady
        from workbench.output.steady import steady_to_json

        result = solve_steady(system)
        if result.success:
            steady_json = steady_to_json(result, system)
        else:
            errors.append(f"steady: {result.message}")
    except Exception as exc:  # noqa: BLE001 - a case's failure is reported, the sweep goes on
        errors.append(f"steady: {_unexpected(exc)}")
    if simulate:
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
    return steady_json, sim_json, ("; ".join(errors) or None)


#: Keys of the ``surge.ID.elastic`` object that are time series (left out, as for the
#: transient's own series).
_ELASTIC_SERIES = ("time_s", "valve_pressure_pa", "midline_pressure_pa")


def _add_elastic(sim_json: dict, system) -> None:
    """Run the elastic surge model on lines the project marks ``model = "elastic"``.

    Adds what ``simulate --json`` adds (``surge.ID.elastic`` and the elastic findings among
    the warnings), without the time series.
    """
    from workbench.core.elastic import elastic_line_ids, run_elastic

    ids = elastic_line_ids(system)
    if not ids:
        return
    from workbench.cli.elastic_option import add_elastic_json

    add_elastic_json(sim_json, run_elastic(system, ids))
    for entry in sim_json.get("surge", {}).values():
        elastic = entry.get("elastic") if isinstance(entry, dict) else None
        if isinstance(elastic, dict):
            for key in _ELASTIC_SERIES:
                elastic.pop(key, None)


_WORKER_PROJECT: Project | None = None


def _worker_init(text: str, name: str, quiet: bool = False) -> None:
    """Load the base project once per worker process.

    ``quiet`` sends the worker's own stderr to the null device: under a full-screen app a
    stray warning printed by a worker would land in the middle of the screen.
    """
    global _WORKER_PROJECT
    if quiet:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, 2)
        os.close(devnull)
    from workbench.project.document import load_project_text

    _WORKER_PROJECT = load_project_text(text, name)


def _worker_case(settings, simulate: bool):
    assert _WORKER_PROJECT is not None  # set by _worker_init
    return solve_case(_WORKER_PROJECT, settings, simulate)


def _outcome(case: Case, solved, criteria) -> CaseOutcome:
    steady, sim, error = solved
    passed: bool | None
    judgements: list[Judgement] = []
    if error is not None and (steady is None or (sim is None and any(c.needs_simulation for c in criteria))):
        passed = None
    else:
        passed, judgements = judge(criteria, steady, sim)
        if error is not None:
            passed = None
    return CaseOutcome(case.index, dict(case.values), steady, sim, passed, error, tuple(judgements))


def _stderr_is_real() -> bool:
    try:
        return sys.stderr is not None and sys.stderr.fileno() >= 0
    except (AttributeError, OSError, ValueError):
        return False


@contextmanager
def _usable_stderr():
    """A real stderr while worker processes start.

    multiprocessing hands ``sys.stderr.fileno()`` to its helper processes; a full-screen
    app (Textual) replaces stderr by an object whose fileno is -1, and starting the pool
    would then fail with "bad value(s) in fds_to_keep".
    """
    if _stderr_is_real():
        yield
        return
    saved = sys.stderr
    with open(os.devnull, "w") as null:
        sys.stderr = null
        try:
            yield
        finally:
            sys.stderr = saved


#: Modules every case needs; imported before worker processes start so that they start warm.
_CASE_MODULES = (
    "workbench.project.document",
    "workbench.core.network",
    "workbench.core.transient",
    "workbench.core.elastic",
    "workbench.output.steady",
    "workbench.output.transient",
    "workbench.output.elastic",
    "workbench.cli.elastic_option",
    "workbench.sweep_runner",
)


def _pool_context():
    """How worker processes start.

    From a single-threaded process (the CLI), ``fork``: the workers inherit the modules
    already imported and start at once. From a threaded one (the app runs sweeps in a
    worker thread, where forking is unsafe), ``forkserver`` with the case modules preloaded,
    so each worker forks from one warm server instead of importing scipy and the rest again.
    """
    import importlib
    import multiprocessing
    import threading

    methods = multiprocessing.get_all_start_methods()
    if "fork" in methods and threading.active_count() == 1:
        for name in _CASE_MODULES:
            importlib.import_module(name)
        return multiprocessing.get_context("fork")
    if "forkserver" in methods:
        ctx = multiprocessing.get_context("forkserver")
        ctx.set_forkserver_preload(list(_CASE_MODULES))
        return ctx
    return multiprocessing.get_context("spawn")


def run_sweep(
    project: Project,
    plan: SweepPlan,
    *,
    progress: Progress | None = None,
    cancel: Callable[[], bool] | None = None,
    workers: int | None = None,
) -> SweepOutcome:
    """Solve every case of the plan; outcomes in sweep order.

    Parameters
    ----------
    project : Project
        The base project.
    plan : SweepPlan
        From :func:`plan_sweep`.
    progress : callable, optional
        ``progress(done, total)`` after each case.
    cancel : callable, optional
        Returns True to stop: cases not yet started are dropped and the outcome is marked
        ``cancelled``.
    workers : int, optional
        Worker processes for simulated cases; default the machine's cores. ``1`` runs
        everything in this process.
    """
    total = len(plan.cases)
    project = prepared_base(project, plan.axes)
    solved: dict[int, tuple] = {}
    cancelled = False
    use_pool = plan.simulate and total > 1 and (workers is None or workers > 1)
    if use_pool:
        from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait

        n = workers or os.cpu_count() or 1
        quiet = not _stderr_is_real()
        context = _pool_context()
        remaining = list(plan.cases)
        if context.get_start_method() == "fork":
            # The first case runs here: it imports whatever the solvers load lazily, and the
            # forked workers inherit all of it instead of each importing it again.
            first = remaining.pop(0)
            solved[first.index] = solve_case(project, first.settings, True)
            if progress:
                progress(len(solved), total)
        with _usable_stderr(), ProcessPoolExecutor(
            max_workers=max(1, min(n, len(remaining))), mp_context=context,
            initializer=_worker_init, initargs=(project.text, project.name, quiet),
        ) as pool:
            pending = {pool.submit(_worker_case, c.settings, True): c.index for c in remaining}
            while pending:
                done, _ = wait(pending, timeout=0.2, return_when=FIRST_COMPLETED)
                for fut in done:
                    index = pending.pop(fut)
                    try:
                        solved[index] = fut.result()
                    except Exception as exc:  # noqa: BLE001 - e.g. a worker died
                        solved[index] = (None, None, f"worker failed: {type(exc).__name__}: {exc}")
                    if progress:
                        progress(len(solved), total)
                if cancel is not None and cancel():
                    cancelled = True
                    for fut in pending:
                        fut.cancel()
                    break
    else:
        for case in plan.cases:
            if cancel is not None and cancel():
                cancelled = True
                break
            solved[case.index] = solve_case(project, case.settings, plan.simulate)
            if progress:
                progress(len(solved), total)
    outcomes = tuple(_outcome(c, solved[c.index], plan.criteria) for c in plan.cases if c.index in solved)
    first = next((o.index for o in outcomes if o.passed), None)
    return SweepOutcome(outcomes, first, cancelled, plan.criteria)


# --- quick, vectorised steady sweeps of one line ----------------------------------------------


@dataclass(frozen=True)
class QuickSweep:
    """Steady flows of a single-line system for every case, solved as one numpy array."""

    line_id: str
    cases: LineCases
    result: LineCasesResult
    errors: tuple[str | None, ...]
    """Per case: why it could not be set up (``None`` when it was)."""
    combined: bool
    """True when the grid was assembled from one-axis changes (fast); False when every case
    went through the document (axes interacted)."""


def _row_differs(a, b) -> bool:
    import numpy as np

    return not np.array_equal(np.asarray(a), np.asarray(b), equal_nan=True)


def run_quick_sweep(project: Project, plan: SweepPlan) -> QuickSweep:
    """Steady flows of every case of a single-line project, vectorised.

    Each axis value is applied once through ``set_value`` (validated as usual) and turned
    into the line's SI quantities; the grid is then assembled by numpy broadcasting. When
    two axes change the same quantity (nominal size and schedule; level and surface
    pressure...) the grid cannot be assembled that way and every case is set up through
    the document instead (slower, same answers).

    Raises
    ------
    SweepSpecError
        When the project is not one line between two fixed heads.
    """
    import numpy as np

    from workbench.core.sweep import LineCases, line_cases_from_systems, single_line_ends, solve_line_cases
    from workbench.project.document import ProjectError, set_value

    project = prepared_base(project, plan.axes)
    line_id = single_line_ends(project.system)
    if line_id is None:
        raise SweepSpecError(
            "a quick sweep needs a project with one line between two fixed heads (reservoirs or "
            "receivers, no junctions); run the full sweep instead"
        )
    quick_metrics = {"flow", "velocity", "reynolds", "head_loss"}
    for c in plan.criteria:
        if c.metric is not None and c.metric not in quick_metrics:
            raise SweepSpecError(f"--require {c.text!r}: a quick sweep has only {', '.join(sorted(quick_metrics))}")
        if c.absent_code is not None:
            raise SweepSpecError(f"--require {c.text!r}: a quick sweep computes no warnings")
    base = line_cases_from_systems([project.system])
    names = list(base.__dataclass_fields__)
    axis_rows: list[LineCases | None] = []
    axis_errors: list[list[str | None]] = []
    for axis in plan.axes:
        systems, errs = [], []
        for value in axis.values:
            try:
                systems.append(set_value(project, axis.keypath, value).system)
                errs.append(None)
            except (ProjectError, ValueError) as exc:
                systems.append(project.system)
                errs.append(_problems_text(exc))
        axis_rows.append(line_cases_from_systems(systems, line_id))
        axis_errors.append(errs)
    shape = tuple(len(a.values) for a in plan.axes)
    changed_by: dict[str, list[int]] = {n: [] for n in names}
    for k, rows in enumerate(axis_rows):
        for n in names:
            if _row_differs(getattr(rows, n), np.broadcast_to(getattr(base, n), getattr(rows, n).shape)):
                changed_by[n].append(k)
    combined = all(len(v) <= 1 for v in changed_by.values())
    errors: list[str | None] = []
    for case in plan.cases:
        idx = np.unravel_index(case.index, shape)
        msgs = [axis_errors[k][i] for k, i in enumerate(idx) if axis_errors[k][i]]
        errors.append("; ".join(msgs) or None)
    if combined:
        columns = {}
        for n in names:
            col = np.broadcast_to(getattr(base, n)[0], shape).copy()
            for k in changed_by[n]:
                view = [None] * len(shape)
                view[k] = slice(None)
                col = np.broadcast_to(getattr(axis_rows[k], n)[tuple(view)], shape).copy()
            columns[n] = col.ravel()
        cases = LineCases(**columns)
    else:
        systems = []
        for case, err in zip(plan.cases, errors, strict=True):
            if err is not None:
                systems.append(project.system)
                continue
            try:
                systems.append(_apply(project, case.settings).system)
            except (ProjectError, ValueError) as exc:
                systems.append(project.system)
                errors[case.index] = _problems_text(exc)
        cases = line_cases_from_systems(systems, line_id)
    result = solve_line_cases(cases)
    return QuickSweep(line_id, cases, result, tuple(errors), combined)


def quick_sweep_json(quick: QuickSweep, plan: SweepPlan) -> dict:
    """The ``sweep --json`` envelope for a quick sweep: ``steady`` holds the line's results only."""
    import numpy as np

    from workbench.core.friction import regime_of

    r = quick.result
    cases = []
    for case, err in zip(plan.cases, quick.errors, strict=True):
        i = case.index
        steady = None
        passed = None
        judgements: list[Judgement] = []
        if err is None and bool(r.converged[i]):
            f = float(r.friction_factor[i])
            steady = {
                "lines": {quick.line_id: {
                    "flow_m3_s": float(r.flow[i]),
                    "velocity_m_s": float(r.velocity[i]),
                    "reynolds": float(r.reynolds[i]),
                    "regime": str(regime_of(float(r.reynolds[i]))),
                    "friction_factor": f if np.isfinite(f) else None,
                    "head_loss_m": float(r.head_loss[i]),
                }},
                "method": "vectorised single-line (quick)",
            }
            passed, judgements = judge(plan.criteria, steady, None)
        elif err is None:
            err = "did not converge"
        out = CaseOutcome(i, dict(case.values), steady, None, passed, err, tuple(judgements)).to_json()
        cases.append(out)
    first = next((c_i for c_i, c in enumerate(cases) if c["pass"]), None)
    return {"cases": cases, "first_passing": first, "quick": True}
