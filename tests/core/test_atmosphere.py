"""Standard-atmosphere pressure against the ISO 2533 / U.S. 1976 tables and fluids."""

from __future__ import annotations

import math

import pytest
from fluids.atmosphere import ATMOSPHERE_1976

from workbench.core.atmosphere import (
    EARTH_RADIUS,
    AtmosphereError,
    atmospheric_pressure,
)


def _geometric(geopotential_m: float) -> float:
    """Geometric elevation of a geopotential height (U.S. Standard Atmosphere 1976, eq. 18)."""
    return EARTH_RADIUS * geopotential_m / (EARTH_RADIUS - geopotential_m)


@pytest.mark.parametrize(
    ("geometric_m", "table_pa"),
    [
        # U.S. Standard Atmosphere 1976, table I (geometric altitude), from memory:
        (0.0, 101325.0),
        (1000.0, 89876.0),
        (2000.0, 79501.0),
        (5000.0, 54048.0),
    ],
)
def test_pressure_matches_the_us_1976_table_at_geometric_elevations(geometric_m, table_pa):
    # The table prints five significant figures: tolerance half a unit of the last one.
    assert atmospheric_pressure(geometric_m) == pytest.approx(table_pa, abs=0.6)


@pytest.mark.parametrize(
    ("geopotential_m", "table_pa"),
    [
        # ISO 2533:1975 table (geopotential altitude H), six figures, from memory;
        # the same values as the project's brief quotes.
        (1000.0, 89874.6),
        (2000.0, 79495.2),
    ],
)
def test_pressure_matches_the_iso_2533_table_at_geopotential_heights(geopotential_m, table_pa):
    assert atmospheric_pressure(_geometric(geopotential_m)) == pytest.approx(table_pa, abs=0.06)


@pytest.mark.parametrize("elevation_m", [-1500.0, -400.0, 0.0, 120.0, 850.0, 2400.0, 4300.0, 11000.0])
def test_pressure_agrees_with_fluids_atmosphere_1976(elevation_m):
    # fluids.atmosphere.ATMOSPHERE_1976 (registry library, independent implementation).
    assert atmospheric_pressure(elevation_m) == pytest.approx(
        ATMOSPHERE_1976(elevation_m).P, rel=1e-9
    )


def test_pressure_falls_with_elevation():
    values = [atmospheric_pressure(z) for z in range(-2000, 11000, 250)]
    assert all(a > b for a, b in zip(values, values[1:]))


@pytest.mark.parametrize("elevation_m", [math.nan, math.inf, -2500.0, 12000.0])
def test_elevation_outside_the_troposphere_is_refused_in_words(elevation_m):
    with pytest.raises(AtmosphereError, match="troposphere"):
        atmospheric_pressure(elevation_m)
