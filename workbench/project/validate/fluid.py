"""``[fluid]``: water, a catalogue liquid, a solution at its strength, or a custom liquid's
own numbers, read into :class:`~workbench.core.model.FluidProps` by :mod:`workbench.core.fluid`
(imported when a file is checked, not at start-up)."""

from __future__ import annotations

import math
import re

from workbench.core import model as m
from workbench.project.schema import SECTIONS
from workbench.project.validate.checker import Checker, describe, field_spec, toml_example

__all__ = ["check_fluid", "solution_fraction"]


def check_fluid(c: Checker, data: dict) -> m.FluidProps | None:
    section = c.table(data.get("fluid", {}), "fluid")
    if section is None:
        return None
    c.known_keys(section, SECTIONS["fluid"], "fluid")
    from workbench.core import fluid as core_fluid

    catalogue = tuple(k for k in core_fluid.CATALOGUE if k != "water")
    solutions = tuple(core_fluid.SOLUTIONS)
    kinds = ("water", *catalogue, *solutions, "custom")
    kind = c.choice(section, field_spec("fluid", "kind"), "fluid", choices=kinds)
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
        fraction = solution_fraction(c, section, core_fluid.SOLUTIONS.get(kind), kind)
        if temperature is None:
            if "temperature" not in section:
                c.add("fluid.temperature", f"missing required key 'temperature' for {kind}, "
                      f"e.g. temperature = \"{c.example('20 degC', 'temperature')}\"")
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
            c.add("fluid.temperature", c.words(exc.args[0] if exc.args else exc))
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


def solution_fraction(c: Checker, section: dict, entry, kind: str) -> float | None:
    """The concentration key of a solution kind (``mass_fraction`` or ``salinity``), checked
    against the range of the kind's fits; ``None`` (with a problem) when missing or wrong."""
    if entry is None:
        return None
    key = entry.parameter
    path = f"fluid.{key}"
    spec = field_spec("fluid", key)
    if key not in section:
        c.add(path, f"missing required key '{key}' for {kind} ({entry.range_text()}), e.g. "
              f"{key} = {toml_example(spec)}")
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
