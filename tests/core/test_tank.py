"""Tank geometry against fluids' TANK (an independent implementation) and plain geometry."""

from __future__ import annotations

import math

import numpy as np
import pytest
from fluids.geometry import TANK
from scipy.integrate import quad

from workbench.core.model import Reservoir, TankShape
from workbench.core.tank import TankLevelError, tank_geometry


def _tank(shape: TankShape, height: float | None = None) -> Reservoir:
    return Reservoir("T1", "tank", 10.0, 1.0, shape=shape, height=height)


HORIZONTAL = TankShape("horizontal_cylinder", diameter=2.4, length=6.0)
VERTICAL = TankShape("vertical_cylinder", diameter=3.0)
CONE = TankShape("cone_bottom", diameter=2.0, cone_height=1.2)
RECT = TankShape("rectangular", length=4.0, width=2.5)


@pytest.mark.parametrize(
    ("shape", "reference", "levels"),
    [
        # fluids.geometry.TANK, horizontal cylinder with flat ends (fluids 1.x, registry).
        (HORIZONTAL, TANK(D=2.4, L=6.0, horizontal=True), np.linspace(0.0, 2.4, 25)),
        # fluids TANK, vertical with a conical bottom of height 1.2 m (apex down).
        (CONE, TANK(D=2.0, L=3.0, horizontal=False, sideA="conical", sideA_a=1.2),
         np.linspace(0.0, 4.2, 29)),
        # fluids TANK, vertical flat-bottomed cylinder.
        (VERTICAL, TANK(D=3.0, L=5.0, horizontal=False), np.linspace(0.0, 5.0, 11)),
    ],
)
def test_volume_matches_fluids_tank_inside_the_shell(shape, reference, levels):
    geom = tank_geometry(_tank(shape))
    for h in levels:
        assert geom.volume(h) == pytest.approx(reference.V_from_h(h), rel=1e-10, abs=1e-12)


@pytest.mark.parametrize("shape", [HORIZONTAL, VERTICAL, CONE, RECT])
def test_volume_is_the_integral_of_the_surface_area(shape):
    # dV/dh = A(h): checked with scipy quad used independently of the closed forms.
    geom = tank_geometry(_tank(shape))
    top = 2.4 if shape is HORIZONTAL else 3.0
    for h in np.linspace(0.0, top, 7):
        integral, _ = quad(geom.area, 0.0, h, limit=200)
        assert geom.volume(h) == pytest.approx(integral, rel=1e-9, abs=1e-12)


@pytest.mark.parametrize("shape", [HORIZONTAL, VERTICAL, CONE, RECT])
def test_level_inverts_volume_to_round_off(shape):
    geom = tank_geometry(_tank(shape))
    top = 2.4 if shape is HORIZONTAL else 3.0
    for h in np.concatenate([np.linspace(0.0, top, 301), [1e-9, 1e-6, top - 1e-6]]):
        assert geom.level(geom.volume(h)) == pytest.approx(h, abs=1e-9)


def test_a_flat_bottom_has_its_full_area_at_the_bottom():
    # Plain geometry: a flat floor is wetted at once (fluids' SA_from_h gives 0 there).
    geom = tank_geometry(_tank(VERTICAL))
    assert geom.area(0.0) == pytest.approx(math.pi * 3.0**2 / 4, rel=1e-15)


def test_a_horizontal_cylinder_has_no_width_at_the_bottom_and_top():
    # Plain geometry: chord 2*sqrt(h(D - h)) vanishes at h = 0 and h = D.
    geom = tank_geometry(_tank(HORIZONTAL))
    assert geom.area(0.0) == 0.0 and geom.area(2.4) == 0.0
    assert geom.area(1.2) == pytest.approx(2 * 6.0 * 1.2, rel=1e-15)
    assert geom.area_floor(0.0) > 0.0


def test_a_closed_shape_refuses_a_volume_beyond_its_top_instead_of_clamping():
    geom = tank_geometry(_tank(HORIZONTAL))
    with pytest.raises(TankLevelError, match="exceeds"):
        geom.level(geom.volume(2.4) * 1.01)
    with pytest.raises(TankLevelError, match="outside"):
        geom.volume(2.5)


def test_an_open_topped_tank_keeps_rising_past_its_overflow_level():
    geom = tank_geometry(_tank(VERTICAL, height=4.0))
    assert geom.capacity == pytest.approx(math.pi * 9 / 4 * 4.0, rel=1e-15)
    assert geom.level(geom.capacity * 1.5) == pytest.approx(6.0, rel=1e-12)


def test_a_negative_volume_is_an_error():
    with pytest.raises(TankLevelError, match="negative"):
        tank_geometry(_tank(CONE)).level(-1.0)


def test_a_shape_missing_a_dimension_is_named():
    with pytest.raises(ValueError, match="shape.cone_height"):
        tank_geometry(_tank(TankShape("cone_bottom", diameter=2.0)))
