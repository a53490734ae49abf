"""The table behind the list editor: columns from the schema, cells as typed, rows to entries.

No Textual here. A list-valued key (a line's ``fittings``, its ``profile``, a valve's
``schedule``) is shown as one row per entry and one column per entry key the schema knows
(:data:`workbench.project.schema.LIST_ITEMS`). Cells hold text exactly as the user typed it;
:func:`items_from` turns the rows back into the list handed to ``set_value``, keeping every
untouched value as it was stored (``1`` stays ``1``, not ``1.0``), so an edit of one cell
changes one value in the file.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any

from workbench.app.outline import value_text
from workbench.project.schema import ELEMENT_SECTIONS, LIST_ITEMS, FieldSpec
from workbench.project.schema import choices_for as schema_choices
from workbench.project.units import QUANTITY_KINDS

#: A leading number and what follows it (the unit as typed): ``"20 m"`` -> 20, ``"m"``.
_NUMBER = re.compile(r"\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*\Z")


@dataclass(frozen=True)
class Column:
    """One key of the list's entries."""

    spec: FieldSpec
    choices: tuple[str, ...] = ()
    """The words a choice column takes (suggested while typing); empty for free text."""

    @property
    def name(self) -> str:
        return self.spec.name

    @property
    def is_quantity(self) -> bool:
        return self.spec.kind in QUANTITY_KINDS

    @property
    def heading(self) -> str:
        return self.name + ("*" if self.spec.required else "")


@dataclass
class Row:
    """One entry: the text of each cell, and the entry as stored (``{}`` for a new row)."""

    cells: dict[str, str]
    original: dict = field(default_factory=dict)


class CellError(ValueError):
    """A cell's text that cannot be the kind of value its column holds."""


def list_key(keypath: str) -> str:
    """The :data:`LIST_ITEMS` key of a list's key path.

    ``"lines.L1.profile"`` -> ``"lines.profile"``; ``"lines.L1.valve.schedule"`` ->
    ``"lines.valve.schedule"`` (element ids never contain dots).
    """
    parts = keypath.split(".")
    if parts[0] in ELEMENT_SECTIONS and len(parts) > 2:
        parts = [parts[0], *parts[2:]]
    return ".".join(parts)


def columns_for(keypath: str, items: list) -> list[Column]:
    """One column per entry key of the schema, then any other key the entries hold."""
    key = list_key(keypath)
    columns = [Column(spec, _choices(key, spec)) for spec in LIST_ITEMS.get(key, ())]
    known = {c.name for c in columns}
    for item in items or []:
        for name in item if isinstance(item, dict) else ():
            if name not in known:
                known.add(name)
                columns.append(Column(FieldSpec(name, "text", False,
                                                "a key the schema does not describe")))
    return columns


def _choices(section: str, spec: FieldSpec) -> tuple[str, ...]:
    if spec.kind != "choice":
        return ()
    try:
        return tuple(schema_choices(section, spec.name)) or spec.choices
    except ImportError:  # a core table that is not installed: free text then
        return spec.choices


def cell_text(value: Any) -> str:
    """A stored value as it is typed in a cell."""
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{k} = {value_text(v)}" for k, v in value.items()) + " }"
    return value_text(value)


def rows_from(items: list | None, columns: list[Column]) -> list[Row]:
    """The rows of a stored list (``None`` when the key is absent)."""
    rows = []
    for item in items or []:
        item = item if isinstance(item, dict) else {}
        rows.append(Row({c.name: cell_text(item[c.name]) if c.name in item else ""
                         for c in columns}, dict(item)))
    return rows


def cell_value(text: str, column: Column, original: dict) -> Any:
    """What a cell's text puts in the entry; ``None`` leaves the key out.

    Text unchanged from the stored value gives the stored value itself. Quantities, words
    and text stay text (the project layer reads units and says what is wrong); numbers
    become numbers here.

    Raises:
        CellError: text a number column cannot hold, in words.
    """
    name = column.name
    if name in original and text == cell_text(original[name]):
        return original[name]
    text = text.strip()
    if text == "":
        return None
    kind = column.spec.kind
    if kind == "int":
        try:
            return int(text)
        except ValueError:
            raise CellError(f"'{text}' is not a whole number") from None
    if kind == "number":
        try:
            return float(text)
        except ValueError:
            raise CellError(f"'{text}' is not a number") from None
    if kind == "bool":
        if text.lower() in {"true", "yes", "on"}:
            return True
        if text.lower() in {"false", "no", "off"}:
            return False
        raise CellError(f"'{text}' is not true or false")
    return text


def items_from(rows: list[Row], columns: list[Column]) -> tuple[list[dict], dict]:
    """The list of entries the rows hold, and the cells that cannot be read.

    Returns:
        ``(items, problems)``; ``problems`` maps ``(row index, column name)`` to a message.
        Keys keep the order the entry had in the file; new keys follow in column order.
    """
    items: list[dict] = []
    problems: dict[tuple[int, str], str] = {}
    for index, row in enumerate(rows):
        values: dict[str, Any] = {}
        for column in columns:
            try:
                value = cell_value(row.cells.get(column.name, ""), column, row.original)
            except CellError as error:
                problems[(index, column.name)] = str(error)
                continue
            if value is not None:
                values[column.name] = value
        order = [k for k in row.original if k in values]
        order += [k for k in values if k not in order]
        items.append({k: values[k] for k in order})
    return items, problems


def is_ordered(columns: list[Column]) -> bool:
    """True when entries run along a required quantity (a profile's distance, a schedule's
    time): a new row then goes halfway to the next one, or one step beyond the last."""
    return bool(columns) and columns[0].is_quantity and columns[0].spec.required


