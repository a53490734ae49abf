"""Tank geometry: liquid surface area, volume and level of the tanks whose level moves.

The transient solver carries each tank's liquid *volume* as its state (so mass balance is
exact and linear in the line flows) and needs the level back from the volume at every
right-hand-side call, and the surface area for its Jacobian. This module gives both in
closed form for the four shapes of schema 1:

=====================  ===========================================================
``vertical_cylinder``  flat bottom; ``A = pi*D^2/4`` at every level, *including*
                       ``h = 0`` (a flat bottom has its full area at the bottom)
``rectangular``        flat bottom; ``A = L*W``
``horizontal_cylinder`` flat ends; ``A = 2*L*sqrt(h*(D - h))``, zero exactly at
                       ``h = 0`` and ``h = D``
``cone_bottom``        cone of height ``h_c`` with its apex at the bottom, then a vertical
                       cylinder; ``A = pi*D^2/4*(h/h_c)^2`` in the cone, zero at the apex
=====================  ===========================================================

Why not ``fluids.geometry.TANK`` at run time: its ``SA_from_h`` returns zero at the very
bottom and top even for a flat bottom, its ``V_from_h`` clamps levels outside the tank
silently, and its ``h_from_V`` is a root solve per call. The tests check these closed forms
against ``fluids.geometry.TANK.V_from_h`` where that function is valid.

Levels above the top are never clamped: an open-topped shape continues prismatically
(the transient solver records ``tank.overflow`` at the overflow level), and a closed
shape (the horizontal cylinder) raises :class:`TankLevelError` outside ``0..D``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

from workbench.core.model import Reservoir


class TankLevelError(ValueError):
    """A volume or level outside what the tank's shape can hold."""


@dataclass(frozen=True)
class TankGeometry:
    """Closed-form geometry of one tank. Levels are depth above the tank bottom [m].

    Attributes
    ----------
    kind : str
        Shape name (a ``TankShape.kind``).
    capacity : float
        Volume at the overflow level (``Reservoir.height``), or at the top of a closed
        shape when no overflow level is given; ``inf`` for an open-topped shape with no
        overflow level [m^3].
    top : float
        Highest level the shape itself allows: ``D`` for a horizontal cylinder, ``inf``
        for open-topped shapes [m].
    overflow_level : float | None
        ``Reservoir.height`` (or the top of a closed shape) [m]; ``None`` when the tank
        cannot overflow in the model.
    """

    kind: str
    capacity: float
    top: float
    overflow_level: float | None
    _area: Callable[[float], float]
    _volume: Callable[[float], float]
    _level: Callable[[float], float]
    _max_area: float
    _v_top: float = math.inf
    """Volume at :attr:`top` (``inf`` for open-topped shapes) [m^3]."""

    def area(self, h: float) -> float:
        """Free-surface area at level ``h`` [m^2].

        Exact geometry: the full area at ``h = 0`` for a flat bottom; zero at ``h = 0``
        and ``h = D`` for a horizontal cylinder and zero at the apex of a cone. Callers
        dividing by it (``dh/dt = (sum Q)/A``) must guard those points; see
        :meth:`area_floor`.

        Parameters
        ----------
        h : float
            Level above the bottom [m], ``0 <= h <= top``.
        """
        self._check_level(h)
        return self._area(h)

    def area_floor(self, h: float, floor_fraction: float = 1e-6) -> float:
        """Surface area [m^2] bounded below by ``floor_fraction`` times the largest area,
        for Jacobians and ODE right-hand sides; extrapolates outside ``0..top``."""
        hh = min(max(h, 0.0), self.top)
        return max(self._area(hh), floor_fraction * self._max_area)

    def volume(self, h: float) -> float:
        """Liquid volume at level ``h`` [m^3]; raises :class:`TankLevelError` below the
        bottom or above a closed top (never clamps)."""
        self._check_level(h)
        return self._volume(h)

    def level(self, volume: float) -> float:
        """Level holding ``volume`` [m]; the inverse of :meth:`volume`.

        Raises :class:`TankLevelError` for a negative volume or one larger than a closed
        shape holds; above the overflow level of an open-topped tank the level simply
        keeps rising (overflow is an event for the caller, not a clamp).
        """
        if volume < -1e-12 * max(self.capacity if math.isfinite(self.capacity) else 1.0, 1.0):
            raise TankLevelError(f"negative liquid volume {volume!r} m^3")
        if volume > self._v_top * (1 + 1e-12):
            raise TankLevelError(
                f"volume {volume!r} m^3 exceeds what the {self.kind} holds "
                f"({self._v_top!r} m^3)"
            )
        return self._level(max(volume, 0.0))

    def level_extrapolated(self, volume: float) -> float:
        """Level for any volume [m], for trial states of an ODE solver.

        Inside the shape this is :meth:`level`. Beyond it the level-volume curve is
        continued by odd reflection, ``h(-V) = -h(V)`` below the bottom and likewise about a
        closed top, so the curve stays monotone and continuous (for a flat bottom this is the
        straight prismatic continuation; at the zero-width bottom of a horizontal cylinder
        or the apex of a cone it keeps the local power law instead of an extreme slope).
        """
        if volume < 0.0:
            return -self._level(min(-volume, self._v_top))
        v_top = self._v_top
        if volume > v_top:
            return 2.0 * self.top - self._level(max(2.0 * v_top - volume, 0.0))
        return self._level(volume)

    def _check_level(self, h: float) -> None:
        if h < 0.0 or h > self.top:
            raise TankLevelError(
                f"level {h!r} m is outside the {self.kind} (0 to {self.top!r} m)"
            )


