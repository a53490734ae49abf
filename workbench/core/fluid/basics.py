"""What every liquid module shares: the error for a liquid or temperature with no
properties, 0 degC, and the temperature check."""

from __future__ import annotations

import math

__all__ = ["T_ZERO_CELSIUS", "FluidPropertyError", "celsius", "check_temperature"]

#: 0 degC [K].
T_ZERO_CELSIUS = 273.15


class FluidPropertyError(ValueError):
    """A liquid or temperature for which no properties can be given; the message says why."""


def celsius(temperature_k: float) -> str:
    """A temperature [K] as a user reads it, e.g. ``"20.0 degC"``."""
    return f"{temperature_k - T_ZERO_CELSIUS:.1f} degC"


def water_boils_note(t: float, p: float, psat: float):
    """The note for a solution whose water (an upper bound of its vapour pressure) boils at
    ``t`` [K] and ``p`` [Pa abs], with its numbers kept for the display units."""
    from workbench.core.finding_text import KeptText

    return KeptText("at {t} water's vapour pressure ({psat}) reaches {p}: the solution may "
                    "boil (its boiling point is higher than water's, by an amount not "
                    "computed here)", t=(t, "temperature", 3), psat=(psat, "pressure_abs", 4),
                    p=(p, "pressure_abs"))


def check_temperature(temperature_k: float) -> float:
    """``temperature_k`` as a float [K]; refuses a non-number, a non-finite or a
    non-positive value."""
    try:
        t = float(temperature_k)
    except (TypeError, ValueError):
        raise FluidPropertyError(f"expected a temperature in kelvin, got {temperature_k!r}") from None
    if not math.isfinite(t) or t <= 0.0:
        raise FluidPropertyError(f"expected a positive absolute temperature [K], got {temperature_k!r}")
    return t
