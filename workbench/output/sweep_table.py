"""A sweep's outcome as one flat table: the columns the CLI prints, the CSV and the app show.

Built from the ``sweep --json`` object (plain dicts), so full and quick sweeps, the CLI and
the app share one table. Values stay SI floats here; :func:`display_rows` formats them in
the project's unit system, :func:`write_csv` writes SI numbers with the unit in the header.
"""

from __future__ import annotations

import csv
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

__all__ = ["SweepColumn", "display_rows", "format_time", "sweep_table", "tidy", "write_csv"]

#: SI unit written in CSV headers for each quantity kind used here.
_SI_UNITS = {"flow": "m^3/s", "velocity": "m/s", "time": "s", "pressure": "Pa", "head": "m"}


@dataclass(frozen=True)
class SweepColumn:
    """One column: a key into the rows, a title and how to show its values."""

    key: str
    title: str
    kind: str | None = None
    """Quantity kind of SI float values, ``None`` for text."""
    swept: bool = False
    """True for the varied keys' columns (what a plot puts on its x axis)."""


def _ordered(seq):
    return list(dict.fromkeys(seq))


def sweep_table(sweep: Mapping, keypaths: Sequence[str] | None = None) -> tuple[list[SweepColumn], list[dict]]:
    """Columns and rows (SI floats, text) of a sweep outcome.

    Parameters
    ----------
    sweep : mapping
        The ``sweep --json`` object.
    keypaths : sequence of str, optional
        The varied keys in sweep order; default the keys of the first case's ``values``.
    """
    cases = list(sweep.get("cases", ()))
    if keypaths is None:
        keypaths = list(cases[0]["values"]) if cases else []
    line_ids = _ordered(lid for c in cases if c.get("steady") for lid in c["steady"].get("lines", {}))
    sim_lines = _ordered(lid for c in cases if c.get("simulation") for lid in c["simulation"].get("lines", {}))
    tanks = _ordered(
        e.get("element") for c in cases if c.get("simulation")
        for e in c["simulation"].get("events", ()) if e.get("code") == "tank.drained"
    )
    any_sim = any(c.get("simulation") for c in cases)
    judged = any(c.get("pass") is not None for c in cases) or bool(sweep.get("criteria"))
    columns = [SweepColumn("case", "#")]
    columns += [SweepColumn(f"value:{k}", k, None, True) for k in keypaths]
    for lid in line_ids:
        columns.append(SweepColumn(f"flow:{lid}", f"flow {lid}", "flow"))
        columns.append(SweepColumn(f"velocity:{lid}", f"velocity {lid}", "velocity"))
        columns.append(SweepColumn(f"plow:{lid}", f"lowest pressure {lid}", "pressure"))
    if any_sim:
        # Tanks drained in no case still get a column when a criterion names them.
        for tid in tanks:
            columns.append(SweepColumn(f"drain:{tid}", f"drain time {tid}", "time"))
        for lid in sim_lines:
            columns.append(SweepColumn(f"pmax:{lid}", f"max pressure {lid}", "pressure"))
            columns.append(SweepColumn(f"pmin:{lid}", f"min pressure {lid}", "pressure"))
    # what each compared criterion measured, in its quantity's unit
    compared = _compared_criteria(sweep.get("criteria") or ())
    for j, (title, kind) in compared.items():
        columns.append(SweepColumn(f"criterion:{j}", title, kind))
    columns.append(SweepColumn("warnings", "warnings"))
    if judged:
        columns.append(SweepColumn("pass", "pass"))
    columns.append(SweepColumn("error", "error"))

    rows = []
    for i, c in enumerate(cases):
        row: dict[str, object] = {"case": i}  # the index into the JSON's cases (and the CSV)
        for k in keypaths:
            row[f"value:{k}"] = c["values"].get(k, "")
        steady = c.get("steady") or {}
        for lid, res in steady.get("lines", {}).items():
            row[f"flow:{lid}"] = res.get("flow_m3_s")
            row[f"velocity:{lid}"] = res.get("velocity_m_s")
            profile = [p for p in (res.get("profile") or {}).get("pressure_pa", ()) if p is not None]
            row[f"plow:{lid}"] = min(profile) if profile else None
        sim = c.get("simulation") or {}
        if sim:
            for tid in tanks:
                times = [e["time_s"] for e in sim.get("events", ())
                         if e.get("code") == "tank.drained" and e.get("element") == tid]
                row[f"drain:{tid}"] = times[0] if times else math.inf
            for lid, res in sim.get("lines", {}).items():
                row[f"pmax:{lid}"] = res.get("max_pressure_pa")
                row[f"pmin:{lid}"] = res.get("min_pressure_pa")
        codes = _ordered(w.get("code") for w in list(steady.get("warnings", ())) + list(sim.get("warnings", ())))
        checks = c.get("checks") or ()
        for j in compared:
            value = checks[j].get("value") if j < len(checks) else None
            row[f"criterion:{j}"] = value
        row["warnings"] = ", ".join(codes)
        row["pass"] = {True: "yes", False: "no", None: "-"}[c.get("pass")]
        row["error"] = c.get("error") or ""
        rows.append(row)
    return columns, rows


