"""Which lines an elastic run takes together: every line joined through junctions.

A chain of lines in series grows through junctions joining exactly two lines and stops at
reservoirs, receivers and dead ends (a junction with one line); a branched or looped part is
taken whole (:func:`connected_lines`).
"""

from __future__ import annotations

from workbench.core.elastic.results import ElasticSetupError
from workbench.core.model import System


def lines_at_nodes(system: System) -> dict[str, list[str]]:
    """Node id -> the ids of the lines that start or end there."""
    touching: dict[str, list[str]] = {}
    for lid, line in system.lines.items():
        touching.setdefault(line.from_node, []).append(lid)
        touching.setdefault(line.to_node, []).append(lid)
    return touching


def _next_in_chain(system: System, touching, node: str, came_from: str,
                   upstream: bool) -> str | None:
    """The line continuing the chain through ``node``, or ``None`` where the chain ends."""
    if node not in system.junctions:
        return None
    others = [lid for lid in touching.get(node, []) if lid != came_from]
    if not others:
        return None
    if len(others) > 1:
        raise ElasticSetupError(
            f"junction {node!r} joins {len(others) + 1} lines; the elastic model handles "
            "lines in series only (no branches)"
        )
    nxt = system.lines[others[0]]
    if (upstream and nxt.to_node != node) or (not upstream and nxt.from_node != node):
        raise ElasticSetupError(
            f"lines {came_from!r} and {nxt.id!r} meet at junction {node!r} pointing "
            "against each other; give lines in series the same direction"
        )
    return nxt.id


def series_chain(system: System, line_id: str) -> tuple[str, ...]:
    """The lines in series that contain ``line_id``, upstream to downstream.

    Raises
    ------
    ElasticSetupError
        Unknown line; a branch (junction with three or more lines); two lines of the chain
        pointing against each other.
    """
    if line_id not in system.lines:
        raise ElasticSetupError(
            f"no line {line_id!r}; lines are: {', '.join(system.lines) or 'none'}"
        )
    touching = lines_at_nodes(system)
    chain = [line_id]
    seen = {line_id}
    while (prev := _next_in_chain(system, touching, system.lines[chain[0]].from_node,
                                  chain[0], True)) is not None:
        if prev in seen:
            raise ElasticSetupError(f"lines around {line_id!r} form a loop")
        chain.insert(0, prev)
        seen.add(prev)
    while (nxt := _next_in_chain(system, touching, system.lines[chain[-1]].to_node,
                                 chain[-1], False)) is not None:
        if nxt in seen:
            raise ElasticSetupError(f"lines around {line_id!r} form a loop")
        chain.append(nxt)
        seen.add(nxt)
    return tuple(chain)


def elastic_line_ids(system: System, extra: tuple[str, ...] | list[str] = ()) -> tuple[str, ...]:
    """Lines to run elastically: ``[lines.ID.surge] model = "elastic"`` plus ``extra``.

    Raises
    ------
    ElasticSetupError
        An id in ``extra`` that is not a line of the system.
    """
    unknown = [lid for lid in extra if lid not in system.lines]
    if unknown:
        raise ElasticSetupError(
            f"no line {', '.join(map(repr, unknown))}; lines are: "
            f"{', '.join(system.lines) or 'none'}"
        )
    chosen = [lid for lid, line in system.lines.items() if line.surge.model == "elastic"]
    chosen += [lid for lid in extra if lid not in chosen]
    return tuple(chosen)


def connected_lines(system: System, line_id: str) -> tuple[str, ...]:
    """The lines joined to ``line_id`` through junctions (reservoirs, tanks and receivers
    hold their heads and separate the parts of a system).

    Lines in series come upstream to downstream (:func:`series_chain`); a branched or looped
    part comes in the order of the project's lines.

    Raises
    ------
    ElasticSetupError
        Unknown line.
    """
    if line_id not in system.lines:
        raise ElasticSetupError(
            f"no line {line_id!r}; lines are: {', '.join(system.lines) or 'none'}"
        )
    touching = lines_at_nodes(system)
    seen = {line_id}
    todo = [line_id]
    while todo:
        line = system.lines[todo.pop()]
        for node in (line.from_node, line.to_node):
            if node not in system.junctions:
                continue
            for other in touching.get(node, []):
                if other not in seen:
                    seen.add(other)
                    todo.append(other)
    try:
        chain = series_chain(system, line_id)
    except ElasticSetupError:
        chain = ()
    if set(chain) == seen:
        return chain
    return tuple(lid for lid in system.lines if lid in seen)
