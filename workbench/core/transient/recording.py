"""What a run keeps as it goes: the output series and the pressure envelope of every station.

Series are kept at the output grid plus every event time, with the drained and spilling
flags of that moment (the result's draw-off and spill series need them). Pressures are
tracked at every accepted step's end at the stations of :class:`TransientModel` (line ends
and profile points): gauge ``p = rho g (H - z)`` with ``H`` interpolated linearly along the
line between its two end heads.
"""

from __future__ import annotations

import numpy as np

from workbench.core.model import G
from workbench.core.transient import siphon
from workbench.core.transient.equations import Equations
from workbench.core.transient.junctions import JunctionHeads
from workbench.core.transient.line_ends import line_end_heads
from workbench.core.transient.model import TransientModel
from workbench.core.transient.state import RunState


class Recording:
    """Output series and per-station pressure extremes of one run."""

    def __init__(self, model: TransientModel):
        nl = model.nl
        ns = len(model.st_frac)
        self.model = model
        self.t_out: list[float] = []
        """Output times [s]."""
        self.y_out: list[np.ndarray] = []
        """States ``[Q, V]`` at the output times."""
        self.drained_out: list[np.ndarray] = []
        """Drained tanks at each output time."""
        self.spilling_out: list[np.ndarray] = []
        """Spilling tanks at each output time."""
        self.p_max = np.full(ns, -np.inf)
        """Largest gauge pressure per station [Pa]."""
        self.p_min = np.full(ns, np.inf)
        """Smallest gauge pressure per station [Pa]."""
        self.p_max_t = np.zeros(ns)
        self.p_min_t = np.zeros(ns)
        self.first_vapour_t = np.full(ns, np.nan)
        """First time each station reached the vapour pressure [s] (nan: never)."""
        self.h_static_max = np.full(nl, -np.inf)
        """Highest end-node head seen per line [m]."""
        self.v_max = np.zeros(nl)
        """Largest velocity magnitude per line [m/s]."""
        self.closing = np.zeros(nl, bool)
        """Valves shutting at the end of the current segment."""
        self.junction_heads = JunctionHeads(model)
        """Junction heads at the output times (:mod:`.junctions`)."""

    def record(self, t: float, y: np.ndarray, open_lines: np.ndarray, state: RunState) -> None:
        """Keep the state at time ``t`` (a shut line's round-off is not a flow)."""
        self.t_out.append(float(t))
        y = np.array(y, dtype=float)
        y[: self.model.nl][~open_lines] = 0.0
        self.y_out.append(y)
        self.junction_heads.keep(t, y, open_lines)
        self.drained_out.append(state.drained.copy())
        self.spilling_out.append(state.spilling.copy())

    def record_many(self, tg: np.ndarray, yg: np.ndarray, open_lines: np.ndarray,
                    state: RunState) -> None:
        """Keep states ``yg`` (state x times) at output times ``tg``."""
        yg[: self.model.nl][~open_lines] = 0.0
        self.junction_heads.keep_many(tg, yg, open_lines)
        self.t_out.extend(tg.tolist())
        self.y_out.extend(yg.T)
        self.drained_out.extend([state.drained.copy()] * tg.size)
        self.spilling_out.extend([state.spilling.copy()] * tg.size)

    def track(self, eq: Equations, t: float, y: np.ndarray, qdot: np.ndarray) -> None:
        """Update the pressure envelope with the state at time ``t``; ``qdot`` is the flows'
        rate of change along the integrated trajectory [m^3/s^2]."""
        model, state, cfg = self.model, eq.state, eq.cfg
        q = y[: model.nl]
        qdot = np.where(cfg.open, qdot, 0.0)
        h_nodes = eq.heads(t, y)
        topo = model.topo
        hn_from = h_nodes[topo.line_from]
        hn_to = h_nodes[topo.line_to]
        h_a, h_b = line_end_heads(model, q, qdot, hn_from, hn_to)
        # A shut valve isolates the pipe from the node beyond it: the pipe side stands at
        # the head of the node it is still open to.
        shut = ~cfg.open & ~state.blocked & ~state.backstopped
        h_b = np.where(shut & model.valve_at_to, h_a, h_b)
        h_a = np.where(shut & model.valve_at_from, h_b, h_a)
        o = model.st_owner
        h_st = h_a[o] + model.st_frac * (h_b[o] - h_a[o])
        p = model.rho * G * (h_st - model.st_elev)
        if state.siphon_broken.any():
            p = siphon.broken_pressures(model, state, p, h_a, h_b)
        # Outlets of drained tanks run part-full or empty: no pressure is tracked there. In
        # the last 0.1 % of a valve closure the flow is below what the tolerances resolve,
        # and the deceleration of the column (hence the valve-end head) is noise: skip it;
        # the head there differs from the last tracked one by a negligible amount.
        tail = self.closing & (np.abs(q) < 1e-3 * state.q_peak)
        p = np.where((state.blocked | state.backstopped | state.siphon_stopped | tail)[o],
                     np.nan, p)
        up = p > self.p_max
        self.p_max = np.where(up, p, self.p_max)
        self.p_max_t = np.where(up, t, self.p_max_t)
        p_vap = model.system.fluid.vapor_pressure
        if p_vap is not None:
            at_vapour = (p + model.system.atmospheric_pressure <= p_vap) & np.isnan(
                self.first_vapour_t)
            self.first_vapour_t = np.where(at_vapour, t, self.first_vapour_t)
        dn = p < self.p_min
        self.p_min = np.where(dn, p, self.p_min)
        self.p_min_t = np.where(dn, t, self.p_min_t)
        self.h_static_max = np.maximum(self.h_static_max, np.maximum(hn_from, hn_to))
        self.v_max = np.maximum(self.v_max, np.abs(q) / model.lines.area)
