"""Tank gas spaces in the outputs: the ``simulate --json`` keys, CSV columns, a summary
table, and the steady vacuum that ``solve`` reports.

JSON keys (per tank with a vent, in ``levels.{id}``; none for an open tank):
``gas_pressure_pa`` [...] (gauge, one per ``time_s``), ``min_gas_pressure_pa``,
``max_gas_pressure_pa``, ``required_inbreathing_m3_s`` and ``required_outbreathing_m3_s``
(API 2000 / ISO 28300: the largest liquid outflow and inflow of the run).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from workbench.output.common import json_float as _num
from workbench.output.common import json_list as _list
from workbench.output.common import quantity_text, simple_table

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.model import System
    from workbench.core.transient import TransientResult

__all__ = ["gas_csv_columns", "gas_json", "gas_table", "steady_gas_pressures",
           "steady_gas_states"]


def gas_json(result: "TransientResult", tid: str, include_series: bool = True) -> dict[str, Any]:
    """The gas-space keys of tank ``tid`` in ``levels.{id}`` (empty for an open tank)."""
    if tid not in result.gas_tank_ids:
        return {}
    p = result.gas_pressures[result.gas_tank_ids.index(tid)]
    out: dict[str, Any] = {}
    if include_series:
        out["gas_pressure_pa"] = _list(p)
    out.update({
        "min_gas_pressure_pa": _num(np.min(p)) if p.size else None,
        "max_gas_pressure_pa": _num(np.max(p)) if p.size else None,
        "required_inbreathing_m3_s": _num(result.required_inbreathing.get(tid)),
        "required_outbreathing_m3_s": _num(result.required_outbreathing.get(tid)),
    })
    return out


def gas_csv_columns(result: "TransientResult") -> tuple[list[str], list[np.ndarray]]:
    """``gas_pressure_<tank>_pa`` (gauge) per tank with a vent: names and series."""
    names = [f"gas_pressure_{tid}_pa" for tid in result.gas_tank_ids]
    return names, list(result.gas_pressures)


def gas_table(result: "TransientResult", system: "System", unit_system: str):
    """Each gas space's pressure range against the tank's design range, and its venting."""
    def q(value, kind):
        return quantity_text(value, kind, unit_system, 3)

    def span(low, high):
        # the range on two rows, low over high, so that the table fits 80 columns
        if low is None and high is None:
            return "—"
        low_text = q(low, "pressure") if low is not None else "—"
        high_text = q(high, "pressure") if high is not None else "—"
        return f"{low_text}\n{high_text}"

    table = simple_table("Tank gas spaces (gauge)")
    table.caption = ("venting for liquid movement, API 2000 / ISO 28300 (thermal breathing "
                     "not included)")
    table.caption_justify = "left"
    table.add_column("tank", overflow="fold")  # an id is folded, never cut
    for col in ("gas pressure\nlow / high", "design\nlimits", "inbreathing\nneeded",
                "outbreathing\nneeded"):
        table.add_column(col, justify="right", no_wrap=True)
    for g, tid in enumerate(result.gas_tank_ids):
        res = system.reservoirs[tid]
        p = result.gas_pressures[g]
        design_vac = -res.design_vacuum if res.design_vacuum is not None else None
        table.add_row(
            tid, span(float(np.min(p)), float(np.max(p))) if p.size else "—",
            span(design_vac, res.design_pressure),
            q(result.required_inbreathing.get(tid), "gas_flow"),
            q(result.required_outbreathing.get(tid), "gas_flow"))
    return table


def vent_words(vent, unit_system: str) -> str:
    """A vent as a reader would name it: ``sealed``, ``50 mm, K 1.5`` or its rating."""
    if vent is None:
        return "open"
    if vent.sealed:
        return "sealed"
    if vent.diameter is not None:
        return f"{quantity_text(vent.diameter, 'diameter', unit_system, 3)}, K {vent.k:g}"
    return (f"{quantity_text(vent.rated_flow, 'gas_flow', unit_system, 3)} at "
            f"{quantity_text(vent.rated_pressure_drop, 'pressure', unit_system, 3)}")


def steady_gas_pressures(system: "System", result) -> dict[str, float | None]:
    """Per tank with a vent, the gauge pressure [Pa] at which its vent passes the air that
    its steady outflow makes room for (``None`` when no pressure does: a sealed tank with an
    outflow, or a choked vent); a sealed tank at rest keeps its initial gas pressure."""
    return {tid: p for tid, (p, _) in steady_gas_states(system, result).items()}


def steady_gas_states(system: "System", result) -> dict[str, tuple[float | None, float]]:
    """Per tank with a vent, (gauge pressure [Pa] or ``None`` as in
    :func:`steady_gas_pressures`, the tank's net outflow [m^3/s] at that pressure; ``nan``
    where the pressure is ``None``: no steady state, so no outflow is held).

    Computed by the core (:func:`workbench.core.steady_vent.vented_steady`, the same fixed
    point a simulation's steady start uses): the vacuum lowers the steady outflow by
    ``p/(rho g)`` of head, so the pressure is the one at that lowered outflow, while
    ``result`` holds the open tank's flows.
    """
    from workbench.core.network import solve_steady
    from workbench.core.steady_vent import vented_steady

    def solve(vented_system):
        res = solve_steady(vented_system)
        if not res.success:
            raise ValueError(res.message)
        return res

    tanks = [tid for tid, r in system.reservoirs.items() if r.vent is not None]
    try:
        state = vented_steady(system, solve, first=result)
    except ValueError:
        return {tid: (None, float("nan")) for tid in tanks}
    out: dict[str, tuple[float | None, float]] = {}
    for tid in tanks:
        p = state.pressures[tid]
        sealed = system.reservoirs[tid].vent.effective_area <= 0.0
        outflow = state.outflows.get(tid, 0.0)
        moving = outflow != 0.0
        if not np.isfinite(p) or (sealed and moving):  # no steady state: no pressure, and
            out[tid] = (None, float("nan"))  # no outflow the vent could hold the tank to
        else:
            out[tid] = (p, outflow)
    return out


def steady_gas_texts(system: "System", result, unit_system: str) -> list:
    """One line per tank with a vent for ``solve``'s tables: its gas-space pressure at the
    steady outflow the vent allows (against the open tank's, which the tables show), and
    against its design."""
    from rich.text import Text

    from workbench.core.steady_vent import net_outflows

    out = []
    states = steady_gas_states(system, result)
    open_flows = net_outflows(system, result, list(states))
    for tid, (p, outflow) in states.items():
        res = system.reservoirs[tid]
        vent = vent_words(res.vent, unit_system)
        if p is None:
            out.append(Text(
                f"Tank {tid} ({vent}): its vent cannot pass the air for this steady outflow; "
                "the vacuum grows until the drain slows or stops (run a simulation).",
                style="bold"))
            continue
        text = (f"Tank {tid} ({vent}): gas space at "
                f"{quantity_text(p, 'pressure', unit_system, 3)} gauge"
                f"{_held_flow_words(outflow, open_flows.get(tid, 0.0), unit_system)}")
        p_v = system.fluid.vapor_pressure
        if p_v is not None and p <= p_v - system.atmospheric_pressure + 1e-6:
            out.append(Text(
                f"Tank {tid} ({vent}): its vent cannot pass the air for this steady outflow "
                "short of the liquid's vapour pressure: the liquid boils into the gas space "
                "and the tank would collapse long before (run a simulation).", style="bold red"))
            continue
        design = res.design_vacuum if p < 0.0 else res.design_pressure
        if design is not None:
            beyond = abs(p) > design
            text += (f", {'beyond' if beyond else 'within'} its design "
                     f"{'vacuum' if p < 0.0 else 'pressure'} of "
                     f"{quantity_text(design, 'pressure', unit_system, 3)}")
        out.append(Text(text + ".", style="bold red" if design is not None and abs(p) > design
                        else ""))
    return out


def _held_flow_words(held: float, open_tank: float, unit_system: str) -> str:
    """", where the vent holds the net outflow to 17.61 L/s (17.74 L/s with the tank open to
    the air, as the tables above assume)", or " at the steady outflow" when the two read the
    same. The tables show line flows, which differ from a tank's net outflow when it has a
    feed or a draw-off, so the open tank's net figure is given here, not pointed to."""
    def q(value):
        return quantity_text(abs(value), "flow", unit_system, 4)

    if not (np.isfinite(held) and np.isfinite(open_tank)) or q(held) == q(open_tank):
        return " at the steady outflow"
    way = "outflow" if held >= 0.0 else "inflow"
    return (f", where the vent holds the net {way} to {q(held)} ({q(open_tank)} with the "
            f"tank open to the air, as the tables above assume)")


#: The calculation record's methods-table row for tanks with a vent.
RECORD_METHOD_ROW = [
    "Tank gas space and vent",
    "ideal-gas air space (isothermal, or adiabatic by choice) in the state; vent flow "
    "m = eps C_d A sqrt(2 rho dp), choked below the critical ratio; gas pressure in the "
    "tank's head",
    "ISO 5167-2:2003 expansibility (via fluids); API 2000 / ISO 28300 required venting for "
    "liquid movement",
    "air at the liquid's temperature; no thermal breathing, no inert blanket, no conservation "
    "vent or flame arrester curves",
]


def record_gas_rows(result: "TransientResult", system: "System", units: str) -> list[list[str]]:
    """Rows of the record's *Tank gas spaces* table: tank, vent, lowest and highest gauge
    pressure, design vacuum and pressure, required in- and outbreathing."""
    def q(value, kind):
        return quantity_text(value, kind, units, 4) if value is not None else "-"

    rows = []
    for g, tid in enumerate(result.gas_tank_ids):
        res = system.reservoirs[tid]
        p = result.gas_pressures[g]
        rows.append([tid, vent_words(res.vent, units),
                     q(float(np.min(p)) if p.size else None, "pressure"),
                     q(float(np.max(p)) if p.size else None, "pressure"),
                     q(res.design_vacuum, "pressure"), q(res.design_pressure, "pressure"),
                     q(result.required_inbreathing.get(tid), "gas_flow"),
                     q(result.required_outbreathing.get(tid), "gas_flow")])
    return rows


RECORD_GAS_HEADER = ["Tank", "Vent", "Lowest gas pressure (gauge)",
                     "Highest gas pressure (gauge)", "Design vacuum", "Design pressure",
                     "Required inbreathing", "Required outbreathing"]
