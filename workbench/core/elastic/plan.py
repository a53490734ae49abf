"""What the time march needs, as arrays: the state layout, boundaries, valves in time.

The state of all ``n`` grid nodes is one array ``X`` of ``2n`` values: ``u = H + BQ`` at
nodes ``0..n-1``, then ``w = H - BQ`` stored reversed (``w`` of node ``p`` at ``2n-1-p``),
so that one shift moves ``u`` one node downstream and ``w`` one node upstream. A line end
meeting a node reads its known characteristic from its *in* slot and receives the node's
answer ``2H - c`` in its *out* slot (see :mod:`workbench.core.elastic.boundaries`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from workbench.core.elastic.grid import Grid
from workbench.core.elastic.losses import ReachFriction
from workbench.core.elastic.results import ElasticSetupError
from workbench.core.elastic.steady import LineEnds, fixed_head
from workbench.core.model import G, Line, System


@dataclass(frozen=True, eq=False)
class Boundaries:
    """Every boundary condition of the grid, in arrays (one entry per boundary)."""

    fixed_node: np.ndarray
    """Reservoir, tank, receiver or discharge ends: grid node [-]."""
    fixed_in: np.ndarray
    fixed_out: np.ndarray
    fixed_head: np.ndarray
    """Head held [m]."""
    fixed_k_out: np.ndarray
    """Loss for flow from the pipe into the fixed head [s^2/m^5]."""
    fixed_k_in: np.ndarray
    """Loss for flow from the fixed head into the pipe [s^2/m^5]."""
    fixed_b: np.ndarray
    fixed_valve: np.ndarray
    """Row of :attr:`kappa` for a valve at that end; -1: none."""
    junction_ptr: np.ndarray
    """Junctions (and dead ends): members ``junction_ptr[j]:junction_ptr[j+1]``."""
    member_in: np.ndarray
    member_out: np.ndarray
    member_b: np.ndarray
    junction_node: np.ndarray
    """Grid node that holds a junction's cavity (its first member's node)."""
    pair_node: np.ndarray
    """Valves joining two lines: ``(pairs, 2)`` grid nodes of the two faces."""
    pair_in: np.ndarray
    pair_out: np.ndarray
    pair_b: np.ndarray
    pair_valve: np.ndarray
    kappa: np.ndarray
    """``(valves, steps + 1)`` valve loss ``K/(2 g A^2)`` in time [s^2/m^5]."""
    vj_ptr: np.ndarray
    """Junctions of three or more lines, one joining through a valve: the other members
    ``vj_ptr[j]:vj_ptr[j+1]`` of ``vj_in``, ``vj_out``, ``vj_b``."""
    vj_in: np.ndarray
    vj_out: np.ndarray
    vj_b: np.ndarray
    vj_node: np.ndarray
    """Grid node holding the junction's cavity."""
    vj_face: np.ndarray
    """``(junctions, 3)``: the valve line's face node, in and out slots."""
    vj_face_b: np.ndarray
    vj_valve: np.ndarray


@dataclass(frozen=True, eq=False)
class MarchPlan:
    """Everything the time march reads; the kernels fill a :class:`MarchOutput`."""

    n: int
    n_steps: int
    dt: float
    state0: np.ndarray
    """Initial ``X`` (``2n``)."""
    b_node: np.ndarray
    """``B = a/(gA)`` per node [s/m^2]."""
    friction: ReachFriction
    bounds: Boundaries
    h_vap: np.ndarray | None
    """Vapour head per node [m]; ``None``: the liquid has no vapour pressure."""
    cavities: bool
    """Model vapour cavities (else only look for the first vapour-pressure contact)."""
    interior: np.ndarray
    """True at nodes that are not a line end."""
    series_nodes: np.ndarray
    """Nodes whose head is recorded every step."""


def slots(n: int, node: int, line_ends_here: bool) -> tuple[int, int]:
    """(in, out) slots of a line end at ``node``: ``u`` in at a line's last node."""
    return (node, 2 * n - 1 - node) if line_ends_here else (2 * n - 1 - node, node)


def valve_kappa(times: np.ndarray, line: Line) -> np.ndarray:
    """The valve's ``K/(2 g A^2)`` at ``times`` [s^2/m^5] (``inf`` when shut)."""
    from workbench.core.valve import opening_at, relative_flow_coefficient, valve_k

    v = line.valve
    if v.schedule is not None and len(v.schedule.times) > 0:
        # opening_at's rule for every step at once: piecewise linear, holding the ends
        x = np.interp(times, v.schedule.times, v.schedule.openings)
    else:
        x = np.full(len(times), opening_at(v, 0.0))
    c = relative_flow_coefficient(v.characteristic, x, v.rangeability, v.low_opening)
    area = math.pi * line.diameter ** 2 / 4.0
    return np.asarray(valve_k(v.k_open, c), dtype=float) / (2.0 * G * area * area)


