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
