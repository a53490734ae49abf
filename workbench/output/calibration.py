"""A calibration for people and programs: the ``calibrate --json`` object, tables and a plot.

:func:`calibration_to_json` gives the documented shape::

    {"parameters": {KEYPATH: {"value": "0.61 mm", "value_si": 0.00061, "ci95_si": [lo, hi]}},
     "residual_rms_before": x, "residual_rms_after": y,
     "measurements": {NAME: {"quantity": ..., "unit_si": ..., "rms_before": ...,
                             "rms_after": ...}},
     "warnings": [...]}

(residuals in SI units of the quantity; keys beyond these are additions). The tested range
of every measurement goes with every result: a calibrated model holds near the conditions
it was tested at.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

import numpy as np

from workbench.output.common import json_float as _num

if TYPE_CHECKING:  # pragma: no cover
    from workbench.project.calibration import CalibrationRun
    from workbench.project.measurements import Measurement

__all__ = ["DISPLAY_KIND", "UNIT_SI", "calibration_plot", "calibration_tables", "calibration_to_json",
           "caution_text", "crossing_time", "interval_notes", "interval_text", "mark_level",
           "tested_range_text"]

#: Measured quantity -> SI unit of its readings and residuals, and its display kind.
UNIT_SI = {"level": "m", "flow": "m^3/s", "pressure": "Pa"}
DISPLAY_KIND = {"level": "elevation", "flow": "flow", "pressure": "pressure"}


def crossing_time(times: np.ndarray, series: np.ndarray, level: float) -> float | None:
    """First time a falling (or rising) series reaches ``level``, linear between readings
    [s]; ``None`` when it does not within the times given."""
    s = np.asarray(series, dtype=float) - level
    falling = s[0] > 0
    hit = np.flatnonzero(s <= 0) if falling else np.flatnonzero(s >= 0)
    if not hit.size:
        return None
    i = int(hit[0])
    if i == 0:
        return float(times[0])
    w = s[i - 1] / (s[i - 1] - s[i])
    return float(times[i - 1] + w * (times[i] - times[i - 1]))


def tested_range_text(m: "Measurement", unit_system: str = "SI") -> str:
    """The conditions a measurement covers, in words and display units."""
    from workbench.project.units import format_quantity

    kind = DISPLAY_KIND[m.quantity]
    low, high = float(np.min(m.values)), float(np.max(m.values))
    span = (format_quantity(low, kind, unit_system, 3) if math.isclose(low, high)
            else f"{format_quantity(low, kind, unit_system, 3)} to "
                 f"{format_quantity(high, kind, unit_system, 3)}")
    words = f"{m.name}: {m.quantity} of {m.element} {span}"
    if m.times is not None:
        words += f" over {duration_text(float(m.times[-1] - m.times[0]))}"
    else:
        words += " (steady)"
    for tank, level in m.levels.items():
        words += f", {tank} starting at {format_quantity(level, 'elevation', unit_system, 3)}"
    for line, opening in m.openings.items():
        words += f", valve on {line} at {opening:.3g} open"
    if m.initial_state == "at_rest":
        words += ", outlet opened at the start"
    return words


def duration_text(seconds: float) -> str:
    """A time span in one readable unit: seconds, minutes below 2 h, then hours."""
    if seconds >= 7200.0:
        return f"{seconds / 3600.0:.3g} h"
    if seconds >= 120.0:
        return f"{seconds / 60.0:.3g} min"
    return f"{seconds:.3g} s"


def _overall(run: "CalibrationRun", which: str) -> float | None:
    """RMS over every reading [SI] when all are of one quantity; else of the residuals
    relative to each measurement's largest reading [-]."""
    res = run.result
    preds = res.predicted_before if which == "before" else res.predicted_after
    if not preds:
        return None
    same = len({m.quantity for m in run.measurements}) == 1
    parts = []
    for m in run.measurements:
        r = preds[m.name] - m.values
        parts.append(r if same else r / max(float(np.max(np.abs(m.values))), 1e-300))
    r = np.concatenate(parts)
    return float(np.sqrt(np.mean(r * r)))