def _members(system: System, ends: list[LineEnds], grid: Grid) -> dict[str, list]:
    """Node id -> ``[(line index, line ends here, grid node, valve here)]``."""
    at: dict[str, list] = {}
    for i, e in enumerate(ends):
        ln = e.line
        v_from = ln.valve is not None and ln.valve.position == "from"
        v_to = ln.valve is not None and ln.valve.position == "to"
        at.setdefault(ln.from_node, []).append((i, False, grid.first(i), v_from))
        at.setdefault(ln.to_node, []).append((i, True, grid.last(i), v_to))
    return at


def build_boundaries(system: System, ends: list[LineEnds], grid: Grid, times: np.ndarray,
                     notes: list[str]) -> tuple[Boundaries, dict[str, int]]:
    """The boundaries of the grid, and the valve rows by line id."""
    n = grid.n
    b_line = [grid.speeds[e.line.id].used / (G * e.loss.area) for e in ends]
    fixed, juncs, pairs, valves, valve_juncs = [], [], [], {}, []

    def valve_row(i: int) -> int:
        valves.setdefault(ends[i].line.id, len(valves))
        return valves[ends[i].line.id]

    for node, members in _members(system, ends, grid).items():
        head = fixed_head(system, node)
        if head is not None:
            for i, here, p, v in members:
                k_e = ends[i].k_entrance
                fixed.append((p, *slots(n, p, here), head, 0.0, k_e, b_line[i],
                              valve_row(i) if v else -1))
            continue
        with_valve = [m for m in members if m[3]]
        if len(with_valve) > 1:
            raise ElasticSetupError(
                f"two valves meet at node {node!r}; the elastic model takes one")
        if with_valve and len(members) == 2:
            one, two = sorted(members, key=lambda m: not m[1])  # the line ending here first
            pairs.append(((one[2], two[2]), slots(n, one[2], one[1]), slots(n, two[2], two[1]),
                          (b_line[one[0]], b_line[two[0]]), valve_row(with_valve[0][0])))
            continue
        if with_valve and len(members) > 2:
            v = with_valve[0]
            others = [m for m in members if m is not v]
            valve_juncs.append(([(slots(n, p, here), b_line[i], p) for i, here, p, _ in others],
                                (v[2], *slots(n, v[2], v[1])), b_line[v[0]], valve_row(v[0])))
            continue
        juncs.append([(slots(n, p, here), b_line[i], p) for i, here, p, _ in members])
    kappa = np.zeros((len(valves), len(times)))
    by_id = {e.line.id: e.line for e in ends}
    for lid, row in valves.items():
        kappa[row] = valve_kappa(times, by_id[lid])
    return _as_arrays(fixed, juncs, pairs, kappa, valve_juncs), valves


def _as_arrays(fixed, juncs, pairs, kappa, valve_juncs) -> Boundaries:
    def col(rows, j, dtype=float):
        return np.array([r[j] for r in rows], dtype=dtype)

    ptr = np.cumsum([0] + [len(m) for m in juncs]).astype(np.int64)
    flat = [m for members in juncs for m in members]
    pair_node = np.array([p[0] for p in pairs], dtype=np.int64).reshape(-1, 2)
    return Boundaries(
        fixed_node=col(fixed, 0, np.int64), fixed_in=col(fixed, 1, np.int64),
        fixed_out=col(fixed, 2, np.int64), fixed_head=col(fixed, 3),
        fixed_k_out=col(fixed, 4), fixed_k_in=col(fixed, 5), fixed_b=col(fixed, 6),
        fixed_valve=col(fixed, 7, np.int64),
        junction_ptr=ptr,
        member_in=np.array([m[0][0] for m in flat], dtype=np.int64),
        member_out=np.array([m[0][1] for m in flat], dtype=np.int64),
        member_b=np.array([m[1] for m in flat], dtype=float),
        junction_node=np.array([members[0][2] for members in juncs], dtype=np.int64),
        pair_node=pair_node,
        pair_in=np.array([[p[1][0], p[2][0]] for p in pairs], dtype=np.int64).reshape(-1, 2),
        pair_out=np.array([[p[1][1], p[2][1]] for p in pairs], dtype=np.int64).reshape(-1, 2),
        pair_b=np.array([p[3] for p in pairs], dtype=float).reshape(-1, 2),
        pair_valve=np.array([p[4] for p in pairs], dtype=np.int64),
        kappa=kappa,
        vj_ptr=np.cumsum([0] + [len(v[0]) for v in valve_juncs]).astype(np.int64),
        vj_in=np.array([m[0][0] for v in valve_juncs for m in v[0]], dtype=np.int64),
        vj_out=np.array([m[0][1] for v in valve_juncs for m in v[0]], dtype=np.int64),
        vj_b=np.array([m[1] for v in valve_juncs for m in v[0]], dtype=float),
        vj_node=np.array([v[0][0][2] for v in valve_juncs], dtype=np.int64),
        vj_face=np.array([v[1] for v in valve_juncs], dtype=np.int64).reshape(-1, 3),
        vj_face_b=np.array([v[2] for v in valve_juncs], dtype=float),
        vj_valve=np.array([v[3] for v in valve_juncs], dtype=np.int64),
    )
