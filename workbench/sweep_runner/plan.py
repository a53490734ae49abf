"""A sweep's plan and outcomes: the checked axes, cases and criteria; each case's result in
the ``sweep --json`` shape, judged against the criteria; and the base project with keys that
conflict with a swept key removed."""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any

from workbench.project.sweep_spec import (
    Axis,
    Case,
    Criterion,
    Judgement,
    check_criteria,
    judge,
    parse_criterion,
    parse_vary,
    sweep_cases,
)

if TYPE_CHECKING:  # pragma: no cover
    from workbench.project.document import Project

__all__ = ["CaseOutcome", "SweepOutcome", "SweepPlan", "outcome", "plan_sweep", "prepared_base",
           "problems_text"]


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


def problems_text(exc: Exception) -> str:
    """A case's set-up failure in words: every problem of a ``ProjectError``, else the
    exception's text."""
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
    with the key set to the first of the axis' values the project accepts, so the base
    stays valid; a value refused there fails its own cases, as anywhere in the list.

    Raises
    ------
    SweepSpecError
        When the project refuses every value of such an axis, naming the key path and the
        first value's reason.
    """
    for axis in axes:
        parts = axis.keypath.split(".")
        if len(parts) != 3 or parts[0] != "lines" or parts[2] not in _SWAPS:
            continue
        line = project.data.get("lines", {}).get(parts[1], {})
        drop = [k for k in _SWAPS[parts[2]] if k in line]
        if drop:
            project = _swapped(project, axis, parts[1], drop)
    return project


def _swapped(project: Project, axis: Axis, line_id: str, drop: Sequence[str]) -> Project:
    """The project with ``drop`` removed from the line and the axis' key set to the first of
    its values that loads."""
    import tomlkit

    from workbench.project.document import ProjectError, load_project_text
    from workbench.project.sweep_spec import SweepSpecError

    doc = tomlkit.parse(project.text)
    table = doc["lines"][line_id]
    for key in drop:
        del table[key]
    key = axis.keypath.split(".")[2]
    units = project.unit_system  # the display units asked for (--units), kept
    first_refusal: ProjectError | None = None
    for value in axis.values:
        table[key] = value
        try:
            loaded = load_project_text(tomlkit.dumps(doc), project.name, units)
        except ProjectError as exc:
            first_refusal = first_refusal or exc
            continue
        return replace(loaded, unit_system=units)
    reasons = "; ".join(f"{p.key}: {p.message}" if p.key else p.message
                        for p in (first_refusal.problems if first_refusal else ()))
    raise SweepSpecError(f"--vary {axis.keypath}: the project accepts none of the values "
                         f"({', '.join(axis.texts)}): {reasons}")


def outcome(case: Case, solved, criteria) -> CaseOutcome:
    """A case's outcome from its ``(steady json, simulation json, error)``, judged."""
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
