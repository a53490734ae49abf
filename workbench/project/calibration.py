"""Calibrating a project against its site tests: what to fit, running the fit, writing it back.

``--fit KEYPATH[=LOW..HIGH]`` names a number of the project file the fit may change, with
its range in the file's units (``lines.210-DR-04.roughness=0.01..3 mm``). The key paths a
fit can use are those the model takes as a plain number:

========================================  ==========================================
key path                                  what is fitted
========================================  ==========================================
``lines.ID.roughness``                    the wall roughness (aged, scaled or tuberculated pipe)
``lines.ID.inner_diameter``               the bore (scale narrows it)
``lines.ID.friction_factor``              a fixed Darcy friction factor given in the file
``lines.ID.fittings[N].k``                the loss coefficient of a fixed-K fitting (a strainer)
``lines.ID.valve.k_open``                 the valve's loss coefficient at full opening
``lines.ID.valve.kv_open``                the valve's Kv at full opening
========================================  ==========================================

:func:`calibrate` runs :func:`workbench.core.calibration.fit` on the chosen measurements
(each under its own test conditions); :func:`apply_fit` gives the project with the fitted
values written in, as one edit, each changed line carrying a comment that names the
measurements and the date.
"""

from __future__ import annotations

import datetime as _dt
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from workbench.project.problems import Problem, ProjectError

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.calibration import FitParameter, FitResult
    from workbench.project.load import Project
    from workbench.project.measurements import Measurement

__all__ = ["CalibrationRun", "FitSpecError", "apply_fit", "bound_words", "calibrate",
           "parameter_kind", "parse_fit", "value_text"]

#: Target -> (schema key under the line, quantity kind or "number").
_KEYS = {
    "roughness": ("roughness", "roughness"),
    "diameter": ("inner_diameter", "diameter"),
    "friction_factor": ("friction_factor", "number"),
    "fitting_k": ("k", "number"),
    "valve_k_open": ("k_open", "number"),
    "valve_kv_open": ("kv_open", "kv"),
}
_FITTING = re.compile(r"lines\.([^.\[\]]+)\.fittings\[(\d+)\]\.k\Z")
_RANGE = re.compile(r"(.+?)\.\.(.+)\Z")
_NUMBER_PREFIX = re.compile(r"\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*)\Z")

FITTABLE = ("lines.ID.roughness", "lines.ID.inner_diameter", "lines.ID.friction_factor",
            "lines.ID.fittings[N].k", "lines.ID.valve.k_open", "lines.ID.valve.kv_open")


class FitSpecError(ValueError):
    """A ``--fit`` that cannot be used; the message names what was wrong."""


def parameter_kind(p: "FitParameter") -> str:
    """Quantity kind of a parameter's value (``"roughness"``, ``"diameter"``, ``"kv"``) or
    ``"number"``."""
    return _KEYS[p.target][1]


def value_text(p: "FitParameter", value: float, unit_system: str = "SI", digits: int = 3) -> str:
    """A fitted value as the file would hold it: ``"0.61 mm"``, ``"2.4"``."""
    from workbench.project.units import format_quantity

    kind = parameter_kind(p)
    if kind == "number":
        return f"{value:.{digits}g}"
    return format_quantity(value, kind, unit_system, digits)


