"""A transient run for people and programs: the ``simulate --json`` object, CSV and rich
summary tables.

:func:`transient_to_json` gives the documented shape (schema 1, all SI; keys beyond the
documented ones are additions, never renames). :func:`transient_csv` writes the time series.
:func:`transient_tables` gives rich renderables in the project's unit system: the tanks
(drain or transfer times), the lines (peak and minimum flows and pressures), surge
screening, events and warnings; a warning's severity is a word as well as a colour.
"""

from __future__ import annotations

import csv
import math
from typing import TYPE_CHECKING, Any, TextIO

import numpy as np

from workbench.output.common import (
    SEVERITY_STYLE,
    finding_message,
    finding_values,
    level_rate_text,
    quantity_text,
    simple_table,
)
from workbench.output.common import json_float as _num
from workbench.output.common import json_list as _list
from workbench.output.vent import gas_csv_columns, gas_json, gas_table

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.model import System
    from workbench.core.transient import TransientResult

__all__ = ["transient_csv", "transient_tables", "transient_to_json", "settle_time"]


def settle_time(t: np.ndarray, series: np.ndarray, fraction: float = 0.99) -> float | None:
    """Time from which a series stays within ``1 - fraction`` of its whole change of its
    final value [s] (the settling time of control engineering, a 1 % band by default).

    For a level that moves one way this is when it has made 99 % of its change; for one that
    overshoots, oscillates or drains and refills it is after the last excursion, not the
    first crossing. ``None`` when the series does not change. Used as the "transfer time" of
    a tank whose level moves without draining.
    """
    if len(t) < 2:
        return None
    series = np.asarray(series, dtype=float)
    change = float(series[-1] - series[0])
    if change == 0.0 or not math.isfinite(change):
        return None
    outside = np.flatnonzero(np.abs(series - series[-1]) > (1.0 - fraction) * abs(change))
    if not outside.size:
        return float(t[0])
    last = int(outside[-1])
    return float(t[last + 1]) if last + 1 < len(t) else None


def transient_to_json(result: TransientResult, system: System, include_series: bool = True) -> dict:
    """The ``workbench simulate --json`` object of a transient result.

    Documented keys: ``schema`` (1), ``time_s`` [...], ``lines`` {id: {``flow_m3_s`` [...],
    ``max_pressure_pa``, ``min_pressure_pa``}} (gauge, anywhere on the line over the run),
    ``levels`` {tank id: {``level_m`` [...]}}, ``events`` [{``time_s``, ``code``, ``element``,
    ``message``}], ``surge`` {line id: {``wave_speed_m_s``, ``joukowsky_pa``,
    ``effective_closure_s``, ``round_trip_s``}} and ``warnings`` [{``code``, ``element``,
    ``message``}]. Values that do not exist (a wave speed without a bulk modulus, the
    closure time of a line without a closing valve) are ``null``.

    Each tank in ``levels`` also has ``initial_level_m``, ``final_level_m``, and
    ``max_level_m`` and ``min_level_m`` (the extremes at the recorded times, which include
    every event), and its feed and draw-off: ``inflow_m3_s`` [...] and
    ``draw_off_m3_s`` [...] (the draw-off delivered: zero while the tank is drained) over
    ``time_s``, zeros for a tank without them; ``inflow_volume_m3`` and
    ``draw_off_volume_m3`` (what they moved over the run), ``spill_volume_m3`` and
    ``line_net_inflow_volume_m3`` (what spilled and what its lines brought in, net; with the
    feed and draw-off they close the tank's volume balance), ``end_state`` (``"steady"``,
    ``"rising"``, ``"falling"``, ``"spilling"``, ``"drained"`` or ``"still"``),
    ``end_net_inflow_m3_s`` and ``end_level_rate_m_s`` (positive rising); and what spills
    over its overflow, ``spill_m3_s`` [...] and ``peak_spill_m3_s``.

    With ``include_series=False`` the arrays (``time_s``, ``flow_m3_s``, ``level_m``,
    ``inflow_m3_s``, ``draw_off_m3_s``, ``spill_m3_s``) are left out and only the summary values remain
    (for sweeps).
    """
    out: dict[str, Any] = {"schema": 1}
    if include_series:
        out["time_s"] = _list(result.t)
    out.update({
        "title": system.title,
        "success": bool(result.success),
        "status": int(result.status),
        "message": result.message,
        "method": result.method,
        "end_time_s": _num(result.t[-1]) if len(result.t) else None,
        "lines": {},
        "levels": {},
        "events": [],
        "surge": {},
        "warnings": [],
        "stats": {"steps": int(result.nsteps), "rhs_evaluations": int(result.nfev),
                  "jacobians": int(result.njev), "wall_time_s": _num(result.wall_time)},
    })
    for i, lid in enumerate(result.line_ids):
        out["lines"][lid] = _line_json(result, i, include_series)
    feeds, draws = _external(result)
    spills = _spills(result)
    for k, tid in enumerate(result.tank_ids):
        out["levels"][tid] = _tank_json(result, system, k, (feeds[k], draws[k], spills[k]),
                                        include_series)
    out["events"] = [
        {"time_s": _num(e.time), "code": e.code, "element": e.element, "message": e.message}
        for e in result.events
    ]
    out["surge"] = {lid: _surge_json(s) for lid, s in result.surge.items()}
    out["warnings"] = [
        {"code": w.code, "element": w.element, "message": w.message, "severity": w.severity,
         "source": w.source, **({"values": finding_values(w)} if w.values else {})}
        for w in result.warnings
    ]
    return out


