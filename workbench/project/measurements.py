"""Site tests in the project file: ``[measurements.NAME]`` tables, checked and read to SI.

A measurement is what was read on the plant during one test: a tank level, a line flow or
a junction pressure, as points typed into the file or as a CSV file beside it
(:mod:`workbench.project.measurement_csv`), with the test's conditions where they differ
from the project's (``initial_level``, ``valve_opening``, ``initial_state``)::

    [measurements.drain_test_nov]
    element = "TK-7"
    quantity = "level"
    points = [ { time = "0 min", value = "3.20 m" }, { time = "5 min", value = "2.71 m" } ]
    initial_level = "3.20 m"

:func:`check_measurements` gives every problem with its key path (validation calls it);
:func:`measurements_of` the checked :class:`Measurement` objects of a loaded project, and
:func:`observation` the core's :class:`~workbench.core.calibration.Observation` of one,
under its test conditions.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from workbench.project.problems import Problem, ProjectError
from workbench.project.schema import LIST_ITEMS, SECTIONS

if TYPE_CHECKING:  # pragma: no cover
    from workbench.core.calibration import Observation
    from workbench.core.model import System

__all__ = ["QUANTITY_KIND", "Measurement", "check_measurements", "measurements_of",
           "observation", "csv_path"]

#: Measured quantity -> quantity kind of its readings (project.units).
QUANTITY_KIND = {"level": "length", "flow": "flow", "pressure": "pressure"}

#: Measured quantity -> the element section it belongs to, and the words for messages.
_ELEMENT_OF = {
    "level": ("reservoirs", "a tank or reservoir (its level above the bottom)"),
    "flow": ("lines", "a line (its flow, positive from -> to)"),
    "pressure": ("junctions", "a junction (its gauge pressure)"),
}


@dataclass(frozen=True, eq=False)
class Measurement:
    """One site test's readings, checked, in SI units."""

    name: str
    element: str
    quantity: str
    """``"level"`` [m above the bottom], ``"flow"`` [m^3/s] or ``"pressure"`` [Pa gauge]."""
    times: np.ndarray | None
    """Reading times from the start of the test [s]; ``None`` for one steady reading."""
    values: np.ndarray
    """Readings [SI]."""
    levels: dict[str, float] = field(default_factory=dict)
    """Test condition: tank id -> level at the start [m]."""
    openings: dict[str, float] = field(default_factory=dict)
    """Test condition: line id -> valve opening held through the test [-]."""
    initial_state: str | None = None
    source: str = "points"
    """``"points"``, or the CSV file as the project names it."""
    skipped_rows: tuple[int, ...] = ()
    """CSV rows skipped for a missing value (1 = the header)."""
    description: str = ""

    @property
    def has_conditions(self) -> bool:
        """True when the test ran under conditions of its own (not the project's)."""
        return bool(self.levels or self.openings or self.initial_state)

    def differs_from(self, system: "System") -> bool:
        """True when the test's conditions are not the project's own (another start level,
        a valve held at another opening or instead of its schedule, another start)."""
        for tank, level in self.levels.items():
            if abs(system.reservoirs[tank].level - level) > 1e-9:
                return True
        for line, opening in self.openings.items():
            valve = system.lines[line].valve
            if valve.schedule is not None or abs(valve.opening - opening) > 1e-12:
                return True
        settings = system.simulation
        own = settings.initial_state if settings is not None else "steady"
        return self.initial_state is not None and self.initial_state != own

    @property
    def steady(self) -> bool:
        """True for one steady reading (compared with the steady solution)."""
        return self.times is None


def csv_path(file: str | None, name: str) -> Path:
    """Where a measurement's CSV file is: beside the project file (or as given if absolute)."""
    path = Path(name)
    if path.is_absolute() or not file or file.startswith("<"):
        return path
    return Path(file).parent / path


class _Reader:
    """Collects problems while checking the measurements of one file."""

    def __init__(self, data: dict, file: str | None, atmosphere: float, read_files: bool):
        self.data = data
        self.read_files = read_files
        self.file = file
        self.atmosphere = atmosphere
        self.problems: list[Problem] = []
        self.unit_system: str | None = None
        """Display units of messages (``None``: the file's own)."""

    def add(self, key: str, message: str) -> None:
        self.problems.append(Problem(self.file, key, message))

    def ids(self, section: str) -> dict:
        tables = self.data.get(section, {})
        return tables if isinstance(tables, dict) else {}

    def quantity(self, text: Any, kind: str, key: str) -> float | None:
        from workbench.project.units import UnitError, parse_quantity

        try:
            value = parse_quantity(text, kind, atmosphere=self.atmosphere)
        except UnitError as exc:
            self.add(key, str(exc))
            return None
        if abs(value) > 1e12:
            self.add(key, f"{text!r}: far beyond any plant; check the number and its unit")
            return None
        return value