def new_row(rows: list[Row], after: int, columns: list[Column], unit_system: str = "SI") -> Row:
    """The row ``a`` inserts after row ``after`` (``-1`` or an empty list: the first row).

    Ordered lists get the point halfway to the next row, or after the last row one more
    step of the same size with the other values copied; other lists get a copy of the
    current row. A first row gets zero on the axis, the kind's display unit, and any
    column default.
    """
    if not rows:
        cells = {c.name: _first_value(c, unit_system, i == 0 and is_ordered(columns))
                 for i, c in enumerate(columns)}
        if not any(cells.values()):  # e.g. a first fitting: its type, the first word
            named = next((c for c in columns if c.choices and not c.spec.default), None)
            if named is not None:
                cells[named.name] = named.choices[0]
        return Row(cells)
    after = max(0, min(after, len(rows) - 1))
    here = rows[after].cells
    if not is_ordered(columns):
        return Row(dict(here))
    cells = dict(here)
    if after + 1 < len(rows):  # halfway to the next point, every number column alike
        there = rows[after + 1].cells
        for column in columns:
            if column.is_quantity or column.spec.kind == "number":
                cells[column.name] = _between(here.get(column.name, ""),
                                              there.get(column.name, ""), column, 0.5)
        return Row(cells)
    axis = columns[0].name
    if after >= 1:  # one more step of the last size, in the last row's unit
        cells[axis] = _between(here.get(axis, ""), rows[after - 1].cells.get(axis, ""),
                               columns[0], -1.0)
    else:
        cells[axis] = _between(here.get(axis, ""), here.get(axis, ""), columns[0], 1.0,
                               bump=True)
    return Row(cells)


def _first_value(column: Column, unit_system: str, axis: bool) -> str:
    spec = column.spec
    if axis or (column.is_quantity and spec.required):
        from workbench.project.units import display_unit

        return f"0 {display_unit(spec.kind, unit_system)}"
    if spec.required and spec.default is None and spec.maximum is not None:
        return cell_text(spec.maximum)  # e.g. a schedule's first opening: fully open
    return ""


def _between(a: str, b: str, column: Column, fraction: float, bump: bool = False) -> str:
    """``a + fraction * (b - a)`` written in ``a``'s unit; ``bump`` adds one unit instead.

    Text that cannot be read is copied from ``a`` (the user sees it and types over it).
    """
    first, second = _NUMBER.match(a or ""), _NUMBER.match(b or "")
    if first is None or second is None:
        return a
    x, unit = float(first.group(1)), first.group(2)
    y, unit_b = float(second.group(1)), second.group(2)
    if unit_b != unit and column.is_quantity:
        y = _convert(b, unit, column)
        if y is None:
            return a
    value = x + 1.0 if bump else x + fraction * (y - x)
    number = f"{value:.6g}"
    return f"{number} {unit}".strip() if column.is_quantity else number


def _convert(text: str, unit: str, column: Column) -> float | None:
    """``text`` as a number in ``unit`` (the same kind), or ``None`` when it cannot be."""
    try:
        from workbench.project.units import QUANTITY_KINDS as kinds
        from workbench.project.units import get_registry, parse_quantity

        si = parse_quantity(text, column.spec.kind)
        ureg = get_registry()
        return float(ureg.Quantity(si, kinds[column.spec.kind].si_unit).to(unit).magnitude)
    except Exception:  # noqa: BLE001 - a starting value only; validation judges the real one
        return None


def display_text(text: str, column: Column, unit_system: str) -> str:
    """A quantity cell in the display unit (the number only), ``"✗"`` when it cannot be
    read, ``""`` when empty."""
    if not text.strip():
        return ""
    from workbench.project.units import display_unit, format_quantity, parse_quantity

    try:
        shown = format_quantity(parse_quantity(text, column.spec.kind), column.spec.kind,
                                unit_system, digits=5)
    except Exception:  # noqa: BLE001 - shown as unreadable; validation gives the reason
        return "✗"
    unit = display_unit(column.spec.kind, unit_system)
    return shown[: -len(unit)].rstrip() if shown.endswith(unit) else shown


def quantity_problem(text: str, column: Column) -> str:
    """Why a quantity cell cannot be read (the unit layer's words), or ``""``.

    Only a hint while typing: applying the list is what validates it.
    """
    if not column.is_quantity or not text.strip():
        return ""
    from workbench.project.units import UnitError, parse_quantity

    try:
        parse_quantity(text, column.spec.kind)
    except UnitError as error:
        return str(error)
    return ""


@dataclass(frozen=True)
class Place:
    """Where a problem of a refused list belongs: a row (0-based) and a column, if named."""

    row: int | None
    column: str | None
    message: str
    key: str


def places(problems, keypath: str) -> list[Place]:
    """Sort a refused edit's problems by the row and column their key paths name.

    Key paths count entries from 1 (``lines.L1.profile[3].distance`` is row index 2).
    """
    pattern = re.compile(re.escape(keypath) + r"\[(\d+)\](?:\.([A-Za-z_][\w-]*))?")
    out = []
    for problem in problems:
        key = getattr(problem, "key", "") or ""
        message = getattr(problem, "message", str(problem))
        match = pattern.match(key)
        if match:
            out.append(Place(int(match.group(1)) - 1, match.group(2), message, key))
        else:
            out.append(Place(None, None, message, key))
    return out


def place_text(place: Place, keypath: str) -> str:
    """One problem in words, led by the row and column it is about."""
    if place.row is not None:
        where = f"row {place.row + 1}" + (f" · {place.column}" if place.column else "")
        return f"✗ {where}: {place.message}"
    if place.key and place.key != keypath:
        return f"✗ {place.key}: {place.message}"
    return f"✗ {place.message}"
