"""Validate the data of a project file and build the core model from it, in one pass.

:func:`check_data` walks the plain data of a file (as ``tomllib`` returns it) section by
section, following :mod:`workbench.project.schema`. It collects every problem rather than
stopping at the first, each with its key path, what was found and what was expected, and
builds :class:`workbench.core.model.System` when there are none. :func:`build_system` is the
same, raising :class:`ProjectError`.

Units are read by :mod:`workbench.project.units`; the liquid by :mod:`workbench.core.fluid`,
the site atmosphere by :mod:`workbench.core.atmosphere`, pipe sizes and materials by
:mod:`workbench.core.pipes`. These are imported when a file is checked, not at start-up.
"""

from __future__ import annotations

import math
import re
from typing import Any

from workbench.core import model as m
from workbench.project.problems import Problem, ProjectError
from workbench.project.schema import (
    ELEMENT_SECTIONS,
    LIST_ITEMS,
    ROOT_KEYS,
    SCHEMA_VERSION,
    SECTIONS,
    FieldSpec,
)
from workbench.project.units import QUANTITY_KINDS, UnitError, parse_quantity

__all__ = ["ID_PATTERN", "build_system", "check_data", "describe", "did_you_mean"]

#: Element ids: letters, digits, '_' and '-' (TOML bare keys), starting with a letter or digit.
ID_PATTERN = re.compile(r"[A-Za-z0-9][A-Za-z0-9_-]*\Z")

#: Largest magnitude of any quantity in SI units: far beyond any plant (a million km, ten
#: million bar), small enough that the solvers' arithmetic cannot overflow on it.
QUANTITY_LIMIT = 1e12

_SECTION_WORD = {
    "reservoirs": "reservoir",
    "junctions": "junction",
    "receivers": "receiver",
    "lines": "line",
}


def describe(value: Any) -> str:
    """A found value in words for messages: ``text '12'``, ``the number 12``, ``a table``."""
    if isinstance(value, bool):
        return f"the boolean {str(value).lower()}"
    if isinstance(value, (int, float)):
        return f"the number {value!r}"
    if isinstance(value, str):
        return f"text {value!r}"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "a list"
    return f"{type(value).__name__} {value!s}"


def did_you_mean(word: str, candidates) -> str:
    """`` — did you mean 'x'?`` for the nearest candidate, or an empty string."""
    import difflib

    close = difflib.get_close_matches(word, list(candidates), n=1, cutoff=0.6)
    return f" — did you mean '{close[0]}'?" if close else ""


class _Checker:
    """Collects problems while reading one file's data."""

    def __init__(self, file: str | None):
        self.file = file
        self.problems: list[Problem] = []
        self.atmosphere = m.P_ATM_SEA_LEVEL

    def add(self, key: str, message: str) -> None:
        self.problems.append(Problem(self.file, key, message))

    # -- structure -------------------------------------------------------------------
    def table(self, value: Any, key: str, what: str = "a table") -> dict | None:
        if isinstance(value, dict):
            return value
        self.add(key, f"expected {what}, got {describe(value)}")
        return None

    def known_keys(self, table: dict, specs, path: str, extra: tuple[str, ...] = ()) -> None:
        names = [s.name for s in specs] + list(extra)
        for key in table:
            if key not in names:
                where = f"{path}.{key}" if path else key
                self.add(where, f"unknown key '{key}'{did_you_mean(key, names)}")
        for spec in specs:
            if spec.required and spec.name not in table:
                where = f"{path}.{spec.name}" if path else spec.name
                example = f", e.g. {spec.name} = {_toml_example(spec)}" if spec.example or spec.choices else ""
                self.add(where, f"missing required key '{spec.name}' ({spec.help}){example}")

    # -- values ----------------------------------------------------------------------
    def quantity(self, table: dict, name: str, kind: str, path: str, *, required: bool = False,
                 positive: bool = False, nonnegative: bool = False) -> float | None:
        key = f"{path}.{name}"
        if name not in table:
            if required:
                self.add(key, f"missing required key '{name}' (a {QUANTITY_KINDS[kind].name}, "
                         f"e.g. {name} = \"{QUANTITY_KINDS[kind].example}\")")
            return None
        try:
            value = parse_quantity(table[name], kind, atmosphere=self.atmosphere)
        except UnitError as exc:
            self.add(key, str(exc))
            return None
        if abs(value) > QUANTITY_LIMIT:
            self.add(key, f"{table[name]!r}: far beyond any plant; check the number and its "
                     "unit")
            return None
        if positive and not value > 0:
            self.add(key, f"{table[name]!r}: the {QUANTITY_KINDS[kind].name} must be positive")
            return None
        if nonnegative and value < 0:
            self.add(key, f"{table[name]!r}: the {QUANTITY_KINDS[kind].name} must not be negative")
            return None
        return value

    def number(self, table: dict, spec: FieldSpec, path: str, *, integer: bool = False,
               exclusive_minimum: bool = False) -> float | int | None:
        key = f"{path}.{spec.name}"
        if spec.name not in table:
            return spec.default  # type: ignore[return-value]
        value = table[spec.name]
        what = "a whole number" if integer else "a number"
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            hint = " (write it without quotes)" if isinstance(value, str) else ""
            self.add(key, f"expected {what}, got {describe(value)}{hint}")
            return None
        if integer and not isinstance(value, int):
            self.add(key, f"expected {what}, got {describe(value)}")
            return None
        if not math.isfinite(value):
            self.add(key, f"expected a finite number, got {value!r}")
            return None
        low, high = spec.minimum, spec.maximum
        too_low = low is not None and (value < low or (exclusive_minimum and value <= low))
        too_high = high is not None and value > high
        if too_low or too_high:
            if low is not None and high is not None:
                expected = f"a value from {low:g} to {high:g}"
                if exclusive_minimum:
                    expected = f"a value above {low:g} and at most {high:g}"
            elif low is not None:
                expected = f"a value above {low:g}" if exclusive_minimum else f"at least {low:g}"
            else:
                expected = f"at most {high:g}"
            self.add(key, f"{value!r} is out of range: expected {expected}")
            return None
        return value

    def text(self, table: dict, name: str, path: str, *, required: bool = False,
             default: str | None = None) -> str | None:
        key = f"{path}.{name}"
        if name not in table:
            if required:
                self.add(key, f"missing required key '{name}'")
            return default
        value = table[name]
        if not isinstance(value, str):
            self.add(key, f"expected text in quotes, got {describe(value)}")
            return None
        return value

    def choice(self, table: dict, spec: FieldSpec, path: str, choices=None) -> str | None:
        choices = tuple(choices if choices is not None else spec.choices)
        key = f"{path}.{spec.name}"
        if spec.name not in table:
            return spec.default  # type: ignore[return-value]
        value = table[spec.name]
        if not isinstance(value, str):
            self.add(key, f"expected one of {_words(choices)}, got {describe(value)}")
            return None
        if value not in choices:
            self.add(key, f"'{value}' is not valid; expected one of {_words(choices)}"
                     f"{did_you_mean(value, choices)}")
            return None
        return value

    def list_of_tables(self, table: dict, name: str, path: str) -> list[tuple[str, dict]]:
        key = f"{path}.{name}"
        if name not in table:
            return []
        value = table[name]
        if not isinstance(value, list):
            self.add(key, f"expected a list of tables [ {{ ... }}, ... ], got {describe(value)}")
            return []
        out = []
        for i, item in enumerate(value, start=1):
            item_key = f"{key}[{i}]"
            if isinstance(item, dict):
                out.append((item_key, item))
            else:
                self.add(item_key, f"expected a table {{ ... }}, got {describe(item)}")
        return out


