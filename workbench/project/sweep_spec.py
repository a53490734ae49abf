"""What a what-if sweep asks: the values to vary, the grid of cases, and the pass criteria.

Text from the command line or the app's sweep screen becomes plain data here:

* ``--vary KEYPATH=VALUES`` -> :class:`Axis`. KEYPATH is a schema key path
  (``lines.L1.nominal_size``, ``reservoirs.T1.level``, ``fluid.temperature``,
  ``lines.L1.valve.opening``); VALUES is a comma-separated list of quantities, numbers or
  names as the file would hold them (``80 mm,100 mm,150 mm``; ``3 in,4 in,6 in``), or a range
  with a point count, ends included (``0.5 m..4 m/8``).
* Several axes make a grid (:func:`sweep_cases`), in *sweep order*: the first ``--vary``
  changes slowest, the last fastest, like nested loops written in that order.
* ``--require`` -> :class:`Criterion`, a small grammar of our own, read by a hand-written
  parser (never ``eval``)::

      criterion  := comparison | absence
      comparison := METRIC "(" ELEMENT ")" OP THRESHOLD
      absence    := "no" CODE [ "(" ELEMENT ")" ]
      OP         := "<" | "<=" | ">" | ">="
      THRESHOLD  := a quantity with a unit ("30 min", "10 L/s"), a plain number for
                    dimensionless metrics

  e.g. ``drain_time(T1) < 30 min``, ``flow(L1) >= 10 L/s``, ``no profile.vapor``,
  ``no surge.rapid_closure(L1)``. Metrics are listed in :data:`METRICS`.

Criteria are judged on the JSON objects that ``solve --json`` and ``simulate --json`` print
(issues' published shapes), so the logic is independent of solver internals.
"""

from __future__ import annotations

import difflib
import itertools
import math
import re
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

from workbench.project.schema import ELEMENT_SECTIONS, SECTIONS, FieldSpec

__all__ = [
    "Axis",
    "Case",
    "Criterion",
    "Judgement",
    "METRICS",
    "Metric",
    "SweepSpecError",
    "judge",
    "parse_criterion",
    "parse_vary",
    "resolve_keypath",
    "sweep_cases",
]

#: Largest grid a sweep may ask for (keeps a typo like ``/10000`` x 3 axes from running for hours).
MAX_CASES = 100_000


class SweepSpecError(ValueError):
    """A ``--vary`` or ``--require`` that cannot be used; the message names what was wrong."""


def _suggest(word: str, options) -> str:
    close = difflib.get_close_matches(word, list(options), n=1)
    return f" — did you mean {close[0]!r}?" if close else ""


# --- key paths ------------------------------------------------------------------------------


@dataclass(frozen=True)
class KeyTarget:
    """Where a key path points in schema 1."""

    keypath: str
    section: str
    """Schema section of the key: ``"lines"``, ``"lines.valve"``, ``"fluid"``..."""
    element: str | None
    """Element id for element sections, else ``None``."""
    spec: FieldSpec


_VARYABLE_KINDS_EXCLUDED = {"list", "table"}