def calibration_to_json(run: "CalibrationRun") -> dict:
    """The ``workbench calibrate --json`` object (see the module docstring)."""
    from workbench.project.calibration import value_text

    res = run.result
    units = run.project.unit_system
    out: dict[str, Any] = {"parameters": {}}
    for i, p in enumerate(res.parameters):
        value = float(res.values[i])
        out["parameters"][p.key] = {
            "value": value_text(p, value, units),
            "value_si": _num(value),
            "ci95_si": [_num(res.ci95[i, 0]), _num(res.ci95[i, 1])],
            "start": value_text(p, p.start, units),
            "start_si": _num(p.start),
            "std_error_si": _num(res.std_error[i]),
            "range_si": [_num(p.lower), _num(p.upper)],
            "at_bound": p.key in res.at_bound,
            "ci95_cut": [bool(c) for c in _cut(res, i)],
        }
    out["residual_rms_before"] = _num(_overall(run, "before"))
    out["residual_rms_after"] = _num(_overall(run, "after"))
    same = len({m.quantity for m in run.measurements}) == 1
    out["residual_unit_si"] = UNIT_SI[run.measurements[0].quantity] if same else "relative"
    out["measurements"] = {m.name: _measurement_json(run, m) for m in run.measurements}
    out["correlation"] = {
        p.key: {q.key: _num(res.correlation[i, j]) for j, q in enumerate(res.parameters)}
        for i, p in enumerate(res.parameters)}
    out["warnings"] = [{"code": w.code, "element": w.element, "message": w.message,
                        "severity": w.severity, "source": w.source} for w in res.warnings]
    out["warnings"] += [{"code": "calibration.interval_cut", "element": key,
                         "severity": "info", "source": "", "message": words}
                        for key, words in interval_notes(run)]
    out["warnings"].append({
        "code": "calibration.tested_range", "element": "calibration", "severity": "caution",
        "source": "", "message": caution_text(run)})
    out.update({"success": bool(res.success), "status": int(res.status),
                "message": res.message, "evaluations": int(res.evaluations)})
    return out


def _cut(res, i: int) -> tuple[bool, bool]:
    cut = getattr(res, "ci95_cut", None)
    return (False, False) if cut is None else (bool(cut[i, 0]), bool(cut[i, 1]))


#: Fit target -> what it is, in words.
_WHAT = {"roughness": "roughness", "diameter": "bore", "friction_factor": "friction factor",
         "fitting_k": "loss coefficient", "valve_k_open": "loss coefficient",
         "valve_kv_open": "Kv"}


def interval_notes(run: "CalibrationRun") -> list[tuple[str, str]]:
    """``(key path, words)`` for each 95 % interval cut to the range searched: the
    linearised interval is symmetric and would reach below zero (or beyond the range)."""
    from workbench.project.calibration import value_text

    res = run.result
    units = run.project.unit_system
    out = []
    for i, p in enumerate(res.parameters):
        low, high = _cut(res, i)
        what = _WHAT.get(p.target, "value")
        if low and p.lower <= 0.0:
            out.append((p.key, f"{p.key}: the 95 % interval is cut at zero: the linearised "
                        f"interval reaches below it, and a {what} cannot be negative; the "
                        "readings bound it only from above"))
        elif low:
            out.append((p.key, f"{p.key}: the 95 % interval is cut at the lower end of the range "
                        f"searched, {value_text(p, p.lower, units)}: the readings do not bound "
                        "it from below within the range"))
        if high:
            out.append((p.key, f"{p.key}: the 95 % interval is cut at the upper end of the range "
                        f"searched, {value_text(p, p.upper, units)}: the readings do not bound "
                        "it from above within the range"))
    return out


def interval_text(p, lo: float, hi: float, cut: tuple[bool, bool], unit_system: str) -> str:
    """An interval for a table: ``"0.5 mm to 0.7 mm"``, a cut end marked ``*``; ``"—"``
    without one."""
    from workbench.project.calibration import value_text

    if not (math.isfinite(lo) and math.isfinite(hi)):
        return "—"
    return (f"{value_text(p, lo, unit_system)}{'*' if cut[0] else ''} to "
            f"{value_text(p, hi, unit_system)}{'*' if cut[1] else ''}")


def caution_text(run: "CalibrationRun") -> str:
    """The caution that goes with every calibration: the range it was tested over."""
    ranges = "; ".join(tested_range_text(m, run.project.unit_system) for m in run.measurements)
    return ("A calibrated model holds near the conditions it was tested at: " + ranges
            + ". At other levels, openings, flows or temperatures the fitted values are an "
            "extrapolation; check them against a test there.")


def _measurement_json(run: "CalibrationRun", m: "Measurement") -> dict:
    res = run.result
    entry: dict[str, Any] = {
        "quantity": m.quantity, "unit_si": UNIT_SI[m.quantity], "element": m.element,
        "rms_before": _num(res.rms_before.get(m.name)),
        "rms_after": _num(res.rms_after.get(m.name)),
        "max_before": _num(res.max_before.get(m.name)),
        "max_after": _num(res.max_after.get(m.name)),
        "readings": int(len(m.values)),
        "skipped_rows": list(m.skipped_rows),
        "time_span_s": None if m.times is None else [_num(m.times[0]), _num(m.times[-1])],
        "value_range_si": [_num(np.min(m.values)), _num(np.max(m.values))],
    }
    if m.quantity == "level" and m.times is not None:
        mark = mark_level(m)
        entry["mark_level_m"] = _num(mark)
        entry["time_to_mark_level_s"] = {
            "measured": _num(crossing_time(m.times, m.values, mark)),
            "before": _crossing(m, res.trace_before.get(m.name), mark),
            "after": _crossing(m, res.trace_after.get(m.name), mark),
        }
    return entry


