"""Reading a site test's readings from a CSV file (a historian export, a typed-up log sheet).

The first row names the columns; the table in the project says which column holds the
times and which the readings, and in which units. Rules, so that nothing is misread
silently:

* UTF-8 text, with or without a byte-order mark; line ends LF or CRLF; the delimiter is a
  comma, a semicolon or a tab (guessed from the header row by ``csv.Sniffer``);
* numbers are read by a strict pattern (no decimal commas or thousands separators); a
  column without a unit in the table must carry one in every cell (``"3.2 m"``);
* times in a unit (``s``, ``min``, ``h`` ...) are taken as written, from the start of the
  test; ISO 8601 timestamps (``time_unit = "iso"``) are counted from the first reading;
* a row with an empty or missing cell (``NA``, ``nan``, ``-``) is skipped and counted; a
  row with text where a number belongs is an error that names the file, the row and the
  column; times must not go backwards.

Only the standard ``csv`` module is used: the files are small and pandas would cost half a
second to import.
"""

from __future__ import annotations

import csv
import io
import math
import os
import re
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

__all__ = ["CsvError", "CsvReadings", "MAX_BYTES", "read_readings"]

#: Largest CSV file read [bytes]: far more than a year of one-second readings of one tag.
MAX_BYTES = 64 * 1024 * 1024

#: Cell texts that mean "no reading" (compared in lower case).
MISSING = frozenset({"", "na", "n/a", "nan", "-", "--", "null", "none", "#n/a"})

_NUMBER = re.compile(r"\s*[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?\s*\Z")


class CsvError(ValueError):
    """A CSV file that cannot be read; the message names the file, row and column.

    ``key`` is the measurement table's key the fault belongs to: ``"file"`` (the file
    itself), ``"time_unit"`` or ``"value_unit"`` (a unit that cannot be used).
    """

    def __init__(self, message: str, key: str = "file"):
        super().__init__(message)
        self.key = key


@dataclass(frozen=True)
class CsvReadings:
    """What a CSV file held: times [s] from the start of the test and readings [SI]."""

    times: tuple[float, ...]
    values: tuple[float, ...]
    skipped_rows: tuple[int, ...]
    """Row numbers (1 = the header) skipped for a missing value."""
    rows: tuple[int, ...] = ()
    """Row number of each reading (1 = the header)."""


@dataclass(frozen=True)
class _Column:
    name: str
    kind: str
    unit: str | None
    index: int = -1
    scale: float = 1.0
    offset: float = 0.0


def _affine(unit: str, kind: str, atmosphere: float) -> tuple[float, float]:
    """``SI = scale * x + offset`` for a number written in ``unit``."""
    from workbench.project.units import parse_quantity

    zero = parse_quantity(f"0 {unit}", kind, atmosphere=atmosphere)
    one = parse_quantity(f"1 {unit}", kind, atmosphere=atmosphere)
    return one - zero, zero


def unit_problem(unit: str | None, kind: str, atmosphere: float = 101325.0) -> str | None:
    """Why ``unit`` cannot be the unit of a column of ``kind`` (``"time"``, ``"length"``,
    ``"flow"``, ``"pressure"``), in words; ``None`` when it can (or when there is none:
    each cell then carries its unit)."""
    from workbench.project.units import UnitError

    if unit is None:
        return None
    try:
        _affine(unit, kind, atmosphere)
    except UnitError as exc:
        words = str(exc).replace(f"'0 {unit}'", f"{unit!r}").replace(f"'1 {unit}'", f"{unit!r}")
        hint = (", or 'iso' for ISO 8601 timestamps" if kind == "time" else "")
        return f"{words}; expected a unit of {kind} such as {_EXAMPLE[kind]}{hint}"
    return None


#: Example units per column kind, for messages.
_EXAMPLE = {"time": "'s', 'min' or 'h'", "length": "'m', 'mm' or 'ft'",
            "flow": "'L/s', 'm3/h' or 'gpm'", "pressure": "'kPa', 'bar' or 'psi'"}


def _open_text(path: Path, shown: str) -> str:
    try:
        if not path.is_file():
            raise CsvError(f"{shown}: no such file" if not path.exists()
                           else f"{shown}: not a plain file")
        size = path.stat().st_size
        if size > MAX_BYTES:
            raise CsvError(f"{shown}: {size / 1e6:.0f} MB is larger than a test's readings "
                           f"can be ({MAX_BYTES // 1024 // 1024} MB at most): cut it to the test")
        raw = path.read_bytes()
    except OSError as exc:
        raise CsvError(f"{shown}: cannot read: {exc.strerror or exc}") from None
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        row = raw[: exc.start].count(b"\n") + 1
        raise CsvError(f"{shown}: row {row}: not UTF-8 text (save the file as UTF-8 CSV)") \
            from None


def _dialect(text: str):
    header = text.splitlines()[0] if text else ""
    try:
        return csv.Sniffer().sniff(header, delimiters=",;\t")
    except csv.Error:
        return csv.excel


def _locate(header: list[str], col: _Column, shown: str) -> _Column:
    from workbench.project.validate.checker import did_you_mean

    names = [h.strip() for h in header]
    if col.name not in names:
        raise CsvError(f"{shown}: row 1: no column named '{col.name}'"
                       f"{did_you_mean(col.name, names)}; the columns are "
                       + ", ".join(f"'{n}'" for n in names))
    return _Column(col.name, col.kind, col.unit, names.index(col.name), col.scale, col.offset)