def _line_json(result: TransientResult, i: int, include_series: bool) -> dict:
    """``lines.ID``: the flow series and the extremes of flow and pressure with their times."""
    lid = result.line_ids[i]
    flows = result.flows[i] if result.flows.size else np.zeros(0)
    entry: dict[str, Any] = {}
    if include_series:
        entry["flow_m3_s"] = _list(flows)
    entry.update({
        "max_pressure_pa": _num(result.max_pressure.get(lid)),
        "min_pressure_pa": _num(result.min_pressure.get(lid)),
        "max_pressure_time_s": _num(result.max_pressure_time.get(lid)),
        "min_pressure_time_s": _num(result.min_pressure_time.get(lid)),
        "peak_flow_m3_s": _num(np.max(flows)) if flows.size else None,
        "min_flow_m3_s": _num(np.min(flows)) if flows.size else None,
    })
    return entry


def _tank_json(result: TransientResult, system: System, k: int, external: tuple,
               include_series: bool) -> dict:
    """``levels.ID`` of tank ``k``: levels, drained and settled times, feed, draw-off and
    spill (``external``: their series), the state at the end, and a vented tank's gas."""
    tid = result.tank_ids[k]
    feed, draw, spill = external
    levels = result.levels[k]
    entry: dict[str, Any] = {}
    if include_series:
        entry["level_m"] = _list(levels)
    entry.update({
        "initial_level_m": _num(levels[0]) if levels.size else None,
        "final_level_m": _num(levels[-1]) if levels.size else None,
        "max_level_m": _num(np.max(levels)) if levels.size else None,
        "min_level_m": _num(np.min(levels)) if levels.size else None,
        "drain_time_s": _num(result.drain_times.get(tid)),
        **({"drain_time_note": result.drain_notes[tid]}
           if tid in getattr(result, "drain_notes", {}) else {}),
        "settle_99_s": _num(settle_time(result.t, levels)),
    })
    if include_series:
        entry["inflow_m3_s"] = _list(feed)
        entry["draw_off_m3_s"] = _list(draw)
        entry["spill_m3_s"] = _list(spill)
    entry.update({
        "inflow_volume_m3": _num(_total(result, "feed_volumes", k, feed)),
        "draw_off_volume_m3": _num(_total(result, "draw_off_volumes", k, draw)),
        "spill_volume_m3": _num(_total(result, "spill_volumes", k, spill)),
        "line_net_inflow_volume_m3": _num(_run_total(result, "line_volumes", k)),
        "end_state": result.end_states.get(tid),
        "end_net_inflow_m3_s": _num(result.end_rates.get(tid)),
        "end_level_rate_m_s": _num(_level_rate(result, system, k)),
        "peak_spill_m3_s": _num(np.max(spill, initial=0.0)),
    })
    entry.update(gas_json(result, tid, include_series))  # tanks with a vent only
    return entry


