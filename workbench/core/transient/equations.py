r"""The right-hand side of the rigid-column equations, its Jacobian, and the heads at a state
(or at several states of one configuration at once).

With ``y = [Q, V]``, ``g = F^T H_F(V) + h(Q, t)`` on open lines,

.. math::

    \dot Q = -S\,g, \qquad \dot V = T\,Q + e(t)

(``S`` the configuration's projection, ``T`` the tanks' rows of the fixed-node incidence with
spilling tanks' rows cleared, ``e`` the feed less the delivered draw-off), and the
Jacobian ``[[-S diag(dh/dQ), -S F_T^T diag(1/A(h))], [T, 0]]``. Heads are gauge-based
piezometric heads [m] (see :mod:`workbench.core.model`).

The state ends with volume accumulators ``W = [U, P]`` per tank: ``dU/dt = T_0 Q`` (the
lines' net inflow, rows never cleared) and ``dP/dt = T_0 Q + e`` while the tank spills, else
0. They feed nothing back (zero columns), and ``V + P - U`` changes by ``e`` alone, so the
volume balance closes to round-off however the tank cycles between output times.
"""

from __future__ import annotations

import numpy as np

from workbench.core.model import G
from workbench.core.transient import siphon
from workbench.core.transient.line_ends import line_end_heads  # noqa: F401 (re-export)
from workbench.core.transient.model import Configuration, TransientModel
from workbench.core.transient.state import RunState

_X_FLOOR = 1e-9
"""Smallest valve travel used inside a segment in which the valve is open: it reaches zero
only at the segment's end, where the line is then shut exactly."""


