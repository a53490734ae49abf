"""A line's lists: ``fittings`` (a named fitting or a fixed loss coefficient each) and its
elevation ``profile`` (distance along the line and elevation, distances increasing)."""

from __future__ import annotations

from workbench.core import model as m
from workbench.project.schema import LIST_ITEMS
from workbench.project.validate.checker import Checker, did_you_mean, field_spec

__all__ = ["check_fittings", "check_profile"]


def check_fittings(c: Checker, t: dict, path: str) -> tuple[m.Fitting, ...] | None:
    try:
        from workbench.core.fittings import FITTINGS
        names = tuple(FITTINGS)
    except ImportError:  # the fittings table is not installed in this build
        names = None
    specs = LIST_ITEMS["lines.fittings"]
    out = []
    n0 = len(c.problems)
    for key, item in c.list_of_tables(t, "fittings", path):
        c.known_keys(item, specs, key)
        ftype = c.text(item, "type", key)
        if ftype is not None and names is not None and ftype not in names:
            c.add(f"{key}.type", f"unknown fitting type '{ftype}'{did_you_mean(ftype, names)}")
        k = c.number(item, field_spec("lines.fittings", "k"), key)
        count = c.number(item, field_spec("lines.fittings", "count"), key, integer=True)
        label = c.text(item, "label", key, default="") or ""
        method = c.choice(item, field_spec("lines.fittings", "method"), key)
        if ("type" in item) == ("k" in item):
            c.add(key, "give either type (a named fitting) or k (a fixed loss coefficient), "
                  "not both" if "type" in item else "give type (a named fitting) or k (a fixed "
                  "loss coefficient)")
        if len(c.problems) == n0:
            out.append(m.Fitting(type=ftype, k=k, count=count or 1, label=label,
                                 method=method or "darby_3k"))
    return tuple(out) if len(c.problems) == n0 else None


def check_profile(c: Checker, t: dict, path: str, length: float | None):
    points = []
    n0 = len(c.problems)
    items = c.list_of_tables(t, "profile", path)
    for key, item in items:
        c.known_keys(item, LIST_ITEMS["lines.profile"], key)
        d = c.quantity(item, "distance", "length", key, nonnegative=True)
        z = c.quantity(item, "elevation", "elevation", key)
        if d is not None and z is not None:
            points.append((key, item, d, z))
    for (_, _, d0, _), (key, item, d1, _) in zip(points, points[1:]):
        if d1 <= d0:
            c.add(f"{key}.distance", f"{item['distance']!r}: distances must increase along "
                  "the profile")
    if length is not None and points:
        key, item, d, _ = points[-1]
        if d > length * (1 + 1e-6) + 1e-9:
            c.add(f"{key}.distance", f"{item['distance']!r} is beyond the line's length "
                  f"{t.get('length')!r}")
    if len(c.problems) > n0:
        return None
    return tuple((d, z) for _, _, d, z in points)