def _surge_json(s) -> dict:
    """``surge.ID``: the rigid-column run's surge screening of one line."""
    return {
        "wave_speed_m_s": _num(s.wave_speed),
        "joukowsky_pa": _num(s.joukowsky),
        "effective_closure_s": _num(s.effective_closure),
        "round_trip_s": _num(s.round_trip),
        "rapid_closure": bool(s.rapid_closure),
        "capped": bool(s.capped),
        "max_pressure_uncapped_pa": _num(s.max_pressure_uncapped),
        "formula": s.formula,
    }


def _external(result: TransientResult) -> tuple[np.ndarray, np.ndarray]:
    """Feed and delivered draw-off series, tanks x times (zeros when the result has none)."""
    shape = (len(result.tank_ids), len(result.t))
    feeds = np.asarray(result.feeds, dtype=float)
    draws = np.asarray(result.draw_offs, dtype=float)
    if feeds.shape != shape:
        feeds = np.zeros(shape)
    if draws.shape != shape:
        draws = np.zeros(shape)
    return feeds, draws


def _spills(result: TransientResult) -> np.ndarray:
    """Spill series, tanks x times (zeros when the result has none)."""
    shape = (len(result.tank_ids), len(result.t))
    spills = np.asarray(result.spills, dtype=float)
    return spills if spills.shape == shape else np.zeros(shape)


def _total(result: TransientResult, name: str, k: int, flow: np.ndarray) -> float | None:
    """A tank's feed or draw-off volume over the run [m^3]: the run's own exact total when
    it kept one, else from the output series."""
    totals = np.asarray(getattr(result, name, ()), dtype=float)
    if totals.size > k:
        return float(totals[k])
    return _moved(result.t, flow)


def _run_total(result: TransientResult, name: str, k: int) -> float | None:
    """A total the run kept for tank ``k`` [m^3], or ``None`` when it kept none."""
    totals = np.asarray(getattr(result, name, ()), dtype=float)
    return float(totals[k]) if totals.size > k else None


def _moved(t: np.ndarray, flow: np.ndarray) -> float | None:
    """Volume a flow series moved over the run [m^3] (trapezoidal rule on the output grid,
    which holds every schedule break point and event time)."""
    if len(t) < 2:
        return 0.0 if len(t) else None
    return float(np.sum(0.5 * (flow[1:] + flow[:-1]) * np.diff(t)))


def _level_rate(result: TransientResult, system: System, k: int) -> float | None:
    """Rate of change of level of tank ``k`` at the end of the run [m/s]."""
    from workbench.core.tank import tank_geometry

    tid = result.tank_ids[k]
    rate = result.end_rates.get(tid)
    if rate is None or not result.levels[k].size:
        return None
    area = tank_geometry(system.reservoirs[tid]).area_floor(float(result.levels[k][-1]))
    return rate / area


def _fed(result: TransientResult, system: System) -> list[int]:
    """Indices of the tanks with a feed or draw-off."""
    return [k for k, tid in enumerate(result.tank_ids)
            if system.reservoirs[tid].has_external_flow]


def transient_csv(result: TransientResult, stream: TextIO, system: System | None = None) -> None:
    """Write the time series as CSV, SI units in the column names.

    Columns: ``time_s``, then ``flow_<line>_m3_s`` per line and ``level_<tank>_m`` per tank,
    then (given ``system``) ``inflow_<tank>_m3_s`` and ``draw_off_<tank>_m3_s`` for each
    tank with a feed or draw-off.
    """
    writer = csv.writer(stream, lineterminator="\n")
    fed = _fed(result, system) if system is not None else []
    feeds, draws = _external(result)
    header = (["time_s"] + [f"flow_{lid}_m3_s" for lid in result.line_ids]
              + [f"level_{tid}_m" for tid in result.tank_ids]
              + [f"{what}_{result.tank_ids[k]}_m3_s" for k in fed
                 for what in ("inflow", "draw_off")])
    columns = [result.t] + list(result.flows) + list(result.levels)
    for k in fed:
        columns += [feeds[k], draws[k]]
    gas_names, gas_columns = gas_csv_columns(result)  # then gas_pressure_<tank>_pa
    header += gas_names
    columns += gas_columns
    writer.writerow(header)
    for row in zip(*columns):
        writer.writerow([repr(float(v)) for v in row])


