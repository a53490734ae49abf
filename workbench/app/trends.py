"""The series of a run the Run view can draw, named and in SI: tank levels, line flows,
feeds, draw-offs and spills, gas-space and junction pressures.

Apart from the Run view so the site-test overlay can read the same series without
importing the view.
"""

from __future__ import annotations

from typing import Any

from workbench.app.results import _get


def trend_series(result: Any) -> list[tuple[str, str, str, Any]]:
    """``(key, label, kind, values SI)`` for every tank level and line flow of a run, and
    every tank's feed, draw-off and spill that is not zero throughout.

    Levels and flows are arrays (tanks x times, lines x times) named by ``tank_ids`` and
    ``line_ids``; so are ``feeds``, ``draw_offs`` and ``spills``.
    """
    def rows(ids: str, values: str):
        """(element id, its series) pairs of one table of the run (none without a run)."""
        return zip(_get(result, ids, default=()) or (), _get(result, values, default=()))

    found: list[tuple[str, str, str, list[float]]] = []
    for tank, values in rows("tank_ids", "levels"):
        found.append((f"level:{tank}", f"level {tank}", "length", values))
    for line, values in rows("line_ids", "flows"):
        found.append((f"flow:{line}", f"flow {line}", "flow", values))
    # a tank's feed, draw-off and overflow spill, where the run has any
    for name, word in (("feeds", "feed"), ("draw_offs", "draw-off"), ("spills", "spill")):
        for tank, values in rows("tank_ids", name):
            if any(v != 0.0 for v in values):
                found.append((f"{name}:{tank}", f"{word} {tank}", "flow", values))
    # the gauge pressure of each tank's gas space (tanks with a vent)
    for tank, values in rows("gas_tank_ids", "gas_pressures"):
        found.append((f"gas:{tank}", f"gas pressure {tank}", "pressure", values))
    # a junction's gauge pressure (kept when a site test reads one)
    for junction, values in rows("junction_ids", "junction_pressures"):
        found.append((f"pressure:{junction}", f"pressure {junction}", "pressure", values))
    return found
