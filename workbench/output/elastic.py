"""Elastic surge results for people and programs: JSON keys and a rich table.

:func:`elastic_to_json` gives, per line run elastically, the object that ``workbench
simulate --json`` puts under ``surge.ID.elastic`` (all SI; arrays along the line's chainage
and in time). :func:`elastic_table` gives a rich summary table in the project's unit system.
These only add keys to the transient JSON; they never rename or reshape its keys.
"""

from __future__ import annotations

from workbench.output.common import json_float as _num, json_list as _list

from typing import TYPE_CHECKING, Any

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
    return out


def elastic_to_json(results: dict[str, ElasticResult]) -> dict[str, dict]:
    """Line id -> its ``surge.ID.elastic`` object, for every line in ``results``."""
    return {lid: elastic_line_json(res, lid) for lid, res in results.items()}


def elastic_findings(results: dict[str, ElasticResult]) -> list[dict]:
    """Findings of the elastic runs as ``warnings`` entries, each chain's once.

    A chain that could not be run gives an ``surge.elastic_failed`` entry with its message.
    """
    seen: set[int] = set()
    out: list[dict] = []
    for lid, res in results.items():
        if id(res) in seen:
            continue
        seen.add(id(res))
        if not res.success and res.status == -1:
            out.append({"code": "surge.elastic_failed", "element": lid,
                        "message": res.message, "severity": "caution", "source": ""})
        for f in res.findings:
            out.append({"code": f.code, "element": f.element, "message": f.message,
                        "severity": f.severity, "source": f.source})
    return out


def elastic_table(results: dict[str, ElasticResult], system: System, unit_system: str = "SI"):
    """A rich table: per elastic line, wave speed, reaches, peak and lowest pressure.

    Notes (a line not run, an adjusted wave speed, vapour pressure reached) are listed in
    full under the table, one per line, so that they read whole in an 80-column terminal.
    """
    from rich.table import Table
    from rich.text import Text

    from workbench.project.units import format_quantity

    table = Table(title="Elastic surge (method of characteristics)", title_justify="left")
    for col in ("line", "a", "reaches", "dt", "p max", "p min", "rating"):
        table.add_column(col, justify="left" if col == "line" else "right", no_wrap=True)
    notes: list[str] = []
    for lid, res in results.items():
        env = res.envelopes.get(lid)
        if env is None:
            table.add_row(lid, "", "", "", "", "", "")
            notes.append(f"{lid}: not run: {res.message}")
            continue
        speed = res.wave_speeds[lid]
        rating = system.lines[lid].pressure_rating
        if abs(speed.adjustment) > 1e-9:
            notes.append(f"{lid}: wave speed adjusted {100 * speed.adjustment:+.2f} % to fit "
                         "the common time step")
        if res.column_separation is not None:
            sep = res.column_separation
            notes.append(f"{lid}: VAPOUR PRESSURE reached on {sep.line} at {sep.distance:.0f} m, "
                         f"t = {sep.time:.2f} s: results after that time are not trustworthy")
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
            format_quantity(float(env.min_pressure.min()), "pressure", unit_system),
            "" if rating is None else format_quantity(rating, "pressure", unit_system),
        )
    caption = ["a: wave speed used; p: gauge pressure, highest and lowest anywhere on the line "
               "over the surge run" + ("; ! over the rating" if any("OVER" in n for n in notes)
                                       else "")]
    caption.extend(notes)
    # messages quote file keys such as [fluid]: plain text, never console markup
    table.caption = Text("\n".join(caption))
    table.caption_justify = "left"
    return table
