"""Head loss of every line of a system at once: friction, fittings, valve, entrance and exit.

For a line carrying flow ``q`` [m^3/s] from its from-end to its to-end, the head lost
between the two end nodes is

.. math::

    h(q) = \\underbrace{\\phi(Re)\\,\\frac{\\nu L}{2 g D^2}\\,v}_{\\text{friction}}
         + \\underbrace{\\Sigma K_1\\,\\frac{\\nu}{2 g D}\\,v}_{\\text{fittings, }K_1/Re}
         + (\\Sigma K_{\\infty} + K_{valve} + K_{ent}(\\operatorname{sign} q)
            + K_{exit}(\\operatorname{sign} q, Re))\\frac{v|v|}{2g}

with ``v = q/A``, ``phi = f*Re`` (64 when laminar, so friction is linear in ``v`` at low
flow and ``h`` is smooth through ``q = 0``; see :func:`workbench.core.friction.friction_re_product`),
``K1/Re`` terms of the 2-K/3-K fittings written the same way, ``K_ent`` the entrance
loss where the flow leaves a free surface (reservoir or vessel) into the line, and
``K_exit`` the exit loss where it enters a reservoir, a vessel or discharges to the air:
the kinetic-energy coefficient of the profile, 2 velocity heads when laminar, 1 when
turbulent, blended between like friction (:func:`workbench.core.fittings.exit_k`). Both
follow the actual flow direction, so a reversing line swaps them; since ``v|v|`` and its
slope both vanish at ``q = 0`` the switch keeps ``h`` continuously differentiable. The exit
term ``K_exit(Re) v|v|/2g`` keeps rising with ``|q|`` across the blend although ``K_exit``
falls: its slope is ``(2 K_exit + Re dK_exit/dRe) |v|/(2 g A)`` and the bracket never drops
below 0.288 (at Re about 3380), so ``dh/dq >= 0`` still holds.

A fixed friction factor on a line replaces ``phi/Re``: ``h_f = f (L/D) v|v|/2g``; the exit
loss still follows the Reynolds number (the velocity profile does not depend on how the
user chose ``f``).

Sign convention: ``h > 0`` for ``q > 0``, and the energy equation of a line reads
``H_from - H_to = h(q)`` with ``H`` the node heads (junction velocity heads neglected, as
usual in network analysis).

A line whose valve is shut (relative flow coefficient 0) carries no flow: :meth:`LineSet.closed`
flags it, and :meth:`LineSet.head_loss` returns ``h = 0`` and ``dh/dq = 0`` there; callers
impose ``q = 0`` on those lines.
"""

from __future__ import annotations

import numpy as np

from workbench.core.fittings import exit_k, fitting_constants
from workbench.core.friction import (
    friction_re_product,
    method_label,
    regime_of,
)
from workbench.core.model import G, System
from workbench.core.topology import Topology, build_topology
from workbench.core.valve import openings_over, relative_flow_coefficient, valve_k

