"""Steady flow in a network of lines between fixed heads: Newton's method on heads and flows.

Unknowns: the head ``H`` of every junction and the flow ``q`` of every line. Equations:

* continuity at each junction, ``A q = 0`` (``A`` the junction incidence matrix of
  :mod:`workbench.core.topology`: net inflow is zero);
* energy along each line, ``H_from - H_to - h(q) = 0`` with ``h`` the line head loss of
  :class:`workbench.core.line.LineSet` (friction, fittings, valve, entrance and exit by
  flow direction).

Newton's method with the analytic sparse Jacobian ``[[0, A], [-A^T, -diag(dh/dq)]]``
(``scipy.sparse``), each step solved through its Schur complement: eliminating the flows
leaves a weighted graph Laplacian ``A W A^T`` over the junction heads only (numpy's dense
LU up to ``DENSE_JUNCTIONS_MAX`` junctions, ``spsolve`` beyond), started from a
linearisation of every line at a
velocity its end heads could drive, with a backtracking line search on the scaled residual.
``h`` is continuously differentiable through zero flow and reversal (laminar friction is
linear in ``q``); where ``dh/dq`` vanishes at ``q = 0`` (lines with a fixed friction factor
and no laminar term) the Jacobian uses a small positive floor, which changes the path but
not the answer.

Lines whose valve is shut carry ``q = 0`` (their energy equation is replaced by ``q = 0``).

An open discharge (a line ending in the air) cannot supply liquid: when the solution would
send flow *out* of an open discharge into a line, that line is set to zero flow, the
network is solved again, and a ``line.drains_back`` finding says the line stands part-full
or drains back. The line is released again if, with it at zero flow, the head upstream of
the discharge rises above it (an active-set loop, at most one pass per line).

Junctions left with no open path to a known head (all their lines shut) have an
undetermined head; they are pinned internally, reported as ``nan`` and flagged
``node.isolated``.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field

import numpy as np

from workbench.core.checks import ProfileResult, line_profiles, steady_findings
from workbench.core.finding_text import slots
from workbench.core.line import LineSet
from workbench.core.model import Finding, G, System, receiver_head, reservoir_head
from workbench.core.siphon import SiphonBreak, broken_profile, find_break, stop_level
from workbench.core.topology import Topology, TopologyError, build_topology

#: Energy residual tolerance [m].
ENERGY_TOL = 1e-9
#: Continuity residual tolerance [m^3/s] (absolute part; a relative part scales with the flows).
CONTINUITY_TOL = 1e-12
MAX_ITERATIONS = 100

STATUS_MESSAGES = {
    0: "converged",
    1: "did not converge within the iteration limit",
    2: "the linear system became singular or the iteration produced non-finite numbers",
    3: "invalid network",
}


@dataclass(frozen=True)
class LineResult:
    """One line of a steady solution. Losses are magnitudes [m]."""

    flow: float
    """[m^3/s], positive from the from-node to the to-node."""
    velocity: float
    """Mean velocity, signed like the flow [m/s]."""
    reynolds: float
    """[-]"""
    regime: str
    """``"laminar"``, ``"transitional"``, ``"turbulent"`` or ``"no flow"``."""
    friction_factor: float | None
    """Darcy f [-]; ``None`` without flow."""
    friction_method: str
    friction_loss: float
    fittings_loss: float
    valve_loss: float
    entrance_loss: float
    exit_loss: float
    minor_loss: float
    """Fittings + valve + entrance + exit [m]."""
    head_loss: float
    """Friction + minor [m]."""
    velocity_head: float
    """v^2/2g [m]."""
    status: str
    """``"flowing"``, ``"siphon_break"`` (the column parts at a high point: the flow is what
    the leg up to it can lift, :attr:`SteadyResult.siphon_breaks`), ``"closed"`` (valve
    shut), ``"drains_back"`` (would run backwards
    from an open discharge: no flow) or ``"isolated"`` (between junctions cut off from
    every known head by shut valves: no flow)."""
    from_node: str
    to_node: str


@dataclass(frozen=True)
class NodeResult:
    """One node of a steady solution."""

    head: float
    """Head [m] (``nan`` for an isolated junction): at a reservoir or receiver its free
    surface or pressure head; at a junction the energy head ``z + p/(rho g) + alpha
    v^2/2g`` the lines meeting there share (no loss at the junction itself)."""
    pressure: float
    """Gauge pressure at the node elevation [Pa]: at a reservoir at its bottom, at a junction
    the lowest static pressure of the flowing lines meeting there (the energy head less the
    largest ``alpha v^2/2g`` among them), never above the pressure in any of them."""
    elevation: float
    """[m]"""
    kind: str
    """``"junction"``, ``"reservoir"``, ``"open_discharge"`` or ``"vessel"``."""


@dataclass(frozen=True, eq=False)
class SteadyResult:
    """Outcome of :func:`solve_steady`, shaped like scipy's results.

    ``success`` and ``status`` (0 converged, 1 iteration limit, 2 singular, 3 invalid
    network) with ``message`` in words; ``iterations`` (Newton steps over every pass) and
    ``residuals`` (``{"continuity": max |A q| [m^3/s], "energy": max |energy| [m]}``).
    """

    success: bool
    status: int
    message: str
    iterations: int = 0
    residuals: dict[str, float] = field(default_factory=dict)
    lines: dict[str, LineResult] = field(default_factory=dict)
    nodes: dict[str, NodeResult] = field(default_factory=dict)
    profiles: dict[str, ProfileResult] = field(default_factory=dict)
    warnings: list[Finding] = field(default_factory=list)
    flows: np.ndarray | None = None
    """Flow per line in :attr:`line_ids` order [m^3/s]."""
    line_ids: tuple[str, ...] = ()
    levels: dict[str, float] = field(default_factory=dict)
    """Reservoir levels used [m above bottom]."""
    openings: dict[str, float] = field(default_factory=dict)
    """Valve openings used, per line with a valve [-]."""
    solve_time: float = 0.0
    """Wall-clock time of the solve [s]."""
    siphon_breaks: dict[str, SiphonBreak] = field(default_factory=dict)
    """Lines whose column parts at a high point (status ``"siphon_break"``): where, and the
    flow they pass instead of the full-bore one (:mod:`workbench.core.siphon`)."""
    template: str = ""
    """:attr:`message` with ``{name}`` slots for :attr:`values`, so that the output layer
    writes its numbers in the display units (:mod:`workbench.core.finding_text`); "" when
    the message carries no numbers."""
    values: tuple = ()
    """``(name, SI value, quantity kind, digits)`` per slot of :attr:`template`."""


def fixed_heads(system: System, topo: Topology, levels: dict[str, float] | None = None):
    """Head of every fixed node in ``topo.fixed_ids`` order [m]."""
    rho = system.fluid.density
    levels = levels or {}
    out = np.empty(topo.n_fixed)
    for k, nid in enumerate(topo.fixed_ids):
        if nid in system.reservoirs:
            out[k] = reservoir_head(system.reservoirs[nid], rho, levels.get(nid))
        else:
            out[k] = receiver_head(system.receivers[nid], rho)
    return out


#: Largest junction count whose Laplacian is solved dense (numpy's LU): below it that is
#: quicker than a sparse factorisation and needs no ``scipy.sparse.linalg`` (0.1 s to import).
DENSE_JUNCTIONS_MAX = 64


def _solve_laplacian(lap, rhs: np.ndarray) -> np.ndarray:
    """``lap x = rhs`` for the junction heads: dense LU for a few junctions, else SuperLU
    (``spsolve``, minimum-degree ordering); ``nan`` where the matrix is singular."""
    if lap.shape[0] <= DENSE_JUNCTIONS_MAX:
        try:
            return np.linalg.solve(lap.toarray(), rhs)
        except np.linalg.LinAlgError:
            return np.full(rhs.shape, np.nan)
    from scipy.sparse.linalg import spsolve

    return np.atleast_1d(spsolve(lap, rhs, permc_spec="MMD_AT_PLUS_A"))


class _Newton:
    """Newton iteration on ``x = [H_junctions, q]`` for a fixed set of blocked lines."""

    def __init__(self, lines: LineSet, topo: Topology, h_fixed: np.ndarray,
                 openings: np.ndarray, blocked: np.ndarray):
        from scipy import sparse

        self.sparse = sparse
        self.lines, self.topo = lines, topo
        self.h_fixed = h_fixed
        self.openings = openings
        self.blocked = blocked
        nj, nl = topo.n_junctions, topo.n_lines
        self.nj, self.nl = nj, nl
        a = topo.incidence.tocoo()
        self.A = topo.incidence.tocsr()
        self.Af = topo.fixed_incidence.tocsr()
        reached = ~np.isin(np.arange(nj), [topo.junction_ids.index(j) for j in
                                          topo.unreached_junctions(~blocked)])
        self.isolated = ~reached
        self._any_isolated = bool(self.isolated.any())
        self._iso_idx = np.flatnonzero(self.isolated)
        self._from, self._to = topo.line_from, topo.line_to
        m_a, m_b = self._from < nj, self._to < nj
        self._lap_index = (self._from, self._to, m_a, m_b, m_a & m_b)
        # Pins for isolated junctions: their elevation (any value works; reported as nan).
        elev = np.array([lines.system.junctions[j].elevation for j in topo.junction_ids])
        self.pin = elev
        # Static sparsity pattern: rows 0..nj-1 continuity, nj.. energy; cols H then q.
        keep_a = ~self.isolated[a.row] & ~blocked[a.col]
        rows = [a.row[keep_a], nj + a.col[keep_a], np.flatnonzero(self.isolated),
                nj + np.arange(nl)]
        cols = [nj + a.col[keep_a], a.row[keep_a], np.flatnonzero(self.isolated),
                nj + np.arange(nl)]
        self._rows = np.concatenate(rows)
        self._cols = np.concatenate(cols)
        self._const = np.concatenate([
            a.data[keep_a], -a.data[keep_a], np.ones(int(self.isolated.sum())),
        ])
        self._n_const = self._const.size
        # Head scale for the merit function and tolerances.
        self.head_span = max(float(np.ptp(h_fixed)) if h_fixed.size else 0.0, 1e-3)

    def residual(self, x: np.ndarray):
        nj = self.nj
        hj, q = x[:nj], x[nj:]
        h, dh = self.lines.head_loss(q, self.openings)
        node_h = np.concatenate([hj, self.h_fixed])
        fe = node_h[self._from] - node_h[self._to] - h  # H_from - H_to - h(q)
        fe = np.where(self.blocked, q, fe)
        fc = self._net_inflow(q)  # A q
        fc = np.where(self.isolated, hj - self.pin, fc)
        return fc, fe, dh

    def _net_inflow(self, q: np.ndarray) -> np.ndarray:
        """``A q``: net inflow to each junction [m^3/s]."""
        n = self.nj + self.topo.n_fixed
        return (np.bincount(self._to, q, minlength=n)
                - np.bincount(self._from, q, minlength=n))[: self.nj]

    def _laplacian(self, w: np.ndarray):
        """``A diag(w) A^T`` assembled directly (CSC), plus identity rows where isolated."""
        a, b, m_a, m_b, both = self._lap_index
        rows = np.concatenate([a[m_a], b[m_b], a[both], b[both], self._iso_idx])
        cols = np.concatenate([a[m_a], b[m_b], b[both], a[both], self._iso_idx])
        data = np.concatenate([w[m_a], w[m_b], -w[both], -w[both],
                               np.ones(self._iso_idx.size)])
        return self.sparse.csc_matrix((data, (rows, cols)), shape=(self.nj, self.nj))

    def jacobian(self, dh: np.ndarray, q: np.ndarray):
        """The full analytic Jacobian ``[[0, A], [-A^T, -diag(dh/dq)]]`` (sparse, CSC).

        Rows: continuity per junction (identity for an isolated junction), then energy per
        line (identity for a blocked line); columns: junction heads, then line flows.
        :meth:`step` solves the same system through its Schur complement.
        """
        diag = np.where(self.blocked, 1.0, -np.maximum(dh, self._dh_floor))
        data = np.concatenate([self._const, diag])
        n = self.nj + self.nl
        return self.sparse.csc_matrix((data, (self._rows, self._cols)), shape=(n, n))

    def step(self, fc: np.ndarray, fe: np.ndarray, dh: np.ndarray) -> np.ndarray:
        """Newton step ``J dx = -F`` solved by eliminating the flows (Schur complement).

        From the energy rows, ``dq = W (F_e - A^T dH)`` with ``W = diag(1/(dh/dq))`` on open
        lines, and ``dq = -q`` on blocked lines; continuity then gives the weighted graph
        Laplacian system ``(A W A^T) dH = F_c + A W F_e + A_b dq_b``, symmetric positive
        definite when every junction reaches a fixed head, of junction size only.
        """
        w = np.where(self.blocked, 0.0, 1.0 / np.maximum(dh, self._dh_floor))
        dq_blocked = np.where(self.blocked, -fe, 0.0)
        if self.nj:
            lap = self._laplacian(w)
            rhs = fc + self._net_inflow(w * fe + dq_blocked)
            if self._any_isolated:
                rhs = np.where(self.isolated, -fc, rhs)
            d_h = _solve_laplacian(lap, rhs)
            d_full = np.concatenate([d_h, np.zeros(self.topo.n_fixed)])
            d_q = np.where(self.blocked, dq_blocked,
                           w * (fe - (d_full[self._to] - d_full[self._from])))
        else:
            d_h = np.zeros(0)
            d_q = np.where(self.blocked, dq_blocked, w * fe)
        return np.concatenate([d_h, d_q])

    def start(self) -> np.ndarray:
        """Laminar-style linearisation: each line as a linear resistance at a plausible speed."""
        lines = self.lines
        span = self.head_span
        # A velocity the whole head span could drive through the line with f = 0.02.
        k_tot = 1.0 + lines.fittings_k_const + 0.02 * lines.length / lines.diameter
        v_ref = np.clip(np.sqrt(2.0 * G * span / k_tot), 0.05, 5.0)
        q_ref = v_ref * lines.area
        h_ref, dh_ref = lines.head_loss(q_ref, self.openings)
        r = np.where(self.blocked, np.inf, np.maximum(h_ref / q_ref, 1e-12))
        # Floor on dh/dq for the Jacobian: the slope at zero flow (laminar friction and the
        # K1/Re fitting terms, never above the true slope), or where that vanishes (a fixed
        # friction factor) a small fraction of the secant resistance.
        _, dh_zero = lines.head_loss(np.zeros(lines.n), self.openings)
        self._dh_floor = np.where(dh_zero > 0.0, dh_zero,
                                  1e-9 * np.where(np.isfinite(r), r, 1.0))
        g = np.where(self.blocked, 0.0, 1.0 / r)
        # Linear network: q = g (H_from - H_to), A q = 0  ->  (A g A^T) H = -A g (Af^T H_f).
        fixed_only = np.concatenate([np.zeros(self.nj), self.h_fixed])
        drive = fixed_only[self._to] - fixed_only[self._from]  # (Af^T H_f) per line
        hj = np.zeros(self.nj)
        if self.nj:
            rhs = -self._net_inflow(g * drive)
            rhs = np.where(self.isolated, self.pin, rhs)
            hj = _solve_laplacian(self._laplacian(g), rhs)
        node_h = np.concatenate([hj, self.h_fixed])
        q = np.where(self.blocked, 0.0, g * (node_h[self._from] - node_h[self._to]))
        return np.concatenate([hj, q])

    def merit(self, fc, fe, qscale):
        return float(np.sum((fc / qscale) ** 2) + np.sum((fe / self.head_span) ** 2))

    def solve(self, x0: np.ndarray, max_iter: int):
        x = x0.copy()
        fc, fe, dh = self.residual(x)
        it = 0
        status = 1
        while it < max_iter:
            q = x[self.nj:]
            qscale = max(float(np.max(np.abs(q))) if q.size else 0.0, 1e-9)
            if self.converged(fc, fe, qscale):
                status = 0
                break
            with np.errstate(all="ignore"):
                step = self.step(fc, fe, dh)
            if not np.all(np.isfinite(step)):
                status = 2
                break
            it += 1
            m0 = self.merit(fc, fe, qscale)
            lam = 1.0
            for _ in range(60):  # down to 1e-18: nearly shut valves need tiny steps
                xn = x + lam * step
                fcn, fen, dhn = self.residual(xn)
                if np.all(np.isfinite(fen)) and self.merit(fcn, fen, qscale) <= (1 - 1e-4 * lam) * m0:
                    break
                lam *= 0.5
            x, fc, fe, dh = xn, fcn, fen, dhn
        else:
            q = x[self.nj:]
            qscale = max(float(np.max(np.abs(q))) if q.size else 0.0, 1e-9)
            if self.converged(fc, fe, qscale):
                status = 0
        return x, fc, fe, it, status

    def converged(self, fc, fe, qscale) -> bool:
        cont = float(np.max(np.abs(fc))) if fc.size else 0.0
        en = float(np.max(np.abs(fe))) if fe.size else 0.0
        return cont <= CONTINUITY_TOL + 1e-13 * qscale and en <= ENERGY_TOL


def solve_steady(system: System, *, levels: dict[str, float] | None = None,
                 openings: dict[str, float] | None = None,
                 max_iterations: int = MAX_ITERATIONS) -> SteadyResult:
    """Solve the steady flows and heads of ``system``.

    Parameters
    ----------
    system : System
    levels : dict, optional
        Reservoir id -> liquid level [m above bottom] replacing the stored level (a tank
        at its current level).
    openings : dict, optional
        Line id -> valve opening 0..1 replacing the valve's steady opening.
    max_iterations : int
        Newton steps allowed per pass.

    Returns
    -------
    SteadyResult
        ``success`` False with the reason in ``message`` when the network is invalid (no
        fixed head reachable, unknown node) or Newton's method does not converge.
    """
    t0 = time.perf_counter()
    levels = dict(levels or {})
    for rid in levels:
        if rid not in system.reservoirs:
            return SteadyResult(False, 3, f"level given for {rid!r}, which is not a reservoir")
    try:
        topo = build_topology(system)
        lines = LineSet(system, topo)
        x_open = lines.steady_openings(openings)
    except (TopologyError, KeyError, ValueError) as exc:
        msg = exc.args[0] if exc.args else str(exc)
        return SteadyResult(False, 3, f"invalid network: {msg}")
    h_fixed = fixed_heads(system, topo, levels)
    shut = lines.closed(x_open)
    rec_from = np.array([k == "open_discharge" for k in lines.from_kind])
    rec_to = np.array([k == "open_discharge" for k in lines.to_kind])
    back = np.zeros(lines.n, bool)
    total_it = 0
    x = fc = fe = None
    status = 1
    newton = None
    cut = np.zeros(lines.n, bool)
    for _pass in range(lines.n + 1):
        blocked = shut | back
        # Junctions cut off from every fixed head (by shut valves) hold still: the lines
        # among them carry no flow (their pinned heads must not drive any).
        cut_off = [topo.node_index(j) for j in topo.unreached_junctions(~blocked)]
        cut = np.isin(topo.line_from, cut_off) | np.isin(topo.line_to, cut_off)
        blocked = blocked | cut
        newton = _Newton(lines, topo, h_fixed, x_open, blocked)
        x0 = newton.start()
        if x is not None:
            x0[newton.nj:] = np.where(blocked, 0.0, x[newton.nj:])
            x0[:newton.nj] = np.where(newton.isolated, newton.pin, x[:newton.nj])
        x, fc, fe, it, status = newton.solve(x0, max_iterations)
        total_it += it
        if status != 0:
            break
        q = x[newton.nj:]
        hj = x[:newton.nj]
        node_h = np.concatenate([hj, h_fixed])
        dhead = node_h[topo.line_from] - node_h[topo.line_to]
        # Flow out of an open discharge is impossible: block those lines.
        new_back = (rec_from & (q > 0.0)) | (rec_to & (q < 0.0))
        # A blocked line is released when the head upstream of its discharge rises above it.
        release = back & ((rec_to & (dhead > 0.0)) | (rec_from & (dhead < 0.0))) & ~shut
        if not new_back.any() and not release.any():
            break
        back = (back | new_back) & ~release
    residuals = {
        "continuity": float(np.max(np.abs(fc))) if fc is not None and fc.size else 0.0,
        "energy": float(np.max(np.abs(fe))) if fe is not None and fe.size else 0.0,
    }
    if status != 0:
        msg, template, values = slots(
            f"no steady solution found: {STATUS_MESSAGES[status]} after {total_it} Newton "
            "steps (largest continuity error {continuity}, energy error {energy}); check for "
            "lines with almost no resistance, valves nearly shut or inconsistent levels",
            continuity=(residuals["continuity"], "flow"), energy=(residuals["energy"], "head"))
        return SteadyResult(False, status, msg, total_it, residuals, template=template,
                            values=values, line_ids=topo.line_ids,
                            solve_time=time.perf_counter() - t0)
    return _assemble(system, topo, lines, newton, x, h_fixed, x_open, shut, back, levels,
                     total_it, residuals, t0, cut & ~shut & ~back)


def node_static_heads(topo: Topology, node_h: np.ndarray, details: dict[str, np.ndarray],
                      status: list[str]) -> np.ndarray:
    """Head for each node's reported pressure [m]: a junction's energy head less the largest
    kinetic energy ``alpha v^2/2g`` of the flowing lines meeting there, so its pressure is
    the lowest static pressure in those lines (never above any of them); a fixed node's head.

    The network equations join lines at a junction by one energy head (no loss at the
    junction itself), which is what ``head`` reports; each line's static pressure there is
    its own velocity head below it (:func:`workbench.core.checks.line_profiles`).
    """
    nj = topo.n_junctions
    flowing = np.array([st in ("flowing", "siphon_break") for st in status], dtype=bool)
    ke = np.where(flowing, np.abs(details["velocity_head"])
                  * np.asarray(details["kinetic_energy_coefficient"], dtype=float), 0.0)
    largest = np.zeros(len(node_h))
    np.maximum.at(largest, topo.line_from, ke)
    np.maximum.at(largest, topo.line_to, ke)
    largest[nj:] = 0.0
    return node_h - largest


def _siphon_breaks(system: System, topo: Topology, lines: LineSet, q: np.ndarray,
                   node_h: np.ndarray, x_open, status: list[str]) -> dict[int, SiphonBreak]:
    """Cap the flow of every line between two fixed heads whose column would part at a high
    point (:func:`workbench.core.siphon.find_break`); ``q`` and ``status`` are updated in
    place. Lines that meet a junction are left to the findings (not capped)."""
    from workbench.core.checks import SUBATMOSPHERIC_TOLERANCE_M

    out: dict[int, SiphonBreak] = {}
    if system.fluid.vapor_pressure is None and not any(
            ln.air_valves for ln in system.lines.values()):
        return out
    nj = topo.n_junctions
    tol = system.fluid.density * G * SUBATMOSPHERIC_TOLERANCE_M
    for i, lid in enumerate(topo.line_ids):
        a, b = int(topo.line_from[i]), int(topo.line_to[i])
        if status[i] != "flowing" or q[i] == 0.0 or a < nj or b < nj:
            continue
        brk = find_break(system, lines, i, lid, q, x_open, float(node_h[a]), float(node_h[b]),
                         tol)
        if brk is not None:
            out[i] = brk
            q[i] = np.sign(q[i]) * brk.flow
            status[i] = "siphon_break"
    return out


def siphon_findings(system: System, breaks) -> list[Finding]:
    """``line.siphon_break`` (danger) for every capped line: where, the flow it passes, and
    the source level at which it stops."""
    from workbench.core.finding_text import finding

    out = []
    for brk in breaks:
        level = stop_level(system, brk)
        at_level = (f" (level {{stop}} in {brk.source!r})" if level is not None else "")
        vals = dict(s=(brk.distance, "length"), z=(brk.elevation, "elevation", 4),
                    q=(brk.flow, "flow"), full=(brk.full_bore_flow, "flow"),
                    head=(brk.stop_head, "head", 4))
        if level is not None:
            vals["stop"] = (level, "length")
        line = system.lines[brk.line]
        res = system.reservoirs.get(brk.source)
        never = level is not None and res is not None and level <= res.min_level
        stops = (", down to the tank's lowest level (the high point is less than a water "
                 "barometer above it)" if never else
                 ", and the flow stops when the source head falls to {head}" + at_level)
        if brk.flow > 0.0:
            what = ("the line passes only {q} (capped: full-bore it would carry {full}); the "
                    "leg beyond runs part-full" + stops)
        else:
            what = ("the source head is at or below {head}" + at_level + ", so nothing can "
                    "be lifted over it: the flow stops (full-bore it would carry {full})")
        where = ("where the pressure would fall below atmospheric and the air valve there "
                 "lets air in" if brk.vented else
                 "where the pressure would fall to the vapour pressure")
        out.append(finding(
            "line.siphon_break", brk.line,
            f"the liquid column parts at {{s}} from {line.from_node!r} (elevation {{z}}), "
            f"{where} (siphon break): " + what
            + "; lower the crest, or raise the source or the downstream pressure",
            "danger", "energy equation up to the high point at the vapour pressure of the "
            "liquid", **vals))
    return out


def _assemble(system, topo, lines, newton, x, h_fixed, x_open, shut, back, levels,
              iterations, residuals, t0, cut=None) -> SteadyResult:
    nj = topo.n_junctions
    hj = x[:nj].copy()
    hj[newton.isolated] = np.nan
    q = x[nj:].copy()
    cut = np.zeros(lines.n, bool) if cut is None else cut
    q[shut | back | cut] = 0.0
    rho = system.fluid.density
    node_h = np.concatenate([hj, h_fixed])
    status = ["closed" if shut[i] else "drains_back" if back[i] else
              "isolated" if cut[i] else "flowing" for i in range(lines.n)]
    breaks = _siphon_breaks(system, topo, lines, q, node_h, x_open, status)
    det = lines.details(q, x_open)
    line_results: dict[str, LineResult] = {}
    cols = {k: np.abs(det[k]).tolist() for k in (
        "friction_loss", "fittings_loss", "valve_loss", "entrance_loss", "exit_loss",
        "minor_loss", "head_loss", "velocity_head")}
    velocity, reynolds = det["velocity"].tolist(), det["reynolds"].tolist()
    f_list, regime, method = det["friction_factor"].tolist(), det["regime"], det["method"]
    q_list = q.tolist()
    for i, lid in enumerate(topo.line_ids):
        flowing = status[i] in ("flowing", "siphon_break") and q_list[i] != 0.0
        f = f_list[i]
        line = system.lines[lid]
        line_results[lid] = LineResult(
            flow=q_list[i],
            velocity=velocity[i],
            reynolds=reynolds[i],
            regime=str(regime[i]) if flowing else "no flow",
            friction_factor=f if flowing and math.isfinite(f) else None,
            friction_method=str(method[i]) if flowing else "",
            status=status[i],
            from_node=line.from_node,
            to_node=line.to_node,
            **{k: v[i] for k, v in cols.items()},
        )
    profiles = line_profiles(system, topo.line_ids, q, node_h[topo.line_from],
                             node_h[topo.line_to], det, status)
    for i, brk in breaks.items():
        lid = topo.line_ids[i]
        excess = (node_h[topo.line_from[i]] - node_h[topo.line_to[i]]) * np.sign(q[i]) \
            - cols["head_loss"][i] if q[i] != 0.0 else 0.0
        arrays = broken_profile(system, profiles[lid], brk, x[nj + i] > 0.0, excess)
        prof = profiles[lid]
        profiles[lid] = ProfileResult(prof.distance, prof.elevation, *arrays)
    nodes: dict[str, NodeResult] = {}
    kinds = ("junction",) * nj + tuple(topo.fixed_kind)
    static = node_static_heads(topo, node_h, det, status)
    for k, nid in enumerate(topo.node_ids):
        z = system.node_elevation(nid)
        hk = float(node_h[k])
        # at a reservoir: at the bottom, where the lines connect; at a junction: the lowest
        # static pressure of the lines meeting there
        p = rho * G * (float(static[k]) - z)
        nodes[nid] = NodeResult(head=hk, pressure=float(p), elevation=z, kind=kinds[k])
    lv = {rid: levels.get(rid, r.level) for rid, r in system.reservoirs.items()}
    isolated = tuple(j for j, iso in zip(topo.junction_ids, newton.isolated, strict=True) if iso)
    findings = steady_findings(system, topo.line_ids, det, q, status, profiles, lv, isolated)
    findings.extend(siphon_findings(system, breaks.values()))
    openings_used = {lid: float(x_open[i]) for i, lid in enumerate(topo.line_ids)
                     if lines.has_valve[i]}
    n_passes_note = ""
    if back.any():
        n_passes_note = f"; {int(back.sum())} line(s) set to no flow at an open discharge"
    msg, template, values = slots(
        f"converged in {iterations} Newton steps (continuity {{continuity}}, energy "
        f"{{energy}}){n_passes_note}", 2, continuity=(residuals["continuity"], "flow"),
        energy=(residuals["energy"], "head"))
    return SteadyResult(
        success=True, status=0, message=msg, template=template, values=values,
        iterations=iterations, residuals=residuals,
        lines=line_results, nodes=nodes, profiles=profiles, warnings=findings, flows=q,
        line_ids=topo.line_ids, levels=lv, openings=openings_used,
        solve_time=time.perf_counter() - t0,
        siphon_breaks={topo.line_ids[i]: brk for i, brk in breaks.items()},
    )