def _prismatic(kind: str, area: float, overflow: float | None) -> TankGeometry:
    return TankGeometry(
        kind=kind,
        capacity=area * overflow if overflow is not None else math.inf,
        top=math.inf,
        overflow_level=overflow,
        _area=lambda h: area,
        _volume=lambda h: area * h,
        _level=lambda v: v / area,
        _max_area=area,
    )


def _horizontal_cylinder(diameter: float, length: float, overflow: float | None) -> TankGeometry:
    r = 0.5 * diameter

    v_full = math.pi * r * r * length

    def _theta_minus_sin(theta: float) -> float:
        if theta < 1e-2:  # series: no cancellation for tiny segments
            t2 = theta * theta
            return theta * t2 / 6.0 * (1.0 - t2 / 20.0 + t2 * t2 / 840.0)
        return theta - math.sin(theta)

    def volume(h: float) -> float:
        # Segment of central angle theta: V = L*R^2*(theta - sin(theta))/2, with
        # sin(theta/4) = sqrt(h/D) (accurate for small h); upper half by symmetry.
        hh = min(max(h, 0.0), diameter)
        low = min(hh, diameter - hh)
        theta = 4.0 * math.asin(math.sqrt(low / diameter))
        v_low = 0.5 * length * r * r * _theta_minus_sin(theta)
        return v_low if hh <= r else v_full - v_low

    def area(h: float) -> float:
        return 2.0 * length * math.sqrt(max(0.0, h * (diameter - h)))

    def level(v: float) -> float:
        if v <= 0.0:
            return 0.0
        if v >= v_full:
            return diameter
        # Work on the lower half (symmetry: V(D - h) = V_full - V(h)) and solve the
        # segment angle theta from theta - sin(theta) = 2*pi*V/V_full, Newton from a
        # start that is exact for small angles (theta^3/6 ~ rhs).
        flip = v > 0.5 * v_full
        vv = v_full - v if flip else v
        rhs = 2.0 * math.pi * vv / v_full
        # start: exact for small angles (theta^3/6 ~ rhs), blended towards the half-full
        # value pi; then Halley steps (cubic convergence, 2-3 steps to round-off)
        theta = min((6.0 * rhs) ** (1.0 / 3.0), math.pi)
        for _ in range(20):
            sin_t = math.sin(theta)
            fval = _theta_minus_sin(theta) - rhs
            d1 = 2.0 * math.sin(0.5 * theta) ** 2  # 1 - cos(theta) without cancellation
            if d1 <= 0.0:
                break
            step = fval / d1
            step = step / (1.0 - 0.5 * step * sin_t / d1)
            theta = min(max(theta - step, 1e-300), math.pi)
            if abs(step) <= 1e-11 * theta:
                break
        h = 2.0 * r * math.sin(0.25 * theta) ** 2  # r(1 - cos(theta/2)), no cancellation
        return diameter - h if flip else h

    top = diameter
    ov = overflow if overflow is not None else top
    return TankGeometry(
        kind="horizontal_cylinder",
        capacity=volume(min(ov, top)),
        top=top,
        overflow_level=min(ov, top),
        _area=area,
        _volume=volume,
        _level=level,
        _max_area=length * diameter,
        _v_top=v_full,
    )


def _cone_bottom(diameter: float, cone_height: float, overflow: float | None) -> TankGeometry:
    a_full = 0.25 * math.pi * diameter * diameter
    v_cone = a_full * cone_height / 3.0

    def area(h: float) -> float:
        if h >= cone_height:
            return a_full
        return a_full * (h / cone_height) ** 2

    def volume(h: float) -> float:
        if h >= cone_height:
            return v_cone + a_full * (h - cone_height)
        return a_full * h**3 / (3.0 * cone_height**2)

    def level(v: float) -> float:
        if v >= v_cone:
            return cone_height + (v - v_cone) / a_full
        return (3.0 * v * cone_height**2 / a_full) ** (1.0 / 3.0)

    return TankGeometry(
        kind="cone_bottom",
        capacity=volume(overflow) if overflow is not None else math.inf,
        top=math.inf,
        overflow_level=overflow,
        _area=area,
        _volume=volume,
        _level=level,
        _max_area=a_full,
    )


