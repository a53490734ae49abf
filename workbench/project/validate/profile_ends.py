"""A line's profile must start and end where the line meets its nodes.

A profile point at distance 0 is where the line leaves its ``from`` node, and a point at
the line's length is where it reaches its ``to`` node: their elevations must be the nodes'
(a tank's ``bottom_elevation``, a junction's or receiver's ``elevation``) within
:data:`TOLERANCE`. Otherwise the profile says the pipe leaves a tank a metre above its
outlet (and the tank would drain through a pipe that starts above the liquid), which no
solver can make sense of. A profile that starts beyond distance 0 (or ends short of the
length) is joined to the node's elevation as before.
"""

from __future__ import annotations

from typing import Any

__all__ = ["TOLERANCE", "check_profile_ends"]

#: How far a profile's end point may be from its node's elevation [m] (survey round-off;
#: common practice, no source).
TOLERANCE = 0.05


def _node_elevation(parts: Any, node: str) -> tuple[float, str] | None:
    """The elevation where a line meets ``node`` [m] and the key that gives it."""
    if node in parts.reservoirs and parts.reservoirs[node] is not None:
        return parts.reservoirs[node].bottom_elevation, f"reservoirs.{node}.bottom_elevation"
    for section in ("junctions", "receivers"):
        element = getattr(parts, section).get(node)
        if element is not None:
            return element.elevation, f"{section}.{node}.elevation"
    return None


def check_profile_ends(c: Any, parts: Any) -> None:
    """Add a problem for each profile end point away from its node's elevation."""
    for lid, line in parts.lines.items():
        if line is None or not line.profile:
            continue
        points = line.profile
        ends = []
        if points[0][0] <= 1e-9:
            ends.append((1, points[0], line.from_node, "starts", "leaves"))
        if points[-1][0] >= line.length * (1 - 1e-9):
            ends.append((len(points), points[-1], line.to_node, "ends", "reaches"))
        for index, (_, z), node, verb, joins in ends:
            found = _node_elevation(parts, node)
            if found is None or abs(z - found[0]) <= TOLERANCE:
                continue
            c.add(f"lines.{lid}.profile[{index}].elevation",
                  f"the profile {verb} at elevation {c.shown(z, 'elevation')} but the line "
                  f"{joins} '{node}' at {c.shown(found[0], 'elevation')} ({found[1]}): the end "
                  f"points must match within {c.shown(TOLERANCE, 'elevation', 2)}; correct the "
                  "elevation, or leave the end point out and the node's elevation is used")
