"""``[reservoirs.ID]``: constant-level reservoirs and tanks (shape, levels, restart level) with
a tank's feed and draw-off, each a constant or a schedule.

A new key of a tank is read in :func:`check_reservoir` (after the shape and levels) and
passed to :class:`~workbench.core.model.Reservoir`; keys that apply only to tanks are listed in
``TANK_KEYS`` so that a constant-level reservoir refuses them.
"""

from __future__ import annotations

import math

from workbench.core import model as m
from workbench.project.schema import LIST_ITEMS, SECTIONS
from workbench.project.validate.checker import Checker, field_spec, words
from workbench.project.validate.vent import VENT_KEYS, check_vent

__all__ = ["FEED_KEYS", "TANK_KEYS", "check_feeds", "check_flow_schedule", "check_reservoir"]

#: A tank's keys for its shape and levels (refused on constant levels).
TANK_KEYS = ("shape", "diameter", "length", "width", "cone_angle", "cone_height", "height",
             "min_level", "restart_level", *VENT_KEYS)


def check_reservoir(c: Checker, rid: str, t: dict) -> m.Reservoir | None:
    """A reservoir of either kind, or ``None`` after adding its problems."""
    path = f"reservoirs.{rid}"
    c.known_keys(t, SECTIONS["reservoirs"], path)
    c.text(t, "description", path)
    n0 = len(c.problems)
    kind = c.choice(t, field_spec("reservoirs", "kind"), path)
    bottom = c.quantity(t, "bottom_elevation", "elevation", path)
    level = c.quantity(t, "level", "length", path, nonnegative=True)
    surface = c.quantity(t, "surface_pressure", "pressure", path)
    if kind == "constant_level":
        _refuse_tank_keys(c, t, path)
        if len(c.problems) > n0 or bottom is None or level is None:
            return None
        return m.Reservoir(rid, "constant_level", bottom, level, surface or 0.0)
    if kind != "tank":
        return None
    dims = _tank_dimensions(c, t, path)
    _check_shape_keys(c, t, path, dims)
    _check_heights(c, t, path, dims, level)
    feeds = check_feeds(c, t, path)
    restart = _restart_level(c, t, path, dims)
    gas = check_vent(c, t, path, dims, surface)
    shape_kind = dims["shape"]
    if len(c.problems) > n0 or None in (bottom, level, shape_kind):
        return None
    shape = m.TankShape(shape_kind, diameter=dims["diameter"], length=dims["length"],
                        width=dims["width"],
                        cone_height=dims["cone_height"] if shape_kind == "cone_bottom" else None)
    return m.Reservoir(rid, "tank", bottom, level, surface or 0.0, shape=shape,
                       height=dims["height"], min_level=dims["min_level"] or 0.0,
                       restart_level=restart, **feeds, **gas)


def _refuse_tank_keys(c: Checker, t: dict, path: str) -> None:
    """A constant-level reservoir given a tank's keys: one problem per key."""
    for key in TANK_KEYS:
        if key in t:
            c.add(f"{path}.{key}", f"'{key}' applies only to kind = \"tank\" (this reservoir "
                  "holds a constant level)")
    for key in FEED_KEYS:
        if key in t:
            c.add(f"{path}.{key}", f"'{key}' applies only to kind = \"tank\": a "
                  "constant-level reservoir's level is held whatever flows in or out, so "
                  "a feed or draw-off would change nothing (make it a tank to model one)")


#: The dimensions each tank shape needs.
SHAPE_NEEDS = {
    "vertical_cylinder": ("diameter",),
    "horizontal_cylinder": ("diameter", "length"),
    "rectangular": ("length", "width"),
    "cone_bottom": ("diameter",),
}


def _tank_dimensions(c: Checker, t: dict, path: str) -> dict:
    """A tank's shape and dimensions as read (m, rad; ``None`` where absent or wrong)."""
    shape_kind = c.choice(t, field_spec("reservoirs", "shape"), path)
    if "shape" not in t:
        c.add(f"{path}.shape", "missing required key 'shape' for a tank: one of "
              + words(field_spec("reservoirs", "shape").choices))
    return {
        "shape": shape_kind,
        "diameter": c.quantity(t, "diameter", "length", path, positive=True),
        "length": c.quantity(t, "length", "length", path, positive=True),
        "width": c.quantity(t, "width", "length", path, positive=True),
        "cone_angle": c.quantity(t, "cone_angle", "angle", path),
        "cone_height": c.quantity(t, "cone_height", "length", path, positive=True),
        "height": c.quantity(t, "height", "length", path, positive=True),
        "min_level": c.quantity(t, "min_level", "length", path, nonnegative=True),
    }


def _check_shape_keys(c: Checker, t: dict, path: str, dims: dict) -> None:
    """The keys each shape needs and refuses; a cone's height from its angle (into ``dims``)."""
    shape_kind = dims["shape"]
    if shape_kind is not None:
        for key in SHAPE_NEEDS[shape_kind]:
            if key not in t:
                c.add(f"{path}.{key}", f"missing required key '{key}' for shape = "
                      f"\"{shape_kind}\"")
        allowed = set(SHAPE_NEEDS[shape_kind])
        if shape_kind == "cone_bottom":
            allowed |= {"cone_angle", "cone_height"}
        for key in ("diameter", "length", "width", "cone_angle", "cone_height"):
            if key in t and key not in allowed:
                c.add(f"{path}.{key}", f"'{key}' does not apply to shape = \"{shape_kind}\"")
    if shape_kind != "cone_bottom":
        return
    if "cone_angle" in t and "cone_height" in t:
        c.add(f"{path}.cone_angle", "give cone_angle or cone_height, not both")
    elif "cone_angle" not in t and "cone_height" not in t:
        c.add(f"{path}.cone_height", "missing required key 'cone_height' (or cone_angle) for "
              "shape = \"cone_bottom\"")
    cone_angle = dims["cone_angle"]
    if cone_angle is not None:
        if not 0 < cone_angle < math.pi:
            c.add(f"{path}.cone_angle", f"{t['cone_angle']!r}: the included angle must be "
                  "between 0 and 180 deg")
        elif dims["diameter"] is not None:
            dims["cone_height"] = dims["diameter"] / 2 / math.tan(cone_angle / 2)


