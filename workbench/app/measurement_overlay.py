"""Site-test readings drawn over the Run view's trends (F5), as points.

A measurement in time of a tank level, a line flow or a junction's gauge pressure, taken
under the project's own conditions, is drawn on the plot of the run when its series is
shown, with its residuals (model minus reading, RMS and largest) in the legend. The app's
run keeps the junction pressures such a test needs (:func:`gauged_junctions`). The readings
are read once per project (a loaded project never changes; an edit makes a new one).
"""

from __future__ import annotations

from typing import Any

_CACHE: dict[str, Any] = {"project": None, "found": []}
#: The Run view's series key prefix and display kind of each quantity.
_KEY = {"level": ("level", "length"), "flow": ("flow", "flow"), "pressure": ("pressure", "pressure")}


def _measurements(project: Any) -> list:
    if _CACHE["project"] is not project:
        found: list = []
        if project is not None and "measurements" in (getattr(project, "data", None) or {}):
            from workbench.project.measurements import measurements_of
            from workbench.project.problems import ProjectError

            try:
                found = [m for m in measurements_of(project).values()
                         if m.times is not None and m.quantity in _KEY
                         and not m.differs_from(project.system)]
            except ProjectError:  # an unreadable CSV file: `workbench check` names it
                found = []
        _CACHE.update(project=project, found=found)
    return _CACHE["found"]


def gauged_junctions(project: Any) -> set[str]:
    """Junctions whose gauge pressure a site test read in time under the project's own
    conditions: the app's run keeps their pressures to compare."""
    return {m.element for m in _measurements(project) if m.quantity == "pressure"}


def _residuals(m: Any, result: Any, key: str) -> Any:
    """Model minus reading at the readings inside the run's span [SI], or ``None``."""
    import numpy as np

    from workbench.app.trends import trend_series

    t = np.asarray(getattr(result, "t", ()), dtype=float) if result is not None else np.zeros(0)
    series = next((v for k, _l, _kind, v in trend_series(result) if k == key), None) \
        if len(t) else None
    if series is None or len(series) != len(t):
        return None
    inside = m.times <= t[-1] * (1 + 1e-9)
    return np.interp(m.times[inside], t, np.asarray(series, dtype=float)) - m.values[inside]


def draw_readings(plt: Any, project: Any, chosen: set[str], x_scale: float,
                  units: str, result: Any = None) -> list[tuple[str, str]]:
    """Scatter each shown series' readings on ``plt`` (times divided by ``x_scale``).

    Returns:
        The legend items ``(marker, words)`` of what was drawn, for the legend line
        under the plot (plotext's own legend would sit on the data); with ``result`` (the
        run shown) each says the residuals, model minus reading, in the display unit.
    """
    import numpy as np

    from workbench.project.units import display_unit, format_quantity, to_display

    items: list[tuple[str, str]] = []
    for n, m in enumerate(_measurements(project)):
        prefix, kind = _KEY[m.quantity]
        key = f"{prefix}:{m.element}"
        if key not in chosen:
            continue
        values = [float(v) for v in to_display(m.values, kind, units)]
        side = "left" if kind == "length" else "right"
        marker = READING_MARKERS[n % len(READING_MARKERS)]  # one per test, told apart
        plt.scatter((m.times / x_scale).tolist(), values, marker=marker, yside=side)
        words = f"{m.name} measured"
        r = _residuals(m, result, key)
        if r is not None and r.size < m.values.size:  # as simulate: none after the run's end
            words += f" {r.size}/{m.values.size}"
        words += f" [{display_unit(kind, units)}, {side}]"
        if r is not None and r.size:
            words += (f", residual RMS {format_quantity(float(np.sqrt(np.mean(r * r))), kind, units, 3)}"
                      f" largest {format_quantity(float(np.max(np.abs(r))), kind, units, 3)}")
        items.append((marker, words))
    return items


#: One plot marker per site test, unlike the series' markers.
READING_MARKERS = "◆▲■▼"