_FREE_SURFACE = ("reservoir", "vessel")
"""Node kinds with a free surface that can feed a line (entrance loss applies)."""
_EXIT_INTO = ("reservoir", "vessel", "open_discharge")
"""Node kinds where flow leaving the line loses its kinetic energy (exit loss)."""


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
    entrance_forward, entrance_reverse : ndarray
        Entrance loss coefficient met by forward / reverse flow (0 where that flow does not
        leave a free surface) [-].
    exit_at_to, exit_at_from : ndarray of bool
        Whether forward flow leaves through an exit at the to-end / reverse flow through one
        at the from-end; the exit's coefficient depends on Re (:meth:`end_k`).
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
        self.entrance_reverse = np.where(to_feed, entrance, 0.0)
        self.exit_at_to = to_exit
        self.exit_at_from = from_exit

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
        chars = np.array([(v.characteristic, v.low_opening) for v in valves] or
                         np.zeros((0, 2)), dtype=object).reshape(-1, 2)
        kinds = sorted({(str(a), str(b)) for a, b in chars})
        self._valve_groups = [(kind, np.flatnonzero((chars[:, 0] == kind[0])
                                                    & (chars[:, 1] == kind[1])))
                              for kind in kinds]

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

    def openings_at(self, t) -> np.ndarray:
        """Per-line valve opening at time ``t`` [s] by each valve's schedule; ``nan`` without.

        A scalar ``t`` gives one row (lines); an array of times gives times x lines, each
        row the one a scalar call at that time gives (``np.interp`` evaluates each time
        alone).
        """
        t = np.asarray(t, dtype=float)
        out = np.full(t.shape + (self.n,), np.nan)
        for i in self._valve_idx:
            out[..., i] = openings_over(self._valves[i], t)
        return out

    def valve_k(self, openings=None) -> np.ndarray:
        """Valve loss coefficient per line at the openings [-]: 0 without a valve, ``inf`` shut."""
        if openings is None:
            x = self._steady_x
        else:  # lines last: times x lines gives times x lines
            x = np.asarray(openings, dtype=float)[..., self._valve_idx]
            x = np.where(np.isnan(x), self._steady_x, x)
        k = np.zeros(x.shape[:-1] + (self.n,))
        for (characteristic, low), sel in self._valve_groups:
            c = relative_flow_coefficient(characteristic, x[..., sel], self._rangeability[sel],
                                          low)
            k[..., self._valve_idx[sel]] = valve_k(self.valve_k_open[self._valve_idx[sel]], c)
        return k

    def closed(self, openings=None) -> np.ndarray:
        """Lines whose valve is shut at these openings (flow must be zero there) [bool]."""
        return np.isinf(self.valve_k(openings))

    # ----------------------------------------------------------------- end losses
    def end_k(self, q) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Entrance and exit loss coefficients met by flows ``q``, by the actual direction.

        Parameters
        ----------
        q : array_like
            Flow per line, positive from-end to to-end [m^3/s].

        Returns
        -------
        k_entrance, k_exit : ndarray
            Loss coefficients referred to the line velocity head [-]; 0 at an end the flow
            does not leave a free surface / does not discharge through. ``k_exit`` is the
            profile's kinetic-energy coefficient (:func:`workbench.core.fittings.exit_k`).
        dk_exit_dre : ndarray
            ``d k_exit / d|Re|`` [-].
        """
        q = np.asarray(q, dtype=float)
        re = np.abs(q / self.area) * (self.diameter / self.kinematic_viscosity)
        return self._end_k(q, re)

    def _end_k(self, q, re):
        forward = q >= 0.0
        k_ent = np.where(forward, self.entrance_forward, self.entrance_reverse)
        has_exit = np.where(forward, self.exit_at_to, self.exit_at_from)
        k_ex, dk_ex = exit_k(re)
        return k_ent, np.where(has_exit, k_ex, 0.0), np.where(has_exit, dk_ex, 0.0)

    # ----------------------------------------------------------------- head loss
    def head_loss(self, q, openings=None) -> tuple[np.ndarray, np.ndarray]:
        """Head loss from the from-end to the to-end of every line, and its slope.

        Parameters
        ----------
        q : array_like
            Flow per line, positive from-end to to-end [m^3/s]; times x lines gives the
            losses of several states at once (every term is per element, lines last).
        openings : array_like, optional
            Valve opening per line 0..1 (``nan`` or ignored without a valve), shaped like
            ``q`` or one row for all; default the valves' steady openings.

        Returns
        -------
        h : ndarray
            Head loss [m], same sign as ``q``; 0 on shut lines.
        dh_dq : ndarray
            ``dh/dq`` [s/m^2], >= 0, continuous through ``q = 0``; 0 on shut lines. The
            exit term adds ``dK_exit/dRe (D/nu) v^2/(2 g A)`` to the quadratic term's slope.
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
        k_ent, k_exit, dk_exit = self._end_k(q, re)
        k_quad = self.fittings_k_const + kv + k_ent + k_exit + self._fixed_fld
        h_lin_coef = np.where(fixed, 0.0, self._c_fric * phi) + self._c_kre
        h = h_lin_coef * v + k_quad * v * av / (2.0 * G)
        dh = (np.where(fixed, 0.0, self._c_fric * (phi + dphi * re)) + self._c_kre) / area
        dh = dh + k_quad * av / (G * area)
        # d/dq of K_exit(Re) v|v|/2g beyond the K_exit 2|v|/2g above: dRe/dv = D/nu sign(v).
        dh = dh + dk_exit * (self.diameter / self.kinematic_viscosity) * v * v / (2.0 * G * area)
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
            ``valve_k``, ``entrance_k``, ``exit_k`` [-] (the coefficients used: ``exit_k``
            is 2 for laminar flow, 1 for turbulent, blended between, 0 without an exit),
            ``kinetic_energy_coefficient`` [-] (``alpha`` of the velocity profile, the
            ``exit_k`` the line would have at an exit; the grade lines use it),
            ``closed`` (bool).
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
        k_ent, k_exit, _ = self._end_k(q, re)
        alpha, _ = exit_k(re)
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
            "kinetic_energy_coefficient": alpha,
            "closed": shut,
        }
