"""Small pieces every result formatter shares: JSON-safe numbers, table style, severity style."""

from __future__ import annotations

import math
from typing import Any

#: Severity word -> rich style (theme-neutral colours; the word carries the meaning).
SEVERITY_STYLE = {"info": "cyan", "caution": "yellow", "danger": "bold red"}


def json_float(x: Any) -> float | None:
    """A JSON-safe float: ``None`` for ``None``, nan and infinities."""
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


def json_list(a) -> list[float | None]:
    """A sequence (or numpy array) as JSON-safe floats."""
    if hasattr(a, "tolist"):
        a = a.tolist()
    return [json_float(v) for v in a]


def simple_table(title: str):
    """The rich table every CLI summary uses: a title on the left, a plain head rule."""
    from rich import box
    from rich.table import Table

    return Table(title=title, title_justify="left", box=box.SIMPLE_HEAD, pad_edge=False)


def quantity_text(value, kind: str, unit_system: str, digits: int = 4) -> str:
    """An SI value in the display unit, or an em dash where there is no finite value."""
    from workbench.project.units import format_quantity

    v = json_float(value)
    return "—" if v is None else format_quantity(v, kind, unit_system, digits)


def level_rate_text(rate, unit_system: str) -> str:
    """A rate of change of level [m/s] in words: ``+12.5 mm/min`` (``in/min`` in US units),
    ``steady`` when below 0.001 mm/min, an em dash when not finite."""
    v = json_float(rate)
    if v is None:
        return "—"
    per_min = v * 60.0
    if abs(per_min) < 1e-6:
        return "steady"
    if unit_system == "US":
        return f"{per_min / 0.0254:+.3g} in/min"
    return f"{per_min * 1000.0:+.3g} mm/min"


def finding_message(finding, unit_system: str = "SI") -> str:
    """A finding's message with its numbers in the display unit system.

    A finding that kept its numbers (``template`` and ``values``, see
    :mod:`workbench.core.finding_text`) is written again in ``unit_system``; any other is
    returned as it is (its ``message``, SI). A plain note (a ``str``, or a
    :class:`~workbench.core.finding_text.KeptText`) is its own message.
    """
    template = getattr(finding, "template", "")
    if not template or unit_system == "SI":
        return str(finding) if isinstance(finding, str) else finding.message
    from workbench.core.finding_text import fill
    from workbench.project.units import format_quantity

    return fill(template, finding.values,
                lambda v, kind, digits: format_quantity(v, kind, unit_system, digits))


def finding_values(finding) -> dict[str, dict[str, Any]]:
    """The ``values`` object of a finding in ``--json``: slot -> ``{"value": SI, "kind": ...}``."""
    return {name: {"value": json_float(v), "kind": kind}
            for name, v, kind, _digits in getattr(finding, "values", ())}
