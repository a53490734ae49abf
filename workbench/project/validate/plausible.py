"""Plausibility ranges: values no plant can have, refused in words before any solver sees them.

Every quantity already has to be finite and below :data:`~workbench.project.validate.checker.
QUANTITY_LIMIT`; that bounds the arithmetic but still lets through values that are typable
and physically absurd -- a bore of 1e-320 m, a Kv of a millionth of a cubic metre an hour, a
fitting with a loss coefficient of 1e300, a grid of a billion reaches -- on which the
solvers divide by zero, overflow or run out of memory. :data:`RANGES` gives, per key (the
key path with element ids and list positions left out), the widest range any plant could
use, generously wider than practice (common practice, no source: the limits are set one or
more orders of magnitude beyond the largest and smallest equipment made), and the words the
refusal uses. Absolute pressures must also be above zero: a gauge pressure at or below
minus the site's atmospheric pressure is below a perfect vacuum.

:func:`quantity_problem` and :func:`number_problem` are called by the
:class:`~workbench.project.validate.checker.Checker` for every value it reads.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

__all__ = ["RANGES", "Plausible", "key_pattern", "number_problem", "quantity_problem"]


@dataclass(frozen=True)
class Plausible:
    """The widest range of one key any plant could use."""

    low: float | None
    """Smallest value [SI unit of the key], ``None`` for no lower bound."""
    high: float | None
    """Largest value [SI unit of the key], ``None`` for no upper bound."""
    what: str
    """The quantity in the user's words, for the message ("a pipe bore")."""
    unit: str = ""
    """Unit the limits are written in, in the message, on an SI display (a US display
    writes them in the US display unit of the key's quantity kind)."""
    scale: float = 1.0
    """SI value of one ``unit``."""
    why: str = ""
    """What lies beyond the range, in words (optional)."""

    def describe(self, unit_system: str = "SI", kind: str | None = None) -> str:
        """The range in words: in :attr:`unit` for SI (or without a quantity ``kind``), in
        the ``kind``'s US display unit for ``unit_system="US"``."""
        scale, unit, converted = self.scale, self.unit, False
        if unit_system == "US" and kind is not None and unit:
            from workbench.project.units import display_unit, to_display

            unit = display_unit(kind, "US")
            scale = 1.0 / float(to_display(1.0, kind, "US"))
            converted = True

        def text(x: float, inward: int = 0) -> str:
            x = x / scale
            # converted limits are rounded inward to two figures ("0.04 in to 780 in", not
            # "0.03937 in to 787.4 in"): every value inside the words is accepted
            x = _two_figures(x, inward) if converted and inward else float(f"{x:.4g}")
            shown = f"{int(round(x)):,}" if abs(x) >= 1 and abs(x - round(x)) < 1e-9 * abs(x) \
                else f"{x:g}"
            return shown + (f" {unit}" if unit else "")

        if self.low is not None and self.high is not None:
            return f"from {text(self.low, 1)} to {text(self.high, -1)}"
        if self.low is not None:
            return f"at least {text(self.low, 1)}"
        return f"at most {text(self.high, -1)}"  # type: ignore[arg-type]


def _two_figures(x: float, direction: int) -> float:
    """``x`` to two significant figures, rounded up (``direction`` 1) or down (-1)."""
    import math

    if x == 0.0 or not math.isfinite(x):
        return x
    step = 10.0 ** (math.floor(math.log10(abs(x))) - 1)
    n = x / step
    n = math.ceil(n - 1e-9) if direction > 0 else math.floor(n + 1e-9)
    return float(f"{n * step:.2g}") if abs(n) < 100 else float(f"{n * step:.3g}")


_ELEVATION = Plausible(-20_000.0, 20_000.0, "an elevation", "m", 1.0,
                       "higher than any mountain or deeper than any mine")
_TANK_SIZE = Plausible(0.01, 10_000.0, "a tank dimension", "m", 1.0)
_FLOW = Plausible(None, 1000.0, "a feed or draw-off", "m3/s", 1.0,
                  "more than a large river carries")

