"""How the lines of a system connect: node numbering, incidence, and fixed-head reachability.

Nodes are numbered ``junction_ids + fixed_ids``: junctions first (their heads are unknowns
of the steady solver), then the fixed-head nodes (reservoirs at their level, receivers at
their elevation or vessel pressure). Every line runs from ``line_from`` to ``line_to``; a
positive flow runs that way.

The incidence matrix ``incidence`` (junctions x lines, sparse) has -1 at a line's
from-junction and +1 at its to-junction, so ``incidence @ q`` is the net inflow to each
junction [m^3/s] and continuity reads ``incidence @ q = 0``.

Pure numpy/scipy; no UI, units library or file I/O.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.core.model import System


class TopologyError(ValueError):
    """The lines do not form a network the solvers can use; the message says why in words."""

    def __init__(self, message: str, elements: tuple[str, ...] = ()):
        super().__init__(message)
        self.elements = elements
        """Ids of the junctions or lines concerned."""


@dataclass(frozen=True, eq=False)
class Topology:
    """Numbering and connectivity of a system's lines and nodes.

    Attributes are plain tuples and numpy arrays; ``incidence`` is a
    ``scipy.sparse.csr_matrix``.
    """

    line_ids: tuple[str, ...]
    """Line ids in solver order."""
    junction_ids: tuple[str, ...]
    """Junction ids; their heads are unknowns."""
    fixed_ids: tuple[str, ...]
    """Fixed-head node ids: reservoirs first, then receivers."""
    fixed_kind: tuple[str, ...]
    """Per fixed node: ``"reservoir"``, ``"open_discharge"`` or ``"vessel"``."""
    line_from: np.ndarray
    """Per line, the index of its from-node in :attr:`node_ids` [int]."""
    line_to: np.ndarray
    """Per line, the index of its to-node in :attr:`node_ids` [int]."""
    incidence: object
    """Junctions x lines sparse matrix: -1 at the from-junction, +1 at the to-junction."""
    fixed_incidence: object
    """Fixed nodes x lines sparse matrix, same signs as :attr:`incidence`."""

    @property
    def node_ids(self) -> tuple[str, ...]:
        """``junction_ids + fixed_ids``: the meaning of :attr:`line_from` / :attr:`line_to`."""
        return self.junction_ids + self.fixed_ids

    @property
    def n_lines(self) -> int:
        return len(self.line_ids)

    @property
    def n_junctions(self) -> int:
        return len(self.junction_ids)

    @property
    def n_fixed(self) -> int:
        return len(self.fixed_ids)

    def node_index(self, node_id: str) -> int:
        """Index of ``node_id`` in :attr:`node_ids` (``KeyError`` if unknown)."""
        return self.node_ids.index(node_id)

    def line_index(self, line_id: str) -> int:
        """Index of ``line_id`` in :attr:`line_ids` (``KeyError`` if unknown)."""
        try:
            return self.line_ids.index(line_id)
        except ValueError:
            raise KeyError(line_id) from None

    def from_is_junction(self) -> np.ndarray:
        """Boolean per line: the from-node is a junction."""
        return self.line_from < self.n_junctions

    def to_is_junction(self) -> np.ndarray:
        """Boolean per line: the to-node is a junction."""
        return self.line_to < self.n_junctions

    def unreached_junctions(self, open_lines: np.ndarray | None = None) -> tuple[str, ...]:
        """Junctions with no path to a fixed-head node through the given lines.

        Parameters
        ----------
        open_lines : ndarray of bool, optional
            Lines that conduct (default: all). Closed lines do not connect their ends.
        """
        return tuple(self.junction_ids[j] for j in np.flatnonzero(~self._reached(open_lines)))

    def _reached(self, open_lines: np.ndarray | None) -> np.ndarray:
        n_nodes = self.n_junctions + self.n_fixed
        use = np.ones(self.n_lines, bool) if open_lines is None else np.asarray(open_lines, bool)
        neighbours: list[list[int]] = [[] for _ in range(n_nodes)]
        for a, b in zip(self.line_from[use], self.line_to[use], strict=True):
            neighbours[a].append(int(b))
            neighbours[b].append(int(a))
        seen = np.zeros(n_nodes, bool)
        stack = list(range(self.n_junctions, n_nodes))
        seen[stack] = True
        while stack:
            node = stack.pop()
            for other in neighbours[node]:
                if not seen[other]:
                    seen[other] = True
                    stack.append(other)
        return seen[: self.n_junctions]


def build_topology(system: System) -> Topology:
    """Number the nodes and lines of ``system`` and check that every junction is fed.

    Parameters
    ----------
    system : System
        A validated system.

    Returns
    -------
    Topology

    Raises
    ------
    TopologyError
        When a line names an unknown node, runs from a node to itself, there are no lines
        or no fixed-head node, or a junction has no path to a reservoir or receiver.
    """
    from scipy import sparse

    if not system.lines:
        raise TopologyError("the system has no lines: add at least one line between two nodes")
    junction_ids = tuple(system.junctions)
    res_ids = tuple(system.reservoirs)
    rec_ids = tuple(system.receivers)
    fixed_ids = res_ids + rec_ids
    if not fixed_ids:
        raise TopologyError(
            "the system has no reservoir or receiver: at least one node must have a known head"
        )
    fixed_kind = ("reservoir",) * len(res_ids) + tuple(system.receivers[r].kind for r in rec_ids)
    node_ids = junction_ids + fixed_ids
    index = {nid: i for i, nid in enumerate(node_ids)}
    line_ids = tuple(system.lines)
    line_from = np.empty(len(line_ids), dtype=np.intp)
    line_to = np.empty(len(line_ids), dtype=np.intp)
    for k, lid in enumerate(line_ids):
        line = system.lines[lid]
        for end, nid in (("from", line.from_node), ("to", line.to_node)):
            if nid not in index:
                raise TopologyError(
                    f"line {lid!r}: its {end} node {nid!r} is not a reservoir, junction or "
                    "receiver of this system",
                    (lid,),
                )
        if line.from_node == line.to_node:
            raise TopologyError(
                f"line {lid!r} runs from {line.from_node!r} to itself: give it two different nodes",
                (lid,),
            )
        line_from[k] = index[line.from_node]
        line_to[k] = index[line.to_node]

    nj, nl = len(junction_ids), len(line_ids)
    cols = np.arange(nl)

    def _incidence(offset: int, size: int):
        rows, cc, vals = [], [], []
        for ends, sign in ((line_from, -1.0), (line_to, 1.0)):
            local = ends - offset
            mask = (local >= 0) & (local < size)
            rows.append(local[mask])
            cc.append(cols[mask])
            vals.append(np.full(mask.sum(), sign))
        return sparse.csr_matrix(
            (np.concatenate(vals), (np.concatenate(rows), np.concatenate(cc))), shape=(size, nl)
        )

    topo = Topology(
        line_ids=line_ids,
        junction_ids=junction_ids,
        fixed_ids=fixed_ids,
        fixed_kind=fixed_kind,
        line_from=line_from,
        line_to=line_to,
        incidence=_incidence(0, nj),
        fixed_incidence=_incidence(nj, len(fixed_ids)),
    )
    unreached = topo.unreached_junctions()
    if unreached:
        raise TopologyError(
            "junction(s) " + ", ".join(repr(j) for j in unreached) + " have no path to a "
            "reservoir or receiver, so their head is undetermined: connect them by lines to a "
            "node with a known level or pressure",
            unreached,
        )
    return topo
