"""Site tests held against the model: residuals for ``simulate``'s table and JSON, the
calculation record and the app's trend view.

Each ``[measurements.NAME]`` is compared where it belongs:

* readings in time under the project's own conditions: on the simulation being shown,
  at the readings' times (linear between its output times); readings after the end of the
  run are not compared, and say so;
* readings in time under conditions of their own (a test level, a valve opening), and a
  junction's pressure in time when the run shown did not keep junction pressures: on a
  run of the model at the test's conditions, over the test's span;
* one steady reading: on the steady solution at the test's conditions.

The residual is model minus reading; its RMS and largest magnitude are given in the
quantity's SI unit in JSON and in the display unit in tables and the record.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from workbench.output.common import json_float as _num

if TYPE_CHECKING:  # pragma: no cover
    from workbench.project.load import Project
    from workbench.project.measurements import Measurement

__all__ = ["Comparison", "compare_measurements", "compare_or_problems", "comparisons_to_json", "comparison_tables",
           "record_lines"]

_UNIT_SI = {"level": "m", "flow": "m^3/s", "pressure": "Pa"}
_KIND = {"level": "elevation", "flow": "flow", "pressure": "pressure"}


@dataclass(frozen=True, eq=False)
class Comparison:
    """One measurement against the model."""

    measurement: "Measurement"
    compared_on: str
    """``"this run"``, ``"a run at the test's conditions"``, ``"a run over the test's
    span"`` (a junction's pressure under the project's conditions) or ``"the steady
    solution"``."""
    times: np.ndarray | None = None
    """Times of the compared readings [s] (``None`` for a steady reading)."""
    readings: np.ndarray = field(default_factory=lambda: np.zeros(0))
    model: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """The model's values at those readings [SI]."""
    outside: int = 0
    """Readings after the end of the simulated span, not compared."""
    note: str = ""
    """Why nothing, or not everything, was compared."""

    @property
    def rms(self) -> float | None:
        r = self.model - self.readings
        return float(np.sqrt(np.mean(r * r))) if r.size else None

    @property
    def largest(self) -> float | None:
        r = self.model - self.readings
        return float(np.max(np.abs(r))) if r.size else None


def _on_run(m: "Measurement", result) -> Comparison:
    from workbench.core.calibration import CalibrationError, Observation, series_of

    try:
        series = series_of(Observation(m.name, m.element, m.quantity, m.times, m.values,
                                       None), result)
    except CalibrationError as exc:
        return Comparison(m, "this run", note=f"not compared: {exc}")
    end = float(result.t[-1]) if len(result.t) else 0.0
    inside = m.times <= end * (1 + 1e-9)
    outside = int(np.count_nonzero(~inside))
    note = ""
    if outside:
        from workbench.output.calibration import duration_text

        note = (f"{outside} reading(s) after the end of the run at {duration_text(end)} are "
                "not compared: "
                "simulate for longer (simulation.duration, or --duration; a run that stops when "
                "drained ends early)")
    times = m.times[inside]
    return Comparison(m, "this run", times, m.values[inside],
                      np.interp(times, result.t, series), outside, note)


def _own(m: "Measurement", system, where: str | None = None) -> Comparison:
    from workbench.core.calibration import CalibrationError, predict
    from workbench.project.measurements import observation

    where = where or ("the steady solution" if m.steady else "a run at the test's conditions")
    try:
        model = predict(observation(m, system), rtol=1e-6)
    except CalibrationError as exc:
        return Comparison(m, where, note=f"not compared: {exc}")
    return Comparison(m, where, m.times, m.values, model)


def compare_measurements(project: "Project", result=None) -> list[Comparison]:
    """Every measurement of a project against the model (``result``: the simulation shown).

    Raises
    ------
    ProjectError
        When a measurement's CSV file cannot be read.
    """
    from workbench.project.measurements import measurements_of

    if "measurements" not in project.data:
        return []
    out = []
    for m in measurements_of(project).values():
        shown = result is not None and (m.quantity != "pressure"
                                        or m.element in getattr(result, "junction_ids", ()))
        if m.steady or m.differs_from(project.system) or result is None:
            out.append(_own(m, project.system))
        elif not shown:  # the run shown keeps no junction pressures: one over the test's span
            out.append(_own(m, project.system, "a run over the test's span"))
        else:
            out.append(_on_run(m, result))
    return out


