"""Head loss of every line of a system at once: friction, fittings, valve, entrance and exit.

For a line carrying flow ``q`` [m^3/s] from its from-end to its to-end, the head lost
between the two end nodes is

.. math::

    h(q) = \\underbrace{\\phi(Re)\\,\\frac{\\nu L}{2 g D^2}\\,v}_{\\text{friction}}
         + \\underbrace{\\Sigma K_1\\,\\frac{\\nu}{2 g D}\\,v}_{\\text{fittings, }K_1/Re}
         + (\\Sigma K_{\\infty} + K_{valve} + K_{ends}(\\operatorname{sign} q))
           \\frac{v|v|}{2g}

with ``v = q/A``, ``phi = f*Re`` (64 when laminar, so friction is linear in ``v`` at low
flow and ``h`` is smooth through ``q = 0``; see :func:`workbench.core.friction.friction_re_product`),
``K1/Re`` terms of the 2-K/3-K fittings written the same way, and ``K_ends`` the entrance
loss where the flow leaves a free surface (reservoir or vessel) into the line plus
the exit loss (one velocity head) where it enters a reservoir, a vessel or discharges to
the air. ``K_ends`` follows the actual flow direction, so a reversing line swaps them; since
``v|v|`` and its slope both vanish at ``q = 0`` the switch keeps ``h`` continuously
differentiable. A fixed friction factor on a line replaces ``phi/Re``:
``h_f = f (L/D) v|v|/2g``.

Sign convention: ``h > 0`` for ``q > 0``, and the energy equation of a line reads
``H_from - H_to = h(q)`` with ``H`` the node heads (junction velocity heads neglected, as
usual in network analysis).

A line whose valve is shut (relative flow coefficient 0) carries no flow: :meth:`LineSet.closed`
flags it, and :meth:`LineSet.head_loss` returns ``h = 0`` and ``dh/dq = 0`` there; callers
impose ``q = 0`` on those lines.
"""

from __future__ import annotations

import numpy as np

from workbench.core.fittings import EXIT_K, fitting_constants
from workbench.core.friction import (
    friction_re_product,
    method_label,
    regime_of,
)
from workbench.core.model import G, System
from workbench.core.topology import Topology, build_topology
from workbench.core.valve import opening_at, relative_flow_coefficient, valve_k

_FREE_SURFACE = ("reservoir", "vessel")
"""Node kinds with a free surface that can feed a line (entrance loss applies)."""
_EXIT_INTO = ("reservoir", "vessel", "open_discharge")
"""Node kinds where flow leaving the line loses its velocity head (exit loss)."""