def _words(choices) -> str:
    return ", ".join(f"'{c}'" for c in choices) if choices else "(none)"


def _toml_example(spec: FieldSpec) -> str:
    if spec.choices:
        return f"\"{spec.choices[0]}\""
    if spec.kind in {"number", "int"}:
        return spec.example
    return f"\"{spec.example}\""


def _spec(section: str, name: str) -> FieldSpec:
    for spec in SECTIONS.get(section, ()) or LIST_ITEMS.get(section, ()):
        if spec.name == name:
            return spec
    raise KeyError(f"{section}.{name}")


# ----------------------------------------------------------------------------------------
# Sections


def _check_root(c: _Checker, data: dict) -> bool:
    c.known_keys(data, ROOT_KEYS, "")
    if "schema" in data:
        version = data["schema"]
        if isinstance(version, bool) or not isinstance(version, int):
            c.add("schema", f"expected the whole number {SCHEMA_VERSION}, got {describe(version)}")
            return False
        if version != SCHEMA_VERSION:
            c.add("schema", f"schema {version} is not supported: this version of workbench "
                  f"reads schema {SCHEMA_VERSION}")
            return False
    return True


def _check_project(c: _Checker, data: dict) -> tuple[str, str, float]:
    section = c.table(data.get("project", {}), "project") or {}
    c.known_keys(section, SECTIONS["project"], "project")
    title = c.text(section, "title", "project", default="") or ""
    if "title" in section and isinstance(section["title"], str) and not title.strip():
        c.add("project.title", "the title must not be empty")
    c.text(section, "description", "project")
    units = c.choice(section, _spec("project", "units"), "project") or "SI"
    site = c.quantity(section, "site_elevation", "elevation", "project")
    site = 0.0 if site is None else site
    from workbench.core.atmosphere import AtmosphereError, atmospheric_pressure

    try:
        c.atmosphere = atmospheric_pressure(site)
    except (AtmosphereError, ValueError) as exc:
        c.add("project.site_elevation", str(exc))
    return title, units, site


