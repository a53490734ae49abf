"""Quantities with units at the edge of the program: parsing what users type, and display.

Project files and forms hold quantities as text with a unit (``"150 mm"``, ``"6 in"``,
``"20 degC"``, ``"3.5 m3/h"``, ``"120 gpm"``, ``"1.5 barg"``). This module turns that text
into SI floats for the core and SI floats back into text in the user's display system.

Rules, chosen so that nothing a file says is misread silently:

* the number is read by a strict pattern, never by pint's expression evaluator, so
  ``"1,5 m"`` and ``"1 000 m"`` (which pint reads as 15 m and 0 m) are refused, as are
  expressions (``"2*3 m"``), non-finite values and numbers inside the unit;
* a quantity that has a dimension must carry a unit: a bare ``12`` is refused;
* pressures are gauge unless the unit says absolute (``bara``, ``psia``, ``kPa abs``,
  ``kPa(a)``); ``barg``, ``psig``, ``kPa(g)`` say gauge explicitly. pint itself reads
  ``"kPa(g)"`` as kilopascal times gram, so the reference words are taken off first.

One pint registry serves the whole program; it is built on first use because building it
costs a few tenths of a second (the terminal app must paint before that), from pint's cache
in the user's cache folder when there is one. pint is imported without its optional Dask
support (:func:`import_pint`), which would otherwise import Dask whenever it is installed.
What pint answered (texts read, conversion factors) is kept between runs by
:mod:`workbench.project.unit_memo`, so a run that meets only known texts and units does not
import pint at all.
"""

from __future__ import annotations

import math
import os
import re
import sys
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import TYPE_CHECKING, Literal

from workbench.core.finding_text import number_text

if TYPE_CHECKING:  # pragma: no cover
    import pint

__all__ = [
    "QUANTITY_KINDS",
    "ParsedQuantity",
    "QuantityKind",
    "UnitError",
    "display_unit",
    "example_text",
    "format_quantity",
    "get_registry",
    "import_pint",
    "parse_pressure",
    "parse_quantity",
    "parse_value",
    "to_display",
    "unit_memo",
]

#: Standard atmospheric pressure at sea level [Pa] (ISO 2533); the default site atmosphere.
P_ATM_SEA_LEVEL = 101325.0

#: Trade units that pint lacks, in pint's definition syntax.
_EXTRA_DEFINITIONS = (
    "gpm = gallon / minute",  # US liquid gallons per minute (pint's gallon is the US gallon)
    "gph = gallon / hour",
    "mgd = 1e6 * gallon / day",  # million US gallons per day
    "lpm = liter / minute",
    "lps = liter / second",
    "m3 = meter ** 3",
    "m2 = meter ** 2",
    "cm3 = centimeter ** 3",
    "mm2 = millimeter ** 2",
    "cm2 = centimeter ** 2",
    "ft3 = foot ** 3",
    "ft2 = foot ** 2",
    "in2 = inch ** 2",
    "in3 = inch ** 3",
    "cfs = foot ** 3 / second",
    "cfm = foot ** 3 / minute",
    "mWC = meter_H2O",
    "ftWC = foot_H2O",
)


def import_pint():
    """The ``pint`` module, imported without its optional Dask support.

    ``pint.compat`` imports ``dask.base`` at import time whenever Dask is installed (it is,
    with the ``cluster`` and ``test`` extras), which about doubles the cost of
    ``import pint``; pint has no switch for it and the program never gives pint Dask arrays.
    While pint is imported, ``sys.modules["dask"]`` is ``None``, the documented marker for
    a module that is not there (``importlib.util.find_spec`` then returns ``None``), and
    the marker is taken away at once, so a later ``import dask`` (a sweep on a cluster)
    imports the real package. If Dask or pint is already loaded nothing is changed.
    """
    if "pint" in sys.modules or "dask" in sys.modules:
        import pint

        return pint
    sys.modules["dask"] = None  # type: ignore[assignment]
    try:
        import pint
    finally:
        if "dask" in sys.modules and sys.modules["dask"] is None:
            del sys.modules["dask"]
    return pint