def _span(series: np.ndarray, q) -> str:
    """A flow series as one value when constant, else ``low to high``."""
    if not series.size:
        return "—"
    low, high = float(np.min(series)), float(np.max(series))
    if high - low <= 1e-12 * max(abs(high), 1e-12):
        return q(high, "flow")
    low_text, high_text = q(low, "flow"), q(high, "flow")
    low_num, _, low_unit = low_text.partition(" ")
    if high_text.endswith(" " + low_unit):
        return f"{low_num}–{high_text}"
    return f"{low_text}–{high_text}"


class _Units:
    """Numbers as text in one unit system: ``q`` a quantity, ``when`` a time."""

    def __init__(self, unit_system: str):
        self.unit_system = unit_system

    def q(self, value, kind: str, digits: int = 4) -> str:
        return quantity_text(value, kind, self.unit_system, digits)

    def when(self, value) -> str:
        """A time in one readable unit: seconds below 2 min, then minutes, then hours."""
        from workbench.project.units import format_quantity

        v = _num(value)
        if v is None:
            return "—"
        if abs(v) >= 7200.0:
            return f"{v / 3600.0:.4g} h"
        if abs(v) >= 120.0:
            return f"{v / 60.0:.4g} min"
        return format_quantity(v, "time", self.unit_system, 4)


def transient_tables(result: TransientResult, system: System, unit_system: str = "SI") -> list:
    """Rich renderables summarising a transient run.

    Parameters
    ----------
    result : TransientResult
    system : System
    unit_system : {"SI", "US"}
        Display units (through :func:`workbench.project.units.format_quantity`).
    """
    from rich.text import Text

    u = _Units(unit_system)
    style = "" if result.success else "bold red"
    end = result.t[-1] if len(result.t) else 0.0
    out: list = [Text(
        f"{system.title}: {result.message} (simulated {u.when(end)}, {result.nsteps} steps, "
        f"{result.method}, {result.wall_time:.3g} s wall).", style=style)]
    if result.tank_ids:
        out.append(_tanks_table(result, u))
        if _fed(result, system):
            out.append(_feeds_table(result, system, u))
        if result.gas_tank_ids:
            out.append(gas_table(result, system, unit_system))
    out.append(_lines_table(result, u))
    closing = {lid: s for lid, s in result.surge.items() if s.effective_closure is not None}
    if closing:
        out.append(_surge_table(closing, u))
    out += _events(result, u)
    out.append(_warnings_table(result, u.unit_system) if result.warnings else Text("No warnings."))
    out.append(Text(
        "Rigid-column model: each line's liquid moves as one incompressible column; valid for "
        "slow valve moves only (see the surge screening). A computed drained time is never "
        "proof that a tank is empty: check before entry (confined space)."))
    return out


def _tanks_table(result: TransientResult, u: _Units):
    """Each tank's initial and final level, drained and settled times and end state."""
    q, when = u.q, u.when
    tanks = simple_table("Tanks")
    for col, just in (("tank", "left"), ("initial level", "right"), ("final level", "right"),
                      ("drained at", "right"), ("settled (1 %)\nfrom", "right"),
                      ("at end", "left")):
        tanks.add_column(col, justify=just, no_wrap=True)
    for k, tid in enumerate(result.tank_ids):
        lv = result.levels[k]
        tanks.add_row(tid, q(lv[0] if lv.size else None, "elevation"),
                      q(lv[-1] if lv.size else None, "elevation"),
                      when(result.drain_times.get(tid)), when(settle_time(result.t, lv)),
                      result.end_states.get(tid, "—"))
    return tanks


def _feeds_table(result: TransientResult, system: System, u: _Units):
    """The fed tanks' feeds and draw-offs, the volumes moved, and how each ends."""
    q = u.q
    feeds, draws = _external(result)
    ft = simple_table("Feeds and draw-offs")
    ft.caption = "draw-off as delivered: it stops while the tank is drained"
    ft.caption_justify = "left"
    for col in ("tank", "feed", "draw-off", "fed in", "drawn off", "at end"):
        ft.add_column(col, justify="left" if col == "tank" else "right", no_wrap=True)
    spills = _spills(result)
    for k in _fed(result, system):
        tid = result.tank_ids[k]
        at_end = level_rate_text(_level_rate(result, system, k), u.unit_system)
        if result.end_states.get(tid) == "spilling":
            at_end = f"spills {q(spills[k][-1] if spills[k].size else None, 'flow')}"
        ft.add_row(tid, _span(feeds[k], q), _span(draws[k], q),
                   q(_total(result, "feed_volumes", k, feeds[k]), "volume"),
                   q(_total(result, "draw_off_volumes", k, draws[k]), "volume"), at_end)
    return ft


