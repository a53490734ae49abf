"""A line's ``[lines.ID.valve]`` (characteristic, K or Kv at full opening, opening schedule)
and ``[lines.ID.surge]`` (which surge model and how many reaches)."""

from __future__ import annotations

import math

from workbench.core import model as m
from workbench.project.schema import LIST_ITEMS, SECTIONS
from workbench.project.validate.checker import Checker, field_spec

__all__ = ["check_surge", "check_valve"]


def check_valve(c: Checker, t: dict, path: str, diameter: float | None,
                 fluid: m.FluidProps | None) -> tuple[bool, m.Valve | None]:
    if "valve" not in t:
        return True, None
    vpath = f"{path}.valve"
    v = c.table(t["valve"], vpath, f"a table [{vpath}]")
    if v is None:
        return False, None
    n0 = len(c.problems)
    c.known_keys(v, SECTIONS["lines.valve"], vpath)
    characteristic = c.choice(v, field_spec("lines.valve", "characteristic"), vpath)
    k_open = c.number(v, field_spec("lines.valve", "k_open"), vpath, exclusive_minimum=True)
    kv_open = c.quantity(v, "kv_open", "kv", vpath, positive=True)
    opening = c.number(v, field_spec("lines.valve", "opening"), vpath)
    rangeability = c.number(v, field_spec("lines.valve", "rangeability"), vpath,
                            exclusive_minimum=True)
    position = c.choice(v, field_spec("lines.valve", "position"), vpath)
    low_opening = c.choice(v, field_spec("lines.valve", "low_opening"), vpath)
    if "k_open" in v and "kv_open" in v:
        c.add(f"{vpath}.kv_open", "give k_open or kv_open, not both")
    elif "k_open" not in v and "kv_open" not in v:
        c.add(f"{vpath}.k_open", "missing required key 'k_open' (or kv_open): the valve's "
              "loss coefficient at full opening, e.g. k_open = 0.2")
    schedule = None
    items = c.list_of_tables(v, "schedule", vpath)
    if "schedule" in v and not items and isinstance(v["schedule"], list):
        c.add(f"{vpath}.schedule", "the schedule is empty: give at least one { time, opening }")
    times, openings = [], []
    for key, item in items:
        c.known_keys(item, LIST_ITEMS["lines.valve.schedule"], key)
        time = c.quantity(item, "time", "time", key, nonnegative=True)
        op = c.number(item, field_spec("lines.valve.schedule", "opening"), key)
        if time is not None and op is not None:
            if times and time <= times[-1]:
                c.add(f"{key}.time", f"{item['time']!r}: times must increase along the schedule")
            times.append(time)
            openings.append(float(op))
    if items and len(times) == len(items):
        schedule = m.ValveSchedule(tuple(times), tuple(openings))
    if len(c.problems) > n0 or characteristic is None:
        return False, None
    if kv_open is not None:
        if diameter is None or fluid is None:
            return False, None
        from workbench.core.valve import k_from_kv

        try:
            k_open = k_from_kv(kv_open * 3600.0, diameter, fluid.density)
        except (ArithmeticError, ValueError):  # Kv so far out that K overflows or underflows
            k_open = math.inf
        if not (math.isfinite(k_open) and k_open > 0.0):
            c.add(f"{vpath}.kv_open", f"{v['kv_open']!r}: this Kv gives no usable loss "
                  f"coefficient in a {c.shown(diameter, 'diameter')} line; check the number and its "
                  "unit")
            return False, None
    return True, m.Valve(characteristic=characteristic, k_open=float(k_open),
                         opening=float(opening), rangeability=float(rangeability),
                         schedule=schedule, position=position, low_opening=low_opening)


def check_surge(c: Checker, t: dict, path: str) -> tuple[bool, m.SurgeSettings]:
    if "surge" not in t:
        return True, m.SurgeSettings()
    spath = f"{path}.surge"
    s = c.table(t["surge"], spath, f"a table [{spath}]")
    if s is None:
        return False, m.SurgeSettings()
    n0 = len(c.problems)
    c.known_keys(s, SECTIONS["lines.surge"], spath)
    model = c.choice(s, field_spec("lines.surge", "model"), spath)
    reaches = c.number(s, field_spec("lines.surge", "reaches"), spath, integer=True)
    if len(c.problems) > n0:
        return False, m.SurgeSettings()
    return True, m.SurgeSettings(model=model or "rigid", reaches=reaches)