#: Key pattern (see :func:`key_pattern`) -> its plausible range, in SI units.
RANGES: dict[str, Plausible] = {
    "lines.inner_diameter": Plausible(1e-3, 20.0, "a pipe bore", "mm", 1e-3),
    "lines.length": Plausible(1e-3, 1e6, "a line length", "m", 1.0),
    "lines.wall_thickness": Plausible(1e-5, 1.0, "a wall thickness", "mm", 1e-3),
    "lines.elastic_modulus": Plausible(1e6, 1.2e12, "a pipe wall's elastic modulus", "GPa",
                                       1e9, "softer than rubber hose or stiffer than diamond"),
    "lines.pressure_rating": Plausible(1e3, 1e9, "a pressure rating", "bar", 1e5),
    "lines.profile.elevation": _ELEVATION,
    "reservoirs.bottom_elevation": _ELEVATION,
    "junctions.elevation": _ELEVATION,
    "receivers.elevation": _ELEVATION,
    "reservoirs.diameter": _TANK_SIZE,
    "reservoirs.length": _TANK_SIZE,
    "reservoirs.width": _TANK_SIZE,
    "reservoirs.height": Plausible(0.01, 1000.0, "a tank height", "m", 1.0),
    "reservoirs.cone_height": Plausible(None, 1000.0, "a cone height", "m", 1.0),
    "reservoirs.level": Plausible(None, 1000.0, "a level", "m", 1.0),
    "reservoirs.inflow": _FLOW,
    "reservoirs.draw_off": _FLOW,
    "reservoirs.inflow_schedule.flow": _FLOW,
    "reservoirs.draw_off_schedule.flow": _FLOW,
    "reservoirs.surface_pressure": Plausible(None, 1e8, "a gas-space pressure", "bar", 1e5),
    "reservoirs.gas_pressure": Plausible(None, 1e8, "a gas-space pressure", "bar", 1e5),
    "reservoirs.design_vacuum": Plausible(None, 1.1e5, "a design vacuum", "kPa", 1e3,
                                          "more than a perfect vacuum"),
    "reservoirs.design_pressure": Plausible(None, 1e8, "a design pressure", "bar", 1e5),
    "reservoirs.shell_height": Plausible(0.01, 1000.0, "a tank height", "m", 1.0),
    "reservoirs.vent.inner_diameter": Plausible(1e-3, 20.0, "a vent bore", "mm", 1e-3),
    "reservoirs.vent.k": Plausible(None, 1e4, "a vent's loss coefficient K"),
    "reservoirs.vent.rated_flow": Plausible(1e-3 / 3600.0, 1e7 / 3600.0, "a vent's rated flow",
                                            "m3/h", 1.0 / 3600.0),
    "reservoirs.vent.rated_pressure_drop": Plausible(1.0, 1e6, "a vent's rated pressure drop",
                                                     "kPa", 1e3),
    "receivers.pressure": Plausible(None, 1e8, "a vessel pressure", "bar", 1e5),
    "fluid.density": Plausible(100.0, 25_000.0, "a liquid density", "kg/m3", 1.0),
    "fluid.viscosity": Plausible(1e-5, 1e4, "a liquid viscosity", "mPa*s", 1e-3),
    "fluid.bulk_modulus": Plausible(1e6, 1e11, "a liquid bulk modulus", "GPa", 1e9),
    "lines.valve.kv_open": Plausible(1e-3 / 3600.0, 1e5 / 3600.0, "a valve Kv", "m3/h",
                                     1.0 / 3600.0, "smaller than any needle valve or larger "
                                     "than any valve made"),
    "lines.valve.k_open": Plausible(None, 1e4, "a fully open valve's loss coefficient K"),
    "lines.valve.rangeability": Plausible(None, 1e4, "a valve's rangeability",
                                          why="far beyond any control valve, where 20 to 100 is usual"),
    "lines.fittings.k": Plausible(None, 1e4, "a fitting's loss coefficient K",
                                  why="no fitting loses that much; a nearly shut valve is "
                                  "a [lines.ID.valve] with an opening"),
    "lines.fittings.count": Plausible(None, 10_000, "a count of fittings"),
    "lines.surge.reaches": Plausible(None, 4000, "a number of reaches on one line",
                                     why="a finer grid adds run time and memory, not accuracy"),
}

_ELEMENT_SECTIONS = ("reservoirs", "junctions", "receivers", "lines")
_INDEX = re.compile(r"\[\d+\]")


def key_pattern(key: str) -> str:
    """A key path without element ids and list positions.

    >>> key_pattern("lines.L-1.fittings[2].k")
    'lines.fittings.k'
    >>> key_pattern("fluid.density")
    'fluid.density'
    """
    parts = _INDEX.sub("", key).split(".")
    if len(parts) > 2 and parts[0] in _ELEMENT_SECTIONS:
        del parts[1]
    return ".".join(parts)


def _out_of_range(key: str, raw: object, value: float, unit_system: str = "SI",
                  kind: str | None = None) -> str | None:
    spec = RANGES.get(key_pattern(key))
    if spec is None:
        return None
    if (spec.low is None or value >= spec.low) and (spec.high is None or value <= spec.high):
        return None
    why = f" ({spec.why})" if spec.why else ""
    check = "check the number and its unit" if spec.unit else "check the number"
    return (f"{raw!r} is not plausible as {spec.what}{why}: expected "
            f"{spec.describe(unit_system, kind)}; {check}")


def quantity_problem(key: str, kind: str, raw: object, value: float,
                     atmosphere: float, unit_system: str = "SI") -> str | None:
    """Why a quantity read from ``key`` cannot be physical, or ``None``.

    Parameters
    ----------
    key : str
        Its key path (``reservoirs.T1.surface_pressure``).
    kind : str
        Its kind of quantity (``pressure`` is gauge).
    raw : object
        The value as written in the file, for the message.
    value : float
        The value in SI units (a ``pressure`` gauge) [SI].
    atmosphere : float
        Absolute atmospheric pressure at the site [Pa].
    unit_system : {"SI", "US"}
        The display units the message writes its numbers in.
    """
    if kind == "pressure" and value + atmosphere <= 0.0:
        from workbench.project.units import format_quantity

        example = "3 psia" if unit_system == "US" else "20 kPa abs"
        return (f"{raw!r} (gauge) is at or below a perfect vacuum: atmospheric pressure at "
                f"the site is {format_quantity(atmosphere, 'pressure', unit_system)}, so a "
                f"gauge pressure must be above "
                f"{format_quantity(-atmosphere, 'pressure', unit_system)} (pressures are "
                f"gauge unless the unit says absolute, e.g. \"{example}\")")
    if kind == "pressure_abs" and value <= 0.0:
        return f"{raw!r}: an absolute pressure must be above zero (a perfect vacuum)"
    return _out_of_range(key, raw, value, unit_system, kind)


def number_problem(key: str, value: float) -> str | None:
    """Why a plain number read from ``key`` cannot be physical, or ``None``."""
    return _out_of_range(key, value, value)