def resolve_keypath(keypath: str, data: Mapping | None = None) -> KeyTarget:
    """Find the schema field a key path names; check the element exists when ``data`` is given.

    Raises
    ------
    SweepSpecError
        Naming the part of the path that is wrong, with the nearest valid word.
    """
    parts = keypath.strip().split(".")
    if not keypath.strip() or any(not p for p in parts):
        raise SweepSpecError(f"{keypath!r} is not a key path: expected e.g. 'lines.L1.length'")
    head = parts[0]
    element: str | None = None
    if head in ELEMENT_SECTIONS:
        if len(parts) < 3:
            raise SweepSpecError(
                f"{keypath!r}: expected {head}.ID.KEY, e.g. '{head}.{'L1' if head == 'lines' else 'T1'}."
                f"{SECTIONS[head][0].name}'"
            )
        element = parts[1]
        rest = parts[2:]
        section = head
        if head == "lines" and rest[0] in ("valve", "surge") and len(rest) == 2:
            section = f"lines.{rest[0]}"
            rest = rest[1:]
        elif head == "reservoirs" and rest[0] == "vent" and len(rest) == 2:
            section = "reservoirs.vent"
            rest = rest[1:]
        if data is not None:
            ids = data.get(head) or {}
            if element not in ids:
                known = ", ".join(ids) or "none"
                raise SweepSpecError(
                    f"{keypath!r}: there is no {head[:-1] if head != 'reservoirs' else 'reservoir'} "
                    f"{element!r} in the project (known: {known}){_suggest(element, ids)}"
                )
    elif head in SECTIONS:
        section = head
        rest = parts[1:]
    else:
        choices = [s for s in SECTIONS if "." not in s]
        raise SweepSpecError(f"{keypath!r}: unknown section {head!r}{_suggest(head, choices)}")
    if len(rest) != 1:
        raise SweepSpecError(f"{keypath!r}: expected one key after {'.'.join(parts[: len(parts) - len(rest)])!r}")
    key = rest[0]
    specs = {s.name: s for s in SECTIONS[section]}
    if key not in specs:
        raise SweepSpecError(
            f"{keypath!r}: {section} has no key {key!r}{_suggest(key, specs)}"
        )
    spec = specs[key]
    if spec.kind in _VARYABLE_KINDS_EXCLUDED:
        raise SweepSpecError(f"{keypath!r}: {key} is a {spec.kind} and cannot be varied; vary one of its values")
    return KeyTarget(keypath.strip(), section, element, spec)


# --- values ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class Axis:
    """One ``--vary``: a key path and the values it takes, in order."""

    keypath: str
    texts: tuple[str, ...]
    """The values as typed (or, for a range, as generated in the unit typed)."""
    values: tuple[object, ...]
    """What :func:`workbench.project.document.set_value` receives: text for quantities and
    names, ``float``/``int``/``bool`` for plain numbers, whole numbers and switches."""
    kind: str
    """The field's kind from the schema."""


_NUMBER_PREFIX = re.compile(r"\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*)\Z", re.S)


def _check_value(target: KeyTarget, text: str) -> object:
    """Validate one typed value for the field; return what set_value receives."""
    from workbench.project.units import QUANTITY_KINDS, UnitError, parse_quantity

    spec = target.spec
    where = f"--vary {target.keypath}"
    if spec.kind in QUANTITY_KINDS:
        try:
            parse_quantity(text, spec.kind)
        except UnitError as exc:
            raise SweepSpecError(f"{where}: {exc}") from None
        return text
    if spec.kind in ("number", "int"):
        try:
            number = float(text)
        except ValueError:
            raise SweepSpecError(f"{where}: {text!r} is not a plain number") from None
        if not math.isfinite(number):
            raise SweepSpecError(f"{where}: {text!r} is not a finite number")
        if spec.kind == "int":
            if number != int(number):
                raise SweepSpecError(f"{where}: {text!r} is not a whole number")
            number = int(number)
        if spec.minimum is not None and number < spec.minimum:
            raise SweepSpecError(f"{where}: {text} is below the smallest valid value {spec.minimum:g}")
        if spec.maximum is not None and number > spec.maximum:
            raise SweepSpecError(f"{where}: {text} is above the largest valid value {spec.maximum:g}")
        return number
    if spec.kind == "bool":
        lowered = text.lower()
        if lowered not in ("true", "false"):
            raise SweepSpecError(f"{where}: {text!r} is not true or false")
        return lowered == "true"
    if spec.kind == "choice" and spec.choices and text not in spec.choices:
        raise SweepSpecError(
            f"{where}: {text!r} is not one of {', '.join(spec.choices)}{_suggest(text, spec.choices)}"
        )
    return text


def _affine(unit: str, kind: str) -> tuple[float, float]:
    """SI = scale * x + offset for values typed as ``x unit`` (offsets: degC, gauge...)."""
    from workbench.project.units import parse_quantity

    zero = parse_quantity(f"0 {unit}", kind)
    one = parse_quantity(f"1 {unit}", kind)
    return one - zero, zero


