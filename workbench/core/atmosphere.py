"""Atmospheric pressure at a site from its elevation, by the standard atmosphere.

The vapour and sub-atmospheric checks need the absolute pressure of the air around the
plant. Without a measured barometric pressure the usual assumption is the standard
atmosphere of ISO 2533:1975 (identical to the U.S. Standard Atmosphere 1976 below
32 km geopotential). Plants sit well inside its first layer, the troposphere, where a
closed form holds, so this module needs no library import and costs well under a
microsecond per call.

Real barometric pressure varies with the weather by a few percent (common practice,
no source); a vapour check should keep a margin for that.
"""

from __future__ import annotations

__all__ = [
    "AtmosphereError",
    "EARTH_RADIUS",
    "ELEVATION_RANGE",
    "atmospheric_pressure",
    "geopotential_height",
]

#: Sea-level standard pressure [Pa] (ISO 2533).
P0 = 101325.0
#: Sea-level standard temperature [K] (ISO 2533).
T0 = 288.15
#: Temperature lapse rate of the troposphere [K/m] (ISO 2533).
LAPSE_RATE = 0.0065
#: Standard gravity [m/s^2] (ISO 2533; CGPM 1901).
G0 = 9.80665
#: Specific gas constant of dry air [J/(kg*K)]: R* / M = 8.31432 / 0.0289644 (ISO 2533).
R_AIR = 8.31432 / 0.0289644
#: Nominal earth radius used to convert geometric to geopotential height [m]
#: (U.S. Standard Atmosphere 1976, r0 = 6 356 766 m).
EARTH_RADIUS = 6356766.0
#: Geometric elevations this module accepts [m]: from the bottom of the ISO 2533 tables
#: (-2 km) to the top of the troposphere (11 km geopotential, 11.019 km geometric).
ELEVATION_RANGE = (-2000.0, 11019.0)

_EXPONENT = G0 / (R_AIR * LAPSE_RATE)


class AtmosphereError(ValueError):
    """An elevation outside the range of the standard atmosphere's troposphere."""


def geopotential_height(elevation_m: float) -> float:
    """Geopotential height of a geometric elevation.

    .. math:: H = \\frac{r_0 z}{r_0 + z}

    Parameters
    ----------
    elevation_m : float
        Geometric elevation above mean sea level, [m]

    Returns
    -------
    float
        Geopotential height, [m]

    References
    ----------
    U.S. Standard Atmosphere, 1976 (NOAA/NASA/USAF), eq. 18; r0 = 6 356 766 m.
    """
    return EARTH_RADIUS * elevation_m / (EARTH_RADIUS + elevation_m)


def atmospheric_pressure(elevation_m: float) -> float:
    """Absolute pressure of the standard atmosphere at a site elevation.

    Troposphere of ISO 2533 / U.S. Standard Atmosphere 1976, with the geometric site
    elevation converted to geopotential height ``H`` first:

    .. math:: p = p_0 \\left(1 - \\frac{L H}{T_0}\\right)^{g_0/(R L)}

    with p0 = 101 325 Pa, T0 = 288.15 K, L = 0.0065 K/m, g0 = 9.80665 m/s^2,
    R = 287.0528 J/(kg K).

    Parameters
    ----------
    elevation_m : float
        Geometric elevation of the site above mean sea level, [m]; from -2000 to
        11 019 m.

    Returns
    -------
    float
        Absolute atmospheric pressure, [Pa]

    Raises
    ------
    AtmosphereError
        When the elevation is not a finite number inside ``ELEVATION_RANGE``.

    Examples
    --------
    >>> round(atmospheric_pressure(0.0), 1)
    101325.0
    >>> round(atmospheric_pressure(1000.0), 0)
    89876.0

    References
    ----------
    ISO 2533:1975, Standard Atmosphere; U.S. Standard Atmosphere, 1976.
    """
    z = float(elevation_m)
    lo, hi = ELEVATION_RANGE
    if not (lo <= z <= hi):  # also false for nan
        raise AtmosphereError(
            f"site elevation {elevation_m!r} m is outside the standard atmosphere's "
            f"troposphere ({lo:g} m to {hi:g} m above sea level)"
        )
    h = EARTH_RADIUS * z / (EARTH_RADIUS + z)
    return P0 * (1.0 - LAPSE_RATE * h / T0) ** _EXPONENT