def _check_fluid(c: _Checker, data: dict) -> m.FluidProps | None:
    section = c.table(data.get("fluid", {}), "fluid")
    if section is None:
        return None
    c.known_keys(section, SECTIONS["fluid"], "fluid")
    from workbench.core import fluid as core_fluid

    catalogue = tuple(k for k in core_fluid.CATALOGUE if k != "water")
    solutions = tuple(core_fluid.SOLUTIONS)
    kinds = ("water", *catalogue, *solutions, "custom")
    kind = c.choice(section, _spec("fluid", "kind"), "fluid", choices=kinds)
    temperature = c.quantity(section, "temperature", "temperature", "fluid")
    custom_keys = ("name", "density", "viscosity", "vapor_pressure")
    if kind is None:
        return None
    for key in ("mass_fraction", "salinity"):
        wanted = [k for k, e in core_fluid.SOLUTIONS.items() if e.parameter == key]
        if key in section and kind not in wanted:
            c.add(f"fluid.{key}", f"'{key}' applies only to kind = "
                  + " or ".join(f'"{k}"' for k in wanted))
    if kind != "custom":
        for key in custom_keys:
            if key in section:
                c.add(f"fluid.{key}", f"'{key}' applies only to kind = \"custom\"; the "
                      f"properties of {kind} come from its formulation")
        bulk = c.quantity(section, "bulk_modulus", "modulus", "fluid", positive=True)
        fraction = _solution_fraction(c, section, core_fluid.SOLUTIONS.get(kind), kind)
        if temperature is None:
            if "temperature" not in section:
                c.add("fluid.temperature", f"missing required key 'temperature' for {kind}, "
                      "e.g. temperature = \"20 degC\"")
            return None
        if kind in solutions and fraction is None:
            return None
        try:
            if kind == "water":
                props = core_fluid.water_properties(temperature, c.atmosphere)
            elif kind in solutions:
                props = core_fluid.solution_properties(kind, temperature, fraction, c.atmosphere)
            else:
                props = core_fluid.liquid_properties(kind, temperature, c.atmosphere)
        except ValueError as exc:
            c.add("fluid.temperature", str(exc))
            return None
        if bulk is not None:  # the user's bulk modulus overrides (or supplies a missing one)
            import dataclasses

            props = dataclasses.replace(
                props, bulk_modulus=bulk,
                notes=(*props.notes, "bulk modulus given in the project file"))
        return props
    name = c.text(section, "name", "fluid", default="custom liquid") or "custom liquid"
    density = c.quantity(section, "density", "density", "fluid", required=True, positive=True)
    viscosity = c.quantity(section, "viscosity", "viscosity", "fluid", required=True,
                           positive=True)
    vapor = c.quantity(section, "vapor_pressure", "pressure_abs", "fluid", nonnegative=True)
    bulk = c.quantity(section, "bulk_modulus", "modulus", "fluid", positive=True)
    if density is None or viscosity is None:
        return None
    try:
        return core_fluid.custom_properties(density, viscosity, vapor, bulk, temperature, name)
    except ValueError as exc:
        c.add("fluid", str(exc))
        return None


def _solution_fraction(c: _Checker, section: dict, entry, kind: str) -> float | None:
    """The concentration key of a solution kind (``mass_fraction`` or ``salinity``), checked
    against the range of the kind's fits; ``None`` (with a problem) when missing or wrong."""
    if entry is None:
        return None
    key = entry.parameter
    path = f"fluid.{key}"
    spec = _spec("fluid", key)
    if key not in section:
        c.add(path, f"missing required key '{key}' for {kind} ({entry.range_text()}), e.g. "
              f"{key} = {_toml_example(spec)}")
        return None
    if key == "salinity":
        raw = section[key]
        if isinstance(raw, str) and re.search(r"\d\s*(ppt|psu)\s*$", raw.strip(), re.I):
            c.add(path, f"{raw!r}: write the absolute salinity in g/kg, e.g. \"35 g/kg\" ('ppt' "
                  "is ambiguous, and practical salinity 'psu' is not a mass fraction)")
            return None
        value = c.quantity(section, key, "salinity", "fluid", nonnegative=True)
        if value is None:
            return None
        if value > entry.fraction_max:
            c.add(path, f"{raw!r} is out of range for {kind}: expected {entry.range_text()}")
            return None
        return value
    value = section[key]
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        hint = " (write it without quotes, e.g. 0.3 for 30 %)" if isinstance(value, str) else ""
        c.add(path, f"expected a number, got {describe(value)}{hint}")
        return None
    if not math.isfinite(value) or not 0.0 <= value <= entry.fraction_max:
        hint = f" (a fraction: {value:g} % is {value / 100:g})" if 1.0 < value <= 100.0 else ""
        c.add(path, f"{value!r} is out of range for {kind}: expected a mass fraction from "
              f"{entry.range_text()}{hint}")
        return None
    return float(value)


def _element_tables(c: _Checker, data: dict) -> dict[str, dict[str, dict]]:
    """Each element section's tables, with ids checked for form and uniqueness."""
    out: dict[str, dict[str, dict]] = {}
    seen: dict[str, str] = {}
    for section in ELEMENT_SECTIONS:
        raw = data.get(section, {})
        tables = c.table(raw, section, f"a table of {section} keyed by id") or {}
        out[section] = {}
        for element_id, table in tables.items():
            key = f"{section}.{element_id}"
            if not ID_PATTERN.match(element_id):
                c.add(key, f"id '{element_id}' is not valid: use letters, digits, '_' and '-', "
                      "starting with a letter or digit")
            if element_id in seen:
                c.add(key, f"id '{element_id}' is also used by {seen[element_id]}; ids must be "
                      "unique across reservoirs, junctions, receivers and lines")
            else:
                seen[element_id] = f"{section}.{element_id}"
            table = c.table(table, key, f"a table [{key}] of the {_SECTION_WORD[section]}'s keys")
            if table is not None:
                out[section][element_id] = table
    return out


