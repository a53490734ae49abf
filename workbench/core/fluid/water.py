"""Liquid water by the IAPWS formulations (density and speed of sound IAPWS-95, viscosity
IAPWS 2008, vapour pressure IAPWS-IF97), computed by the ``chemicals`` package's fast
routines (imported on first use) and cached by (temperature, pressure)."""

from __future__ import annotations

import math
from functools import lru_cache

from workbench.core.finding_text import KeptText
from workbench.core.fluid.basics import (
    T_ZERO_CELSIUS,
    FluidPropertyError,
    check_temperature,
)
from workbench.core.model import FluidProps

__all__ = ["WATER_FORMULATION", "WATER_T_CRITICAL", "WATER_T_MIN", "water_properties",
           "water_psat", "water_vapour_pressure"]

#: Lowest temperature at which the IAPWS-95 routines of ``chemicals`` solve for
#: (supercooled) liquid water [K].
WATER_T_MIN = 235.0
#: Critical temperature of water, IAPWS-95 [K].
WATER_T_CRITICAL = 647.096

WATER_FORMULATION = (
    "water: IAPWS-95 density and speed of sound (bulk modulus rho*w^2), "
    "IAPWS 2008 viscosity, IAPWS-IF97 saturation pressure"
)


@lru_cache(maxsize=4096)
def _water_cached(temperature_k: float, pressure_pa: float) -> FluidProps:
    from chemicals.iapws import iapws95_properties, iapws95_Psat
    from chemicals.vapor_pressure import Psat_IAPWS
    from chemicals.viscosity import mu_IAPWS

    t, p = temperature_k, pressure_pa
    notes: list[str] = []
    if t < T_ZERO_CELSIUS:
        # IF97's saturation equation is not meant for supercooled liquid; IAPWS-95's is.
        psat = iapws95_Psat(t)
        notes.append(KeptText(
            "{t} is below {zero}: water freezes; the values are IAPWS-95 extrapolations for "
            "supercooled liquid", t=(t, "temperature", 3), zero=(T_ZERO_CELSIUS, "temperature")
        ))
    else:
        psat = Psat_IAPWS(t)
    p_eval = p
    if psat >= p:
        notes.append(KeptText(
            "{t} is at or above the boiling point at {p} (vapour pressure {psat}): the liquid "
            "flashes; values are for liquid just above its saturation pressure",
            t=(t, "temperature", 3), p=(p, "pressure_abs"), psat=(psat, "pressure_abs", 4)
        ))
        # Evaluate the liquid branch: IAPWS-95 decides the phase by its own saturation
        # pressure, which differs from IF97's in the fifth digit.
        p_eval = 1.0001 * max(psat, iapws95_Psat(t))
    rho, _u, _s, _h, _cv, _cp, w, *_rest = iapws95_properties(t, p_eval)
    # Industrial form of IAPWS 2008 (no critical enhancement: it matters only within
    # a few kelvin of the critical point, far outside a liquid-handling plant).
    mu = mu_IAPWS(t, rho)
    return FluidProps(
        name="water",
        density=rho,
        viscosity=mu,
        vapor_pressure=psat,
        bulk_modulus=rho * w * w,
        temperature=t,
        formulation=WATER_FORMULATION,
        notes=tuple(notes),
    )


def water_properties(temperature_k: float, pressure_pa: float = 101325.0) -> FluidProps:
    """Properties of liquid water by the IAPWS formulations.

    .. math::

        \\rho = \\rho_{95}(T, p), \\quad \\mu = \\mu_{2008}(T, \\rho), \\quad
        p_{sat} = p_{sat,IF97}(T), \\quad K_s = \\rho\\, w^2

    Parameters
    ----------
    temperature_k : float
        Temperature, [K]; from 235 K (supercooled) to below the critical point 647.096 K.
    pressure_pa : float, optional
        Absolute pressure at which density and speed of sound are evaluated, [Pa];
        default one standard atmosphere.

    Returns
    -------
    FluidProps
        Density [kg/m^3], viscosity [Pa*s], vapour pressure [Pa abs], isentropic bulk
        modulus [Pa]; ``notes`` says when the temperature is below 0 degC (frozen; the
        values are for supercooled liquid) or at/above boiling at ``pressure_pa`` (the
        values are then for liquid just above saturation pressure).

    Raises
    ------
    FluidPropertyError
        Outside 235 K to 647.096 K, or for a non-positive pressure.

    Examples
    --------
    >>> w = water_properties(293.15)
    >>> round(w.density, 3), round(w.viscosity * 1e3, 4), round(w.vapor_pressure, 1)
    (998.207, 1.0016, 2339.2)

    References
    ----------
    Wagner, W., Pruss, A. (2002), J. Phys. Chem. Ref. Data 31, 387 (IAPWS-95);
    Huber, M. L. et al. (2009), J. Phys. Chem. Ref. Data 38, 101 (IAPWS 2008 viscosity);
    Wagner, W. et al. (2000), J. Eng. Gas Turbines Power 122, 150 (IAPWS-IF97).
    """
    t = check_temperature(temperature_k)
    try:
        p = float(pressure_pa)
    except (TypeError, ValueError):
        raise FluidPropertyError(f"expected an absolute pressure in pascals, got {pressure_pa!r}") from None
    if not math.isfinite(p) or p <= 0.0:
        raise FluidPropertyError(f"expected a positive absolute pressure [Pa], got {pressure_pa!r}")
    if not (WATER_T_MIN <= t < WATER_T_CRITICAL):
        raise FluidPropertyError(KeptText(
            "water at {t} is outside the liquid range the IAPWS formulations cover here "
            "({low} to the critical point {critical})", 3, t=(t, "temperature"),
            low=(WATER_T_MIN, "temperature"), critical=(WATER_T_CRITICAL, "temperature")))
    return _water_cached(t, p)


def water_psat(t: float) -> float:
    """Water's saturation pressure [Pa] by IAPWS-IF97."""
    from chemicals.vapor_pressure import Psat_IAPWS

    return Psat_IAPWS(t)


def water_vapour_pressure(t: float) -> float:
    """Pure water's vapour pressure [Pa]: as :func:`water_properties` where it holds
    (IF97 from 0 degC, IAPWS-95 for supercooled liquid to 235 K); IF97 extrapolated below."""
    from chemicals.iapws import iapws95_Psat

    if T_ZERO_CELSIUS <= t or t < WATER_T_MIN:
        return water_psat(t)
    return iapws95_Psat(t)