def _range_values(target: KeyTarget, a_text: str, b_text: str, count_text: str) -> list[str]:
    from workbench.project.units import QUANTITY_KINDS, UnitError, parse_quantity

    where = f"--vary {target.keypath}"
    if not count_text.strip().isdigit():
        raise SweepSpecError(f"{where}: the point count after '/' must be a whole number, got {count_text.strip()!r}")
    count = int(count_text)
    if count < 2:
        raise SweepSpecError(f"{where}: a range needs at least 2 points, got {count}")
    kind = target.spec.kind
    if kind in ("number", "int"):
        a, b = _check_value(target, a_text), _check_value(target, b_text)
        points = [a + (b - a) * i / (count - 1) for i in range(count)]
        if kind == "int":
            return [str(int(round(p))) for p in points]
        return [f"{p:.6g}" for p in points]
    if kind not in QUANTITY_KINDS:
        raise SweepSpecError(
            f"{where}: a range needs a quantity or a number; {target.spec.name} holds "
            f"{kind} values: list them with commas instead"
        )
    match = _NUMBER_PREFIX.match(a_text)
    if match is None or not match.group(2):
        raise SweepSpecError(f"{where}: the range start {a_text.strip()!r} must be a number with a unit")
    a_number, unit = float(match.group(1)), match.group(2).strip()
    try:
        b_si = parse_quantity(b_text.strip(), kind)
        parse_quantity(a_text.strip(), kind)
        scale, offset = _affine(unit, kind)
    except UnitError as exc:
        raise SweepSpecError(f"{where}: {exc}") from None
    b_number = (b_si - offset) / scale
    return [f"{a_number + (b_number - a_number) * i / (count - 1):.6g} {unit}" for i in range(count)]


def parse_vary(text: str, data: Mapping | None = None) -> Axis:
    """Read ``KEYPATH=VALUES``.

    Parameters
    ----------
    text : str
        E.g. ``"lines.L1.nominal_size=3 in,4 in,6 in"`` or ``"reservoirs.T1.level=0.5 m..4 m/8"``.
    data : mapping, optional
        The project's plain data, to check that the element exists.

    Examples
    --------
    >>> parse_vary("reservoirs.T1.level=1 m..2 m/3").texts
    ('1 m', '1.5 m', '2 m')
    """
    if "=" not in text:
        raise SweepSpecError(f"--vary {text!r}: expected KEYPATH=VALUES, e.g. 'lines.L1.inner_diameter=80 mm,100 mm'")
    keypath, values_text = text.split("=", 1)
    target = resolve_keypath(keypath, data)
    values_text = values_text.strip()
    if not values_text:
        raise SweepSpecError(f"--vary {target.keypath}: no values after '='")
    if ".." in values_text:
        start, _, end = values_text.partition("..")
        if "/" not in end:
            raise SweepSpecError(
                f"--vary {target.keypath}: a range needs a point count, e.g. '0.5 m..4 m/8'"
            )
        end, _, count = end.rpartition("/")
        texts = _range_values(target, start, end, count)
    else:
        texts = [t.strip() for t in values_text.split(",")]
        if any(not t for t in texts):
            raise SweepSpecError(f"--vary {target.keypath}: an empty value in {values_text!r} (two commas, or a trailing comma?)")
    if len(set(texts)) != len(texts):
        raise SweepSpecError(f"--vary {target.keypath}: a value is listed twice in {values_text!r}")
    values = tuple(_check_value(target, t) for t in texts)
    return Axis(target.keypath, tuple(texts), values, target.spec.kind)


@dataclass(frozen=True)
class Case:
    """One case of a sweep: the settings applied to the project, in sweep order."""

    index: int
    settings: tuple[tuple[str, object], ...]
    """``(keypath, value for set_value)`` pairs."""
    values: dict[str, str]
    """``keypath -> value as typed``: the ``values`` object of the JSON output."""


def sweep_cases(axes: Sequence[Axis]) -> list[Case]:
    """Every combination of the axes' values, the first axis changing slowest.

    Examples
    --------
    >>> a = Axis("fluid.temperature", ("10 degC", "20 degC"), ("10 degC", "20 degC"), "temperature")
    >>> b = Axis("lines.L1.valve.opening", ("0.5", "1"), (0.5, 1.0), "number")
    >>> [c.values["lines.L1.valve.opening"] for c in sweep_cases([a, b])]
    ['0.5', '1', '0.5', '1']
    """
    if not axes:
        raise SweepSpecError("nothing to vary: give at least one --vary KEYPATH=VALUES")
    seen: set[str] = set()
    for axis in axes:
        if axis.keypath in seen:
            raise SweepSpecError(f"--vary {axis.keypath} is given twice: list all its values in one --vary")
        seen.add(axis.keypath)
    total = math.prod(len(a.texts) for a in axes)
    if total > MAX_CASES:
        raise SweepSpecError(f"the sweep has {total} cases, more than the limit of {MAX_CASES}")
    cases = []
    for index, combo in enumerate(itertools.product(*(range(len(a.texts)) for a in axes))):
        settings = tuple((a.keypath, a.values[i]) for a, i in zip(axes, combo, strict=True))
        values = {a.keypath: a.texts[i] for a, i in zip(axes, combo, strict=True)}
        cases.append(Case(index, settings, values))
    return cases


