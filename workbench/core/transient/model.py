"""The rigid-column model of a system: constant arrays, line configurations, tracked stations.

:class:`TransientModel` holds everything constant over a run, built once from a
:class:`~workbench.core.model.System`: the incidence of lines on junctions and fixed nodes,
``a = rho g/I = g A/L`` per line, the tanks' geometry and limit volumes, and the *stations*
(line ends and profile points) where pressure is tracked. :class:`Configuration` holds the
matrices of one configuration of open lines and spilling tanks (see the package docstring
for the projection ``S``); :class:`~workbench.core.transient.sparse.SparseConfiguration` the
same for a large system. The state vector is ``y = [Q (lines), V (tanks), X (gas spaces),
W (volume accumulators)]``.
"""

from __future__ import annotations

import numpy as np

from workbench.core.model import (
    G,
    System,
    draw_off_at,
    inflow_at,
    receiver_head,
    reservoir_head,
    restart_level,
)
from workbench.core.tank import TankGeometry, tank_geometry
from workbench.core.transient.gas import GasSpaces
from workbench.core.transient.sparse import SPARSE_LINES


class Configuration:
    """Matrices for one configuration of open lines and spilling tanks."""

    def __init__(self, model: "TransientModel", open_lines: np.ndarray, spilling: np.ndarray):
        self.open = open_lines.copy()
        self.open_f = open_lines.astype(float)
        self.spilling = spilling.copy()
        alpha = np.where(open_lines, model.alpha, 0.0)
        m = model.m_dense
        nl = model.nl
        if m.shape[0]:
            lap = (m * alpha) @ m.T
            self.lap_pinv = np.linalg.pinv(lap, rcond=1e-13, hermitian=True)
            w = self.lap_pinv @ (m * alpha)
            self.w = w  # H_J = -w @ g
            self.s = alpha[:, None] * (np.eye(nl) - m.T @ w)
        else:
            self.w = np.zeros((0, nl))
            self.s = np.diag(alpha)
        self.s_tank = self.s @ model.ft_tank  # lines x tanks
        self._alpha = alpha
        self._m = m
        t_rows = model.t_rows.copy()
        t_rows[spilling, :] = 0.0
        self.t_rows = t_rows
        self.ext_on = (~spilling).astype(float)  # a spilling tank's surplus leaves it

    def junction_heads(self, g: np.ndarray) -> np.ndarray:
        """Junction heads [m] for ``g = F^T H_F + h`` on the open lines (lines, or lines x
        times for several states: junctions x times)."""
        return -(self.w @ g) if self.w.shape[0] else np.zeros((0,) + g.shape[1:])

    def project(self, q: np.ndarray) -> np.ndarray:
        """Flows made to satisfy continuity at every junction after lines were stopped.

        A line stopped at once (a tank's outlet when it drains) takes a pressure impulse
        that changes the other flows at its junctions in inverse proportion to their
        inertance: ``q' = q - diag(a) M^T (M diag(a) M^T)^+ M q`` (the rigid-column momentum
        balance over an instant).
        """
        if not self._m.shape[0]:
            return q
        imbalance = self._m @ q
        if not np.any(np.abs(imbalance) > 0.0):
            return q
        return q - self._alpha * (self._m.T @ (self.lap_pinv @ imbalance))