def _check_heights(c: Checker, t: dict, path: str, dims: dict, level: float | None) -> None:
    """Height against the shape (a horizontal cylinder's defaults to its diameter, into
    ``dims``), and the level and minimum level below it."""
    shape_kind, diameter = dims["shape"], dims["diameter"]
    height, cone_height, min_level = dims["height"], dims["cone_height"], dims["min_level"]
    if shape_kind == "horizontal_cylinder" and diameter is not None:
        if height is None:
            height = dims["height"] = diameter
        elif height > diameter * (1 + 1e-9):
            c.add(f"{path}.height", f"{t['height']!r} is above the top of the horizontal "
                  f"cylinder (diameter {t.get('diameter')!r})")
    if shape_kind == "cone_bottom" and cone_height is not None and height is not None \
            and height < cone_height:
        c.add(f"{path}.height", f"{t['height']!r} is below the top of the cone "
              f"({c.shown(cone_height, 'length')})")
    if level is not None and height is not None and level > height * (1 + 1e-9):
        what = "height" if "height" in t else "diameter"
        c.add(f"{path}.level", f"level {t['level']!r} is above the tank's {what} "
              f"{t.get(what)!r}: the tank would overflow")
    if min_level is not None and level is not None and min_level >= level and level > 0:
        c.add(f"{path}.min_level", f"min_level {t['min_level']!r} must be below level "
              f"{t['level']!r}")
    if min_level is not None and height is not None and min_level >= height:
        c.add(f"{path}.min_level", f"min_level {t['min_level']!r} must be below height")


def _restart_level(c: Checker, t: dict, path: str, dims: dict) -> float | None:
    """The level (m) at which a drained tank's outlets start again, above the minimum level
    and below the overflow."""
    restart = c.quantity(t, "restart_level", "length", path, nonnegative=True)
    if restart is None:
        return None
    height = dims["height"]
    if restart <= (dims["min_level"] or 0.0):
        c.add(f"{path}.restart_level", f"restart_level {t['restart_level']!r} must be above "
              f"min_level {t.get('min_level', c.shown(0.0, 'length'))!r}: the outlets start "
              "again above the "
              "drained level")
    elif height is not None and restart >= height:
        c.add(f"{path}.restart_level", f"restart_level {t['restart_level']!r} must be below "
              "the overflow level (height)")
    return restart


#: A tank's keys for flows from and to outside the model (refused on constant levels).
FEED_KEYS = ("inflow", "inflow_schedule", "draw_off", "draw_off_schedule")


def check_feeds(c: Checker, t: dict, path: str) -> dict:
    """A tank's feed and draw-off, each a constant or a schedule (not both), as Reservoir
    keyword arguments; problems are added with their key paths."""
    out: dict = {}
    for name, opposite in (("inflow", "draw_off"), ("draw_off", "inflow")):
        sched_name = f"{name}_schedule"
        if name in t and sched_name in t:
            c.add(f"{path}.{sched_name}", f"give {name} or {sched_name}, not both")
            continue
        if name in t:
            value = c.quantity(t, name, "flow", path)
            if value is not None and value < 0.0:
                what = ("a flow taken out of the tank is draw_off" if name == "inflow"
                        else "a feed into the tank is inflow")
                c.add(f"{path}.{name}", f"{t[name]!r}: the {name.replace('_', '-')} must not be "
                      f"negative ({what}, e.g. {opposite} = \"{c.shown(abs(value), 'flow')}\")")
            elif value is not None:
                out[name] = value
        elif sched_name in t:
            schedule = check_flow_schedule(c, t, sched_name, path)
            if schedule is not None:
                out[sched_name] = schedule
    return out


def check_flow_schedule(c: Checker, t: dict, name: str, path: str) -> m.FlowSchedule | None:
    """A list of ``{ time, flow }`` points with increasing times and flows not negative."""
    key = f"{path}.{name}"
    items = c.list_of_tables(t, name, path)
    if isinstance(t[name], list) and not t[name]:
        c.add(key, "the schedule is empty: give at least one { time = \"0 s\", flow = "
              f"\"{c.example('10 L/s', 'flow')}\" }}")
        return None
    n0 = len(c.problems)
    times: list[float] = []
    flows: list[float] = []
    what = "draw-off" if name.startswith("draw_off") else "feed"
    for item_key, item in items:
        c.known_keys(item, LIST_ITEMS[f"reservoirs.{name}"], item_key)
        time = c.quantity(item, "time", "time", item_key, nonnegative=True)
        flow = c.quantity(item, "flow", "flow", item_key)
        if flow is not None and flow < 0.0:
            c.add(f"{item_key}.flow", f"{item['flow']!r}: the {what} must not be negative")
            flow = None
        if time is not None and flow is not None:
            if times and time <= times[-1]:
                c.add(f"{item_key}.time", f"{item['time']!r}: times must increase along the "
                      "schedule")
            times.append(time)
            flows.append(flow)
    if len(c.problems) > n0 or len(times) != len(items) or not items:
        return None
    return m.FlowSchedule(tuple(times), tuple(flows))