def _lines_table(result: TransientResult, u: _Units):
    """Each line's flow range and pressure extremes with their times."""
    q, when = u.q, u.when
    lines = simple_table("Lines")
    for col, just in (("line", "left"), ("peak flow", "right"), ("min flow", "right"),
                      ("max pressure", "right"), ("min pressure", "right")):
        lines.add_column(col, justify=just, no_wrap=True)
    any_capped = False
    for i, lid in enumerate(result.line_ids):
        f = result.flows[i] if result.flows.size else np.zeros(0)
        pmax = q(result.max_pressure.get(lid), "pressure")
        surge = result.surge.get(lid)
        if surge is not None and surge.capped:
            pmax += " *"
            any_capped = True
        # each extreme with its time under it, so that the table fits 80 columns
        lines.add_row(lid, q(np.max(f) if f.size else None, "flow"),
                      q(np.min(f) if f.size else None, "flow"),
                      f"{pmax}\nat {when(result.max_pressure_time.get(lid))}",
                      f"{q(result.min_pressure.get(lid), 'pressure')}\n"
                      f"at {when(result.min_pressure_time.get(lid))}")
    if any_capped:
        lines.caption = ("* capped at static plus Joukowsky: the rigid column overstates a "
                         "fast closure (see the surge screening)")
        lines.caption_justify = "left"
    return lines


def _surge_table(closing: dict, u: _Units):
    """The surge screening of each closing valve: wave speed, round trip, closure, verdict."""
    from rich.text import Text

    q, when = u.q, u.when
    st = simple_table("Surge screening of valve closures (a: wave speed; in 2L/a: closure "
                      "time in wave round trips)")
    for col in ("line", "a", "2L/a", "eff. closure", "in 2L/a", "Joukowsky"):
        st.add_column(col, justify="left" if col == "line" else "right", no_wrap=True)
    st.add_column("verdict", overflow="fold", ratio=1)
    for lid, s in closing.items():
        trips = (s.effective_closure / s.round_trip) if s.round_trip else None
        verdict = ("RAPID: elastic analysis needed" if s.rapid_closure
                   else "slow: rigid column adequate" if trips is not None else "—")
        st.add_row(lid, q(s.wave_speed, "velocity"), when(s.round_trip),
                   when(s.effective_closure), "—" if trips is None else f"{trips:.3g}",
                   q(s.joukowsky, "pressure"),
                   Text(verdict, style="bold red" if s.rapid_closure else ""))
    return st


#: Events shown in the tables; the rest are counted (all are in ``--json``).
EVENTS_SHOWN = 60


def _events(result: TransientResult, u: _Units) -> list:
    """The events table (the first :data:`EVENTS_SHOWN`, then a count), or "No events."."""
    from rich.text import Text

    if not result.events:
        return [Text("No events.")]
    ev = simple_table("Events")
    ev.add_column("time", justify="right", no_wrap=True)
    ev.add_column("code", no_wrap=True)
    ev.add_column("element", no_wrap=True)
    ev.add_column("message", overflow="fold", ratio=1)
    shown = result.events[:EVENTS_SHOWN]
    for e in shown:
        ev.add_row(u.when(e.time), e.code, e.element, Text(finding_message(e, u.unit_system)))
    out: list = [ev]
    if len(result.events) > len(shown):
        out.append(Text(f"... {len(result.events) - len(shown)} more events in --json."))
    return out


def _warnings_table(result: TransientResult, unit_system: str = "SI"):
    """The warnings, each severity as a word and a colour, with its published source."""
    from rich.text import Text

    warn = simple_table("Warnings")
    warn.add_column("severity", no_wrap=True)
    warn.add_column("code / element", overflow="fold")
    warn.add_column("message (source)", overflow="fold", ratio=1)
    for w in result.warnings:
        message = Text(finding_message(w, unit_system))
        if w.source:
            message.append(f" ({w.source})", style="dim")
        warn.add_row(Text(w.severity.upper(), style=SEVERITY_STYLE.get(w.severity, "")),
                     f"{w.code}\n{w.element}", message)
    return warn