def compare_or_problems(project: "Project", result=None) -> tuple[list[Comparison], str]:
    """:func:`compare_measurements`, or no comparisons and the problems as text (a CSV file
    that cannot be read)."""
    from workbench.project.problems import ProjectError

    try:
        return compare_measurements(project, result), ""
    except ProjectError as exc:
        return [], str(exc)


def comparisons_to_json(comparisons: list[Comparison]) -> dict[str, Any]:
    """``{NAME: {quantity, element, unit_si, readings, compared, rms, max_abs, ...}}``."""
    out = {}
    for c in comparisons:
        m = c.measurement
        out[m.name] = {
            "quantity": m.quantity, "element": m.element, "unit_si": _UNIT_SI[m.quantity],
            "readings": int(len(m.values)), "compared": int(len(c.readings)),
            "rms": _num(c.rms), "max_abs": _num(c.largest), "outside_span": c.outside,
            "compared_on": c.compared_on, "skipped_rows": list(m.skipped_rows),
            "note": c.note or None,
        }
    return out


def comparison_tables(comparisons: list[Comparison], unit_system: str = "SI") -> list:
    """A rich table of the residuals, and each note under it."""
    from rich.text import Text

    from workbench.output.common import quantity_text, simple_table

    if not comparisons:
        return []
    table = simple_table("Measurements (model minus reading)")
    for col in ("measurement", "of", "readings", "RMS", "largest"):
        table.add_column(col, justify="right" if col in ("readings", "RMS", "largest") else "left",
                         no_wrap=col != "of")
    for c in comparisons:
        m = c.measurement
        kind = _KIND[m.quantity]
        table.add_row(m.name, f"{m.quantity} {m.element}", f"{len(c.readings)}/{len(m.values)}",
                      quantity_text(c.rms, kind, unit_system, 3),
                      quantity_text(c.largest, kind, unit_system, 3))
    out: list = [table]
    for c in comparisons:
        rows = c.measurement.skipped_rows
        if rows:
            out.append(Text(f"{c.measurement.name}: {len(rows)} row(s) of "
                            f"{c.measurement.source} skipped for a missing value (row "
                            f"{', '.join(str(r) for r in rows[:8])}{' ...' if len(rows) > 8 else ''})."))
        if c.compared_on != "this run" and not c.note:
            out.append(Text(f"{c.measurement.name}: compared on {c.compared_on}."))
        if c.note:
            out.append(Text(f"{c.measurement.name}: {c.note}"))
    return out


def record_lines(project: "Project", result=None) -> list[str]:
    """The record's section on site tests: each measurement, its residuals, its range."""
    from workbench.output.calibration import tested_range_text
    from workbench.project.problems import ProjectError
    from workbench.project.units import format_quantity

    if "measurements" not in project.data:
        return []
    lines = ["## Site tests", ""]
    try:
        comparisons = compare_measurements(project, result)
    except ProjectError as exc:
        return lines + [f"The readings could not be read: {exc}", ""]
    lines += ["| measurement | of | readings compared | RMS (model − reading) | largest | "
              "compared on |", "| --- | --- | ---: | ---: | ---: | --- |"]
    for c in comparisons:
        m = c.measurement
        kind = _KIND[m.quantity]

        def q(v):
            return "—" if v is None or not math.isfinite(v) else format_quantity(
                v, kind, project.unit_system, 3)
        lines.append(f"| {m.name} | {m.quantity} of {m.element} | {len(c.readings)} of "
                     f"{len(m.values)} | {q(c.rms)} | {q(c.largest)} | {c.compared_on} |")
    lines.append("")
    lines += [f"- {tested_range_text(c.measurement, project.unit_system)}"
              + (f". {c.note}" if c.note else "") for c in comparisons]
    lines += ["", "A model calibrated against these tests holds near the conditions tested "
              "(the ranges above); elsewhere its fitted values are an extrapolation.", ""]
    return lines