# --- criteria -------------------------------------------------------------------------------


@dataclass(frozen=True)
class Metric:
    """A named result a criterion can compare."""

    name: str
    kind: str
    """Quantity kind of the threshold, or ``"number"`` for dimensionless results."""
    element_section: str
    """Section whose ids the argument names (``"lines"``, ``"reservoirs"``, ``"nodes"``)."""
    needs_simulation: bool
    extract: Callable[[Mapping | None, Mapping | None, str], float | None]
    """``(steady, simulation, element) -> SI value`` (``None`` when the result is missing)."""
    help: str


def _steady_line(key: str):
    def extract(steady, simulation, element):
        try:
            return float(steady["lines"][element][key])
        except (KeyError, TypeError, ValueError):
            return None

    return extract


def _steady_node(key: str):
    def extract(steady, simulation, element):
        try:
            return float(steady["nodes"][element][key])
        except (KeyError, TypeError, ValueError):
            return None

    return extract


def _lowest_profile_pressure(steady, simulation, element):
    """Lowest gauge pressure along a line's profile in the steady solution [Pa]."""
    try:
        values = [float(v) for v in steady["lines"][element]["profile"]["pressure_pa"] if v is not None]
    except (KeyError, TypeError, ValueError):
        return None
    return min(values) if values else None


def _sim_line(key: str):
    def extract(steady, simulation, element):
        try:
            return float(simulation["lines"][element][key])
        except (KeyError, TypeError, ValueError):
            return None

    return extract


def _event_time(code: str):
    """Time of the first event ``code`` for the element; ``inf`` when it never happened."""

    def extract(steady, simulation, element):
        if simulation is None:
            return None
        for event in simulation.get("events", ()):
            if event.get("code") == code and event.get("element") == element:
                return float(event["time_s"])
        return math.inf

    return extract


def _sim_level(key: str):
    """A tank's level from the simulation's summary: ``max_level_m``, ``min_level_m`` or
    ``final_level_m`` [m above its bottom]."""

    def extract(steady, simulation, element):
        try:
            return float(simulation["levels"][element][key])
        except (KeyError, TypeError, ValueError):
            return None

    return extract


#: Named results for ``--require``: name -> Metric.
METRICS: dict[str, Metric] = {
    m.name: m
    for m in (
        Metric("flow", "flow", "lines", False, _steady_line("flow_m3_s"), "steady flow in a line (signed, from -> to)"),
        Metric("velocity", "velocity", "lines", False, _steady_line("velocity_m_s"), "steady mean velocity in a line"),
        Metric("head_loss", "head", "lines", False, _steady_line("head_loss_m"), "steady head loss along a line"),
        Metric("reynolds", "number", "lines", False, _steady_line("reynolds"), "steady Reynolds number of a line"),
        Metric("lowest_pressure", "pressure", "lines", False, _lowest_profile_pressure,
               "lowest steady gauge pressure along a line's profile"),
        Metric("pressure", "pressure", "nodes", False, _steady_node("pressure_pa"), "steady gauge pressure at a node"),
        Metric("head", "head", "nodes", False, _steady_node("head_m"), "steady piezometric head at a node"),
        Metric("drain_time", "time", "reservoirs", True, _event_time("tank.drained"),
               "time for a tank to reach its min_level (infinite if it did not in the run)"),
        Metric("overflow_time", "time", "reservoirs", True, _event_time("tank.overflow"),
               "time for a tank to reach its height (infinite if it did not in the run)"),
        Metric("max_level", "length", "reservoirs", True, _sim_level("max_level_m"),
               "highest level of a tank during the simulation (above its bottom)"),
        Metric("min_level", "length", "reservoirs", True, _sim_level("min_level_m"),
               "lowest level of a tank during the simulation (above its bottom)"),
        Metric("final_level", "length", "reservoirs", True, _sim_level("final_level_m"),
               "level of a tank at the end of the simulation (above its bottom)"),
        Metric("min_gas_pressure", "pressure", "reservoirs", True,
               _sim_level("min_gas_pressure_pa"),
               "lowest gauge pressure of a tank's gas space during the simulation (a tank "
               "with a vent)"),
        Metric("max_gas_pressure", "pressure", "reservoirs", True,
               _sim_level("max_gas_pressure_pa"),
               "highest gauge pressure of a tank's gas space during the simulation"),
        Metric("max_pressure", "pressure", "lines", True, _sim_line("max_pressure_pa"),
               "highest gauge pressure on a line during the simulation"),
        Metric("min_pressure", "pressure", "lines", True, _sim_line("min_pressure_pa"),
               "lowest gauge pressure on a line during the simulation"),
    )
}