class Equations:
    """The equations of one run in its current configuration (see the module docstring).

    Holds the configuration of open lines (:attr:`cfg`, replaced by the run loop at each
    restart) and a one-state cache of the head losses: the solver asks for the Jacobian,
    and the run for pressures, at points where the right-hand side was just evaluated.
    """

    def __init__(self, model: TransientModel, state: RunState):
        self.model = model
        self.state = state
        self.cfg: Configuration | None = None
        self.open_valve_floor = np.zeros(model.nl, bool)
        """Valves open over the current segment: their travel is kept above ``_X_FLOOR``."""
        self._cache = None

    def reset(self, cfg: Configuration, open_valve_floor: np.ndarray) -> None:
        """Take a new configuration (and forget the cached losses)."""
        self.cfg = cfg
        self.open_valve_floor = open_valve_floor
        self._cache = None

    def clear_cache(self) -> None:
        self._cache = None

    def _openings(self, t) -> np.ndarray | None:
        """Valve openings at time ``t`` [s] (times x lines for an array of times)."""
        if not self.model.valve_lines.size:
            return None
        x = self.model.lines.openings_at(t)
        if self.open_valve_floor.any():
            x = np.where(self.open_valve_floor, np.maximum(x, _X_FLOOR), x)
        return x

    def losses(self, t, y):
        """Fixed heads [m], tank levels [m], head losses [m] and their slopes [s/m^2] at a
        state, cached for the last state."""
        c = self._cache
        if c is not None and c[0] == t and np.array_equal(c[1], y):
            return c[2]
        nl = self.model.nl
        hf, levels = self.model.fixed_heads(y[nl:self.model.ne])  # [V, X]
        h, dh = self.model.lines.head_loss(y[:nl], self._openings(t))
        if self.state.siphon_broken.any():
            h, dh = siphon.broken_losses(self.model, self.state, y[:nl], hf, h, dh)
        out = (hf, levels, h, dh)
        self._cache = (t, y.copy(), out)
        return out

    def external_net(self, t):
        """Feed less the draw-off delivered, per tank, at time ``t`` [m^3/s]: a drained
        tank supplies no draw-off."""
        feed, draw = self.model.external(t)
        return feed - np.where(self.state.drained, 0.0, draw)

    def rhs(self, t, y):
        """``dy/dt`` at time ``t`` [s] and state ``y`` ([m^3/s], [m^3])."""
        model, cfg = self.model, self.cfg
        nl = model.nl
        hf, _, h, _ = self.losses(t, y)
        g = (model.ft @ hf + h) * cfg.open_f
        nv, ne = nl + model.nt, model.ne
        out = np.empty(model.n_state)
        out[:nl] = cfg.s @ g
        out[:nl] *= -1.0
        lines_in = model.t_rows @ y[:nl]
        net = lines_in + self.external_net(t) if model.has_ext else lines_in
        # a spilling tank's rows are cleared: its surplus leaves it (and is counted in W)
        out[nl:nv] = np.where(cfg.spilling, 0.0, net)
        if model.ng:  # dX/dt = mdot(p) + rho_atm dV/dt (see workbench.core.transient.gas)
            gas = model.gas
            p, rho, _ = gas.state(y[nl:nv], y[nv:ne])
            out[nv:ne] = gas.inflow(p, rho) + gas.rho_atm * out[nl + gas.tank]
        if model.nw:  # the volume accumulators: lines' net inflow, and the spill
            out[ne:ne + model.nt] = lines_in
            out[ne + model.nt:] = np.where(cfg.spilling, net, 0.0)
        return out

    def jac(self, t, y):
        """The analytic Jacobian ``d(dy/dt)/dy`` (see the module docstring)."""
        model, cfg = self.model, self.cfg
        nl, nt = model.nl, model.nt
        _, _, _, dh = self.losses(t, y)
        dh = dh * cfg.open_f
        nv = nl + nt
        levels = model.tank_levels(y[nl:nv])
        inv_a = np.array([1.0 / g.area_floor(lv, 1e-9) for g, lv in zip(model.geoms, levels)])
        if model.sparse:
            from workbench.core.transient.sparse import sparse_jacobian

            return sparse_jacobian(self, y, dh, inv_a)
        j = np.zeros((model.n_state, model.n_state))
        j[:nl, :nl] = -cfg.s * dh[None, :]
        if nt:
            if model.ng:
                self._jac_gas(y, j, inv_a)
            else:
                j[:nl, nl:nv] = -cfg.s_tank * inv_a[None, :]
                j[nl:nv, :nl] = cfg.t_rows
            ne = model.ne
            j[ne:ne + nt, :nl] = model.t_rows
            j[ne + nt:, :nl] = model.t_rows * cfg.spilling[:, None]
        return j

    def _jac_gas(self, y, j, inv_a):
        """The Jacobian's tank and gas-space blocks when tanks have gas spaces: a tank's
        head moves with its level and its gauge pressure over ``rho g``, and
        ``dX/dt = mdot(p) + rho_atm dV/dt``."""
        model, cfg = self.model, self.cfg
        nl, nt = model.nl, model.nt
        nv = nl + nt
        gas = model.gas
        dp_dv, dp_dx, dm_dp = gas.derivatives(y[nl:nv], y[nv:model.ne])
        rg = model.rho * G
        dh_dv = inv_a.copy()
        dh_dv[gas.tank] += dp_dv / rg
        j[:nl, nl:nv] = -cfg.s_tank * dh_dv[None, :]
        j[:nl, nv:model.ne] = -cfg.s_tank[:, gas.tank] * (dp_dx / rg)[None, :]
        j[nl:nv, :nl] = cfg.t_rows
        rows = np.arange(nv, nv + model.ng)
        j[rows, :] = gas.rho_atm * j[nl + gas.tank, :]
        j[rows, nl + gas.tank] += dm_dp * dp_dv
        j[rows, rows] += dm_dp * dp_dx

    def heads(self, t, y):
        """Junction heads then fixed-node heads at a state [m] (the topology's node order)."""
        model, cfg = self.model, self.cfg
        hf, levels, h, _ = self.losses(t, y)
        g = model.ft @ hf + h * cfg.open_f
        hj = cfg.junction_heads(g)
        return np.concatenate([hj, hf])

    def heads_many(self, ts: np.ndarray, ys: np.ndarray) -> np.ndarray:
        """:meth:`heads` at several states of the current configuration [m], nodes x times.

        ``ys`` is state x times at times ``ts`` [s]. The tanks' heads, the valve openings
        and the losses still come from each state and time; what the configuration fixes
        (``w = (M diag(a) M^T)^+ M diag(a)``, or the sparse factors of ``M diag(a) M^T``)
        is applied once, to the matrix of right-hand sides ``G = F^T H_F + h`` on the open
        lines (lines x times): ``H_J = -w G``. Each column equals :meth:`heads` at its
        time to round-off. With a broken siphon (losses set per state) it is
        :meth:`heads` at each time.
        """
        if self.state.siphon_broken.any():
            return np.column_stack([self.heads(t, ys[:, k]) for k, t in enumerate(ts)])
        model, cfg = self.model, self.cfg
        nl = model.nl
        hf = np.column_stack([model.fixed_heads(ys[nl:model.ne, k])[0]
                              for k in range(ys.shape[1])])
        h, _ = model.lines.head_loss(ys[:nl].T, self._openings(ts))
        g = model.ft @ hf + h.T * cfg.open_f[:, None]
        return np.vstack([cfg.junction_heads(g), hf])

    def discharge_drive(self, t, y):
        """Per line, the head difference driving flow out of its open discharge [m] (zero
        on lines that do not discharge to air)."""
        model = self.model
        h_nodes = self.heads(t, y)
        return model.discharge_sign * (h_nodes[model.topo.line_from]
                                       - h_nodes[model.topo.line_to])