def mark_level(m: "Measurement") -> float:
    """The level 90 % of the way from the first reading to the last: the mark at which a
    drain or fill time is compared (the last reading itself is too noisy to time)."""
    return float(m.values[0] + 0.9 * (m.values[-1] - m.values[0]))


def _crossing(m: "Measurement", trace, level: float) -> float | None:
    """When the model's whole output (not only its values at the readings) reaches
    ``level``, within the test's span."""
    if trace is None or m.times is None:
        return None
    return _num(crossing_time(*trace, level))


def calibration_tables(run: "CalibrationRun") -> list:
    """Rich renderables: the parameters, the fit per measurement, correlations, warnings."""
    from rich.text import Text

    from workbench.output.common import SEVERITY_STYLE, simple_table
    from workbench.project.calibration import value_text
    from workbench.project.units import format_quantity

    res = run.result
    units = run.project.unit_system
    runs = "" if "model runs" in res.message else f" ({res.evaluations} model runs)"
    out: list = [Text(f"{run.project.system.title}: calibration: {res.message}{runs}.",
                      style="" if res.success else "bold red")]
    pt = simple_table("Parameters")
    for col in ("key path", "was", "fitted", "95 % interval"):
        pt.add_column(col, justify="left" if col == "key path" else "right", overflow="fold")
    for i, p in enumerate(res.parameters):
        lo, hi = res.ci95[i]
        pt.add_row(p.key, value_text(p, p.start, units), value_text(p, float(res.values[i]), units),
                   interval_text(p, lo, hi, _cut(res, i), units))
    out.append(pt)
    out += [Text(f"* {words}.") for _key, words in interval_notes(run)]
    mt = simple_table("Fit to the measurements (model minus reading)")
    for col in ("measurement", "readings", "RMS before", "RMS after", "largest after"):
        mt.add_column(col, justify="left" if col == "measurement" else "right", no_wrap=True)
    for m in run.measurements:
        kind = DISPLAY_KIND[m.quantity]

        def q(v):
            return "—" if v is None or not math.isfinite(v) else format_quantity(v, kind, units, 3)
        mt.add_row(m.name, str(len(m.values)), q(res.rms_before.get(m.name)),
                   q(res.rms_after.get(m.name)), q(res.max_after.get(m.name)))
    out.append(mt)
    for m in run.measurements:
        entry = _measurement_json(run, m).get("time_to_mark_level_s")
        if entry and entry["measured"] is not None:
            level = format_quantity(mark_level(m), "elevation", units, 3)
            verb = "fall" if m.values[-1] < m.values[0] else "rise"
            out.append(Text(f"{m.name}: time to {verb} 90 % of the measured change (to {level}): measured "
                            f"{_time(entry['measured'])}, model before {_time(entry['before'])}, "
                            f"after {_time(entry['after'])}."))
    if len(res.parameters) > 1 and np.all(np.isfinite(res.correlation)):
        ct = simple_table("Correlation of the fitted parameters")
        ct.add_column("")
        for p in res.parameters:
            ct.add_column(p.key, justify="right", overflow="fold")
        for i, p in enumerate(res.parameters):
            ct.add_row(p.key, *(f"{res.correlation[i, j]:+.3f}" for j in range(len(res.parameters))))
        out.append(ct)
    for w in res.warnings:
        out.append(Text.assemble((w.severity.upper(), SEVERITY_STYLE.get(w.severity, "")),
                                 f" {w.code}: {w.message}"))
    out.append(Text("CAUTION " + caution_text(run)))
    return out


def _time(seconds) -> str:
    return "not within the test" if seconds is None else duration_text(float(seconds))


def calibration_plot(run: "CalibrationRun", colour: bool = True, width: int = 80) -> str:
    """Readings against the model before and after the fit, one plot per measurement in
    time (plotext; monochrome with ``colour=False``)."""
    import plotext as plt

    from workbench.project.units import display_unit, to_display

    units = run.project.unit_system
    texts = []
    for m in run.measurements:
        if m.times is None:
            continue
        kind = DISPLAY_KIND[m.quantity]
        scale, t_unit = (3600.0, "h") if m.times[-1] >= 7200 else \
            (60.0, "min") if m.times[-1] >= 120 else (1.0, "s")
        t = (m.times / scale).tolist()
        plt.clf()
        plt.plotsize(width, 20)
        if not colour:
            plt.theme("clear")

        def y(values):
            return [float(v) for v in np.atleast_1d(to_display(np.asarray(values), kind, units))]
        for which, series, marker in (("before", run.result.predicted_before, "."),
                                      ("fitted", run.result.predicted_after, "*")):
            if m.name in series:
                plt.plot(t, y(series[m.name]), label=f"model {which}", marker=marker)
        plt.scatter(t, y(m.values), label="measured", marker="o")
        plt.title(f"{m.name}: {m.quantity} of {m.element}")
        plt.xlabel(f"time [{t_unit}]")
        plt.ylabel(f"{m.quantity} [{display_unit(kind, units)}]")
        texts.append(plt.build() if colour else plt.uncolorize(plt.build()))
    plt.clf()
    return "\n".join(texts)