def check_measurements(data: Any, file: str | None = None, *, atmosphere: float = 101325.0,
                       read_files: bool = True, unit_system: str | None = None,
                       ) -> tuple[dict[str, Measurement], list[Problem]]:
    """Check the ``[measurements]`` tables of a file's data and read them to SI.

    Parameters
    ----------
    data : dict
        The file as ``tomllib`` reads it (element sections give the ids that may be named).
    file : str, optional
        The project file's name: messages name it, and a CSV file is looked for beside it.
    atmosphere : float
        Site atmospheric pressure [Pa], for readings in absolute pressure units.
    unit_system : {"SI", "US"}, optional
        Display units of the numbers in messages; default the file's ``[project] units``.
    read_files : bool
        Read the CSV files. Validation does not: a project's text is checked wherever it
        is (a copy, a sweep case, the app's edits), while its CSV files are read when a
        command uses the readings (``check``, ``simulate``, ``calibrate``, ``report``).

    Returns
    -------
    (dict of Measurement, list of Problem)
        The measurements by name (those without problems) and every problem found.
    """
    r = _Reader(data if isinstance(data, dict) else {}, file, atmosphere, read_files)
    r.unit_system = unit_system
    raw = r.data.get("measurements")
    if raw is None:
        return {}, []
    if not isinstance(raw, dict):
        r.add("measurements", "expected tables [measurements.NAME], one per site test")
        return {}, r.problems
    out = {}
    for name, table in raw.items():
        n0 = len(r.problems)
        if not isinstance(table, dict):
            r.add(f"measurements.{name}", f"expected a table [measurements.{name}] of the "
                  "test's keys (element, quantity, points or file)")
            continue
        found = _check_one(r, name, table)
        if found is not None and len(r.problems) == n0:
            out[name] = found
    return out, r.problems


def _check_one(r: _Reader, name: str, t: dict) -> Measurement | None:
    from workbench.project.validate.checker import did_you_mean

    path = f"measurements.{name}"
    specs = SECTIONS["measurements"]
    names = [s.name for s in specs]
    for key in t:
        if key not in names:
            r.add(f"{path}.{key}", f"unknown key '{key}'{did_you_mean(key, names)}")
    for spec in specs:
        if spec.required and spec.name not in t:
            r.add(f"{path}.{spec.name}", f"missing required key '{spec.name}' ({spec.help})")
    quantity, element = t.get("quantity"), t.get("element")
    if "quantity" in t and quantity not in QUANTITY_KIND:
        r.add(f"{path}.quantity", f"{quantity!r} is not valid; expected one of 'level', "
              "'flow', 'pressure'")
        return None
    if quantity is None or element is None:
        return None
    if not _element_fits(r, path, element, quantity):
        return None
    if ("points" in t) == ("file" in t):
        r.add(path, "give the readings as points = [...] or in a CSV file (file = '...'), "
              "one of the two")
        return None
    series = _points(r, path, t, quantity) if "points" in t else _csv(r, path, t, quantity)
    if series is None:
        return None
    times, values, skipped = series
    if times is None and quantity == "level":
        r.add(path, "a level is compared in time (a drain or a fill): give readings at two "
              "times or more")
        return None
    levels = _levels(r, path, t, element, quantity)
    openings = _openings(r, path, t, element, quantity)
    state = t.get("initial_state")
    if state is not None and state not in ("steady", "at_rest"):
        r.add(f"{path}.initial_state", f"{state!r} is not valid; expected 'steady' or 'at_rest'")
    description = t.get("description", "")
    if not isinstance(description, str):
        r.add(f"{path}.description", "expected text in quotes")
    if levels is None or openings is None:
        return None
    return Measurement(name, element, quantity, times, values, levels, openings, state,
                       t.get("file", "points"), skipped, description if isinstance(description, str) else "")


def _element_fits(r: _Reader, path: str, element: Any, quantity: str) -> bool:
    from workbench.project.validate.checker import did_you_mean

    if not isinstance(element, str):
        r.add(f"{path}.element", "expected the id of an element, in quotes")
        return False
    section, words = _ELEMENT_OF[quantity]
    if element in r.ids(section):
        return True
    every = {eid: s for s in ("reservoirs", "junctions", "receivers", "lines")
             for eid in r.ids(s)}
    if element in every:
        r.add(f"{path}.element", f"'{element}' is in {every[element]}: a {quantity} reading "
              f"belongs to {words}")
    else:
        r.add(f"{path}.element", f"element = '{element}' names no element"
              f"{did_you_mean(element, r.ids(section))}")
    return False


