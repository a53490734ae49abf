"""A liquid the user describes by its own numbers (``kind = "custom"``), checked for sense."""

from __future__ import annotations

import math

from workbench.core.fluid.basics import FluidPropertyError, check_temperature
from workbench.core.model import FluidProps

__all__ = ["custom_properties"]


def custom_properties(
    density: float,
    viscosity: float,
    vapor_pressure: float | None = None,
    bulk_modulus: float | None = None,
    temperature_k: float | None = None,
    name: str = "custom liquid",
) -> FluidProps:
    """Properties the user gives (``kind = "custom"``), checked for sense.

    Parameters
    ----------
    density : float
        [kg/m^3], positive.
    viscosity : float
        Dynamic viscosity [Pa*s], positive.
    vapor_pressure : float, optional
        Absolute vapour pressure [Pa], non-negative; ``None``: vapour checks are skipped
        (a note says so).
    bulk_modulus : float, optional
        [Pa], positive; ``None``: surge wave speeds need one.
    temperature_k : float, optional
        [K], for the record.
    name : str, optional
        Readable name.

    Raises
    ------
    FluidPropertyError
        For a non-finite or non-positive value.
    """

    def positive(value, what, allow_zero=False):
        try:
            v = float(value)
        except (TypeError, ValueError):
            raise FluidPropertyError(f"{what}: expected a number, got {value!r}") from None
        if not math.isfinite(v) or v < 0.0 or (v == 0.0 and not allow_zero):
            raise FluidPropertyError(f"{what}: expected a positive value, got {value!r}")
        return v

    rho = positive(density, "density [kg/m^3]")
    mu = positive(viscosity, "viscosity [Pa*s]")
    psat = None if vapor_pressure is None else positive(vapor_pressure, "vapor_pressure [Pa]", True)
    k = None if bulk_modulus is None else positive(bulk_modulus, "bulk_modulus [Pa]")
    t = None if temperature_k is None else check_temperature(temperature_k)
    notes = []
    if psat is None:
        notes.append("no vapour pressure given: vapour checks are skipped")
    return FluidProps(
        name=name,
        density=rho,
        viscosity=mu,
        vapor_pressure=psat,
        bulk_modulus=k,
        temperature=t,
        formulation="custom: values given by the user",
        notes=tuple(notes),
    )