@lru_cache(maxsize=1)
def get_registry() -> "pint.UnitRegistry":
    """The program's one pint registry, built on first use, with the trade units added.

    pint's own cache of its parsed definition files (``cache_folder``) is kept in the
    user's cache folder (:func:`registry_cache_folder`): building the registry from it takes
    about a sixth of the time of parsing the files again. Without a usable folder, or if
    the cache cannot be read, the registry is built without it.
    """
    pint = import_pint()
    folder = registry_cache_folder(pint.__version__)
    try:
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=folder)
    except Exception:  # noqa: BLE001 - a damaged or half-written cache: parse the files again
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    for definition in _EXTRA_DEFINITIONS:
        ureg.define(definition)
    return ureg


def registry_cache_folder(pint_version: str) -> Path | None:
    """The folder for pint's registry cache, or ``None`` when there is no writable one.

    ``$WORKBENCH_CACHE_DIR`` if set (empty: no cache), else ``$XDG_CACHE_HOME`` or
    ``~/.cache`` (``%LOCALAPPDATA%`` on Windows), then ``gravity-workbench/pint-VERSION``:
    one folder per pint version, so a new pint never reads an older pint's cache.
    """
    base = _cache_base()
    if base is None:
        return None
    folder = base / f"pint-{pint_version}"
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError:
        return None
    return folder if os.access(folder, os.W_OK | os.X_OK) else None


