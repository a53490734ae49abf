"""Elastic surge results for people and programs: JSON keys and a rich table.

:func:`elastic_to_json` gives, per line run elastically, the object that ``workbench
simulate --json`` puts under ``surge.ID.elastic`` (all SI; arrays along the line's chainage
and in time). :func:`elastic_table` gives a rich summary table in the project's unit system.
These only add keys to the transient JSON; they never rename or reshape its keys.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from workbench.output.common import json_float as _num
from workbench.output.common import json_list as _list

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.elastic import ElasticResult
    from workbench.core.model import System

__all__ = ["elastic_findings", "elastic_line_json", "elastic_table", "elastic_to_json"]


def elastic_line_json(result: ElasticResult, line_id: str) -> dict:
    """The ``surge.ID.elastic`` object of one line.

    Keys: ``success``, ``status``, ``message``, ``chain`` (the lines in series run together),
    ``distance_m``, ``elevation_m``, ``max_head_m``, ``min_head_m``, ``max_pressure_pa``,
    ``min_pressure_pa`` (gauge; arrays along the line's nodes), ``time_s``,
    ``valve_pressure_pa`` (gauge, at the pipe side of the chain's valve; empty without a
    valve), ``valve_line``, ``midline_pressure_pa`` (gauge, this line's mid-length node),
    ``reaches``, ``dt_s``, ``wave_speed_m_s`` (as used), ``wave_speed_korteweg_m_s``,
    ``wave_speed_adjustment`` (relative, used/Korteweg - 1), ``wave_speed_formula``,
    ``friction_model``, ``initial_flow_m3_s``, ``trusted_until_s`` (``null``: trusted
    throughout), ``column_separation`` (``null`` or {``time_s``, ``line``, ``distance_m``,
    ``pressure_abs_pa``}), ``notes`` and ``kernel`` (the time-stepping kernel used,
    ``"compiled"`` or ``"numpy"``; the numbers agree to round-off).

    Added with the vapour cavity model and branched lines (keys only added): ``lines_run``
    (every line run together), ``initial_flows_m3_s`` (per line), ``vapour_head_m`` (along
    this line), ``max_pressure_before_separation_pa`` (highest gauge pressure on this line
    before the first cavity formed; ``null`` when none formed), ``cavity_max_volume_m3``
    (along this line), ``cavity_volume_m3`` (total in the lines run, every step),
    ``cavities`` (zones on this line: ``start_m``, ``end_m``, ``sections``, ``events``,
    ``first_open_s``, ``last_collapse_s`` (``null``: open at the end), ``max_volume_m3``,
    ``max_volume_time_s``, ``max_volume_at_m``), ``grid_check`` (``null``, or the same run
    with twice the reaches: ``reaches`` and ``max_pressure_pa`` per line), ``traces_m``
    (head in time at valves and junctions, by label) and ``cavity_model``.
    """
    out: dict[str, Any] = {
        "success": bool(result.success),
        "status": int(result.status),
        "message": result.message,
        "chain": list(result.line_ids),
    }
    env = result.envelopes.get(line_id)
    if env is None:
        return out
    speed = result.wave_speeds[line_id]
    sep = result.column_separation
    out.update({
        "distance_m": _list(env.distance),
        "elevation_m": _list(env.elevation),
        "max_head_m": _list(env.max_head),
        "min_head_m": _list(env.min_head),
        "max_pressure_pa": _list(env.max_pressure),
        "min_pressure_pa": _list(env.min_pressure),
        "time_s": _list(result.time),
        "valve_line": result.valve_line,
        "valve_pressure_pa": _list(result.valve_pressure),
        "midline_pressure_pa": _list(result.midline_pressure[line_id]),
        "reaches": int(result.reaches[line_id]),
        "dt_s": _num(result.dt),
        "wave_speed_m_s": _num(speed.used),
        "wave_speed_korteweg_m_s": _num(speed.korteweg),
        "wave_speed_adjustment": _num(speed.adjustment),
        "wave_speed_formula": speed.formula,
        "friction_model": result.friction,
        "initial_flow_m3_s": _num(result.initial_flow),
        "trusted_until_s": _num(result.trusted_until),
        "column_separation": None if sep is None else {
            "time_s": _num(sep.time), "line": sep.line, "distance_m": _num(sep.distance),
            "pressure_abs_pa": _num(sep.pressure_abs),
        },
        "notes": list(result.notes),
        "kernel": result.kernel,
    })
    out.update(_cavity_json(result, line_id))
    return out


CAVITY_MODEL = ("discrete vapour cavity model (Wylie & Streeter 1993, ch. 8; Bergant, "
                "Simpson & Tijsseling 2006), cavity volume weighting psi = 1")


def _cavity_json(result: ElasticResult, line_id: str) -> dict:
    env = result.envelopes[line_id]
    pre = env.max_head_before_separation
    rho_g = None
    if pre is not None:
        # gauge pressure from head as the envelope's own: p = rho g (H - z)
        k = int(env.max_head.argmax())
        rho_g = env.max_pressure[k] / (env.max_head[k] - env.elevation[k]) \
            if env.max_head[k] != env.elevation[k] else None
    gc = result.grid_check
    return {
        "lines_run": list(result.line_ids),
        "initial_flows_m3_s": {k: _num(v) for k, v in result.initial_flows.items()},
        "vapour_head_m": _list(result.vapour_head.get(line_id, [])),
        "max_pressure_before_separation_pa": (
            None if pre is None or rho_g is None
            else _num(float((rho_g * (pre - env.elevation)).max()))),
        "cavity_max_volume_m3": (None if env.cavity_max_volume is None
                                 else _list(env.cavity_max_volume)),
        "cavity_volume_m3": _list(result.cavity_volume),
        "cavities": [{
            "start_m": _num(z.start), "end_m": _num(z.end), "sections": z.sections,
            "events": z.events, "first_open_s": _num(z.first_open),
            "last_collapse_s": _num(z.last_collapse), "max_volume_m3": _num(z.max_volume),
            "max_volume_time_s": _num(z.max_volume_time), "max_volume_at_m": _num(z.max_volume_at),
        } for z in result.cavity_zones if z.line == line_id],
        "grid_check": None if gc is None else {
            "reaches": dict(gc.reaches),
            "max_pressure_pa": {k: _num(v) for k, v in gc.max_pressure.items()}},
        "traces_m": {label: _list(v) for label, v in result.traces.items()},
        "cavity_model": CAVITY_MODEL if len(result.cavity_volume) else None,
    }


def elastic_to_json(results: dict[str, ElasticResult]) -> dict[str, dict]:
    """Line id -> its ``surge.ID.elastic`` object, for every line in ``results``."""
    return {lid: elastic_line_json(res, lid) for lid, res in results.items()}


def elastic_findings(results: dict[str, ElasticResult],
                     unit_system: str | None = None) -> list[dict]:
    """Findings of the elastic runs as ``warnings`` entries, each chain's once.

    A chain that could not be run gives an ``surge.elastic_failed`` entry with its message.
    Messages are SI (as ``--json`` has them) unless ``unit_system`` asks for display units.
    """
    from workbench.output.common import finding_message, finding_values

    def words(item) -> str:
        return item.message if unit_system is None else finding_message(item, unit_system)

    seen: set[int] = set()
    out: list[dict] = []
    for lid, res in results.items():
        if id(res) in seen:
            continue
        seen.add(id(res))
        if not res.success and res.status == -1:
            out.append({"code": "surge.elastic_failed", "element": lid,
                        "message": words(res), "severity": "caution", "source": ""})
        for f in res.findings:
            out.append({"code": f.code, "element": f.element, "message": words(f),
                        "severity": f.severity, "source": f.source,
                        **({"values": finding_values(f)} if f.values else {})})
    return out


def elastic_table(results: dict[str, ElasticResult], system: System, unit_system: str = "SI"):
    """A rich table: per elastic line, wave speed, reaches, peak and lowest pressure.

    Notes (a line not run, an adjusted wave speed, vapour pressure reached) are listed in
    full under the table, one per line, so that they read whole in an 80-column terminal.
    """
    from rich.table import Table
    from rich.text import Text

    from workbench.output.common import finding_message
    from workbench.project.units import format_quantity

    table = Table(title="Elastic surge (method of characteristics)", title_justify="left")
    for col in ("line", "a", "reaches", "dt", "p max", "p min", "rating"):
        table.add_column(col, justify="left" if col == "line" else "right", no_wrap=True)
    notes: list[str] = []
    for lid, res in results.items():
        env = res.envelopes.get(lid)
        if env is None:
            table.add_row(lid, "", "", "", "", "", "")
            notes.append(f"{lid}: not run: {finding_message(res, unit_system)}")
            continue
        speed = res.wave_speeds[lid]
        rating = system.lines[lid].pressure_rating
        if abs(speed.adjustment) > 1e-9:
            notes.append(f"{lid}: wave speed adjusted {100 * speed.adjustment:+.2f} % to fit "
                         "the common time step")
        if res.column_separation is not None:
            sep = res.column_separation
            notes.append(f"{lid}: VAPOUR PRESSURE reached on {sep.line} at "
                         f"{format_quantity(sep.distance, 'length', unit_system, 3)}, "
                         f"t = {sep.time:.2f} s: results after that time are not trustworthy")
            notes.extend(_cavity_notes(res, lid, unit_system))
        over = rating is not None and env.max_pressure.max() > rating
        if over:
            notes.append(f"{lid}: the peak is OVER THE RATING")
        table.add_row(
            lid,
            format_quantity(speed.used, "velocity", unit_system),
            str(res.reaches[lid]),
            f"{res.dt * 1e3:.3g} ms",
            format_quantity(float(env.max_pressure.max()), "pressure", unit_system)
            + (" !" if over else ""),
            format_quantity(float(env.min_pressure.min()), "pressure", unit_system)
            + (" v" if _at_vapour(res, lid) else ""),
            "" if rating is None else format_quantity(rating, "pressure", unit_system),
        )
    vapour = any(_at_vapour(res, lid) for lid, res in results.items()
                 if lid in res.envelopes)
    caption = ["a: wave speed used; p: gauge pressure, highest and lowest anywhere on the line "
               "over the surge run" + ("; ! over the rating" if any("OVER" in n for n in notes)
                                       else "")
               + ("; v at vapour pressure (a vapour cavity)" if vapour else "")]
    caption.extend(notes)
    # messages quote file keys such as [fluid]: plain text, never console markup
    table.caption = Text("\n".join(caption))
    table.caption_justify = "left"
    return table


def _at_vapour(res: ElasticResult, lid: str) -> bool:
    """True when the line's lowest head is the vapour head (a cavity formed on it)."""
    return any(z.line == lid for z in res.cavity_zones)


def _cavity_notes(res: ElasticResult, lid: str, unit_system: str) -> list[str]:
    """Per line: its cavity zones, the peak before separation and the grid check."""
    from workbench.project.units import format_quantity

    def p(value):
        return format_quantity(value, "pressure", unit_system)

    def x(value):
        return format_quantity(value, "length", unit_system, 3)

    env = res.envelopes[lid]
    out = []
    for z in res.cavity_zones:
        if z.line != lid:
            continue
        where = (f"at {x(z.start)}" if z.sections == 1
                 else f"along {x(z.start)} to {x(z.end)}")
        end = ("open at the end" if z.last_collapse is None
               else f"last collapse {z.last_collapse:.2f} s")
        out.append(f"{lid}: vapour cavities {where}, from {z.first_open:.2f} s, largest "
                   f"{format_quantity(z.max_volume, 'small_volume', unit_system, 3)}, {end}")
    if env.max_head_before_separation is not None and out:
        j = int(env.max_head.argmax())
        rho_g = env.max_pressure[j] / (env.max_head[j] - env.elevation[j])
        before = float((rho_g * (env.max_head_before_separation - env.elevation)).max())
        out.append(f"{lid}: p max {p(float(env.max_pressure.max()))} with the collapses, "
                   f"{p(before)} before the column separated")
    if res.grid_check is not None and out:
        out.append(f"{lid}: with {res.grid_check.reaches[lid]} reaches p max is "
                   f"{p(res.grid_check.max_pressure[lid])} (the peak depends on the grid)")
    return out


def envelope_rows(result: ElasticResult, line_id: str, unit_system: str = "SI",
                  points: int = 9) -> list[list[str]]:
    """Rows ``[chainage, max p, min p, note]`` at about ``points`` stations along a line,
    the note saying in words where a vapour cavity formed nearby."""
    import numpy as np

    from workbench.project.units import format_quantity

    env = result.envelopes.get(line_id)
    if env is None:
        return []
    n = len(env.distance)
    picks = sorted(set(np.linspace(0, n - 1, min(points, n)).round().astype(int).tolist()))
    cav = env.cavity_max_volume
    rows = []
    for j, i in enumerate(picks):
        lo = picks[j - 1] + 1 if j else 0
        hi = picks[j + 1] if j + 1 < len(picks) else n
        near = cav is not None and bool((cav[lo:hi] > 0).any())
        rows.append([format_quantity(float(env.distance[i]), "length", unit_system),
                     format_quantity(float(env.max_pressure[i]), "pressure", unit_system),
                     format_quantity(float(env.min_pressure[i]), "pressure", unit_system),
                     "vapour cavity (at vapour pressure)" if near else ""])
    return rows


def cavity_lines(result: ElasticResult, line_id: str, unit_system: str = "SI") -> list[str]:
    """The cavity zones of a line and the grid check, in words, one sentence each."""
    return _cavity_notes(result, line_id, unit_system)
