"""Running a what-if sweep: apply each case to the project, solve, judge, keep the order.

This is orchestration between the layers, with no UI: the CLI's ``sweep`` command and the
app's sweep screen both call :func:`plan_sweep` then :func:`run_sweep` (or
:func:`run_quick_sweep` for dense steady sweeps of a single line).

* Each case is the base project with the case's values set through
  :func:`workbench.project.document.set_value` (so it is validated exactly as a file would
  be), then solved by :func:`workbench.core.network.solve_steady` and, when the project
  has a ``[simulation]`` section, :func:`workbench.core.transient.simulate`.
* Cases with a simulation run on a :class:`concurrent.futures.Executor`: by default a local
  process pool, or a Dask cluster's (:func:`cluster_executor`); each task carries the
  project text and its case. The outcomes are put back in sweep order whatever order they
  finish in.
* A case that fails (bad value, no solution, solver error) is reported with its error and the
  sweep goes on.

Modules: :mod:`.plan` (plan and outcomes), :mod:`.case` (one case, the task and the
workers' project cache), :mod:`.run` (:func:`run_sweep`), :mod:`.pool` (the local process
pool), :mod:`.cluster` (Dask), :mod:`.quick` (vectorised single-line sweeps).
"""

from __future__ import annotations

from workbench.sweep_runner.case import SweepTask, run_task, solve_case
from workbench.sweep_runner.cluster import ClusterError, cluster_executor
from workbench.sweep_runner.plan import (
    CaseOutcome,
    SweepOutcome,
    SweepPlan,
    plan_sweep,
    prepared_base,
)
from workbench.sweep_runner.quick import QuickSweep, quick_sweep_json, run_quick_sweep
from workbench.sweep_runner.run import Progress, run_sweep

__all__ = [
    "CaseOutcome",
    "ClusterError",
    "Progress",
    "QuickSweep",
    "SweepOutcome",
    "SweepPlan",
    "SweepTask",
    "cluster_executor",
    "plan_sweep",
    "prepared_base",
    "quick_sweep_json",
    "run_quick_sweep",
    "run_sweep",
    "run_task",
    "solve_case",
]