#: Magnitudes below which an SI value is rounding noise of the solvers, shown as 0.
_NOISE = {"pressure": 1e-6, "pressure_abs": 1e-6, "head": 1e-9, "flow": 1e-12, "velocity": 1e-9}


def _compared_criteria(criteria: Sequence[str]) -> dict[int, tuple[str, str]]:
    """Index -> (title, quantity kind) of the criteria that compare a named result."""
    from workbench.project.sweep_spec import METRICS, SweepSpecError, parse_criterion

    out: dict[int, tuple[str, str]] = {}
    for j, text in enumerate(criteria):
        try:
            crit = parse_criterion(text)
        except SweepSpecError:
            continue
        if crit.metric is not None:
            kind = METRICS[crit.metric].kind
            out[j] = (f"{crit.metric}({crit.element})", None if kind == "number" else kind)
    return out


def tidy(value: float, kind: str | None) -> float:
    """``value`` with solver rounding noise (e.g. -3e-13 Pa at a free outlet) set to 0."""
    return 0.0 if kind in _NOISE and abs(value) < _NOISE[kind] else value


def format_time(seconds: float) -> str:
    """Readable duration: ``'45 s'``, ``'12.5 min'``, ``'3.25 h'``; ``'not reached'`` for inf."""
    if seconds is None:
        return ""
    if not math.isfinite(seconds):
        return "not reached"
    if seconds < 120:
        return f"{seconds:.3g} s"
    if seconds < 7200:
        return f"{seconds / 60:.4g} min"
    return f"{seconds / 3600:.4g} h"


def display_rows(columns: Sequence[SweepColumn], rows: Sequence[Mapping], unit_system: str = "SI") -> list[list[str]]:
    """Rows as display text in the unit system (pint only at this edge)."""
    from workbench.project.units import format_quantity

    out = []
    for row in rows:
        cells = []
        for col in columns:
            value = row.get(col.key)
            if value is None or value == "":
                cells.append("")
            elif col.key == "case":
                cells.append(str(int(value) + 1))  # numbered from 1 for the reader
            elif col.kind == "time":
                cells.append(format_time(float(value)))
            elif col.kind is not None:
                cells.append(format_quantity(tidy(float(value), col.kind), col.kind, unit_system))
            else:
                cells.append(str(value))
        out.append(cells)
    return out


def write_csv(path: str | Path, columns: Sequence[SweepColumn], rows: Sequence[Mapping]) -> None:
    """Write the table as CSV: SI numbers, the unit in each header (``flow L1 [m^3/s]``)."""
    with open(path, "w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh)
        writer.writerow([f"{c.title} [{_SI_UNITS[c.kind]}]" if c.kind in _SI_UNITS else c.title for c in columns])
        for row in rows:
            cells = []
            for c in columns:
                value = row.get(c.key)
                if isinstance(value, float):
                    cells.append("" if math.isnan(value) else ("inf" if math.isinf(value) else repr(value)))
                else:
                    cells.append("" if value is None else value)
            writer.writerow(cells)