def _target(project: "Project", key: str) -> tuple[str, str, int | None]:
    """``(target, line id, fitting index)`` of a key path, or FitSpecError in words."""
    fitting = _FITTING.match(key)
    if fitting:
        lid, index = fitting.group(1), int(fitting.group(2)) - 1
        line = project.system.lines.get(lid)
        if line is None:
            raise FitSpecError(f"{key}: there is no line {lid!r} in the project")
        if not 0 <= index < len(line.fittings):
            raise FitSpecError(f"{key}: line {lid} has {len(line.fittings)} fitting(s)")
        if line.fittings[index].k is None:
            raise FitSpecError(f"{key}: fitting {index + 1} of line {lid} is a named fitting "
                               f"({line.fittings[index].type}) whose loss comes from its "
                               "published method; give it a fixed k in the file to fit it")
        return "fitting_k", lid, index
    from workbench.project.sweep_spec import SweepSpecError, resolve_keypath

    try:
        target = resolve_keypath(key, project.data)
    except SweepSpecError as exc:
        raise FitSpecError(str(exc).replace("cannot be varied", "cannot be fitted")) from None
    name = target.spec.name
    if target.section == "lines.valve" and name in ("k_open", "kv_open"):
        valve = project.data["lines"][target.element].get("valve")
        if not isinstance(valve, dict):
            raise FitSpecError(f"{key}: line {target.element} has no valve")
        if name not in valve:
            other = "kv_open" if name == "k_open" else "k_open"
            raise FitSpecError(f"{key}: the valve is given by {other}; fit "
                               f"lines.{target.element}.valve.{other}")
        return ("valve_k_open" if name == "k_open" else "valve_kv_open"), target.element, None
    if target.section == "lines" and name in ("roughness", "inner_diameter", "friction_factor"):
        line = project.system.lines[target.element]
        if name == "roughness" and line.friction_factor is not None:
            raise FitSpecError(f"{key}: line {target.element} has a fixed friction_factor, so "
                               "its roughness does not act; fit the friction_factor")
        if name == "friction_factor" and line.friction_factor is None:
            raise FitSpecError(f"{key}: line {target.element} takes its friction factor from "
                               "the correlation; fit its roughness")
        return {"inner_diameter": "diameter"}.get(name, name), target.element, None
    what = "is not a number" if target.spec.kind in ("text", "choice", "bool") else \
        "is not a number the fit can change"
    raise FitSpecError(f"{key}: {name} {what}; a fit can change " + ", ".join(FITTABLE))


def _start(project: "Project", target: str, lid: str, index: int | None) -> float:
    line = project.system.lines[lid]
    if target == "roughness":
        return line.roughness
    if target == "diameter":
        return line.diameter
    if target == "friction_factor":
        return float(line.friction_factor)
    if target == "fitting_k":
        return float(line.fittings[index].k)
    if target == "valve_k_open":
        return line.valve.k_open
    from workbench.project.units import parse_quantity

    return parse_quantity(project.data["lines"][lid]["valve"]["kv_open"], "kv")


def _default_range(target: str, start: float, diameter: float) -> tuple[float, float]:
    """A wide range when none is given (common practice, no source: aged steel reaches a
    few millimetres of roughness; scale rarely takes half the bore)."""
    if target == "roughness":
        return 0.0, 0.05 * diameter
    if target == "diameter":
        return 0.5 * start, 1.05 * start
    if target == "friction_factor":
        return 0.005, 0.1
    if target == "valve_kv_open":
        return 0.1 * start, 3.0 * start
    return (0.1 * start, 10.0 * start) if start > 0 else (0.0, 10.0)


def _bounds(key: str, text: str, kind: str) -> tuple[float, float]:
    match = _RANGE.match(text.strip())
    if match is None:
        raise FitSpecError(f"--fit {key}: expected a range LOW..HIGH after '=', e.g. "
                           f"{key}={'0.01..3 mm' if kind != 'number' else '0.1..5'}; got {text!r}")
    low_text, high_text = match.group(1).strip(), match.group(2).strip()
    if kind == "number":
        try:
            low, high = float(low_text), float(high_text)
        except ValueError:
            raise FitSpecError(f"--fit {key}: {text!r}: the bounds are plain numbers") from None
    else:
        from workbench.project.units import UnitError, parse_quantity

        low_match, high_match = _NUMBER_PREFIX.match(low_text), _NUMBER_PREFIX.match(high_text)
        if low_match and not low_match.group(2) and high_match and high_match.group(2):
            low_text = f"{low_text} {high_match.group(2)}"  # "0.01..3 mm": one unit for both
        try:
            low, high = parse_quantity(low_text, kind), parse_quantity(high_text, kind)
        except UnitError as exc:
            raise FitSpecError(f"--fit {key}: {exc}") from None
    if not low < high:
        raise FitSpecError(f"--fit {key}: the lower bound must be below the upper bound")
    if low < 0.0 or (kind in ("diameter", "kv") and low <= 0.0):
        raise FitSpecError(f"--fit {key}: the range must be positive")
    return low, high


