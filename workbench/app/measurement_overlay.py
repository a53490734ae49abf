"""Site-test readings drawn over the Run view's trends (F5), as points.

A measurement in time of a tank level or a line flow, taken under the project's own
conditions, is drawn on the plot of the run when its series is shown. The readings are read
once per project (a loaded project never changes; an edit makes a new one).
"""

from __future__ import annotations

from typing import Any

_CACHE: dict[str, Any] = {"project": None, "found": []}


def _measurements(project: Any) -> list:
    if _CACHE["project"] is not project:
        found: list = []
        if project is not None and "measurements" in (getattr(project, "data", None) or {}):
            from workbench.project.measurements import measurements_of
            from workbench.project.problems import ProjectError

            try:
                found = [m for m in measurements_of(project).values()
                         if m.times is not None and m.quantity in ("level", "flow")
                         and not m.differs_from(project.system)]
            except ProjectError:  # an unreadable CSV file: `workbench check` names it
                found = []
        _CACHE.update(project=project, found=found)
    return _CACHE["found"]


def draw_readings(plt: Any, project: Any, chosen: set[str], x_scale: float,
                  units: str) -> list[tuple[str, str]]:
    """Scatter each shown series' readings on ``plt`` (times divided by ``x_scale``).

    Returns:
        The legend items ``(marker, words)`` of what was drawn, for the legend line
        under the plot (plotext's own legend would sit on the data).
    """
    from workbench.project.units import display_unit, to_display

    items: list[tuple[str, str]] = []
    for m in _measurements(project):
        key = f"{'level' if m.quantity == 'level' else 'flow'}:{m.element}"
        if key not in chosen:
            continue
        kind = "length" if m.quantity == "level" else "flow"
        values = [float(v) for v in to_display(m.values, kind, units)]
        side = "left" if kind == "length" else "right"
        plt.scatter((m.times / x_scale).tolist(), values, marker="◆", yside=side)
        items.append(("◆", f"{m.name} measured [{display_unit(kind, units)}, {side}]"))
    return items