def _check_reservoir(c: _Checker, rid: str, t: dict) -> m.Reservoir | None:
    path = f"reservoirs.{rid}"
    specs = SECTIONS["reservoirs"]
    c.known_keys(t, specs, path)
    c.text(t, "description", path)
    n0 = len(c.problems)
    kind = c.choice(t, _spec("reservoirs", "kind"), path)
    bottom = c.quantity(t, "bottom_elevation", "elevation", path)
    level = c.quantity(t, "level", "length", path, nonnegative=True)
    surface = c.quantity(t, "surface_pressure", "pressure", path)
    tank_keys = ("shape", "diameter", "length", "width", "cone_angle", "cone_height", "height",
                 "min_level", "restart_level")
    if kind == "constant_level":
        for key in tank_keys:
            if key in t:
                c.add(f"{path}.{key}", f"'{key}' applies only to kind = \"tank\" (this reservoir "
                      "holds a constant level)")
        for key in _FEED_KEYS:
            if key in t:
                c.add(f"{path}.{key}", f"'{key}' applies only to kind = \"tank\": a "
                      "constant-level reservoir's level is held whatever flows in or out, so "
                      "a feed or draw-off would change nothing (make it a tank to model one)")
        if len(c.problems) > n0 or bottom is None or level is None:
            return None
        return m.Reservoir(rid, "constant_level", bottom, level, surface or 0.0)
    if kind != "tank":
        return None
    shape_kind = c.choice(t, _spec("reservoirs", "shape"), path)
    if "shape" not in t:
        c.add(f"{path}.shape", "missing required key 'shape' for a tank: one of "
              + _words(_spec("reservoirs", "shape").choices))
    diameter = c.quantity(t, "diameter", "length", path, positive=True)
    length = c.quantity(t, "length", "length", path, positive=True)
    width = c.quantity(t, "width", "length", path, positive=True)
    cone_angle = c.quantity(t, "cone_angle", "angle", path)
    cone_height = c.quantity(t, "cone_height", "length", path, positive=True)
    height = c.quantity(t, "height", "length", path, positive=True)
    min_level = c.quantity(t, "min_level", "length", path, nonnegative=True)
    needed = {
        "vertical_cylinder": ("diameter",),
        "horizontal_cylinder": ("diameter", "length"),
        "rectangular": ("length", "width"),
        "cone_bottom": ("diameter",),
    }
    if shape_kind is not None:
        for key in needed[shape_kind]:
            if key not in t:
                c.add(f"{path}.{key}", f"missing required key '{key}' for shape = "
                      f"\"{shape_kind}\"")
        allowed = set(needed[shape_kind])
        if shape_kind == "cone_bottom":
            allowed |= {"cone_angle", "cone_height"}
        for key in ("diameter", "length", "width", "cone_angle", "cone_height"):
            if key in t and key not in allowed:
                c.add(f"{path}.{key}", f"'{key}' does not apply to shape = \"{shape_kind}\"")
    if shape_kind == "cone_bottom":
        if "cone_angle" in t and "cone_height" in t:
            c.add(f"{path}.cone_angle", "give cone_angle or cone_height, not both")
        elif "cone_angle" not in t and "cone_height" not in t:
            c.add(f"{path}.cone_height", "missing required key 'cone_height' (or cone_angle) for "
                  "shape = \"cone_bottom\"")
        if cone_angle is not None:
            if not 0 < cone_angle < math.pi:
                c.add(f"{path}.cone_angle", f"{t['cone_angle']!r}: the included angle must be "
                      "between 0 and 180 deg")
            elif diameter is not None:
                cone_height = diameter / 2 / math.tan(cone_angle / 2)
    if shape_kind == "horizontal_cylinder" and diameter is not None:
        if height is None:
            height = diameter
        elif height > diameter * (1 + 1e-9):
            c.add(f"{path}.height", f"{t['height']!r} is above the top of the horizontal "
                  f"cylinder (diameter {t.get('diameter')!r})")
    if shape_kind == "cone_bottom" and cone_height is not None and height is not None \
            and height < cone_height:
        c.add(f"{path}.height", f"{t['height']!r} is below the top of the cone "
              f"({cone_height:.4g} m)")
    if level is not None and height is not None and level > height * (1 + 1e-9):
        what = "height" if "height" in t else "diameter"
        c.add(f"{path}.level", f"level {t['level']!r} is above the tank's {what} "
              f"{t.get(what)!r}: the tank would overflow")
    if min_level is not None and level is not None and min_level >= level and level > 0:
        c.add(f"{path}.min_level", f"min_level {t['min_level']!r} must be below level "
              f"{t['level']!r}")
    if min_level is not None and height is not None and min_level >= height:
        c.add(f"{path}.min_level", f"min_level {t['min_level']!r} must be below height")
    feeds = _check_feeds(c, t, path)
    restart = c.quantity(t, "restart_level", "length", path, nonnegative=True)
    if restart is not None:
        low = min_level or 0.0
        if restart <= low:
            c.add(f"{path}.restart_level", f"restart_level {t['restart_level']!r} must be above "
                  f"min_level {t.get('min_level', '0 m')!r}: the outlets start again above the "
                  "drained level")
        elif height is not None and restart >= height:
            c.add(f"{path}.restart_level", f"restart_level {t['restart_level']!r} must be below "
                  "the overflow level (height)")
    if len(c.problems) > n0 or None in (bottom, level, shape_kind):
        return None
    shape = m.TankShape(shape_kind, diameter=diameter, length=length, width=width,
                        cone_height=cone_height if shape_kind == "cone_bottom" else None)
    return m.Reservoir(rid, "tank", bottom, level, surface or 0.0, shape=shape, height=height,
                       min_level=min_level or 0.0, restart_level=restart, **feeds)