def parse_fit(project: "Project", text: str) -> "FitParameter":
    """A ``--fit KEYPATH[=LOW..HIGH]`` as a core FitParameter (SI bounds).

    Raises
    ------
    FitSpecError
        For a key path that does not exist or is not a number the model uses, and for a
        range that cannot be read.
    """
    from workbench.core.calibration import FitParameter

    key, _, bounds = text.partition("=")
    key = key.strip()
    target, lid, index = _target(project, key)
    start = _start(project, target, lid, index)
    kind = _KEYS[target][1]
    if bounds.strip():
        low, high = _bounds(key, bounds, kind)
    else:
        low, high = _default_range(target, start, project.system.lines[lid].diameter)
    if target == "roughness" and high >= project.system.lines[lid].diameter / 2:
        raise FitSpecError(f"--fit {key}: the upper bound must be below the pipe radius")
    return FitParameter(key, target, lid, low, high, start, index)


@dataclass(frozen=True, eq=False)
class CalibrationRun:
    """A fit and what it was made on."""

    result: "FitResult"
    measurements: tuple["Measurement", ...]
    project: "Project"


def _chosen(project: "Project", names: Sequence[str] | None) -> list["Measurement"]:
    from workbench.project.measurements import measurements_of
    from workbench.project.validate import did_you_mean

    found = measurements_of(project)
    if not found:
        raise FitSpecError(f"{project.name}: the project has no [measurements.NAME] tables: "
                           "add the site test's readings first")
    if not names:
        return list(found.values())
    out = []
    for name in names:
        if name not in found:
            raise FitSpecError(f"--measurement {name}: no such measurement in the project"
                               f"{did_you_mean(name, found)}; it has " + ", ".join(found))
        out.append(found[name])
    return out


def calibrate(project: "Project", fits: Sequence[str], names: Sequence[str] | None = None, *,
              progress: Callable[[int, float], None] | None = None,
              cancel: Callable[[], bool] | None = None) -> CalibrationRun:
    """Fit the named parameters to the named measurements (all of them by default).

    Raises
    ------
    FitSpecError
        For a ``--fit`` or ``--measurement`` that cannot be used.
    ProjectError
        When a measurement's CSV file cannot be read.
    workbench.core.calibration.CalibrationError
        When the model cannot be run at the project's own values.
    """
    from workbench.core.calibration import fit
    from workbench.project.measurements import observation

    if not fits:
        raise FitSpecError("give at least one --fit KEYPATH[=LOW..HIGH]")
    if len(fits) > 3:
        raise FitSpecError(f"{len(fits)} parameters: fit one to three at a time (site tests "
                           "rarely tell more apart)")
    parameters = [parse_fit(project, text) for text in fits]
    keys = [p.key for p in parameters]
    if len(set(keys)) < len(keys):
        raise FitSpecError("the same key path is given twice")
    chosen = _chosen(project, names)
    observations = [observation(m, project.system) for m in chosen]
    result = fit(observations, parameters, progress=progress, cancel=cancel)
    words = bound_words(result, project.unit_system)
    if words:
        import dataclasses

        result = dataclasses.replace(result, message=words)
    return CalibrationRun(result, tuple(chosen), project)


