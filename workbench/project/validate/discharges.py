"""Every line must be fed: open discharges alone feed nothing.

An open discharge is a free outfall to air: liquid leaves the system there and never enters
from it (the steady solver blocks any flow out of one). Lines joined to each other through
junctions form a group; a group whose only ends are open discharges (no tank, reservoir or
vessel) has nothing to feed it. Its fixed heads (the discharges' elevations) then differ
with no flow to take up the difference, or hold a pipe full of liquid at rest that would in
fact drain: no steady state or run built on it means anything. A line from one open
discharge straight to another is the smallest such group. Both are refused here, naming
the lines and their ends, rather than reaching the solvers. (A group with no fixed head at
all is the topology check's.)
"""

from __future__ import annotations

from typing import Any

__all__ = ["check_open_discharge_ends"]


def _groups(lines: dict[str, dict], junctions: dict) -> list[list[str]]:
    """The lines joined to each other through junctions, each group in file order."""
    parent = {lid: lid for lid in lines}

    def find(x: str) -> str:
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    at_junction: dict[str, str] = {}
    for lid, table in lines.items():
        for end in (table.get("from"), table.get("to")):
            if isinstance(end, str) and end in junctions:
                if end in at_junction:
                    parent[find(lid)] = find(at_junction[end])
                else:
                    at_junction[end] = lid
    groups: dict[str, list[str]] = {}
    for lid in lines:
        groups.setdefault(find(lid), []).append(lid)
    return list(groups.values())


def _quoted(ids) -> str:
    return ", ".join(f"'{i}'" for i in ids)


def check_open_discharge_ends(c: Any, parts: Any) -> None:
    """Add a problem for each group of lines that only open discharges end."""
    tables = parts.tables
    lines = tables.get("lines", {})
    junctions, receivers = tables.get("junctions", {}), tables.get("receivers", {})
    reservoirs = tables.get("reservoirs", {})
    for group in _groups(lines, junctions):
        ends = [lines[lid].get(end) for lid in group for end in ("from", "to")]
        if not all(isinstance(e, str) and (e in junctions or e in receivers
                                           or e in reservoirs) for e in ends):
            continue  # a dangling or missing end: reported where the line is read
        outfalls = list(dict.fromkeys(e for e in ends if e in receivers))
        fed = any(e in reservoirs or receivers[e].get("kind") != "open_discharge"
                  for e in ends if e not in junctions)
        if fed or not outfalls:
            continue
        first = group[0]
        if len(group) == 1 and len(outfalls) == 2:
            a, b = lines[first]["from"], lines[first]["to"]
            c.add(f"lines.{first}.to",
                  f"line '{first}' joins two open discharges, from '{a}' to '{b}': an open "
                  "discharge is a free outfall where liquid leaves the system, so nothing can "
                  "feed this line; start it at the tank, reservoir, vessel or junction the "
                  "liquid comes from")
            continue
        inner = list(dict.fromkeys(e for e in ends if e in junctions))
        through = f" (through junction(s) {_quoted(inner)})" if inner else ""
        c.add(f"lines.{first}",
              f"line(s) {_quoted(group)}{through} end only at the open discharge(s) "
              f"{_quoted(outfalls)}: an open discharge is a free outfall where liquid leaves "
              "the system, so nothing feeds these lines; connect them to the tank, reservoir "
              "or vessel the liquid comes from, or delete them")