#: A tank's keys for flows from and to outside the model (refused on constant levels).
_FEED_KEYS = ("inflow", "inflow_schedule", "draw_off", "draw_off_schedule")


def _check_feeds(c: _Checker, t: dict, path: str) -> dict:
    """A tank's feed and draw-off, each a constant or a schedule (not both), as Reservoir
    keyword arguments; problems are added with their key paths."""
    out: dict = {}
    for name, opposite in (("inflow", "draw_off"), ("draw_off", "inflow")):
        sched_name = f"{name}_schedule"
        if name in t and sched_name in t:
            c.add(f"{path}.{sched_name}", f"give {name} or {sched_name}, not both")
            continue
        if name in t:
            value = c.quantity(t, name, "flow", path)
            if value is not None and value < 0.0:
                what = ("a flow taken out of the tank is draw_off" if name == "inflow"
                        else "a feed into the tank is inflow")
                c.add(f"{path}.{name}", f"{t[name]!r}: the {name.replace('_', '-')} must not be "
                      f"negative ({what}, e.g. {opposite} = \"{abs(value) * 1000:g} L/s\")")
            elif value is not None:
                out[name] = value
        elif sched_name in t:
            schedule = _check_flow_schedule(c, t, sched_name, path)
            if schedule is not None:
                out[sched_name] = schedule
    return out


def _check_flow_schedule(c: _Checker, t: dict, name: str, path: str) -> m.FlowSchedule | None:
    """A list of ``{ time, flow }`` points with increasing times and flows not negative."""
    key = f"{path}.{name}"
    items = c.list_of_tables(t, name, path)
    if isinstance(t[name], list) and not t[name]:
        c.add(key, "the schedule is empty: give at least one { time = \"0 s\", flow = \"10 L/s\" }")
        return None
    n0 = len(c.problems)
    times: list[float] = []
    flows: list[float] = []
    what = "draw-off" if name.startswith("draw_off") else "feed"
    for item_key, item in items:
        c.known_keys(item, LIST_ITEMS[f"reservoirs.{name}"], item_key)
        time = c.quantity(item, "time", "time", item_key, nonnegative=True)
        flow = c.quantity(item, "flow", "flow", item_key)
        if flow is not None and flow < 0.0:
            c.add(f"{item_key}.flow", f"{item['flow']!r}: the {what} must not be negative")
            flow = None
        if time is not None and flow is not None:
            if times and time <= times[-1]:
                c.add(f"{item_key}.time", f"{item['time']!r}: times must increase along the "
                      "schedule")
            times.append(time)
            flows.append(flow)
    if len(c.problems) > n0 or len(times) != len(items) or not items:
        return None
    return m.FlowSchedule(tuple(times), tuple(flows))


def _check_junction(c: _Checker, jid: str, t: dict) -> m.Junction | None:
    path = f"junctions.{jid}"
    c.known_keys(t, SECTIONS["junctions"], path)
    c.text(t, "description", path)
    elevation = c.quantity(t, "elevation", "elevation", path)
    return None if elevation is None else m.Junction(jid, elevation)


def _check_receiver(c: _Checker, rid: str, t: dict) -> m.Receiver | None:
    path = f"receivers.{rid}"
    c.known_keys(t, SECTIONS["receivers"], path)
    c.text(t, "description", path)
    kind = c.choice(t, _spec("receivers", "kind"), path)
    elevation = c.quantity(t, "elevation", "elevation", path)
    pressure = c.quantity(t, "pressure", "pressure", path)
    if kind == "vessel" and "pressure" not in t:
        c.add(f"{path}.pressure", "missing required key 'pressure' for kind = \"vessel\", "
              "e.g. pressure = \"50 kPa\"")
        return None
    if kind == "open_discharge" and "pressure" in t:
        c.add(f"{path}.pressure", "'pressure' applies only to kind = \"vessel\" (an open "
              "discharge is at atmospheric pressure)")
        return None
    if kind is None or elevation is None or (kind == "vessel" and pressure is None):
        return None
    return m.Receiver(rid, kind, elevation, pressure if kind == "vessel" else 0.0)