def _points(r: _Reader, path: str, t: dict, quantity: str):
    items = t["points"]
    key = f"{path}.points"
    if not isinstance(items, list) or not items:
        r.add(key, "expected a list of readings [ { time = '...', value = '...' }, ... ]")
        return None
    kind = QUANTITY_KIND[quantity]
    allowed = [s.name for s in LIST_ITEMS["measurements.points"]] + [quantity]
    times, values = [], []
    n0 = len(r.problems)
    for i, item in enumerate(items, start=1):
        ik = f"{key}[{i}]"
        if not isinstance(item, dict):
            r.add(ik, "expected a table { time = '...', value = '...' }")
            continue
        for k in item:
            if k not in allowed:
                r.add(f"{ik}.{k}", f"unknown key '{k}'; expected time and value")
        reading = item.get("value", item.get(quantity))
        if reading is None or ("value" in item and quantity in item):
            r.add(ik, f"give the reading as value = '...' (or {quantity} = '...'), once")
            continue
        vkey = f"{ik}.value" if "value" in item else f"{ik}.{quantity}"
        value = r.quantity(reading, kind, vkey)
        words = None if value is None else _impossible(r, quantity, value)
        if words:
            r.add(vkey, f"{reading!r}: {words}")
        values.append(value)
        if "time" in item:
            times.append(r.quantity(item["time"], "time", f"{ik}.time"))
        elif len(items) > 1:
            r.add(f"{ik}.time", "missing the time of the reading (only a single steady reading "
                  "may go without one)")
    if len(r.problems) > n0:
        return None
    for i, (a, b) in enumerate(zip(times, times[1:]), start=2):
        if b <= a:
            r.add(f"{key}[{i}].time", "times must increase from one reading to the next")
    if times and min(times) < 0.0:
        r.add(f"{key}[1].time", "a time must not be negative (times count from the start of "
              "the test)")
    late = _too_late(times)
    if late is not None:
        r.add(f"{key}[{late + 1}].time", _LATE)
    if len(r.problems) > n0:
        return None
    steady = len(items) == 1
    return (None if steady else np.array(times)), np.array(values, dtype=float), ()


def _csv(r: _Reader, path: str, t: dict, quantity: str):
    from workbench.project.measurement_csv import CsvError, is_iso, read_readings, unit_problem

    n0 = len(r.problems)
    for key in ("file", "time_column", "value_column"):
        if key not in t:
            r.add(f"{path}.{key}", f"missing '{key}': a CSV file needs file, time_column and "
                  "value_column (and time_unit, value_unit unless each cell has its unit)")
        elif not isinstance(t[key], str) or not t[key].strip():
            r.add(f"{path}.{key}", "expected text in quotes")
    for key in ("time_unit", "value_unit"):
        if key in t and (not isinstance(t[key], str) or not t[key].strip()):
            r.add(f"{path}.{key}", "expected a unit in quotes, e.g. 'min' or 'm'")
    if len(r.problems) > n0:
        return None
    for key, kind in (("time_unit", "time"), ("value_unit", QUANTITY_KIND[quantity])):
        if key in t and not (key == "time_unit" and is_iso(t[key])):
            words = unit_problem(t[key], kind, r.atmosphere)
            if words:
                r.add(f"{path}.{key}", words)
    if len(r.problems) > n0 or not r.read_files:
        return None
    try:
        found = read_readings(
            csv_path(r.file, t["file"]), shown=t["file"], time_column=t["time_column"],
            time_unit=t.get("time_unit"), value_column=t["value_column"],
            value_kind=QUANTITY_KIND[quantity], value_unit=t.get("value_unit"),
            atmosphere=r.atmosphere)
    except CsvError as exc:
        r.add(f"{path}.{exc.key}", str(exc))
        return None
    late = _too_late(found.times)
    if late is not None:
        r.add(f"{path}.file", f"{t['file']}: row {found.rows[late]}, column "
              f"'{t['time_column']}': {_LATE}")
        return None
    for row, value in zip(found.rows, found.values):
        words = _impossible(r, quantity, value)
        if words:
            r.add(f"{path}.file", f"{t['file']}: row {row}, column '{t['value_column']}': "
                  f"{words}")
            return None
    times = None if len(found.times) == 1 else np.array(found.times)
    return times, np.array(found.values, dtype=float), found.skipped_rows