def bound_words(result: "FitResult", unit_system: str = "SI") -> str | None:
    """The message of a fit whose parameters ran to a bound, with the bounds in display
    units (the core can only say them in SI); ``None`` when no parameter is on a bound."""
    if result.status != -1:
        return None
    words = []
    for p, value in zip(result.parameters, result.values):
        span = p.upper - p.lower
        at_edge = min(abs(value - p.lower), abs(value - p.upper)) <= 1e-6 * span
        if p.key in result.at_bound and at_edge:
            side = "lower" if abs(value - p.lower) <= abs(value - p.upper) else "upper"
            words.append(f"{p.key} ran to its {side} bound "
                         f"{value_text(p, float(value), unit_system)}")
    if not words:
        return None
    return ("the fit did not converge: " + "; ".join(words) + ". Widen the range, or check "
            "that the parameter acts on these readings and that the test conditions are right")


def apply_fit(project: "Project", run: CalibrationRun, date: _dt.date | None = None) -> "Project":
    """The project with the fitted values written in, as one edit.

    Each changed key's line gets the comment ``calibrated to NAME on DATE (was OLD)``
    (an older comment on that line is kept after it). Raises ProjectError when the values
    make the project invalid.
    """
    from workbench.project.edit import set_values

    date = date or _dt.date.today()
    names = ", ".join(m.name for m in run.measurements)
    units = project.unit_system
    changes: dict[str, object] = {}
    notes: dict[str, str] = {}
    for p, value in zip(run.result.parameters, run.result.values):
        text = value_text(p, float(value), units)
        was = value_text(p, p.start, units)
        note = f"calibrated to {names} on {date.isoformat()} (was {was})"
        if p.target == "fitting_k":
            fittings = [dict(f) for f in project.data["lines"][p.line]["fittings"]]
            fittings[p.index]["k"] = float(text)
            changes[f"lines.{p.line}.fittings"] = fittings
            notes[f"lines.{p.line}.fittings"] = note.replace("calibrated", f"fitting {p.index + 1} k calibrated")
            continue
        kind = parameter_kind(p)
        key = p.key
        changes[key] = float(text) if kind == "number" else text
        notes[key] = note
        table = project.data["lines"][p.line]
        if p.target == "diameter" and "nominal_size" in table:
            _bore_instead_of_size(project, p, changes)
            notes[key] = note.replace(")", f", nominal_size {table['nominal_size']} schedule "
                                      f"{table.get('schedule', '40')})")
    new = set_values(project, changes)
    return _with_comments(new, notes)


def _bore_instead_of_size(project: "Project", p: "FitParameter", changes: dict) -> None:
    """A fitted bore replaces the nominal size and schedule (the wall is kept for surge)."""
    from workbench.project.units import format_quantity

    table = project.data["lines"][p.line]
    changes[f"lines.{p.line}.nominal_size"] = None
    changes[f"lines.{p.line}.schedule"] = None
    line = project.system.lines[p.line]
    if "wall_thickness" not in table and line.wall_thickness is not None:
        changes[f"lines.{p.line}.wall_thickness"] = format_quantity(
            line.wall_thickness, "thickness", project.unit_system, 4)


def _with_comments(project: "Project", notes: dict[str, str]) -> "Project":
    from workbench.project.load import parse_data, project_from_doc

    doc = project.doc
    for key, note in notes.items():
        container = doc
        *path, name = key.split(".")  # element ids hold no dots (validate.ID_PATTERN)
        for part in path:
            container = container[part]
        item = container.item(name) if hasattr(container, "item") else container[name]
        old = (item.trivia.comment or "").lstrip("#").strip()
        item.comment(f"{note}; {old}" if old and "calibrated to" not in old else note)
        item.trivia.comment_ws = "  "
    text = doc.as_string()
    try:
        return project_from_doc(text, path=project.path, name=project.name,
                                loaded_hash=project.loaded_hash, data=parse_data(text, project.name))
    except ProjectError:  # a comment cannot make a file invalid: a bug if it ever does
        raise ProjectError(Problem(project.name, "", "the calibration note could not be written"))