def _check_fittings(c: _Checker, t: dict, path: str) -> tuple[m.Fitting, ...] | None:
    try:
        from workbench.core.fittings import FITTINGS
        names = tuple(FITTINGS)
    except ImportError:  # the fittings table is not installed in this build
        names = None
    specs = LIST_ITEMS["lines.fittings"]
    out = []
    n0 = len(c.problems)
    for key, item in c.list_of_tables(t, "fittings", path):
        c.known_keys(item, specs, key)
        ftype = c.text(item, "type", key)
        if ftype is not None and names is not None and ftype not in names:
            c.add(f"{key}.type", f"unknown fitting type '{ftype}'{did_you_mean(ftype, names)}")
        k = c.number(item, _spec("lines.fittings", "k"), key)
        count = c.number(item, _spec("lines.fittings", "count"), key, integer=True)
        label = c.text(item, "label", key, default="") or ""
        method = c.choice(item, _spec("lines.fittings", "method"), key)
        if ("type" in item) == ("k" in item):
            c.add(key, "give either type (a named fitting) or k (a fixed loss coefficient), "
                  "not both" if "type" in item else "give type (a named fitting) or k (a fixed "
                  "loss coefficient)")
        if len(c.problems) == n0:
            out.append(m.Fitting(type=ftype, k=k, count=count or 1, label=label,
                                 method=method or "darby_3k"))
    return tuple(out) if len(c.problems) == n0 else None


def _check_profile(c: _Checker, t: dict, path: str, length: float | None):
    points = []
    n0 = len(c.problems)
    items = c.list_of_tables(t, "profile", path)
    for key, item in items:
        c.known_keys(item, LIST_ITEMS["lines.profile"], key)
        d = c.quantity(item, "distance", "length", key, nonnegative=True)
        z = c.quantity(item, "elevation", "elevation", key)
        if d is not None and z is not None:
            points.append((key, item, d, z))
    for (_, _, d0, _), (key, item, d1, _) in zip(points, points[1:]):
        if d1 <= d0:
            c.add(f"{key}.distance", f"{item['distance']!r}: distances must increase along "
                  "the profile")
    if length is not None and points:
        key, item, d, _ = points[-1]
        if d > length * (1 + 1e-6) + 1e-9:
            c.add(f"{key}.distance", f"{item['distance']!r} is beyond the line's length "
                  f"{t.get('length')!r}")
    if len(c.problems) > n0:
        return None
    return tuple((d, z) for _, _, d, z in points)


def _check_valve(c: _Checker, t: dict, path: str, diameter: float | None,
                 fluid: m.FluidProps | None) -> tuple[bool, m.Valve | None]:
    if "valve" not in t:
        return True, None
    vpath = f"{path}.valve"
    v = c.table(t["valve"], vpath, f"a table [{vpath}]")
    if v is None:
        return False, None
    n0 = len(c.problems)
    c.known_keys(v, SECTIONS["lines.valve"], vpath)
    characteristic = c.choice(v, _spec("lines.valve", "characteristic"), vpath)
    k_open = c.number(v, _spec("lines.valve", "k_open"), vpath, exclusive_minimum=True)
    kv_open = c.quantity(v, "kv_open", "kv", vpath, positive=True)
    opening = c.number(v, _spec("lines.valve", "opening"), vpath)
    rangeability = c.number(v, _spec("lines.valve", "rangeability"), vpath,
                            exclusive_minimum=True)
    position = c.choice(v, _spec("lines.valve", "position"), vpath)
    if "k_open" in v and "kv_open" in v:
        c.add(f"{vpath}.kv_open", "give k_open or kv_open, not both")
    elif "k_open" not in v and "kv_open" not in v:
        c.add(f"{vpath}.k_open", "missing required key 'k_open' (or kv_open): the valve's "
              "loss coefficient at full opening, e.g. k_open = 0.2")
    schedule = None
    items = c.list_of_tables(v, "schedule", vpath)
    if "schedule" in v and not items and isinstance(v["schedule"], list):
        c.add(f"{vpath}.schedule", "the schedule is empty: give at least one { time, opening }")
    times, openings = [], []
    for key, item in items:
        c.known_keys(item, LIST_ITEMS["lines.valve.schedule"], key)
        time = c.quantity(item, "time", "time", key, nonnegative=True)
        op = c.number(item, _spec("lines.valve.schedule", "opening"), key)
        if time is not None and op is not None:
            if times and time <= times[-1]:
                c.add(f"{key}.time", f"{item['time']!r}: times must increase along the schedule")
            times.append(time)
            openings.append(float(op))
    if items and len(times) == len(items):
        schedule = m.ValveSchedule(tuple(times), tuple(openings))
    if len(c.problems) > n0 or characteristic is None:
        return False, None
    if kv_open is not None:
        if diameter is None or fluid is None:
            return False, None
        from workbench.core.valve import k_from_kv

        try:
            k_open = k_from_kv(kv_open * 3600.0, diameter, fluid.density)
        except (ArithmeticError, ValueError):  # Kv so far out that K overflows or underflows
            k_open = math.inf
        if not (math.isfinite(k_open) and k_open > 0.0):
            c.add(f"{vpath}.kv_open", f"{v['kv_open']!r}: this Kv gives no usable loss "
                  f"coefficient in a {diameter * 1000:.4g} mm line; check the number and its unit")
            return False, None
    return True, m.Valve(characteristic=characteristic, k_open=float(k_open),
                         opening=float(opening), rangeability=float(rangeability),
                         schedule=schedule, position=position)


def _check_surge(c: _Checker, t: dict, path: str) -> tuple[bool, m.SurgeSettings]:
    if "surge" not in t:
        return True, m.SurgeSettings()
    spath = f"{path}.surge"
    s = c.table(t["surge"], spath, f"a table [{spath}]")
    if s is None:
        return False, m.SurgeSettings()
    n0 = len(c.problems)
    c.known_keys(s, SECTIONS["lines.surge"], spath)
    model = c.choice(s, _spec("lines.surge", "model"), spath)
    reaches = c.number(s, _spec("lines.surge", "reaches"), spath, integer=True)
    if len(c.problems) > n0:
        return False, m.SurgeSettings()
    return True, m.SurgeSettings(model=model or "rigid", reaches=reaches)


