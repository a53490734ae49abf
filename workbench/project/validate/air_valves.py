"""Air valves at a line's profile points: ``air_valve = true`` in a ``profile`` entry."""

from __future__ import annotations

from workbench.project.validate.checker import Checker, describe


def check_air_valves(c: Checker, t: dict, path: str) -> tuple[float, ...]:
    """Distances [m] of the profile points marked ``air_valve = true`` (refusals by key path)."""
    from workbench.project.units import parse_quantity

    found = []
    items = t.get("profile")
    if not isinstance(items, list):
        return ()  # the profile checker refuses it
    for i, item in enumerate(items, start=1):
        key = f"{path}.profile[{i}]"
        if not isinstance(item, dict) or "air_valve" not in item:
            continue
        value = item["air_valve"]
        if not isinstance(value, bool):
            c.add(f"{key}.air_valve", f"expected true or false, got {describe(value)}")
            continue
        if value and "distance" in item:
            try:
                found.append(float(parse_quantity(str(item["distance"]), "length")))
            except (ValueError, TypeError):
                continue  # the profile checker names a bad distance
    return tuple(found)