def _need(res: Reservoir, **values: float | None) -> None:
    for name, value in values.items():
        if value is None or not (value > 0.0) or not math.isfinite(value):
            raise ValueError(
                f"tank {res.id!r} ({res.shape.kind if res.shape else 'no shape'}): "
                f"shape.{name} must be a positive length, got {value!r}"
            )


def _vertical(res: Reservoir) -> TankGeometry:
    _need(res, diameter=res.shape.diameter)
    return _prismatic("vertical_cylinder", 0.25 * math.pi * res.shape.diameter**2, res.height)


def _rectangular(res: Reservoir) -> TankGeometry:
    _need(res, length=res.shape.length, width=res.shape.width)
    return _prismatic("rectangular", res.shape.length * res.shape.width, res.height)


def _horizontal(res: Reservoir) -> TankGeometry:
    _need(res, diameter=res.shape.diameter, length=res.shape.length)
    return _horizontal_cylinder(res.shape.diameter, res.shape.length, res.height)


def _cone(res: Reservoir) -> TankGeometry:
    _need(res, diameter=res.shape.diameter, cone_height=res.shape.cone_height)
    return _cone_bottom(res.shape.diameter, res.shape.cone_height, res.height)


#: shape kind -> builder; the registry of tank shapes.
SHAPES: dict[str, Callable[[Reservoir], TankGeometry]] = {
    "vertical_cylinder": _vertical,
    "horizontal_cylinder": _horizontal,
    "rectangular": _rectangular,
    "cone_bottom": _cone,
}


def tank_geometry(res: Reservoir) -> TankGeometry:
    """Geometry of a tank reservoir.

    Parameters
    ----------
    res : Reservoir
        A reservoir of kind ``"tank"`` with a ``shape``.

    Returns
    -------
    TankGeometry
        ``area(h)`` [m^2], ``volume(h)`` [m^3], ``level(volume)`` [m], ``capacity`` [m^3].

    Examples
    --------
    >>> from workbench.core.model import Reservoir, TankShape
    >>> g = tank_geometry(Reservoir("T1", "tank", 0.0, 1.0,
    ...                   shape=TankShape("horizontal_cylinder", diameter=2.0, length=5.0)))
    >>> round(g.volume(1.0), 6), round(g.level(g.volume(0.3)), 12)
    (7.853982, 0.3)
    """
    if res.shape is None:
        raise ValueError(f"reservoir {res.id!r} is a {res.kind!r} without a tank shape")
    try:
        builder = SHAPES[res.shape.kind]
    except KeyError:
        raise ValueError(
            f"tank {res.id!r}: unknown shape {res.shape.kind!r}; expected one of "
            + ", ".join(SHAPES)
        ) from None
    return builder(res)


@dataclass(frozen=True)
class TankBalance:
    """The volume balance of one tank at an instant: what its lines, feed and draw-off move.

    All flows [m^3/s]; ``level_rate`` [m/s], positive rising.
    """

    lines_net: float
    """Net flow into the tank by its lines (inflows less outflows)."""
    inflow: float
    """Feed from outside the model."""
    draw_off: float
    """Draw-off asked by something outside the model."""
    net: float
    """``lines_net + inflow - draw_off``: the rate of change of volume."""
    level_rate: float
    """``net / A(h)``, the free-surface area at the level."""


def tank_balances(system, flows: dict[str, float], levels: dict[str, float] | None = None,
                  t: float = 0.0) -> dict[str, TankBalance]:
    """The balance of every tank of ``system`` at given line flows, levels and time.

    ``dV/dt = sum Q_in - sum Q_out + Q_feed(t) - Q_draw(t)`` and ``dh/dt = (dV/dt)/A(h)``
    (mass balance of an incompressible liquid; the area from the tank's geometry, floored
    at a millionth of its largest as in the transient solver).

    Parameters
    ----------
    system : System
    flows : dict
        Line id -> flow [m^3/s], positive from -> to.
    levels : dict, optional
        Tank id -> level [m]; default each tank's stored level.
    t : float
        Time for scheduled feeds and draw-offs [s].
    """
    from workbench.core.model import draw_off_at, inflow_at

    levels = levels or {}
    out: dict[str, TankBalance] = {}
    for rid, res in system.reservoirs.items():
        if res.kind != "tank":
            continue
        lines_net = 0.0
        for lid, line in system.lines.items():
            q = flows.get(lid, 0.0)
            if line.to_node == rid:
                lines_net += q
            if line.from_node == rid:
                lines_net -= q
        feed, draw = inflow_at(res, t), draw_off_at(res, t)
        net = lines_net + feed - draw
        area = tank_geometry(res).area_floor(levels.get(rid, res.level))
        out[rid] = TankBalance(lines_net, feed, draw, net, net / area)
    return out
