"""Running every case of a sweep on an executor, outcomes in sweep order.

:func:`run_sweep` hands each case to a :class:`concurrent.futures.Executor` as a
:class:`~workbench.sweep_runner.case.SweepTask` (the project text and the case): by default
a local process pool for simulated sweeps, or any executor the caller gives (a Dask cluster's,
:mod:`workbench.sweep_runner.cluster`). Outcomes are put back in sweep order whatever order
the cases finish in; a case that fails is reported with its error and the sweep goes on.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from typing import TYPE_CHECKING

from workbench.sweep_runner.case import SweepTask, remember_project, run_task, solve_case
from workbench.sweep_runner.plan import SweepOutcome, SweepPlan, outcome, prepared_base

if TYPE_CHECKING:  # pragma: no cover
    from concurrent.futures import Executor

    from workbench.project.document import Project

__all__ = ["Progress", "run_sweep"]

Progress = Callable[[int, int], None]
"""``progress(done, total)``, called in the caller's thread after each finished case."""


def run_sweep(
    project: Project,
    plan: SweepPlan,
    *,
    progress: Progress | None = None,
    cancel: Callable[[], bool] | None = None,
    workers: int | None = None,
    executor: Executor | None = None,
) -> SweepOutcome:
    """Solve every case of the plan; outcomes in sweep order.

    Parameters
    ----------
    project : Project
        The base project.
    plan : SweepPlan
        From :func:`~workbench.sweep_runner.plan.plan_sweep`.
    progress : callable, optional
        ``progress(done, total)`` after each case.
    cancel : callable, optional
        Returns True to stop: cases not yet started are dropped and the outcome is marked
        ``cancelled``.
    workers : int, optional
        Worker processes of the local pool for simulated cases; default the machine's
        cores. ``1`` runs everything in this process. Ignored with ``executor``.
    executor : concurrent.futures.Executor, optional
        Runs every case (steady or simulated) on it instead, e.g. a Dask cluster's; the
        caller owns it (it is not shut down here). Its workers must be able to import
        ``workbench``.
    """
    total = len(plan.cases)
    project = prepared_base(project, plan.axes)
    solved: dict[int, tuple] = {}
    cancelled = False
    if executor is not None:
        cancelled = _run_on(executor, project, plan.cases, plan.simulate, solved, total,
                            progress, cancel)
    elif plan.simulate and total > 1 and (workers is None or workers > 1):
        cancelled = _run_local_pool(project, plan, workers, solved, progress, cancel)
    else:
        for case in plan.cases:
            if cancel is not None and cancel():
                cancelled = True
                break
            solved[case.index] = solve_case(project, case.settings, plan.simulate)
            if progress:
                progress(len(solved), total)
    outcomes = tuple(outcome(c, solved[c.index], plan.criteria)
                     for c in plan.cases if c.index in solved)
    first = next((o.index for o in outcomes if o.passed), None)
    return SweepOutcome(outcomes, first, cancelled, plan.criteria)


def _run_local_pool(project: Project, plan: SweepPlan, workers: int | None, solved: dict,
                    progress: Progress | None, cancel) -> bool:
    """The simulated cases on a local process pool; True when cancelled."""
    from workbench.sweep_runner.pool import local_pool, pool_context

    total = len(plan.cases)
    n = workers or os.cpu_count() or 1
    context = pool_context()
    remaining = list(plan.cases)
    remember_project(project)  # forked workers inherit it loaded
    if context.get_start_method() == "fork":
        # The first case runs here: it imports whatever the solvers load lazily, and the
        # forked workers inherit all of it instead of each importing it again.
        first = remaining.pop(0)
        solved[first.index] = solve_case(project, first.settings, True)
        if progress:
            progress(len(solved), total)
    with local_pool(min(n, len(remaining)), context) as pool:
        return _run_on(pool, project, remaining, True, solved, total, progress, cancel)


def _run_on(executor: Executor, project: Project, cases, simulate: bool, solved: dict,
            total: int, progress: Progress | None, cancel) -> bool:
    """Submit each case as a task and collect the results into ``solved`` (by case index)
    as they finish; True when cancelled (futures not yet started are cancelled)."""
    from concurrent.futures import FIRST_COMPLETED, wait

    pending = {
        executor.submit(run_task, SweepTask(project.text, project.name, tuple(c.settings),
                                            simulate, project.unit_system)): c.index
        for c in cases
    }
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
            for fut in pending:
                fut.cancel()
            return True
    return False
