"""Axes for the terminal plots (grade line, run trends, surge): plain functions, no Textual.

Shared by every plotting view so they read alike:

* the y range is the data's, padded a little; a limit line (pressure rating, vapour
  limit, atmospheric) is drawn only where it falls inside that range, and named in words
  with its value when it lies off the scale (:func:`place_limits`);
* time is shown in s, min or h by the span (:func:`time_axis`), never 363.1/726.1 s;
* the legend is a line of text beside the plot, not drawn over the data
  (:func:`legend_text`); every series has a marker character as well as a colour;
* heads below what is physically possible (below the vapour limit, where the liquid
  column separates) are clamped to that limit and counted, so nothing impossible is
  drawn (:func:`clamp_below`).

plotext places its legend inside the plot box and scales to every series given, which is
why the range and the legend are worked out here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Iterable, Sequence

#: Fraction of the data span added above and below, so a line does not sit on the frame.
PAD = 0.06


def finite(values: Iterable[float]) -> list[float]:
    return [float(v) for v in values if v is not None and math.isfinite(float(v))]


def data_range(*series: Sequence[float], pad: float = PAD) -> tuple[float, float] | None:
    """``(low, high)`` of all finite values, padded by ``pad`` of the span (or by a unit
    fraction of the magnitude when the span is nil); ``None`` when there is no value."""
    values = [v for s in series if s is not None for v in finite(s)]
    if not values:
        return None
    low, high = min(values), max(values)
    span = high - low
    if span <= 0.0:
        span = max(abs(high), 1.0) * 0.1
    return low - pad * span, high + pad * span


@dataclass(frozen=True)
class Limit:
    """A limit line: its name as the user reads it and its values (one per x, or one)."""

    name: str
    values: Sequence[float]
    marker: str = "."


def place_limits(limits: Sequence[Limit], span: tuple[float, float] | None,
                 fmt=lambda v: f"{v:.3g}") -> tuple[list[Limit], list[str]]:
    """Split limits into those to draw (some value inside ``span``) and a note for each
    one off the scale: ``"rating above the plot (min 104 m)"``.

    Args:
        limits: the candidate limit lines.
        span: the y range of the data, as from :func:`data_range`.
        fmt: how a value is written in the note (the caller adds the unit).
    """
    drawn: list[Limit] = []
    words: list[str] = []
    for limit in limits:
        values = finite(limit.values)
        if not values:
            continue
        if span is None:
            drawn.append(limit)
            continue
        low, high = span
        if any(low <= v <= high for v in values):
            drawn.append(limit)
        elif min(values) > high:
            words.append(f"{limit.name} above the plot (lowest {fmt(min(values))})")
        else:
            words.append(f"{limit.name} below the plot (highest {fmt(max(values))})")
    return drawn, words


def time_axis(seconds: Sequence[float]) -> tuple[list[float], str, float]:
    """Times in the unit their span reads best in: ``(values, unit word, divisor)``.

    Up to 3 minutes in s, up to 3 hours in min, beyond in h.
    """
    values = finite(seconds)
    span = (max(values) - min(values)) if values else 0.0
    if span <= 180.0:
        unit, divisor = "s", 1.0
    elif span <= 3 * 3600.0:
        unit, divisor = "min", 60.0
    else:
        unit, divisor = "h", 3600.0
    return [float(t) / divisor for t in seconds], unit, divisor


def nice_ticks(low: float, high: float, count: int = 5) -> list[float]:
    """Round tick values (1, 2, 2.5, 5 x 10^n steps) covering ``low..high``."""
    if not (math.isfinite(low) and math.isfinite(high)) or high <= low:
        return [low]
    raw = (high - low) / max(count - 1, 1)
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1, 2, 2.5, 5, 10) if m * power >= raw)
    first = math.ceil(low / step) * step
    ticks = []
    value = first
    while value <= high + 1e-9 * step:
        ticks.append(round(value, 10))
        value += step
    return ticks


def tick_labels(ticks: Sequence[float]) -> list[str]:
    """Tick values without trailing noise (``5``, ``7.5``, ``0.25``)."""
    return [f"{t:g}" for t in ticks]


def legend_text(items: Sequence[tuple[str, str]]) -> str:
    """A legend as one line of text: ``"= pipe  ▪ grade line  . vapour limit"``."""
    return "  ".join(f"{marker} {label}" for marker, label in items)


def clamp_below(values: Sequence[float], floor: Sequence[float] | float | None
                ) -> tuple[list[float], int]:
    """``values`` with every value below ``floor`` raised to it, and how many were raised.

    Used for heads below the vapour limit: the liquid cannot be at a lower absolute
    pressure than its vapour pressure (the column separates instead), so such a value is
    drawn at the limit and the plot says how many points were held there.
    """
    if floor is None:
        return [float(v) for v in values], 0
    floors = [float(floor)] * len(values) if isinstance(floor, (int, float)) else list(floor)
    out: list[float] = []
    raised = 0
    for v, f in zip(values, floors):
        v = float(v)
        if math.isfinite(f) and v < f:
            out.append(f)
            raised += 1
        else:
            out.append(v)
    return out, raised
