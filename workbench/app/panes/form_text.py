"""What a form's fields say besides their values: the unit hint, the placeholder of an
empty field, the words a field takes, and a refused edit's messages. Plain functions (no
widgets), used by :mod:`workbench.app.panes.form` and the System view.
"""

from __future__ import annotations

from typing import Any

from workbench.app.outline import Field
from workbench.project.units import QUANTITY_KINDS

NODE_SECTIONS = ("reservoirs", "junctions", "receivers")


def hint(field: Field, stored: Any, unit_system: str) -> str:
    """The stored value in the display unit (``= 4.03 in``), or the unit expected."""
    kind = field.spec.kind
    if kind not in QUANTITY_KINDS:
        return ""
    from workbench.project.units import display_unit, format_quantity, parse_quantity

    if stored in (None, ""):
        return f"[{display_unit(kind, unit_system)}]"
    try:
        return "= " + format_quantity(parse_quantity(stored, kind), kind, unit_system)
    except Exception:  # noqa: BLE001 - a hint only; validation reports the real problem
        return f"[{display_unit(kind, unit_system)}]"


def placeholder(field: Field) -> str:
    """What an empty field says: its default, "required" or "not set" — never an example
    value, which reads as a computed one (an example bore on a DN150 line); examples are
    on the help line."""
    spec = field.spec
    if spec.default not in (None, ""):
        return f"(default {spec.default})"
    if spec.required:
        return "(required)"
    if spec.name == "inner_diameter":
        return "(from the size)"
    return "(not set)"


def companion_keys(error: Exception, table: str) -> tuple[list[tuple[str, str]], list[str]]:
    """Of a refusal, the keys of ``table`` ("fluid.", "reservoirs.T1.") it says are missing
    (with the message) and those it says no longer apply; empty lists when any problem is
    of another sort."""
    missing: list[tuple[str, str]] = []
    stale: list[str] = []
    for p in getattr(error, "problems", []) or []:
        key = p.key
        if not key.startswith(table) or "." in key[len(table):]:
            return [], []
        if p.message.startswith("missing required key"):
            missing.append((key, p.message))
        elif "applies only to" in p.message:
            stale.append(key)
        else:
            return [], []
    return missing, stale


def problem_text(error: Exception, keypath: str) -> str:
    """The messages of a refused edit, those about this key first, without the file name."""
    problems = list(getattr(error, "problems", []) or [])
    if not problems:
        return str(error)
    mine = [p for p in problems if p.key == keypath or p.key.startswith(keypath)]
    others = [p for p in problems if p not in mine]
    parts = [p.message for p in mine] + [f"{p.key}: {p.message}" for p in others]
    return "; ".join(parts)


def choices_for(field: Field, data: dict) -> tuple[str, ...] | None:
    """The words a field can take, for a drop-down; ``None`` for free text."""
    spec = field.spec
    if spec.name in ("from", "to") and field.keypath.startswith("lines."):
        return tuple(e for s in NODE_SECTIONS for e in (data.get(s) or {}))
    if spec.kind != "choice":
        return None
    if spec.name == "entrance":
        return None  # a named shape or a number K: free text
    if spec.choices:
        return spec.choices
    return _runtime_choices(field.keypath.split(".", 1)[0], spec.name)


def _runtime_choices(section: str, name: str) -> tuple[str, ...] | None:
    """Words that come from a core table (fluid kinds, materials): the schema's own list."""
    from workbench.project.schema import choices_for as schema_choices

    try:
        words = schema_choices(section, name)
    except ImportError:
        return None
    return tuple(words) or None