class TransientModel:
    """Everything constant over a run: arrays built once from the system."""

    def __init__(self, system: System):
        from scipy import sparse

        from workbench.core.line import LineSet
        from workbench.core.topology import build_topology

        self.system = system
        topo = build_topology(system)
        self.topo = topo
        self.lines = LineSet(system, topo)
        self.nl = topo.n_lines
        rho = system.fluid.density
        self.rho = rho
        # rho*g/I = g*A/L [m^2/s^2]: the rate of change of flow per metre of head
        self.alpha = G * self.lines.area / self.lines.length
        self.sparse = self.nl >= SPARSE_LINES
        if self.sparse:  # see workbench.core.transient.sparse
            self.m_sparse = sparse.csr_matrix(topo.incidence, dtype=float)
            f_sparse = sparse.csr_matrix(topo.fixed_incidence, dtype=float)
            self.ft = sparse.csr_matrix(f_sparse.T)
            self.touches_fixed = np.asarray(abs(f_sparse).sum(axis=0)).ravel() > 0.0
        else:
            self.m_dense = np.asarray(topo.incidence.toarray(), dtype=float)
            f_sparse = None
            f_dense = np.asarray(topo.fixed_incidence.toarray(), dtype=float)
            self.ft = np.ascontiguousarray(f_dense.T)
        # fixed heads: constant part
        h_fixed = np.zeros(topo.n_fixed)
        tank_ids: list[str] = []
        tank_fixed: list[int] = []
        for k, nid in enumerate(topo.fixed_ids):
            if nid in system.reservoirs:
                res = system.reservoirs[nid]
                h_fixed[k] = reservoir_head(res, rho)
                if res.kind == "tank":
                    tank_ids.append(nid)
                    tank_fixed.append(k)
            else:
                h_fixed[k] = receiver_head(system.receivers[nid], rho)
        self.h_fixed0 = h_fixed
        self.tank_ids = tuple(tank_ids)
        self.tank_fixed = np.array(tank_fixed, dtype=np.intp)
        self.nt = len(tank_ids)
        self.tanks = [system.reservoirs[t] for t in tank_ids]
        self.geoms: list[TankGeometry] = [tank_geometry(r) for r in self.tanks]
        self._level_fns = [g.level_extrapolated for g in self.geoms]
        self.tank_head_offset = np.array(
            [r.bottom_elevation + r.surface_pressure / (rho * G) for r in self.tanks]
        )
        if self.sparse:
            self.t_rows = f_sparse[self.tank_fixed, :].toarray()
            self.ft_tank_sparse = sparse.csc_matrix(f_sparse[self.tank_fixed, :].T)
        else:
            self.t_rows = f_dense[self.tank_fixed, :]
            self.ft_tank = self.t_rows.T
        self.v_min = np.array([g.volume(r.min_level) for g, r in zip(self.geoms, self.tanks)])
        self.v_over = np.array(
            [g.capacity if g.overflow_level is not None else np.inf for g in self.geoms]
        )
        self.v_restart = np.array([g.volume(min(restart_level(r), g.top))
                                   for g, r in zip(self.geoms, self.tanks)])
        self.gas = GasSpaces(system, self.tanks, self.geoms)
        self.ng = self.gas.ng
        self.ne = self.nl + self.nt + self.ng
        """Where the volume accumulators start in the state (after ``[Q, V, X]``)."""
        self.nw = 2 * self.nt
        """Volume accumulators: per tank the net volume in through its lines, then the
        volume spilled over its overflow [m^3] (see :mod:`workbench.core.transient`)."""
        self.n_state = self.ne + self.nw
        self.ext_tanks = [k for k, r in enumerate(self.tanks) if r.has_external_flow]
        self.has_ext = bool(self.ext_tanks)
        self.valve_lines = np.flatnonzero(self.lines.has_valve)
        # +1 where the line discharges to air at its to-end, -1 at its from-end, 0 otherwise
        rec_to = np.array([k == "open_discharge" for k in self.lines.to_kind])
        rec_from = np.array([k == "open_discharge" for k in self.lines.from_kind])
        self.discharge_sign = np.where(rec_to, 1.0, np.where(rec_from, -1.0, 0.0))
        self.is_discharge = self.discharge_sign != 0.0
        self._stations()

    def configuration(self, open_lines: np.ndarray, spilling: np.ndarray):
        """The matrices of a configuration: dense, or sparse for a large system."""
        if self.sparse:
            from workbench.core.transient.sparse import SparseConfiguration

            return SparseConfiguration(self, open_lines, spilling)
        return Configuration(self, open_lines, spilling)

    # ------------------------------------------------------------------ feeds
    def external(self, t: float) -> tuple[np.ndarray, np.ndarray]:
        """Feed into each tank and the draw-off asked of it at time ``t`` [m^3/s]."""
        feed = np.zeros(self.nt)
        draw = np.zeros(self.nt)
        for k in self.ext_tanks:
            feed[k] = inflow_at(self.tanks[k], t)
            draw[k] = draw_off_at(self.tanks[k], t)
        return feed, draw

    def schedule_times(self) -> set[float]:
        """Break points of the feed and draw-off schedules [s]."""
        times: set[float] = set()
        for r in self.tanks:
            for sched in (r.inflow_schedule, r.draw_off_schedule):
                if sched is not None:
                    times.update(sched.times)
        return times

    # ------------------------------------------------------------------ heads
    def tank_levels(self, v: np.ndarray) -> np.ndarray:
        """Levels [m] from the tanks' liquid volumes [m^3]."""
        return np.array([f(x) for f, x in zip(self._level_fns, v.tolist())])

    def fixed_heads(self, tail: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Heads of the fixed nodes [m] and the tanks' levels [m] from the state's tail
        ``[V (tanks), X (gas spaces)]``: a tank's head is its bottom elevation, level and
        surface (or gas-space) gauge pressure over ``rho g``."""
        h = self.h_fixed0.copy()
        if not self.nt:
            return h, np.zeros(0)
        v = tail[: self.nt]
        levels = self.tank_levels(v)
        head = self.tank_head_offset + levels
        if self.ng:
            head[self.gas.tank] += self.gas.gauge(v, tail[self.nt:]) / (self.rho * G)
        h[self.tank_fixed] = head
        return h, levels

    # ------------------------------------------------------------------ stations
    def _stations(self) -> None:
        """Points along every line where pressure is tracked: both ends (so the valve
        inlet), and every profile point."""
        system = self.system
        frac: list[float] = []
        elev: list[float] = []
        owner: list[int] = []
        for i, lid in enumerate(self.topo.line_ids):
            line = system.lines[lid]
            z_from = system.node_elevation(line.from_node)
            z_to = system.node_elevation(line.to_node)
            pts = [(0.0, z_from)]
            end = (line.length, z_to)
            for d, z in line.profile:
                if 0.0 < d < line.length:
                    pts.append((d, z))
                elif d <= 0.0:
                    pts[0] = (0.0, z)
                else:  # a profile point at (or past) the to-end gives its elevation
                    end = (line.length, z)
            pts.append(end)
            for d, z in pts:
                frac.append(d / line.length)
                elev.append(z)
                owner.append(i)
        self.st_frac = np.array(frac)
        self.st_elev = np.array(elev)
        self.st_owner = np.array(owner, dtype=np.intp)
        self.st_start = np.flatnonzero(np.r_[True, np.diff(self.st_owner) != 0])
        lines = self.lines
        self.from_free = np.array([k in ("reservoir", "vessel") for k in lines.from_kind])
        self.to_free = np.array([k in ("reservoir", "vessel") for k in lines.to_kind])
        self.from_junction = np.array([k == "junction" for k in lines.from_kind])
        self.to_junction = np.array([k == "junction" for k in lines.to_kind])
        valve_at_to = np.zeros(self.nl, bool)
        valve_at_from = np.zeros(self.nl, bool)
        for i, lid in enumerate(self.topo.line_ids):
            v = system.lines[lid].valve
            if v is not None:
                valve_at_to[i] = v.position == "to"
                valve_at_from[i] = v.position == "from"
        self.valve_at_to = valve_at_to
        self.valve_at_from = valve_at_from
        self.entrance_k = np.array([system.lines[lid].entrance_k for lid in self.topo.line_ids])
