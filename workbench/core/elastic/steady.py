r"""The steady state an elastic run starts from, with the same losses as its boundaries.

Each line's flow follows from the heads at its two nodes through the line's loss (friction
and fittings, :class:`~workbench.core.elastic.losses.LineLoss`), its valve
``K = K_open/c(x)^2`` at the opening at ``t = 0``, and at a free surface the entrance loss
``(1 + K_entrance)`` velocity heads where flow leaves it (an exit into a free surface or the
air keeps its piezometric head: the exit loss is the velocity head; Wylie & Streeter,
*Fluid Transients in Systems*, 1993, ch. 3 convention). The heads at junctions make the flows
balance (continuity). Lines behind a shut valve or leading to a dead end carry no flow and
sit at the head of the node they stay open to; piezometric heads are continuous through
junctions. The state is an equilibrium of the discrete equations, so nothing moves until a
valve does (tested).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from workbench.core.elastic.losses import LineLoss
from workbench.core.elastic.results import ElasticSetupError
from workbench.core.model import G, Line, System, receiver_head, reservoir_head


@dataclass(frozen=True)
class LineEnds:
    """How one line meets its two nodes in the steady state (and the boundaries)."""

    line: Line
    loss: LineLoss
    k_entrance: float
    """``(1 + K_entrance)/(2 g A^2)`` [s^2/m^5], for flow leaving a free surface."""
    from_fixed: bool
    to_fixed: bool
    k_valve: float
    """The valve's ``K/(2 g A^2)`` at ``t = 0`` [s^2/m^5]; 0 without a valve; inf: shut."""

    def total_loss(self, q: float) -> float:
        """Head drop from the from-node to the to-node at flow ``q`` [m]."""
        k = self.k_valve
        if q >= 0.0 and self.from_fixed:
            k += self.k_entrance
        if q < 0.0 and self.to_fixed:
            k += self.k_entrance
        return self.loss.head_loss(q) + k * q * abs(q)

    def flow(self, dh: float) -> float:
        """Flow [m^3/s] for a head drop ``dh`` [m] from the from-node to the to-node."""
        if dh == 0.0 or self.k_valve == math.inf:
            return 0.0
        from scipy.optimize import brentq

        qb = self.loss.area * math.sqrt(2.0 * G * abs(dh)) * 2.0 + 1e-12
        while abs(self.total_loss(math.copysign(qb, dh))) < abs(dh):
            qb *= 2.0
        lo, hi = (0.0, qb) if dh > 0 else (-qb, 0.0)
        return brentq(lambda q: dh - self.total_loss(q), lo, hi, xtol=1e-15, rtol=1e-14,
                      maxiter=200)


def fixed_head(system: System, node: str) -> float | None:
    """The head held at a reservoir or receiver [m]; ``None`` at a junction."""
    rho = system.fluid.density
    if node in system.reservoirs:
        return reservoir_head(system.reservoirs[node], rho)
    if node in system.receivers:
        return receiver_head(system.receivers[node], rho)
    return None


def _carrying_lines(ends: list[LineEnds], system: System) -> list[int]:
    """Lines that may carry flow: open, and not leading (through junctions) to a dead end."""
    live = [i for i, e in enumerate(ends) if e.k_valve != math.inf]
    while True:
        degree: dict[str, int] = {}
        for i in live:
            for node in (ends[i].line.from_node, ends[i].line.to_node):
                degree[node] = degree.get(node, 0) + 1
        dead = [i for i in live if any(
            node in system.junctions and degree[node] == 1
            for node in (ends[i].line.from_node, ends[i].line.to_node))]
        if not dead:
            return live
        live = [i for i in live if i not in dead]