def _number(cell: str, col: _Column, row: int, shown: str, atmosphere: float) -> float:
    text = cell.strip()
    if col.unit is None:
        from workbench.project.units import UnitError, parse_quantity

        try:
            return parse_quantity(text, col.kind, atmosphere=atmosphere)
        except UnitError as exc:
            raise CsvError(f"{shown}: row {row}, column '{col.name}': {exc}") from None
    if not _NUMBER.match(text):
        raise CsvError(f"{shown}: row {row}, column '{col.name}': {text!r} is not a number "
                       "(write it with a decimal point and no separators)")
    value = col.scale * float(text) + col.offset
    if not math.isfinite(value):
        raise CsvError(f"{shown}: row {row}, column '{col.name}': {text!r} is not finite")
    return value


def _timestamp(cell: str, row: int, col: _Column, shown: str) -> datetime:
    text = cell.strip()
    try:
        return datetime.fromisoformat(text.replace("Z", "+00:00") if text.endswith("Z") else text)
    except ValueError:
        raise CsvError(f"{shown}: row {row}, column '{col.name}': {text!r} is not an ISO 8601 "
                       "timestamp such as '2026-11-14T09:30:00'") from None


def is_iso(time_unit: str | None) -> bool:
    """True when ``time_unit`` asks for ISO 8601 timestamps."""
    return time_unit is not None and time_unit.strip().lower() in ("iso", "iso8601", "iso 8601")


def read_readings(path: str | os.PathLike, *, shown: str, time_column: str,
                  time_unit: str | None, value_column: str, value_kind: str,
                  value_unit: str | None, atmosphere: float = 101325.0) -> CsvReadings:
    """Read the times and readings of one test from a CSV file.

    Parameters
    ----------
    path : path
        The file.
    shown : str
        The file's name as messages show it.
    time_column, value_column : str
        Header names of the two columns.
    time_unit : str or None
        A time unit (``"s"``, ``"min"``, ``"h"``), ``"iso"`` for ISO 8601 timestamps, or
        ``None`` when every cell carries its unit.
    value_kind : str
        Quantity kind of the readings (``"length"``, ``"flow"``, ``"pressure"``).
    value_unit : str or None
        Unit of the readings, or ``None`` when every cell carries its unit.
    atmosphere : float
        Site atmospheric pressure for absolute pressure units [Pa].

    Raises
    ------
    CsvError
        Naming the file, the row (1 = the header) and the column; its ``key`` names the
        table's key at fault (``file``, ``time_unit`` or ``value_unit``).
    """
    iso = is_iso(time_unit)
    tcol = _Column(time_column, "time", None if iso else time_unit)
    vcol = _Column(value_column, value_kind, value_unit)
    for key, unit, kind in (("time_unit", tcol.unit, "time"), ("value_unit", vcol.unit, value_kind)):
        words = unit_problem(unit, kind, atmosphere)
        if words:
            raise CsvError(words, key)
    if tcol.unit is not None:
        tcol = _Column(tcol.name, "time", tcol.unit, -1, *_affine(tcol.unit, "time", atmosphere))
    if vcol.unit is not None:
        vcol = _Column(vcol.name, value_kind, vcol.unit, -1,
                       *_affine(vcol.unit, value_kind, atmosphere))
    text = _open_text(Path(path), shown)
    reader = csv.reader(io.StringIO(text, newline=""), _dialect(text))
    try:
        header = next(reader)
    except StopIteration:
        raise CsvError(f"{shown}: the file is empty; its first row must name the columns") from None
    except csv.Error as exc:
        raise CsvError(f"{shown}: row 1: {exc}") from None
    tcol, vcol = _locate(header, tcol, shown), _locate(header, vcol, shown)
    return _rows(reader, tcol, vcol, iso, shown, atmosphere)


def _rows(reader, tcol: _Column, vcol: _Column, iso: bool, shown: str,
          atmosphere: float) -> CsvReadings:
    times: list[float] = []
    values: list[float] = []
    rows: list[int] = []
    skipped: list[int] = []
    first: datetime | None = None
    while True:
        try:
            cells = next(reader)
        except StopIteration:
            break
        except csv.Error as exc:
            raise CsvError(f"{shown}: row {reader.line_num}: {exc}") from None
        row = reader.line_num
        if not any(c.strip() for c in cells):
            continue
        wanted = [cells[c.index] if c.index < len(cells) else "" for c in (tcol, vcol)]
        if any(w.strip().lower() in MISSING for w in wanted):
            skipped.append(row)
            continue
        if iso:
            stamp = _timestamp(wanted[0], row, tcol, shown)
            if first is None:
                first = stamp
            try:
                t = (stamp - first).total_seconds()
            except TypeError:
                raise CsvError(f"{shown}: row {row}, column '{tcol.name}': timestamps with and "
                               "without a time zone are mixed") from None
        else:
            t = _number(wanted[0], tcol, row, shown, atmosphere)
        if t < 0.0:
            raise CsvError(f"{shown}: row {row}, column '{tcol.name}': the time is before the "
                           "start of the test" if iso else
                           f"{shown}: row {row}, column '{tcol.name}': a time must not be negative")
        if times and t < times[-1]:
            raise CsvError(f"{shown}: row {row}, column '{tcol.name}': the time goes backwards "
                           "(rows must be in time order)")
        times.append(t)
        values.append(_number(wanted[1], vcol, row, shown, atmosphere))
        rows.append(row)
    if not times:
        raise CsvError(f"{shown}: no readings: every row after the header is empty or "
                       "missing a value")
    return CsvReadings(tuple(times), tuple(values), tuple(skipped), tuple(rows))
