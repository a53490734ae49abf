"""Findings that keep their numbers: SI values with a quantity kind, written out in words later.

A finding's message is read by people in the project's display unit system (SI or US), and
by scripts in the JSON, which is SI. The core therefore builds a finding from a template with
named slots and the SI value and quantity kind of each slot (:func:`finding`); its
``message`` is the template filled in SI display units (kPa, L/s, m, mm), and the output
layer fills the same template in the display units of the project
(:func:`workbench.output.common.finding_message`, through pint).

The SI text is written here without pint (the core imports no pint); the scale factors and
labels repeat the SI column of :data:`workbench.project.units.QUANTITY_KINDS` and a test
checks that both give the same text.
"""

from __future__ import annotations

import math
import string

from workbench.core.model import Finding, Severity

#: Quantity kind -> (factor from the SI base unit to the SI display unit, label).
SI_DISPLAY: dict[str, tuple[float, str]] = {
    "length": (1.0, "m"),
    "elevation": (1.0, "m"),
    "head": (1.0, "m"),
    "diameter": (1000.0, "mm"),
    "thickness": (1000.0, "mm"),
    "roughness": (1000.0, "mm"),
    "pressure": (1e-3, "kPa"),
    "pressure_abs": (1e-3, "kPa abs"),
    "flow": (1000.0, "L/s"),
    "gas_flow": (3600.0, "m3/h"),
    "velocity": (1.0, "m/s"),
    "time": (1.0, "s"),
    "volume": (1.0, "m3"),
    "temperature": (1.0, "degC"),
    "small_volume": (1000.0, "L"),
}


#: Quantity kind -> offset added after the factor (a temperature [K] in degC).
SI_OFFSET: dict[str, float] = {"temperature": -273.15}


def number_text(x: float, digits: int) -> str:
    """``x`` to ``digits`` significant digits, trailing zeros dropped (as the output layer)."""
    if not math.isfinite(x):
        return str(x)
    if x == 0:
        return "0"
    magnitude = math.floor(math.log10(abs(x)))
    if magnitude >= 7 or magnitude < -4:
        return f"{x:.{max(digits - 1, 0)}e}"
    decimals = max(0, digits - 1 - magnitude)
    text = f"{x:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in {"-0", ""} else text


def si_text(value: float, kind: str, digits: int = 3) -> str:
    """An SI value in the SI display unit of ``kind``, e.g. ``si_text(-1200.0, "pressure")
    -> "-1.2 kPa"``."""
    factor, label = SI_DISPLAY[kind]
    return f"{number_text(value * factor + SI_OFFSET.get(kind, 0.0), digits)} {label}"


def fill(template: str, values, text_of) -> str:
    """``template`` with each ``{name}`` slot replaced by ``text_of(value, kind, digits)``."""
    texts = {name: text_of(value, kind, digits) for name, value, kind, digits in values}
    return string.Formatter().vformat(template, (), texts)


def slots(template: str, digits: int = 3, **values) -> tuple[str, str, tuple]:
    """``(SI message, template, values)`` for a message with numbers kept (an event's, or a
    finding built by hand); arguments as :func:`finding`."""
    kept = []
    for name, spec in values.items():
        value, kind = float(spec[0]), spec[1]
        if kind not in SI_DISPLAY:
            raise ValueError(f"unknown quantity kind {kind!r} for {name!r}")
        kept.append((name, value, kind, int(spec[2]) if len(spec) > 2 else digits))
    kept_t = tuple(kept)
    return fill(template, kept_t, si_text), template, kept_t


class KeptText(str):
    """A plain message (a note) that is its SI text and keeps its numbers: :attr:`template`
    and :attr:`values` as a finding's, so the output layer can write it in display units."""

    template: str
    values: tuple

    def __new__(cls, template: str, digits: int = 3, **values) -> "KeptText":
        message, template, kept = slots(template, digits, **values)
        text = super().__new__(cls, message)
        text.template, text.values = template, kept
        return text


def finding(code: str, element: str, template: str, severity: Severity = "caution",
            source: str = "", digits: int = 3, **values) -> Finding:
    """A :class:`Finding` whose numbers are kept as SI values with their kind.

    Parameters
    ----------
    code, element, severity, source
        As :class:`workbench.core.model.Finding`.
    template : str
        The message with ``{name}`` slots (``str.format`` syntax, names only).
    digits : int
        Significant digits of every slot unless a value gives its own.
    **values
        ``name=(SI value, kind)`` or ``name=(SI value, kind, digits)``; ``kind`` a key of
        :data:`SI_DISPLAY`.
    """
    message, template, kept = slots(template, digits, **values)
    return Finding(code, element, message, severity, source, template=template, values=kept)


def duration_text(seconds: float) -> str:
    """A time span as an engineer reads it: ``42.1 s``, ``12 min 30 s``, ``2 h 05 min``
    (the same in both unit systems)."""
    if seconds is None or not math.isfinite(seconds):
        return "—"
    if abs(seconds) < 120:
        return f"{seconds:.3g} s" if abs(seconds) < 10 else f"{seconds:.1f} s"
    minutes, sec = divmod(round(seconds), 60)
    if minutes < 120:
        return f"{minutes} min {sec:02d} s"
    hours, minutes = divmod(minutes, 60)
    return f"{hours} h {minutes:02d} min"