_LATE = ("the reading is more than 32 years after the start of the test, beyond the longest "
         "span a run simulates: check the time and its unit")


def _too_late(times) -> int | None:
    """Index of the first time beyond the longest simulated span, or ``None``."""
    from workbench.core.transient.options import MAX_DURATION

    return next((i for i, t in enumerate(times) if t is not None and t > MAX_DURATION), None)


def _impossible(r: _Reader, quantity: str, value: float) -> str | None:
    """Why a reading [SI] cannot have been read on a plant, in words; ``None`` when it can.

    A level is read above the tank's bottom, so it is not negative; a gauge pressure is not
    below a perfect vacuum (minus the site's atmospheric pressure).
    """
    from workbench.project.units import format_quantity

    units = r.unit_system or (r.data.get("project", {}).get("units", "SI") if isinstance(
        r.data.get("project"), dict) else "SI")
    units = units if units in ("SI", "US") else "SI"
    if quantity == "level" and value < 0.0:
        return (f"a level of {format_quantity(value, 'length', units, 3)} is below the tank's "
                "bottom: expected a level above the bottom, 0 or more (take any zero offset of "
                "the transmitter off the readings)")
    if quantity == "pressure" and value < -r.atmosphere:
        return (f"a gauge pressure of {format_quantity(value, 'pressure', units, 3)} is below a "
                f"perfect vacuum (the site's atmosphere is "
                f"{format_quantity(r.atmosphere, 'pressure', units, 3)}): expected a gauge "
                "pressure above minus the atmospheric pressure")
    return None


def _levels(r: _Reader, path: str, t: dict, element: str, quantity: str) -> dict | None:
    if "initial_level" not in t:
        return {}
    raw, key = t["initial_level"], f"{path}.initial_level"
    tanks = r.ids("reservoirs")
    if isinstance(raw, dict):
        pairs = list(raw.items())
    else:
        tank = element if quantity == "level" else None
        if quantity == "flow":
            line = r.ids("lines").get(element, {})
            tank = next((line.get(end) for end in ("from", "to")
                         if isinstance(line, dict) and line.get(end) in tanks), None)
        if tank is None:
            r.add(key, "give the tank: initial_level = { TANK = '...' } (the measured element "
                  "is not a tank, nor a line from one)")
            return None
        pairs = [(tank, raw)]
    out = {}
    for tank, text in pairs:
        if tank not in tanks:
            r.add(f"{key}.{tank}", f"'{tank}' is not a tank or reservoir")
            continue
        value = r.quantity(text, "length", f"{key}.{tank}" if isinstance(raw, dict) else key)
        if value is not None and value < 0.0:
            r.add(key, f"{text!r}: a level must not be negative")
        elif value is not None:
            out[tank] = value
    return out if len(out) == len(pairs) else None


def _openings(r: _Reader, path: str, t: dict, element: str, quantity: str) -> dict | None:
    if "valve_opening" not in t:
        return {}
    raw, key = t["valve_opening"], f"{path}.valve_opening"
    lines = r.ids("lines")
    pairs = list(raw.items()) if isinstance(raw, dict) else [(element, raw)]
    out = {}
    for line, value in pairs:
        where = f"{key}.{line}" if isinstance(raw, dict) else key
        table = lines.get(line)
        if not isinstance(table, dict) or not isinstance(table.get("valve"), dict):
            r.add(where, f"'{line}' is not a line with a valve: give valve_opening = "
                  "{ LINE = x } for the valve that was set")
            continue
        if isinstance(value, bool) or not isinstance(value, (int, float)) \
                or not math.isfinite(value) or not 0.0 <= value <= 1.0:
            r.add(where, f"expected an opening from 0 to 1 (a plain number), got {value!r}")
            continue
        out[line] = float(value)
    return out if len(out) == len(pairs) else None


def measurements_of(project) -> dict[str, Measurement]:
    """The checked measurements of a loaded project, by name.

    Raises
    ------
    ProjectError
        When a measurement cannot be read (its CSV file changed or went since loading).
    """
    found, problems = check_measurements(project.data, project.name,
                                         atmosphere=project.system.atmospheric_pressure,
                                         unit_system=project.unit_system)
    if problems:
        raise ProjectError(problems)
    return found


def observation(m: Measurement, system: "System") -> "Observation":
    """The core's view of a measurement: its readings and the system under its conditions."""
    from workbench.core.calibration import Observation, with_conditions

    tested = with_conditions(system, levels=m.levels, openings=m.openings,
                             initial_state=m.initial_state)
    return Observation(m.name, m.element, m.quantity, m.times, m.values, tested)