def _solve_network(ends, live, heads: dict[str, float]) -> dict[int, float]:
    """Flows of the carrying lines and heads at their junctions (``heads`` is completed).

    Unknowns: each carrying line's flow and each junction's head; equations: each line's
    loss ``H_from - H_to = h(Q)`` and continuity at each junction (Newton-type solution,
    scipy's ``hybr``). Lines between fixed heads alone are solved one by one.
    """
    unknown = sorted({node for i in live for node in (ends[i].line.from_node,
                                                       ends[i].line.to_node)
                      if node not in heads})
    if not unknown:
        return {i: ends[i].flow(heads[ends[i].line.from_node] - heads[ends[i].line.to_node])
                for i in live}
    from scipy.optimize import root

    index = {node: len(live) + j for j, node in enumerate(unknown)}
    h_scale = max(1.0, max(heads.values()) - min(heads.values()))
    q_scale = max(ends[i].loss.area * math.sqrt(2.0 * G * h_scale) for i in live)

    def head(x, node):
        return heads[node] if node not in index else x[index[node]] * h_scale

    def residual(x):
        r = np.zeros(len(x))
        for j, i in enumerate(live):
            ln = ends[i].line
            q = x[j] * q_scale
            r[j] = (head(x, ln.from_node) - head(x, ln.to_node) - ends[i].total_loss(q)) \
                / h_scale
            if ln.from_node in index:
                r[index[ln.from_node]] -= x[j]
            if ln.to_node in index:
                r[index[ln.to_node]] += x[j]
        return r

    guess = np.concatenate([np.full(len(live), 0.1),
                            np.full(len(unknown), np.mean(list(heads.values())) / h_scale)])
    sol = root(residual, guess, method="hybr", options={"xtol": 1e-15})
    if not np.all(np.abs(residual(sol.x)) < 1e-9):
        raise ElasticSetupError(
            "the steady flow the surge run starts from could not be found for the lines "
            f"{', '.join(ends[i].line.id for i in live)}")
    heads.update({node: float(sol.x[k]) * h_scale for node, k in index.items()})
    return {i: float(sol.x[j]) * q_scale for j, i in enumerate(live)}


def _spread_heads(ends, live, heads: dict[str, float]) -> None:
    """Give nodes without a head the head of a neighbour across a line without flow."""
    for allow_shut in (False, True):
        changed = True
        while changed:
            changed = False
            for i, e in enumerate(ends):
                if i in live or (e.k_valve == math.inf and not allow_shut):
                    continue
                a, b = e.line.from_node, e.line.to_node
                if a in heads and b not in heads:
                    heads[b] = heads[a]
                    changed = True
                elif b in heads and a not in heads:
                    heads[a] = heads[b]
                    changed = True


def steady_state(system: System, ends: list[LineEnds]) -> tuple[list[float], dict[str, float]]:
    """Initial flow of each line [m^3/s] and head at each node [m].

    Raises
    ------
    ElasticSetupError
        No reservoir or receiver anywhere in the lines run.
    """
    heads = {}
    for e in ends:
        for node in (e.line.from_node, e.line.to_node):
            h = fixed_head(system, node)
            if h is not None:
                heads[node] = h
    if not heads:
        raise ElasticSetupError(
            f"the lines {' - '.join(e.line.id for e in ends)} have no free surface or "
            "receiver at any end")
    live = _carrying_lines(ends, system)
    flows = [0.0] * len(ends)
    for i, q in _solve_network(ends, live, heads).items():
        flows[i] = q
    _spread_heads(ends, live, heads)
    return flows, heads


def line_heads(e: LineEnds, q: float, heads: dict[str, float], count: int) -> np.ndarray:
    """Steady head at the ``count + 1`` nodes of a line [m]: from its from-node, less the
    entrance and valve losses there, falling by ``h_f/N`` per reach."""
    ln = e.line
    if q == 0.0:
        shut_from = e.k_valve == math.inf and ln.valve is not None and \
            ln.valve.position == "from"
        return np.full(count + 1, heads[ln.to_node] if shut_from else heads[ln.from_node])
    h = heads[ln.from_node]
    if e.from_fixed and q > 0.0:
        h -= e.k_entrance * q * q
    if ln.valve is not None and ln.valve.position == "from":
        h -= e.k_valve * q * abs(q)
    drop = e.loss.head_loss(q) / count
    return h - drop * np.arange(count + 1)
