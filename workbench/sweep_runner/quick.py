"""Quick, vectorised steady sweeps of one line: every case's flow in one numpy solve
(:func:`workbench.core.sweep.solve_line_cases`), for dense sweeps of a single-line project."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from workbench.project.sweep_spec import Judgement, SweepSpecError, judge
from workbench.sweep_runner.case import apply_settings
from workbench.sweep_runner.plan import CaseOutcome, SweepPlan, prepared_base, problems_text

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.sweep import LineCases, LineCasesResult
    from workbench.project.document import Project

__all__ = ["QuickSweep", "quick_sweep_json", "run_quick_sweep"]


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

    project = prepared_base(project, plan.axes)
    line_id = single_line_ends(project.system)
    if line_id is None:
        raise SweepSpecError(
            "a quick sweep needs a project with one line between two fixed heads (reservoirs or "
            "receivers, no junctions); run the full sweep instead"
        )
    _check_quick_criteria(plan)
    base = line_cases_from_systems([project.system])
    names = list(base.__dataclass_fields__)
    axis_rows, axis_errors = _axis_rows(project, plan, line_id)
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
        cases = LineCases(**_grid(base, axis_rows, shape, changed_by))
    else:
        cases = _case_by_case(project, plan, errors, line_id)
    result = solve_line_cases(cases)
    return QuickSweep(line_id, cases, result, tuple(errors), combined)


#: The metrics a quick sweep computes.
QUICK_METRICS = ("flow", "head_loss", "reynolds", "velocity")


def _check_quick_criteria(plan: SweepPlan) -> None:
    """Refuse criteria a quick sweep cannot judge (no pressures, no warnings)."""
    for c in plan.criteria:
        if c.metric is not None and c.metric not in QUICK_METRICS:
            raise SweepSpecError(f"--require {c.text!r}: a quick sweep has only {', '.join(QUICK_METRICS)}")
        if c.absent_code is not None:
            raise SweepSpecError(f"--require {c.text!r}: a quick sweep computes no warnings")


def _axis_rows(project: Project, plan: SweepPlan, line_id: str):
    """For each axis, the line's SI quantities at each of its values (set through the
    document, validated), and per value the error text or ``None``."""
    from workbench.core.sweep import line_cases_from_systems
    from workbench.project.document import ProjectError, set_value

    axis_rows: list[LineCases] = []
    axis_errors: list[list[str | None]] = []
    for axis in plan.axes:
        systems, errs = [], []
        for value in axis.values:
            try:
                systems.append(set_value(project, axis.keypath, value).system)
                errs.append(None)
            except (ProjectError, ValueError) as exc:
                systems.append(project.system)
                errs.append(problems_text(exc))
        axis_rows.append(line_cases_from_systems(systems, line_id))
        axis_errors.append(errs)
    return axis_rows, axis_errors


def _grid(base: LineCases, axis_rows: list, shape: tuple, changed_by: dict) -> dict:
    """Each quantity over the whole grid (flattened in sweep order): the base value, or the
    values of the one axis that changes it, broadcast along that axis."""
    import numpy as np

    columns = {}
    for n, axes in changed_by.items():
        col = np.broadcast_to(getattr(base, n)[0], shape).copy()
        for k in axes:
            view = [None] * len(shape)
            view[k] = slice(None)
            col = np.broadcast_to(getattr(axis_rows[k], n)[tuple(view)], shape).copy()
        columns[n] = col.ravel()
    return columns


def _case_by_case(project: Project, plan: SweepPlan, errors: list, line_id: str) -> LineCases:
    """Every case set up through the document (when axes interact); a case that cannot be
    set up keeps the base system and its error in ``errors``."""
    from workbench.core.sweep import line_cases_from_systems
    from workbench.project.document import ProjectError

    systems = []
    for case, err in zip(plan.cases, errors, strict=True):
        if err is not None:
            systems.append(project.system)
            continue
        try:
            systems.append(apply_settings(project, case.settings).system)
        except (ProjectError, ValueError) as exc:
            systems.append(project.system)
            errors[case.index] = problems_text(exc)
    return line_cases_from_systems(systems, line_id)


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
