"""Rows of text for the result tables, in the display units. No Textual here.

Severity is always carried by a word and a symbol, never by colour alone.
"""

from __future__ import annotations

import math
from typing import Any

from workbench.core.finding_text import duration_text  # noqa: F401 (the views' time spans)

#: severity -> (symbol, word) shown in every findings table.
SEVERITY = {
    "danger": ("‼", "DANGER"),
    "caution": ("!", "caution"),
    "info": ("i", "info"),
}


#: One line under every result view; the cautions themselves stay on their own screen (F8).
SCREENING = "Screening estimate only: check against local codes and licensed practice (F8)"

#: The mark a result view shows when its result belongs to an older state of the project.
STALE_RUN = "◌ STALE: from before the latest edits (Ctrl+R runs again)"


def severity_label(severity: str) -> str:
    symbol, word = SEVERITY.get(severity, ("?", severity))
    return f"{symbol} {word}"


def _get(obj: Any, *names: str, default: Any = None) -> Any:
    for name in names:
        if isinstance(obj, dict) and name in obj:
            return obj[name]
        if hasattr(obj, name):
            return getattr(obj, name)
    return default


def _num(value: Any, kind: str | None, units: str, digits: int = 4) -> str:
    if value is None:
        return "—"
    try:
        value = float(value)
    except (TypeError, ValueError):
        return str(value)
    if not math.isfinite(value):
        return "—"
    if kind is None:
        return _plain(value, digits)
    from workbench.project.units import to_display

    return _plain(float(to_display(value, kind, units)), digits)


def _plain(x: float, digits: int) -> str:
    if x == 0:
        return "0"
    magnitude = math.floor(math.log10(abs(x)))
    if magnitude >= 6 or magnitude < -3:
        return f"{x:.{max(digits - 1, 0)}e}"
    decimals = max(0, digits - 1 - magnitude)
    text = f"{x:.{decimals}f}"
    return text


def unit(kind: str, units: str) -> str:
    from workbench.project.units import display_unit

    return display_unit(kind, units)


def line_columns(units: str) -> list[str]:
    return ["line", f"flow {unit('flow', units)}", f"v {unit('velocity', units)}", "Re",
            "regime", "f", f"loss {unit('head', units)}"]


def line_rows(result: Any, units: str) -> list[tuple[str, ...]]:
    """One row per line: flow, velocity, Reynolds number, regime, friction factor, loss."""
    rows = []
    for line_id, line in (_get(result, "lines", default={}) or {}).items():
        rows.append((
            line_id,
            _num(_get(line, "flow", "flow_m3_s"), "flow", units),
            _num(_get(line, "velocity", "velocity_m_s"), "velocity", units, 3),
            _num(_get(line, "reynolds"), None, units, 3),
            str(_get(line, "regime", default="—")),
            _num(_get(line, "friction_factor", "f"), None, units, 3),
            _num(_get(line, "head_loss", "head_loss_m", "total_loss"), "head", units),
        ))
    return rows


def node_columns(units: str) -> list[str]:
    return ["node", "kind", f"head {unit('head', units)}", f"p {unit('pressure', units)} g",
            f"z {unit('elevation', units)}"]


def node_rows(result: Any, units: str) -> list[tuple[str, ...]]:
    """One row per node: kind, piezometric head, gauge pressure, elevation."""
    rows = []
    for node_id, node in (_get(result, "nodes", default={}) or {}).items():
        rows.append((
            node_id,
            str(_get(node, "kind", default="")),
            _num(_get(node, "head", "head_m"), "head", units),
            _num(_get(node, "pressure", "pressure_pa"), "pressure", units),
            _num(_get(node, "elevation"), "elevation", units),
        ))
    return rows


def tank_columns(units: str) -> list[str]:
    from workbench.project.units import display_unit

    flow = display_unit("flow", units)
    return ["tank", f"lines in {flow}", f"feed {flow}", f"draw-off {flow}", "level moves"]


def tank_rows(result: Any, system: Any, units: str) -> list[tuple[str, ...]]:
    """One row per tank with a feed or draw-off: the balance at the solved flows and levels
    (feed and draw-off at time zero) and how fast the level moves."""
    from workbench.output.common import level_rate_text
    from workbench.output.steady import fed_tank_balances

    if result is None or system is None:
        return []
    return [(rid, _num(b.lines_net, "flow", units), _num(b.inflow, "flow", units),
             _num(b.draw_off, "flow", units), level_rate_text(b.level_rate, units))
            for rid, b in fed_tank_balances(result, system).items()]


FINDING_COLUMNS = ["severity", "code", "element", "message"]


def finding_rows(findings: Any, units: str = "SI") -> list[tuple[str, str, str, str]]:
    """Findings with the most serious first (order otherwise kept), numbers in ``units``."""
    rank = {"danger": 0, "caution": 1, "info": 2}
    items = sorted(list(findings or []), key=lambda f: rank.get(_get(f, "severity"), 3))
    return [(severity_label(_get(f, "severity", default="caution")), _get(f, "code", default=""),
             _get(f, "element", default=""), finding_text(f, units))
            for f in items]


def finding_text(f: Any, units: str = "SI") -> str:
    """A finding's message in the display unit system (a dict finding: its message as is)."""
    if isinstance(f, dict):
        return f.get("message", "")
    from workbench.output.common import finding_message

    return finding_message(f, units)


def sorted_findings(findings: Any) -> list[Any]:
    rank = {"danger": 0, "caution": 1, "info": 2}
    return sorted(list(findings or []), key=lambda f: rank.get(_get(f, "severity"), 3))


def decimate(x, y, buckets: int = 300) -> tuple[list[float], list[float]]:
    """At most ``2*buckets`` points of a series for a terminal plot, keeping its peaks.

    Each bucket of consecutive samples keeps its lowest and highest point (in time
    order), so a short pressure spike or a flow reversal survives the thinning.
    """
    import numpy as np

    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    n = len(x)
    if n <= 2 * buckets:
        return x.tolist(), y.tolist()
    edges = np.linspace(0, n, buckets + 1).astype(int)
    keep: list[int] = []
    for lo, hi in zip(edges[:-1], edges[1:]):
        if hi <= lo:
            continue
        chunk = y[lo:hi]
        a, b = lo + int(np.nanargmin(chunk)), lo + int(np.nanargmax(chunk))
        keep.extend(sorted({a, b}))
    if keep[-1] != n - 1:
        keep.append(n - 1)
    index = np.asarray(keep)
    return x[index].tolist(), y[index].tolist()
