"""The checker every section's validation writes to, and the message helpers they share.

:class:`Checker` collects :class:`~workbench.project.problems.Problem` records while one file's
data is read: each reading method (:meth:`Checker.quantity`, :meth:`Checker.number`,
:meth:`Checker.choice`, ...) returns the value in SI units, or ``None`` after adding a
problem with its key path, what was found and what was expected.
"""

from __future__ import annotations

import math
import re
from typing import Any

from workbench.core import model as m
from workbench.printable import printable
from workbench.project.problems import Problem
from workbench.project.schema import LIST_ITEMS, SECTIONS, FieldSpec
from workbench.project.units import QUANTITY_KINDS, UnitError, parse_quantity
from workbench.project.validate.plausible import number_problem, quantity_problem

__all__ = ["ID_PATTERN", "QUANTITY_LIMIT", "Checker", "describe", "did_you_mean", "field_spec",
           "toml_example", "words"]

#: Element ids: letters, digits, '_' and '-' (TOML bare keys), starting with a letter or digit.
ID_PATTERN = re.compile(r"[A-Za-z0-9][A-Za-z0-9_-]*\Z")

#: Largest magnitude of any quantity in SI units: far beyond any plant (a million km, ten
#: million bar), small enough that the solvers' arithmetic cannot overflow on it.
QUANTITY_LIMIT = 1e12


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


class Checker:
    """Collects problems while reading one file's data."""

    def __init__(self, file: str | None, unit_system: str = "SI"):
        self.file = file
        self.problems: list[Problem] = []
        self.atmosphere = m.P_ATM_SEA_LEVEL
        self.unit_system = unit_system
        """Display units ("SI" or "US") that messages write computed numbers in."""

    def add(self, key: str, message: str) -> None:
        self.problems.append(Problem(self.file, key, message))

    def words(self, text: object) -> str:
        """A core message in the display units: a
        :class:`~workbench.core.finding_text.KeptText` is written again from its template and
        SI values (any other text is returned as it is)."""
        template = getattr(text, "template", "")
        if not template or self.unit_system == "SI":
            return str(text)
        from workbench.core.finding_text import fill

        return fill(template, text.values, lambda v, kind, digits: self.shown(v, kind, digits))

    def example(self, text: str, kind: str) -> str:
        """An example quantity (SI, as the schema writes it) in the display units, e.g.
        ``example("50 kPa", "pressure") -> "7.25 psi"`` on a US project."""
        from workbench.project.units import example_text

        return example_text(text, kind, self.unit_system)

    def shown(self, value_si: float, kind: str, digits: int = 4) -> str:
        """An SI value as text in the display units, e.g. ``"4.028 in"`` on a US project."""
        from workbench.project.units import format_quantity

        return format_quantity(value_si, kind, self.unit_system, digits)

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
                shown = toml_example(spec)
                if spec.kind in QUANTITY_KINDS and spec.example and not spec.choices:
                    shown = f"\"{self.example(spec.example, spec.kind)}\""
                example = f", e.g. {spec.name} = {shown}" if spec.example or spec.choices else ""
                self.add(where, f"missing required key '{spec.name}' ({spec.help}){example}")

    # -- values ----------------------------------------------------------------------
    def quantity(self, table: dict, name: str, kind: str, path: str, *, required: bool = False,
                 positive: bool = False, nonnegative: bool = False) -> float | None:
        key = f"{path}.{name}"
        if name not in table:
            if required:
                self.add(key, f"missing required key '{name}' (a {QUANTITY_KINDS[kind].name}, "
                         f"e.g. {name} = \"{self.example(QUANTITY_KINDS[kind].example, kind)}\")")
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
        implausible = quantity_problem(key, kind, table[name], value, self.atmosphere,
                                       self.unit_system)
        if implausible:
            self.add(key, implausible)
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
        implausible = number_problem(key, value)
        if implausible:
            self.add(key, implausible)
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
        return printable(value)  # the model carries text safe to print; the file keeps its own

    def choice(self, table: dict, spec: FieldSpec, path: str, choices=None) -> str | None:
        choices = tuple(choices if choices is not None else spec.choices)
        key = f"{path}.{spec.name}"
        if spec.name not in table:
            return spec.default  # type: ignore[return-value]
        value = table[spec.name]
        if not isinstance(value, str):
            self.add(key, f"expected one of {words(choices)}, got {describe(value)}")
            return None
        if value not in choices:
            self.add(key, f"'{value}' is not valid; expected one of {words(choices)}"
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


def words(choices) -> str:
    """Choices in quotes for messages: ``'a', 'b'``."""
    return ", ".join(f"'{c}'" for c in choices) if choices else "(none)"


def toml_example(spec: FieldSpec) -> str:
    """A field's example value as written in TOML (text in quotes)."""
    if spec.choices:
        return f"\"{spec.choices[0]}\""
    if spec.kind in {"number", "int"}:
        return spec.example
    return f"\"{spec.example}\""


def field_spec(section: str, name: str) -> FieldSpec:
    """The schema's :class:`FieldSpec` of ``name`` in ``section`` (a table or list item)."""
    for spec in SECTIONS.get(section, ()) or LIST_ITEMS.get(section, ()):
        if spec.name == name:
            return spec
    raise KeyError(f"{section}.{name}")
