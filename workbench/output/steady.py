"""A steady solution for people and programs: the ``solve --json`` object and rich tables.

:func:`steady_to_json` gives the documented shape (schema 1, all SI; extra keys beyond the
documented ones are additions, never renames). :func:`steady_tables` gives rich tables
of lines, nodes and warnings in the project's unit system; a warning's severity is shown
as a word and a colour, never colour alone.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

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

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.model import System
    from workbench.core.network import SteadyResult

__all__ = ["SEVERITY_STYLE", "steady_tables", "steady_to_json"]


def fed_tank_balances(result, system: System) -> dict:
    """Tank id -> ``TankBalance`` at the solved flows and levels, for the tanks with a feed or
    a draw-off only (in file order): what ``solve`` prints and the app's Flows view shows."""
    from workbench.core.tank import tank_balances

    fed = [rid for rid, r in system.reservoirs.items() if r.kind == "tank" and r.has_external_flow]
    if not fed:
        return {}
    flows = {lid: r.flow for lid, r in result.lines.items()}
    balances = tank_balances(system, flows, dict(result.levels))
    return {rid: balances[rid] for rid in fed if rid in balances}


def steady_to_json(result: SteadyResult, system: System) -> dict:
    """The ``workbench solve --json`` object of a steady result.

    Documented keys: ``schema`` (1), ``fluid`` {``density_kg_m3``, ``viscosity_pa_s``,
    ``vapor_pressure_pa``}, ``lines`` {id: {``flow_m3_s``, ``velocity_m_s``, ``reynolds``,
    ``regime``, ``friction_factor``, ``head_loss_m``, ...}}, ``nodes`` {id: {``head_m``,
    ``pressure_pa`` (gauge), ...}} for every junction, reservoir and receiver, and
    ``warnings`` [{``code``, ``element``, ``message``, ...}]. Values that do not exist (the
    friction factor of a line without flow, the head of an isolated junction) are ``null``.

    Grade lines: a junction's ``head_m`` is the energy head the lines meeting there share,
    its ``pressure_pa`` the lowest static pressure among those lines; a line's profile
    ``hgl_m``, ``pressure_pa`` and ``pressure_abs_pa`` are static (piezometric, the energy
    head ``egl_m`` less the line's own ``alpha v^2/2g``). A line whose column parts at a high
    point has ``status`` ``"siphon_break"``, ``capped`` true and ``siphon_break``
    {``distance_m``, ``elevation_m``, ``break_pressure_abs_pa``, ``full_bore_flow_m3_s``,
    ``stop_head_m``, ``source``}; its ``flow_m3_s`` is the capped flow. A warning with numbers adds
    ``values`` {slot: {``value`` (SI), ``kind``}}.

    Tank nodes add their volume balance at the solved flows: ``lines_net_inflow_m3_s``,
    ``inflow_m3_s`` (feed, at time zero when scheduled), ``draw_off_m3_s``,
    ``net_inflow_m3_s`` and ``level_rate_m_s`` (positive rising).
    """
    from workbench.core.tank import tank_balances

    fluid = system.fluid
    out: dict[str, Any] = {
        "schema": 1,
        "title": system.title,
        "success": bool(result.success),
        "status": int(result.status),
        "message": result.message,
        "iterations": int(result.iterations),
        "residuals": {k: _num(v) for k, v in (result.residuals or {}).items()},
        "fluid": {
            "name": fluid.name,
            "density_kg_m3": _num(fluid.density),
            "viscosity_pa_s": _num(fluid.viscosity),
            "vapor_pressure_pa": _num(fluid.vapor_pressure),
            "temperature_k": _num(fluid.temperature),
        },
        "atmospheric_pressure_pa": _num(system.atmospheric_pressure),
        "lines": {},
        "nodes": {},
        "warnings": [],
    }
    for lid, r in result.lines.items():
        out["lines"][lid] = _line_json(result, lid, r)
    for nid, n in result.nodes.items():
        out["nodes"][nid] = {
            "head_m": _num(n.head),
            "pressure_pa": _num(n.pressure),
            "elevation_m": _num(n.elevation),
            "kind": n.kind,
        }
        if nid in result.levels:
            out["nodes"][nid]["level_m"] = _num(result.levels[nid])
    flows = {lid: r.flow for lid, r in result.lines.items()}
    for tid, b in tank_balances(system, flows, dict(result.levels)).items():
        if tid in out["nodes"]:
            out["nodes"][tid].update({
                "lines_net_inflow_m3_s": _num(b.lines_net),
                "inflow_m3_s": _num(b.inflow),
                "draw_off_m3_s": _num(b.draw_off),
                "net_inflow_m3_s": _num(b.net),
                "level_rate_m_s": _num(b.level_rate),
            })
    if result.success:  # tanks with a vent: the gas-space pressure at the steady outflow
        from workbench.output.vent import steady_gas_states

        for tid, (p, outflow) in steady_gas_states(system, result).items():
            out["nodes"][tid]["gas_pressure_pa"] = _num(p)
            out["nodes"][tid]["vent_held_net_outflow_m3_s"] = _num(outflow)
    out["warnings"] = [
        {"code": w.code, "element": w.element, "message": w.message, "severity": w.severity,
         "source": w.source, **({"values": finding_values(w)} if w.values else {})}
        for w in result.warnings
    ]
    return out