def _cache_base() -> Path | None:
    """The program's cache folder (see :func:`registry_cache_folder`), ``None`` when off."""
    override = os.environ.get("WORKBENCH_CACHE_DIR")
    if override is not None:
        return Path(override) if override else None
    if os.name == "nt" and os.environ.get("LOCALAPPDATA"):
        return Path(os.environ["LOCALAPPDATA"]) / "gravity-workbench"
    return Path(os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache") / "gravity-workbench"


@lru_cache(maxsize=1)
def unit_memo():
    """The process's :class:`~workbench.project.unit_memo.UnitMemo`, read on first use."""
    from workbench.project.unit_memo import UnitMemo, memo_key, memo_path

    base = _cache_base()
    key = memo_key(Path(__file__))
    return UnitMemo(None if base is None else memo_path(base, key), key)


class UnitError(ValueError):
    """Text that is not a valid quantity of the expected kind; the message says why in words."""


@dataclass(frozen=True)
class QuantityKind:
    """What a quantity field holds: its dimension, SI unit and display units."""

    name: str
    """Word used in messages, e.g. ``"length"``."""
    si_unit: str
    """pint unit the core uses for this kind."""
    display_si: str
    """Display unit in the SI system (a pint unit)."""
    display_us: str
    """Display unit in the US customary system (a pint unit)."""
    example: str
    """A valid example for messages and forms."""
    label_si: str = ""
    """Text shown after the number when it differs from the pint unit."""
    label_us: str = ""


#: Quantity kinds used by the schema, forms and output: kind -> QuantityKind.
QUANTITY_KINDS: dict[str, QuantityKind] = {
    "length": QuantityKind("length", "m", "m", "ft", "120 m"),
    "diameter": QuantityKind("diameter", "m", "mm", "inch", "102.3 mm", "mm", "in"),
    "roughness": QuantityKind("roughness", "m", "mm", "inch", "0.045 mm", "mm", "in"),
    "thickness": QuantityKind("wall thickness", "m", "mm", "inch", "6 mm", "mm", "in"),
    "elevation": QuantityKind("elevation", "m", "m", "ft", "12 m"),
    "head": QuantityKind("head", "m", "m", "ft", "4.5 m"),
    "pressure": QuantityKind("pressure", "Pa", "kPa", "psi", "50 kPa"),
    "pressure_abs": QuantityKind(
        "absolute pressure", "Pa", "kPa", "psi", "2.34 kPa", "kPa abs", "psia"
    ),
    "modulus": QuantityKind("modulus", "Pa", "GPa", "ksi", "207 GPa"),
    "flow": QuantityKind("flow", "m^3/s", "L/s", "gpm", "12 L/s", "L/s", "gpm"),
    # Air through a tank's vent: a gas volume flow, shown as vents are rated (m3/h; ft3/min
    # in US practice), never in liquid units such as gpm.
    "gas_flow": QuantityKind("gas flow", "m^3/s", "m^3/h", "cfm", "300 m3/h", "m3/h", "ft3/min"),
    # A valve's Kv is the flow [m^3/h] of water at 1 bar drop (IEC 60534); kept in m^3/h on
    # display in both systems because converting its units does not give the US Cv.
    "kv": QuantityKind("flow coefficient", "m^3/s", "m^3/h", "m^3/h", "250 m3/h", "m3/h", "m3/h"),
    "velocity": QuantityKind("velocity", "m/s", "m/s", "ft/s", "1.5 m/s"),
    "time": QuantityKind("time", "s", "s", "s", "30 s"),
    "temperature": QuantityKind("temperature", "K", "degC", "degF", "20 degC"),
    "density": QuantityKind("density", "kg/m^3", "kg/m^3", "lb/ft^3", "998 kg/m3", "kg/m3", "lb/ft3"),
    "viscosity": QuantityKind("viscosity", "Pa*s", "mPa*s", "cP", "1.0 mPa*s", "mPa*s", "cP"),
    "volume": QuantityKind("volume", "m^3", "m^3", "gallon", "12 m3", "m3", "gal"),
    # A small liquid or vapour volume (a vapour cavity), in litres rather than cubic metres.
    "small_volume": QuantityKind("volume", "m^3", "L", "gallon", "12 L", "L", "gal"),
    "area": QuantityKind("area", "m^2", "m^2", "ft^2", "3 m2", "m2", "ft2"),
    "angle": QuantityKind("angle", "radian", "degree", "degree", "60 deg", "deg", "deg"),
    # Absolute salinity of seawater: mass of dissolved salt per mass of seawater, kept as a
    # fraction [kg/kg] in the core and shown in g/kg as oceanographic tables give it.
    "salinity": QuantityKind("salinity", "", "g/kg", "g/kg", "35 g/kg"),
}

#: Words for dimensions a user may type by mistake (for "expected X, got Y").
_DIMENSION_WORDS = (
    ("m", "length"),
    ("Pa", "pressure"),
    ("m^3/s", "flow"),
    ("m/s", "velocity"),
    ("s", "time"),
    ("K", "temperature"),
    ("kg/m^3", "density"),
    ("Pa*s", "viscosity"),
    ("m^2/s", "kinematic viscosity"),
    ("m^3", "volume"),
    ("m^2", "area"),
    ("kg", "mass"),
    ("kg/s", "mass flow"),
    ("N", "force"),
    ("J", "energy"),
    ("W", "power"),
    ("1/s", "frequency"),
)

_ANGLE_UNITS = {"degree", "radian", "arcminute", "arcsecond", "gradian", "turn"}

Reference = Literal["gauge", "absolute"]

# A plain decimal number: no thousands separators, no expressions, optional exponent.
_NUMBER = re.compile(r"\s*(?P<num>[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)(?P<rest>.*)\Z", re.S)
_WORD_REFERENCE = re.compile(
    r"^(?P<base>.*?)\s*(?:\(\s*(?P<paren>g|a|abs|gauge|absolute)\s*\)|\s(?P<word>abs|absolute|gauge|g|a))\s*$",
    re.I,
)
_EXPONENT = re.compile(r"(\*\*|\^)\s*[+-]?\d+(\.\d+)?")
#: Longest unit text handed to pint [characters]: the longest unit a file needs is a couple
#: of dozen characters ("kilogram / meter / second ** 2"), while pint's tokenizer takes
#: seconds of CPU on a unit of a few hundred thousand characters ("m m m ...").
MAX_UNIT_CHARS = 100


@dataclass(frozen=True)
class ParsedQuantity:
    """A quantity read from text: its SI value and, for pressures, the stated reference."""

    value: float
    """Value in the kind's SI unit."""
    reference: Reference | None = None
    """``"gauge"`` or ``"absolute"`` when the unit said so; ``None`` when it did not."""


def _a(word: str) -> str:
    """``"a length"``, ``"an elevation"``."""
    return f"an {word}" if word[:1].lower() in "aeiou" else f"a {word}"


def _dimension_word(units: "pint.Unit") -> str:
    ureg = get_registry()
    dim = units.dimensionality
    if not dim:
        return "a plain number"
    for unit, word in _DIMENSION_WORDS:
        if ureg.parse_units(unit).dimensionality == dim:
            return _a(word)
    return f"a quantity in {dim}"


def _split_number(text: str, what: str) -> tuple[float, str]:
    match = _NUMBER.match(text)
    if match is None:
        stripped = text.strip()
        if re.match(r"^[+-]?(inf|infinity|nan)\b", stripped, re.I):
            raise UnitError(f"{text!r} is not {_a(what)}: the value must be a finite number")
        raise UnitError(f"{text!r} is not {_a(what)}: it must start with a number, e.g. "
                        f"{_example(what)!r}")
    number, rest = match.group("num"), match.group("rest")
    if rest[:1] in {",", "_"} or re.match(r"\s+\d", rest) or rest[:1].isdigit():
        raise UnitError(
            f"{text!r} is not {_a(what)}: write the number without spaces or separators and "
            "with a decimal point (e.g. 1000 or 1.5)"
        )
    value = float(number)
    if not math.isfinite(value):
        raise UnitError(f"{text!r} is not {_a(what)}: the value must be a finite number")
    return value, rest.strip()


def _example(what: str) -> str:
    for kind in QUANTITY_KINDS.values():
        if kind.name == what:
            return kind.example
    return "12 m"


def _parse_units(text: str, unit_text: str, what: str) -> "pint.Unit":
    if not re.match(r"^[A-Za-z°µμΩ%]", unit_text):
        raise UnitError(f"{text!r} is not {_a(what)}: expected a number followed by a unit, "
                        f"e.g. {_example(what)!r}")
    if not re.fullmatch(r"[A-Za-z0-9_°µμΩ%\s\*/\^\(\)\.·-]+", unit_text):
        raise UnitError(f"{text!r} is not {_a(what)}: the unit {unit_text!r} has characters a "
                        "unit cannot have")
    without_exponents = _EXPONENT.sub("", unit_text)
    if re.search(r"(^|[^A-Za-z0-9_])[\d.]", without_exponents):
        raise UnitError(f"{text!r} is not {_a(what)}: numbers are not allowed inside the unit "
                        f"{unit_text!r}; write one number, then the unit")
    ureg = get_registry()
    import pint

    try:
        return ureg.parse_units(unit_text.replace("·", "*"))
    except pint.UndefinedUnitError as exc:
        names = getattr(exc, "unit_names", None) or (unit_text,)
        name = names[0] if isinstance(names, (list, tuple)) else names
        raise UnitError(f"{text!r} is not {_a(what)}: unknown unit {name!r}") from None
    except Exception:  # pint's tokenizer raises assorted errors on malformed text
        raise UnitError(f"{text!r} is not {_a(what)}: cannot read the unit {unit_text!r}") from None


def _split_reference(unit_text: str) -> tuple[str, Reference | None]:
    """Take gauge/absolute words or suffixes off a pressure unit."""
    match = _WORD_REFERENCE.match(unit_text)
    if match and match.group("base"):
        word = (match.group("paren") or match.group("word")).lower()
        return match.group("base"), ("gauge" if word.startswith("g") else "absolute")
    return unit_text, None


def _pressure_suffix(unit_text: str) -> tuple[str, Reference] | None:
    """``barg``/``psia``/``kPag``...: a pressure unit with a g or a suffix, when that parses."""
    if len(unit_text) < 2 or unit_text[-1] not in "gaGA" or not unit_text[:-1].strip():
        return None
    ureg = get_registry()
    try:
        base = ureg.parse_units(unit_text[:-1])
    except Exception:  # not a unit without the suffix either: let the caller report it
        return None
    if base.dimensionality != ureg.parse_units("Pa").dimensionality:
        return None
    return unit_text[:-1], ("gauge" if unit_text[-1] in "gG" else "absolute")


def _is_pressure_with_reference(unit_text: str) -> bool:
    base, stated = _split_reference(unit_text)
    if stated is None:
        return _pressure_suffix(unit_text) is not None
    ureg = get_registry()
    try:
        return ureg.parse_units(base).dimensionality == ureg.parse_units("Pa").dimensionality
    except Exception:  # not a unit at all: the caller reports it
        return False


def parse_value(text: object, kind: str) -> ParsedQuantity:
    """Read a quantity of ``kind`` from text; keep a pressure's reference as stated.

    Parameters
    ----------
    text : str
        What the user typed, e.g. ``"150 mm"`` or ``"1.5 barg"``.
    kind : str
        A key of :data:`QUANTITY_KINDS`.

    Returns
    -------
    ParsedQuantity
        The value in the kind's SI unit [e.g. m, Pa, m^3/s, K] and the pressure reference.

    Raises
    ------
    UnitError
        With a message that says in words what was wrong.
    """
    spec = QUANTITY_KINDS[kind]
    what = spec.name
    if isinstance(text, bool) or not isinstance(text, str):
        if isinstance(text, (int, float)):
            raise UnitError(f"expected {_a(what)} with a unit, e.g. {spec.example!r}, "
                            f"got the bare number {text!r}")
        raise UnitError(f"expected {_a(what)} as text with a unit, e.g. {spec.example!r}, "
                        f"got {type(text).__name__} {text!r}")
    return _parse_text(text, kind)


@lru_cache(maxsize=4096)
def _parse_text(text: str, kind: str) -> ParsedQuantity:
    """Parse one quantity text (cached: sweeps and edits re-read the same texts; and
    between runs, what pint read, in the unit memo)."""
    memo = unit_memo()
    kept = memo.parsed(kind, text)
    if kept is not None:
        return ParsedQuantity(*kept)
    value, unit_text = _split_number(text, QUANTITY_KINDS[kind].name)
    unit = memo.unit(kind, unit_text)
    if unit is not None:
        si = value * unit[0]  # what pint computes for a plain factor, to the last bit
        if math.isfinite(si) and not (kind == "temperature" and si < 0.0):
            return ParsedQuantity(si, unit[1])
    return _parse_with_pint(text, kind)  # pint's words for what is wrong


def _parse_with_pint(text: str, kind: str) -> ParsedQuantity:
    """:func:`_parse_text` by pint; what it read is kept in the unit memo."""
    spec = QUANTITY_KINDS[kind]
    what = spec.name
    value, unit_text = _split_number(text, what)
    as_written = unit_text
    if not unit_text:
        raise UnitError(f"{text!r} is not {_a(what)}: a unit is needed, e.g. {spec.example!r}")
    if len(unit_text) > MAX_UNIT_CHARS:
        raise UnitError(f"expected {_a(what)}, but the unit {unit_text[:24]!r}... is "
                        f"{len(unit_text):,} characters long (a unit has at most "
                        f"{MAX_UNIT_CHARS})")
    reference: Reference | None = None
    is_pressure = kind in {"pressure", "pressure_abs"}
    if is_pressure:
        unit_text, reference = _split_reference(unit_text)
        if reference is None:
            suffixed = _pressure_suffix(unit_text)
            if suffixed is not None:
                unit_text, reference = suffixed
    elif _is_pressure_with_reference(unit_text):
        raise UnitError(f"{text!r}: expected {_a(what)}, got a pressure")
    units = _parse_units(text, unit_text, what)
    ureg = get_registry()
    target = ureg.parse_units(spec.si_unit)
    if kind == "angle":
        if str(units) not in _ANGLE_UNITS:
            raise UnitError(f"{text!r} is not an angle: use deg or rad")
    elif units.dimensionality != target.dimensionality:
        raise UnitError(f"{text!r}: expected {_a(what)}, got {_dimension_word(units)}")
    try:
        si = ureg.Quantity(value, units).to(target).magnitude
    except Exception:  # e.g. offset units combined with others ("degC/s")
        raise UnitError(f"{text!r} is not {_a(what)}: cannot convert {unit_text!r}") from None
    si = float(si)
    if not math.isfinite(si):
        raise UnitError(f"{text!r} is not {_a(what)}: the value must be a finite number")
    if kind == "temperature" and si < 0.0:
        raise UnitError(f"{text!r} is below absolute zero")
    if ureg.Quantity(0.0, units).to(target).magnitude == 0.0:  # a plain factor
        factor = float(ureg.Quantity(1.0, units).to(target).magnitude)
        unit_memo().keep_unit(kind, as_written, factor, reference)
    else:
        unit_memo().keep_parsed(kind, text, si, reference)
    return ParsedQuantity(si, reference)


def parse_pressure(text: object) -> tuple[float, Reference | None]:
    """Read a pressure: ``(value [Pa], reference)`` with the reference as the unit said it."""
    parsed = parse_value(text, "pressure")
    return parsed.value, parsed.reference


def parse_quantity(text: object, kind: str, *, atmosphere: float = P_ATM_SEA_LEVEL) -> float:
    """Read a quantity of ``kind`` from text and return its SI value.

    For ``kind="pressure"`` the result is gauge [Pa]: a unit that says absolute (``bara``,
    ``psia``, ``kPa abs``) is converted with ``atmosphere``. For ``kind="pressure_abs"``
    the result is absolute [Pa]: a plain unit means absolute there (vapour pressures), and
    a unit that says gauge is converted with ``atmosphere``.

    Parameters
    ----------
    text : str
        The quantity as typed, e.g. ``"150 mm"``.
    kind : str
        A key of :data:`QUANTITY_KINDS`.
    atmosphere : float
        Absolute atmospheric pressure at the site [Pa]; standard sea level by default.

    Examples
    --------
    >>> parse_quantity("150 mm", "diameter")
    0.15
    >>> round(parse_quantity("1 bara", "pressure"), 1)
    -1325.0
    """
    if kind not in QUANTITY_KINDS:
        raise KeyError(f"unknown quantity kind {kind!r}")
    parsed = parse_value(text, kind)
    if kind == "pressure" and parsed.reference == "absolute":
        return parsed.value - atmosphere
    if kind == "pressure_abs" and parsed.reference == "gauge":
        return parsed.value + atmosphere
    return parsed.value


def _display(kind: str, unit_system: str) -> tuple[str, str]:
    spec = QUANTITY_KINDS[kind]
    if unit_system == "US":
        return spec.display_us, spec.label_us or spec.display_us
    if unit_system == "SI":
        return spec.display_si, spec.label_si or spec.display_si
    raise ValueError(f"unit system must be 'SI' or 'US', got {unit_system!r}")


def display_unit(kind: str, unit_system: str) -> str:
    """Unit label for ``kind`` in a display system, e.g. ``("flow", "US") -> "gpm"``."""
    return _display(kind, unit_system)[1]


def to_display(value_si, kind: str, unit_system: str):
    """Magnitude of an SI value (float or numpy array) in the display unit of ``kind``."""
    unit, _ = _display(kind, unit_system)
    spec = QUANTITY_KINDS[kind]
    if unit == spec.si_unit:
        return value_si
    factor = _display_factor(spec.si_unit, unit)
    if factor is None:  # an offset unit (temperature): pint converts
        return get_registry().Quantity(value_si, spec.si_unit).to(unit).magnitude
    if isinstance(value_si, (list, tuple)):  # as pint takes a sequence
        import numpy as np

        value_si = np.asarray(value_si)
    return value_si * factor  # what pint computes for a plain factor, to the last bit


@lru_cache(maxsize=256)
def _display_factor(si_unit: str, unit: str) -> float | None:
    """The factor from ``si_unit`` to ``unit`` (kept in the unit memo), ``None`` when the
    conversion is not a plain factor."""
    memo = unit_memo()
    factor = memo.factor(si_unit, unit)
    if factor is not None:
        return factor
    ureg = get_registry()
    if ureg.Quantity(0.0, si_unit).to(unit).magnitude != 0.0:
        return None
    factor = float(ureg.Quantity(1.0, si_unit).to(unit).magnitude)
    memo.keep_factor(si_unit, unit, factor)
    return factor


def example_text(text: str, kind: str, unit_system: str) -> str:
    """An example quantity as the schema writes it (SI) in the display units, to 3 digits,
    e.g. ``example_text("50 kPa", "pressure", "US") -> "7.25 psi"``; as it is in SI, for a
    kind without units, or when it does not read."""
    if unit_system == "SI" or kind not in QUANTITY_KINDS:
        return text
    try:
        return format_quantity(parse_quantity(text, kind), kind, unit_system, 3)
    except UnitError:
        return text


def format_quantity(value_si: float, kind: str, unit_system: str = "SI", digits: int = 4) -> str:
    """Text for an SI value in the display unit, to ``digits`` significant digits.

    The text reads back with :func:`parse_quantity` of the same kind.

    Examples
    --------
    >>> format_quantity(0.0125, "flow")
    '12.5 L/s'
    >>> format_quantity(0.1023, "diameter", "US")
    '4.028 in'
    """
    magnitude = float(to_display(float(value_si), kind, unit_system))
    return f"{number_text(magnitude, digits)} {display_unit(kind, unit_system)}"