_OPERATORS: dict[str, Callable[[float, float], bool]] = {
    "<=": lambda a, b: a <= b,
    ">=": lambda a, b: a >= b,
    "<": lambda a, b: a < b,
    ">": lambda a, b: a > b,
}

_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")
_CODE = re.compile(r"[a-z_][a-z0-9_]*(?:\.[a-z_][a-z0-9_]*)*")
_ID = re.compile(r"[A-Za-z0-9_][A-Za-z0-9_\-]*")


@dataclass(frozen=True)
class Criterion:
    """One ``--require``: a comparison of a named result, or the absence of a warning code."""

    text: str
    metric: str | None = None
    element: str | None = None
    op: str | None = None
    threshold: float | None = None
    """Threshold in SI units."""
    threshold_text: str = ""
    absent_code: str | None = None
    """For ``no CODE``: the warning or event code that must not appear."""

    @property
    def needs_simulation(self) -> bool:
        return self.metric is not None and METRICS[self.metric].needs_simulation


class _Reader:
    """A cursor over the criterion text for the hand-written parser."""

    def __init__(self, text: str) -> None:
        self.text = text
        self.pos = 0

    def skip(self) -> None:
        while self.pos < len(self.text) and self.text[self.pos].isspace():
            self.pos += 1

    def take(self, pattern: re.Pattern) -> str | None:
        self.skip()
        match = pattern.match(self.text, self.pos)
        if match is None:
            return None
        self.pos = match.end()
        return match.group(0)

    def literal(self, word: str) -> bool:
        self.skip()
        if self.text.startswith(word, self.pos):
            self.pos += len(word)
            return True
        return False

    def rest(self) -> str:
        self.skip()
        return self.text[self.pos :].strip()

    def error(self, expected: str) -> SweepSpecError:
        found = self.rest()
        return SweepSpecError(
            f"--require {self.text!r}: expected {expected} at character {self.pos + 1}"
            + (f", found {found[:20]!r}" if found else ", found the end")
        )


def _element_arg(reader: _Reader, required: bool) -> str | None:
    if not reader.literal("("):
        if required:
            raise reader.error("'(' and an element id")
        return None
    element = reader.take(_ID)
    if element is None:
        raise reader.error("an element id")
    if not reader.literal(")"):
        raise reader.error("')'")
    return element