def _check_line(c: _Checker, lid: str, t: dict, node_ids: dict[str, str],
                fluid: m.FluidProps | None) -> m.Line | None:
    path = f"lines.{lid}"
    c.known_keys(t, SECTIONS["lines"], path)
    c.text(t, "description", path)
    n0 = len(c.problems)
    ends = {}
    for end in ("from", "to"):
        node = c.text(t, end, path)
        if node is None:
            continue
        if node in node_ids and node_ids[node] != "lines":
            ends[end] = node
        elif node in node_ids:
            c.add(f"{path}.{end}", f"{end} = '{node}' names a line; a line must end at a "
                  "reservoir, junction or receiver")
        else:
            c.add(f"{path}.{end}", f"{end} = '{node}' names no element"
                  f"{did_you_mean(node, [k for k, s in node_ids.items() if s != 'lines'])}")
    if len(ends) == 2 and ends["from"] == ends["to"]:
        c.add(f"{path}.to", f"the line starts and ends at '{ends['to']}'")
    length = c.quantity(t, "length", "length", path, positive=True)

    # Bore: an inside diameter, or a nominal size and schedule from the pipe tables.
    diameter = wall = None
    if "inner_diameter" in t and "nominal_size" in t:
        c.add(f"{path}.nominal_size", "give inner_diameter or nominal_size, not both")
    elif "inner_diameter" in t:
        diameter = c.quantity(t, "inner_diameter", "diameter", path, positive=True)
        if "schedule" in t:
            c.add(f"{path}.schedule", "schedule applies only with nominal_size")
    elif "nominal_size" in t:
        nominal = t["nominal_size"]
        schedule = t.get("schedule", _spec("lines", "schedule").default)
        from workbench.core.pipes import PipeSizeError, pipe_dimensions

        if not isinstance(nominal, (str, int, float)) or isinstance(nominal, bool):
            c.add(f"{path}.nominal_size", f"expected a nominal size such as \"4 in\" or "
                  f"\"DN100\", got {describe(nominal)}")
        elif not isinstance(schedule, (str, int)) or isinstance(schedule, bool):
            c.add(f"{path}.schedule", f"expected a schedule such as \"40\", got "
                  f"{describe(schedule)}")
        else:
            try:
                size = pipe_dimensions(nominal, schedule)
            except (PipeSizeError, ValueError) as exc:
                c.add(f"{path}.nominal_size", str(exc))
            else:
                diameter, wall = size.inner_diameter, size.wall_thickness
    else:
        c.add(f"{path}.inner_diameter", "missing required key 'inner_diameter' (or "
              "nominal_size with schedule), e.g. inner_diameter = \"102.26 mm\"")

    # Wall: roughness, and the elastic data for surge, from material unless given.
    material = None
    if "material" in t:
        name = t["material"]
        from workbench.core.pipes import MaterialError, pipe_material

        try:
            material = pipe_material(name)
        except (MaterialError, ValueError) as exc:
            c.add(f"{path}.material", str(exc))
    roughness = c.quantity(t, "roughness", "roughness", path, nonnegative=True)
    if roughness is None and "roughness" not in t:
        if material is not None:
            roughness = material.roughness
        elif "material" not in t:
            c.add(f"{path}.roughness", "missing required key 'roughness' (or material), e.g. "
                  "roughness = \"0.045 mm\"")
    if roughness is not None and diameter is not None and roughness >= diameter / 2:
        c.add(f"{path}.roughness", f"{t.get('roughness', t.get('material'))!r}: the roughness "
              "must be below the pipe radius")
    friction_factor = c.number(t, _spec("lines", "friction_factor"), path, exclusive_minimum=True)
    from workbench.core.fittings import ENTRANCES

    entrance_k, entrance_name = ENTRANCES["sharp"].k, "sharp"
    if "entrance" in t:
        e = t["entrance"]
        if isinstance(e, str) and e in ENTRANCES:
            entrance_k, entrance_name = ENTRANCES[e].k, e
        elif isinstance(e, (int, float)) and not isinstance(e, bool) and math.isfinite(e) \
                and e >= 0:
            entrance_k, entrance_name = float(e), f"K = {e:g}"
        else:
            hint = did_you_mean(e, ENTRANCES) if isinstance(e, str) else ""
            c.add(f"{path}.entrance", f"{describe(e)} is not an entrance{hint}; expected one of "
                  f"{_words(ENTRANCES)} or a loss coefficient K >= 0")
    fittings = _check_fittings(c, t, path)
    profile = _check_profile(c, t, path, length)
    given_wall = c.quantity(t, "wall_thickness", "thickness", path, positive=True)
    if given_wall is not None:
        wall = given_wall
    if wall is not None and diameter is not None and "wall_thickness" in t and wall >= diameter:
        c.add(f"{path}.wall_thickness", f"{t['wall_thickness']!r} is thicker than the bore; "
              "check the value")
    elastic = c.quantity(t, "elastic_modulus", "modulus", path, positive=True)
    if elastic is None and material is not None and "elastic_modulus" not in t:
        elastic = material.elastic_modulus
    poisson = c.number(t, _spec("lines", "poisson_ratio"), path)
    if "poisson_ratio" not in t and material is not None and material.poisson_ratio is not None:
        poisson = material.poisson_ratio
    support = c.choice(t, _spec("lines", "support"), path)
    rating = c.quantity(t, "pressure_rating", "pressure", path, positive=True)
    valve_ok, valve = _check_valve(c, t, path, diameter, fluid)
    surge_ok, surge = _check_surge(c, t, path)
    if len(c.problems) > n0 or not (valve_ok and surge_ok) or None in (length, diameter, roughness) \
            or len(ends) < 2 or fittings is None or profile is None:
        return None
    return m.Line(
        id=lid, from_node=ends["from"], to_node=ends["to"], length=length, diameter=diameter,
        roughness=roughness, friction_factor=friction_factor, entrance_k=entrance_k,
        entrance_name=entrance_name, fittings=fittings, profile=profile, wall_thickness=wall,
        elastic_modulus=elastic, poisson_ratio=0.3 if poisson is None else float(poisson),
        support=support or "anchored", pressure_rating=rating, valve=valve, surge=surge,
        material=t.get("material") if material is not None else None,
    )