class LineSet:
    """All lines of a system, as arrays in :class:`~workbench.core.topology.Topology` order.

    Parameters
    ----------
    system : System
    topology : Topology, optional
        Built from ``system`` when not given.

    Attributes
    ----------
    ids : tuple of str
    length, diameter, area, roughness, rel_roughness : ndarray
        [m], [m], [m^2], [m], [-].
    inertance : ndarray
        ``rho L / A`` [kg/m^4]: pressure difference per rate of change of flow.
    inertance_head : ndarray
        ``L / (g A)`` [s^2/m^2]: head difference per rate of change of flow.
    from_kind, to_kind : tuple of str
        ``"junction"``, ``"reservoir"``, ``"open_discharge"`` or ``"vessel"`` per end.
    has_valve : ndarray of bool
    """

    def __init__(self, system: System, topology: Topology | None = None):
        topo = build_topology(system) if topology is None else topology
        self.topology = topo
        self.system = system
        lines = [system.lines[i] for i in topo.line_ids]
        fluid = system.fluid
        self.ids: tuple[str, ...] = topo.line_ids
        self.density = float(fluid.density)
        self.kinematic_viscosity = float(fluid.viscosity / fluid.density)
        self.length = np.array([ln.length for ln in lines], dtype=float)
        self.diameter = np.array([ln.diameter for ln in lines], dtype=float)
        self.area = np.pi * self.diameter**2 / 4.0
        self.roughness = np.array([ln.roughness for ln in lines], dtype=float)
        self.rel_roughness = self.roughness / self.diameter
        self.inertance = self.density * self.length / self.area
        self.inertance_head = self.length / (G * self.area)
        fixed_f = [np.nan if ln.friction_factor is None else ln.friction_factor for ln in lines]
        self.fixed_friction = np.array(fixed_f, dtype=float)
        self._has_fixed_f = ~np.isnan(self.fixed_friction)

        kinds = ("junction",) * topo.n_junctions + tuple(topo.fixed_kind)
        self.from_kind = tuple(kinds[i] for i in topo.line_from)
        self.to_kind = tuple(kinds[i] for i in topo.line_to)
        entrance = np.array([ln.entrance_k for ln in lines], dtype=float)
        from_free = np.array([k in _FREE_SURFACE for k in self.from_kind])
        to_free = np.array([k in _FREE_SURFACE for k in self.to_kind])
        from_exit = np.array([k in _EXIT_INTO for k in self.from_kind])
        to_exit = np.array([k in _EXIT_INTO for k in self.to_kind])
        # Open discharge cannot feed a line; the entrance K there only keeps h defined.
        from_feed = from_free | (np.array([k == "open_discharge" for k in self.from_kind]))
        to_feed = to_free | (np.array([k == "open_discharge" for k in self.to_kind]))
        self.entrance_forward = np.where(from_feed, entrance, 0.0)
        self.exit_forward = np.where(to_exit, EXIT_K, 0.0)
        self.entrance_reverse = np.where(to_feed, entrance, 0.0)
        self.exit_reverse = np.where(from_exit, EXIT_K, 0.0)

        k_re = np.zeros(len(lines))
        k_const = np.zeros(len(lines))
        methods: list[tuple[str, ...]] = []
        for i, ln in enumerate(lines):
            used = []
            for fit in ln.fittings:
                loss = fitting_constants(fit, ln.diameter)
                k_re[i] += fit.count * loss.k_re
                k_const[i] += fit.count * loss.k_const
                used.append(loss.method)
            methods.append(tuple(used))
        self.fittings_k_re = k_re
        """Sum of count * K1 of the fittings (coefficient of 1/Re) [-]."""
        self.fittings_k_const = k_const
        """Sum of count * constant part of the fittings' K at this size [-]."""
        self.fittings_methods = tuple(methods)

        self.has_valve = np.array([ln.valve is not None for ln in lines])
        self._valves = [ln.valve for ln in lines]
        self.valve_k_open = np.array(
            [ln.valve.k_open if ln.valve is not None else 0.0 for ln in lines], dtype=float
        )
        self._valve_idx = np.flatnonzero(self.has_valve)
        valves = [self._valves[i] for i in self._valve_idx]
        self._steady_x = np.array([v.opening for v in valves], dtype=float)
        self._rangeability = np.array([v.rangeability for v in valves], dtype=float)
        chars = np.array([v.characteristic for v in valves], dtype=object)
        self._valve_groups = [(c, np.flatnonzero(chars == c)) for c in sorted(set(chars))]

        # Constant factors of the head-loss terms.
        nu = self.kinematic_viscosity
        self._c_fric = nu * self.length / (2.0 * G * self.diameter**2)
        self._c_kre = nu / (2.0 * G * self.diameter) * self.fittings_k_re
        self._fixed_fld = np.where(self._has_fixed_f, self.fixed_friction, 0.0) * (
            self.length / self.diameter
        )

    # ----------------------------------------------------------------- openings
    @property
    def n(self) -> int:
        return len(self.ids)

    def steady_openings(self, overrides: dict[str, float] | None = None) -> np.ndarray:
        """Per-line valve opening: each valve's steady ``opening``, ``nan`` without a valve.

        Parameters
        ----------
        overrides : dict, optional
            Line id -> opening 0..1 replacing the valve's own.
        """
        out = np.full(self.n, np.nan)
        for i in self._valve_idx:
            out[i] = self._valves[i].opening
        if overrides:
            for lid, x in overrides.items():
                out[self.topology.line_index(lid)] = x
        return out

    def openings_at(self, t: float) -> np.ndarray:
        """Per-line valve opening at time ``t`` [s] by each valve's schedule; ``nan`` without."""
        out = np.full(self.n, np.nan)
        for i in self._valve_idx:
            out[i] = opening_at(self._valves[i], t)
        return out

    def valve_k(self, openings=None) -> np.ndarray:
        """Valve loss coefficient per line at the openings [-]: 0 without a valve, ``inf`` shut."""
        if openings is None:
            x = self._steady_x
        else:
            x = np.asarray(openings, dtype=float)[self._valve_idx]
            x = np.where(np.isnan(x), self._steady_x, x)
        k = np.zeros(self.n)
        for characteristic, sel in self._valve_groups:
            c = relative_flow_coefficient(characteristic, x[sel], self._rangeability[sel])
            k[self._valve_idx[sel]] = valve_k(self.valve_k_open[self._valve_idx[sel]], c)
        return k

    def closed(self, openings=None) -> np.ndarray:
        """Lines whose valve is shut at these openings (flow must be zero there) [bool]."""
        return np.isinf(self.valve_k(openings))

    # ----------------------------------------------------------------- head loss
    def head_loss(self, q, openings=None) -> tuple[np.ndarray, np.ndarray]:
        """Head loss from the from-end to the to-end of every line, and its slope.

        Parameters
        ----------
        q : array_like
            Flow per line, positive from-end to to-end [m^3/s].
        openings : array_like, optional
            Valve opening per line 0..1 (``nan`` or ignored without a valve); default the
            valves' steady openings.

        Returns
        -------
        h : ndarray
            Head loss [m], same sign as ``q``; 0 on shut lines.
        dh_dq : ndarray
            ``dh/dq`` [s/m^2], >= 0, continuous through ``q = 0``; 0 on shut lines.
        """
        q = np.asarray(q, dtype=float)
        kv = self.valve_k(openings) if self._valve_idx.size else np.zeros(self.n)
        shut = np.isinf(kv)
        kv = np.where(shut, 0.0, kv)
        area = self.area
        v = q / area
        av = np.abs(v)
        re = av * (self.diameter / self.kinematic_viscosity)
        phi, dphi = friction_re_product(re, self.rel_roughness)
        fixed = self._has_fixed_f
        ends = np.where(q >= 0.0, self.entrance_forward + self.exit_forward,
                        self.entrance_reverse + self.exit_reverse)
        k_quad = self.fittings_k_const + kv + ends + self._fixed_fld
        h_lin_coef = np.where(fixed, 0.0, self._c_fric * phi) + self._c_kre
        h = h_lin_coef * v + k_quad * v * av / (2.0 * G)
        dh = (np.where(fixed, 0.0, self._c_fric * (phi + dphi * re)) + self._c_kre) / area
        dh = dh + k_quad * av / (G * area)
        if shut.any():
            h = np.where(shut, 0.0, h)
            dh = np.where(shut, 0.0, dh)
        return h, dh

    # ----------------------------------------------------------------- reporting
    def details(self, q, openings=None) -> dict[str, np.ndarray]:
        """Everything a report shows about each line at flows ``q`` [m^3/s].

        Returns
        -------
        dict of ndarray
            ``velocity`` [m/s], ``reynolds`` [-], ``regime`` (str), ``friction_factor`` [-]
            (``inf`` at zero flow), ``method`` (str, the law that gave f), ``friction_loss``,
            ``fittings_loss``, ``valve_loss``, ``entrance_loss``, ``exit_loss``,
            ``minor_loss``, ``head_loss``, ``velocity_head`` [m] (losses signed like ``q``),
            ``valve_k``, ``entrance_k``, ``exit_k`` [-], ``closed`` (bool).
        """
        q = np.asarray(q, dtype=float)
        kv = self.valve_k(openings)
        shut = np.isinf(kv)
        kv = np.where(shut, 0.0, kv)
        v = q / self.area
        av = np.abs(v)
        re = av * (self.diameter / self.kinematic_viscosity)
        phi, _ = friction_re_product(re, self.rel_roughness)
        fixed = self._has_fixed_f
        with np.errstate(divide="ignore", invalid="ignore"):
            f = np.where(fixed, self.fixed_friction, phi / re)
        vh = v * av / (2.0 * G)
        friction = np.where(fixed, self._fixed_fld * vh, self._c_fric * phi * v)
        fittings = self._c_kre * v + self.fittings_k_const * vh
        forward = q >= 0.0
        k_ent = np.where(forward, self.entrance_forward, self.entrance_reverse)
        k_exit = np.where(forward, self.exit_forward, self.exit_reverse)
        method = np.where(fixed, "fixed by the user", method_label(re))
        minor = fittings + kv * vh + (k_ent + k_exit) * vh
        zero = np.where(shut, 0.0, 1.0)
        return {
            "velocity": v,
            "reynolds": re,
            "regime": np.atleast_1d(regime_of(re)),
            "friction_factor": f,
            "method": np.atleast_1d(method),
            "friction_loss": friction * zero,
            "fittings_loss": fittings * zero,
            "valve_loss": kv * vh * zero,
            "entrance_loss": k_ent * vh * zero,
            "exit_loss": k_exit * vh * zero,
            "minor_loss": minor * zero,
            "head_loss": (friction + minor) * zero,
            "velocity_head": np.abs(vh),
            "valve_k": np.where(shut, np.inf, kv),
            "entrance_k": k_ent,
            "exit_k": k_exit,
            "closed": shut,
        }