def parse_criterion(text: str) -> Criterion:
    """Read one ``--require``.

    Examples
    --------
    >>> c = parse_criterion("drain_time(T1) < 30 min")
    >>> c.metric, c.element, c.op, c.threshold
    ('drain_time', 'T1', '<', 1800.0)
    >>> parse_criterion("no profile.vapor").absent_code
    'profile.vapor'
    """
    reader = _Reader(text)
    first = reader.take(_NAME)
    if first is None:
        raise reader.error("a result name (" + ", ".join(METRICS) + ") or 'no CODE'")
    if first == "no":
        code = reader.take(_CODE)
        if code is None:
            raise reader.error("a warning code such as 'profile.vapor'")
        element = _element_arg(reader, required=False)
        if reader.rest():
            raise reader.error("the end of the criterion")
        return Criterion(text=text.strip(), absent_code=code, element=element)
    if first not in METRICS:
        raise SweepSpecError(
            f"--require {text!r}: unknown result {first!r}{_suggest(first, METRICS)}; "
            f"known: {', '.join(METRICS)}, or 'no CODE'"
        )
    metric = METRICS[first]
    element = _element_arg(reader, required=True)
    op = None
    for candidate in _OPERATORS:  # two-character operators are tried first
        if reader.literal(candidate):
            op = candidate
            break
    if op is None:
        raise reader.error("a comparison: <, <=, > or >=")
    threshold_text = reader.rest()
    if not threshold_text:
        raise reader.error(f"a threshold ({'a number' if metric.kind == 'number' else 'a ' + metric.kind + ' with a unit'})")
    if metric.kind == "number":
        try:
            threshold = float(threshold_text)
        except ValueError:
            raise SweepSpecError(f"--require {text!r}: {threshold_text!r} is not a plain number") from None
    else:
        from workbench.project.units import UnitError, parse_quantity

        try:
            threshold = parse_quantity(threshold_text, metric.kind)
        except UnitError as exc:
            raise SweepSpecError(f"--require {text!r}: {exc}") from None
    if not math.isfinite(threshold):
        raise SweepSpecError(f"--require {text!r}: the threshold must be finite")
    return Criterion(text.strip(), first, element, op, threshold, threshold_text)


def check_criteria(criteria: Sequence[Criterion], data: Mapping, has_simulation: bool) -> None:
    """Check that each criterion names an existing element of the right kind.

    Raises
    ------
    SweepSpecError
        For a missing element, or a simulation result asked of a project without one.
    """
    for c in criteria:
        if c.metric is None:
            if c.element is not None and not any(c.element in (data.get(s) or {}) for s in ELEMENT_SECTIONS):
                raise SweepSpecError(f"--require {c.text!r}: no element {c.element!r} in the project")
            continue
        metric = METRICS[c.metric]
        if metric.needs_simulation and not has_simulation:
            raise SweepSpecError(
                f"--require {c.text!r}: {c.metric} comes from a simulation, which this sweep does "
                "not run (no [simulation] section in the project, or a steady-only sweep)"
            )
        sections = ("reservoirs", "junctions", "receivers") if metric.element_section == "nodes" else (metric.element_section,)
        ids = [i for s in sections for i in (data.get(s) or {})]
        if c.element not in ids:
            what = "node" if metric.element_section == "nodes" else metric.element_section.rstrip("s")
            raise SweepSpecError(
                f"--require {c.text!r}: {c.element!r} is not a {what} of the project"
                f"{_suggest(c.element or '', ids)}"
            )
        if c.metric in ("drain_time", "overflow_time"):
            kind = ((data.get("reservoirs") or {}).get(c.element) or {}).get("kind")
            if kind != "tank":
                raise SweepSpecError(f"--require {c.text!r}: {c.element!r} is not a tank (its level never changes)")


@dataclass(frozen=True)
class Judgement:
    """How a case fared against one criterion."""

    criterion: Criterion
    passed: bool
    value: float | None
    """The result compared [SI], or ``None`` for an absence check."""
    note: str


def _codes(result: Mapping | None, element: str | None):
    if not result:
        return []
    found = []
    for item in list(result.get("warnings", ())) + list(result.get("events", ())):
        if element is None or item.get("element") == element:
            found.append(item.get("code"))
    return found


def judge(criteria: Sequence[Criterion], steady: Mapping | None, simulation: Mapping | None) -> tuple[bool | None, list[Judgement]]:
    """Judge one case: ``(pass, details)``; pass is ``None`` when there are no criteria."""
    if not criteria:
        return None, []
    details = []
    for c in criteria:
        if c.absent_code is not None:
            hits = [code for code in _codes(steady, c.element) + _codes(simulation, c.element)
                    if code == c.absent_code]
            note = f"{c.absent_code} found" if hits else f"no {c.absent_code}"
            details.append(Judgement(c, not hits, None, note))
            continue
        value = METRICS[c.metric].extract(steady, simulation, c.element)
        if value is None:
            details.append(Judgement(c, False, None, f"{c.metric}({c.element}) not in the results"))
            continue
        passed = _OPERATORS[c.op](value, c.threshold)
        details.append(Judgement(c, passed, value, ""))
    return all(d.passed for d in details), details