def _check_simulation(c: _Checker, data: dict, has_tank: bool) -> m.SimulationSettings | None:
    if "simulation" not in data:
        return None
    s = c.table(data["simulation"], "simulation")
    if s is None:
        return None
    n0 = len(c.problems)
    c.known_keys(s, SECTIONS["simulation"], "simulation")
    duration = c.quantity(s, "duration", "time", "simulation", positive=True)
    initial = c.choice(s, _spec("simulation", "initial_state"), "simulation")
    stop = c.choice(s, _spec("simulation", "stop_when"), "simulation")
    interval = c.quantity(s, "output_interval", "time", "simulation", positive=True)
    if stop == "drained" and not has_tank:
        c.add("simulation.stop_when", "stop_when = \"drained\" needs at least one reservoir "
              "with kind = \"tank\"")
    if interval is not None and duration is not None and interval > duration:
        c.add("simulation.output_interval", "the output interval is longer than the duration")
    if len(c.problems) > n0 or duration is None:
        return None
    return m.SimulationSettings(duration=duration, initial_state=initial or "steady",
                                stop_when=stop, output_interval=interval)


def check_data(data: Any, file: str | None = None) -> tuple[m.System | None, list[Problem]]:
    """Validate a project file's data and build the core model.

    Parameters
    ----------
    data : dict
        The file as ``tomllib.loads`` returns it.
    file : str, optional
        File name for messages.

    Returns
    -------
    (System or None, list of Problem)
        The system when there are no problems; otherwise ``None`` and every problem found.
    """
    c = _Checker(file)
    if not isinstance(data, dict):
        c.add("", f"expected a TOML document, got {describe(data)}")
        return None, c.problems
    if not _check_root(c, data):
        return None, c.problems
    title, _units, site = _check_project(c, data)
    fluid = _check_fluid(c, data)
    tables = _element_tables(c, data)
    node_ids = {eid: section for section, ts in tables.items() for eid in ts}
    reservoirs = {k: _check_reservoir(c, k, t) for k, t in tables["reservoirs"].items()}
    junctions = {k: _check_junction(c, k, t) for k, t in tables["junctions"].items()}
    receivers = {k: _check_receiver(c, k, t) for k, t in tables["receivers"].items()}
    lines = {k: _check_line(c, k, t, node_ids, fluid) for k, t in tables["lines"].items()}
    if not tables["lines"] and "lines" in data:
        c.add("lines", "no lines: a system needs at least one [lines.ID] table")
    connected = {t.get(end) for t in tables["lines"].values() for end in ("from", "to")
                 if isinstance(t.get(end), str)}
    for jid in tables["junctions"]:
        if jid not in connected:
            c.add(f"junctions.{jid}", f"junction '{jid}' is not connected to any line")
    has_tank = any(isinstance(t, dict) and t.get("kind") == "tank"
                   for t in tables["reservoirs"].values())
    simulation = _check_simulation(c, data, has_tank)
    if c.problems or fluid is None:
        return None, c.problems
    system = m.System(
        title=title, fluid=fluid, reservoirs=reservoirs, junctions=junctions,
        receivers=receivers, lines=lines, atmospheric_pressure=c.atmosphere,
        site_elevation=site, simulation=simulation,
    )
    from workbench.core.topology import TopologyError, build_topology

    try:
        build_topology(system)
    except TopologyError as exc:
        elements = getattr(exc, "elements", ())
        key = ""
        if elements:
            first = elements[0]
            key = f"{node_ids.get(first, 'lines')}.{first}"
        c.add(key or "lines", str(exc))
        return None, c.problems
    return system, c.problems


def build_system(data: Any, file: str | None = None) -> m.System:
    """The core model of a project file's data; raises :class:`ProjectError` listing every
    problem."""
    system, problems = check_data(data, file)
    if problems or system is None:
        raise ProjectError(problems or [Problem(file, "", "the project could not be built")])
    return system