def _line_json(result, lid: str, r) -> dict:
    """One line of ``solve --json``: its flow and losses, opening, siphon break, profile."""
    entry = {
        "flow_m3_s": _num(r.flow),
        "velocity_m_s": _num(r.velocity),
        "reynolds": _num(r.reynolds),
        "regime": r.regime,
        "friction_factor": _num(r.friction_factor),
        "friction_method": r.friction_method,
        "head_loss_m": _num(r.head_loss),
        "friction_loss_m": _num(r.friction_loss),
        "minor_loss_m": _num(r.minor_loss),
        "fittings_loss_m": _num(r.fittings_loss),
        "valve_loss_m": _num(r.valve_loss),
        "entrance_loss_m": _num(r.entrance_loss),
        "exit_loss_m": _num(r.exit_loss),
        "velocity_head_m": _num(r.velocity_head),
        "status": r.status,
        "from": r.from_node,
        "to": r.to_node,
    }
    if lid in result.openings:
        entry["valve_opening"] = _num(result.openings[lid])
    brk = getattr(result, "siphon_breaks", {}).get(lid)
    if brk is not None:
        entry["capped"] = True
        entry["siphon_break"] = {
            "distance_m": _num(brk.distance), "elevation_m": _num(brk.elevation),
            "break_pressure_abs_pa": _num(brk.break_pressure),
            "full_bore_flow_m3_s": _num(brk.full_bore_flow),
            "stop_head_m": _num(brk.stop_head), "source": brk.source,
        }
    prof = result.profiles.get(lid)
    if prof is not None:
        entry["profile"] = {
            "distance_m": _list(prof.distance),
            "elevation_m": _list(prof.elevation),
            "hgl_m": _list(prof.hgl),
            "egl_m": _list(prof.egl),
            "pressure_pa": _list(prof.pressure_gauge),
            "pressure_abs_pa": _list(prof.pressure_abs),
        }
    return entry


def steady_tables(result: SteadyResult, system: System, unit_system: str = "SI") -> list:
    """Rich renderables for a steady result: a summary line, lines, nodes and warnings.

    Parameters
    ----------
    result : SteadyResult
    system : System
    unit_system : {"SI", "US"}
        Display units (through :func:`workbench.project.units.format_quantity`).
    """
    from rich.text import Text

    table = simple_table

    def q(value, kind: str, digits: int = 4) -> str:
        return quantity_text(value, kind, unit_system, digits)

    def plain(value, digits: int = 4) -> str:
        v = _num(value)
        return "—" if v is None else f"{v:.{digits}g}"

    out: list = []
    if not result.success:
        out.append(Text(f"No steady solution: {finding_message(result, unit_system)}",
                        style="bold red"))
        return out
    out.append(Text(f"{system.title}: steady solution {finding_message(result, unit_system)}."))

    lines = table("Lines")
    for col, just in (("line", "left"), ("flow", "right"), ("velocity", "right"),
                      ("Re", "right"), ("regime", "left"), ("f", "right"),
                      ("head loss", "right")):
        lines.add_column(col, justify=just, no_wrap=True)
    losses = table("Head losses")
    for col, just in (("line", "left"), ("from → to", "left"), ("friction", "right"),
                      ("minor", "right"), ("velocity head", "right"), ("f from", "left")):
        losses.add_column(col, justify=just, overflow="fold",
                          no_wrap=col in ("friction", "minor", "velocity head"))
    for lid, r in result.lines.items():
        moving = r.status in ("flowing", "siphon_break") and r.flow != 0.0
        regime = r.regime if r.status == "flowing" else r.status.replace("_", " ")
        lines.add_row(
            lid, q(r.flow, "flow"), q(r.velocity, "velocity"),
            f"{r.reynolds:,.0f}" if moving else "—", regime,
            plain(r.friction_factor, 4), q(r.head_loss, "head"),
        )
        losses.add_row(lid, f"{r.from_node} → {r.to_node}", q(r.friction_loss, "head"),
                       q(r.minor_loss, "head"), q(r.velocity_head, "head"),
                       r.friction_method or "—")
    out.append(lines)
    out.append(losses)

    nodes = table("Nodes")
    for col, just in (("node", "left"), ("kind", "left"), ("elevation", "right"),
                      ("head", "right"), ("pressure (gauge)", "right")):
        nodes.add_column(col, justify=just)
    for nid, n in result.nodes.items():
        nodes.add_row(nid, n.kind.replace("_", " "), q(n.elevation, "elevation"),
                      q(n.head, "head"), q(n.pressure, "pressure"))
    out.append(nodes)
    from workbench.output.vent import steady_gas_texts

    out += steady_gas_texts(system, result, unit_system)

    balances = fed_tank_balances(result, system)
    if balances:
        bal = table("Tank balances (feed and draw-off at time zero)")
        for col in ("tank", "lines, net in", "feed", "draw-off", "level moves"):
            bal.add_column(col, justify="left" if col == "tank" else "right", no_wrap=True)
        for rid, b in balances.items():
            bal.add_row(rid, q(b.lines_net, "flow"), q(b.inflow, "flow"), q(b.draw_off, "flow"),
                        level_rate_text(b.level_rate, unit_system))
        out.append(bal)

    warn = table("Warnings")
    warn.add_column("severity", no_wrap=True)
    warn.add_column("code / element", overflow="fold")
    warn.add_column("message (source)", overflow="fold", ratio=1)
    for w in result.warnings:
        style = SEVERITY_STYLE.get(w.severity, "")
        message = Text(finding_message(w, unit_system))
        if w.source:
            message.append(f" ({w.source})", style="dim")
        warn.add_row(Text(w.severity.upper(), style=style), f"{w.code}\n{w.element}", message)
    if not result.warnings:
        out.append(Text("No warnings."))
    else:
        out.append(warn)
    return out
