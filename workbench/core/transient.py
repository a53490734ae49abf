r"""Rigid-column transient of a gravity system: line flows, tank levels, valve moves, events.

Model
-----
The liquid in every line moves as one incompressible column (rigid-column theory). With
``Q`` the line flow [m^3/s], ``I = rho L/A`` its inertance [kg/m^4] and ``H`` piezometric
node heads [m],

.. math::

    I\,\frac{dQ}{dt} = \rho g\,\bigl(H_{from} - H_{to} - h(Q, t)\bigr)

where ``h`` is the head loss of :meth:`workbench.core.line.LineSet.head_loss` (friction in
every regime, fittings, the valve at its current opening, entrance and exit by the actual
flow direction). Tanks obey

.. math::

    \frac{dV}{dt} = \sum Q_{in} - \sum Q_{out} + Q_{feed}(t) - Q_{draw}(t)

with the level from the tank's geometry (:mod:`workbench.core.tank`): the sums are over
the tank's lines, ``Q_feed`` is a feed from outside the model and ``Q_draw`` a draw-off by
something outside it (constants, or piecewise-linear schedules whose break points are
segment ends, landed exactly like valve schedule points). The state is the tank *volume*,
so the mass balance is linear in the flows and conserved to round-off; the feed and
draw-off do not depend on the state, so the Jacobian is that of the lines alone.
Constant-level reservoirs and receivers keep their heads.

Junction heads are algebraic (an index-1 system): continuity ``sum dQ/dt = 0`` at every
junction gives the linear system ``(M diag(a) M^T) H_J = -M diag(a) (F^T H_F + h)`` with
``a = rho g/I``, ``M`` the junction incidence and ``F`` the fixed-node incidence. Its
solution enters the right-hand side as a projection ``dQ/dt = -S (F^T H_F + h)``,
``S = diag(a) (I - M^T L^+ M diag(a))``, formed once per configuration of open lines (the
pseudo-inverse also covers a group of junctions cut off by shut valves) so every call is
one matrix product; junction heads for pressures are recovered from the same factors.

Integration is implicit (Radau by default, BDF or LSODA by name) with the analytic
Jacobian ``-S diag(dh/dQ)`` and ``-S F^T diag(1/A(h))``, driven step by step through
scipy's ``OdeSolver`` interface so progress is reported honestly as the fraction of
simulated time and a cancel request stops the run between steps. Events are located by
root finding (``brentq``) on the solver's dense output, as ``solve_ivp`` does, and the
integrator is restarted after each event that changes the configuration:

``tank.drained``
    the volume falls to the one at ``min_level``; the tank's outlets then stop drawing
    (their flow is set to zero and held there) and its draw-off stops
    (``tank.draw_off_stopped``); a feed or an inflowing line keeps filling it;
``tank.refilled``
    a drained tank's volume rises to the one at its restart level
    (:func:`workbench.core.model.restart_level`, a band above ``min_level`` so that a
    feed smaller than the outflow does not make the outlets chatter): its outlets open
    again, starting from rest, and its draw-off resumes;
``tank.overflow``
    the volume reaches the one at the overflow level; the level is then held there and the
    surplus inflow (lines and feed, less the draw-off) spills, until it turns negative
    (``tank.spill_end``);
``line.reversal``
    a line flow changes sign (recorded only after a swing of at least 0.1 % of the line's
    largest flow so far, so numerical chatter near a rest state is not reported);
``valve.closed``
    a valve's schedule reaches zero opening (its break point, landed exactly): the line's
    flow is set to zero and held there, with no division by zero and no flow through the
    shut valve.

Validity
--------
Rigid-column pressures are valid for slow valve moves only; :mod:`workbench.core.surge`
screens each closure and caps reported peaks at static plus Joukowsky. The laminar start-up
of this lumped model is exponential with time constant ``rho D^2/(32 mu)``; the exact
laminar start-up (Szymanski's series solution, 1932) is about 1.3-1.4 times slower to
reach 63-99 % of the final flow, so for viscous liquids start-up times here are
optimistic. A computed "drained" time is never proof that a tank is empty.
"""

from __future__ import annotations

import math
import time as _time
from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from workbench.core.fittings import exit_k
from workbench.core.model import (
    G,
    Finding,
    System,
    draw_off_at,
    inflow_at,
    receiver_head,
    reservoir_head,
    restart_level,
)
from workbench.core.surge import LineSurge, effective_closure_time, screen_line
from workbench.core.tank import TankGeometry, tank_geometry

#: Gauge pressure below which a run's minimum counts as sub-atmospheric [Pa]: below the
#: solver's rounding at free outlets (about 1e-9 Pa), far above any pressure that matters.
SUBATMOSPHERIC_NOISE_PA = -1.0

#: Integration methods by name (all scipy OdeSolver classes); the first three are implicit.
METHODS: dict[str, str] = {
    "Radau": "implicit Runge-Kutta of order 5 (Radau IIA), analytic Jacobian",
    "BDF": "backward differentiation formulas of variable order, analytic Jacobian",
    "LSODA": "ODEPACK LSODA: switches between Adams and BDF, analytic Jacobian",
    "RK45": "explicit Runge-Kutta 5(4) (for comparison: slow on stiff systems)",
}

#: Longest simulated duration accepted [s] (about 32 years).
MAX_DURATION = 1e9

#: Most points of the reported series; a finer output interval is widened (with a note).
MAX_OUTPUT_POINTS = 200_000

#: Status codes of :class:`TransientResult`.
STATUS = {
    -1: "integration failed",
    0: "reached the end of the simulated duration",
    1: "stop condition met (every draining tank drained)",
    2: "cancelled",
}

_X_FLOOR = 1e-9
"""Smallest valve travel used inside a segment in which the valve is open: it reaches zero
only at the segment's end, where the line is then shut exactly."""


@dataclass(frozen=True)
class Event:
    """Something that happened at an instant of the run."""

    time: float
    """[s]"""
    code: str
    """``tank.drained``, ``tank.draw_off_stopped``, ``tank.refilled``, ``tank.overflow``,
    ``tank.spill_end``, ``line.reversal``, ``line.restart``, ``valve.closed``,
    ``valve.opened``, ``outlet.submergence`` (placed between output times)."""
    element: str
    """Id of the tank, line or valve's line."""
    message: str


@dataclass(frozen=True)
class TransientResult:
    """Outcome of :func:`simulate`, shaped like scipy's ``OdeResult``.

    Series are sampled at :attr:`t` (the output grid plus every event time).
    """

    success: bool
    status: int
    """See :data:`STATUS`."""
    message: str
    t: np.ndarray
    """Output times [s]."""
    line_ids: tuple[str, ...]
    flows: np.ndarray
    """Line flows, lines x times [m^3/s]."""
    tank_ids: tuple[str, ...]
    levels: np.ndarray
    """Tank levels above their bottoms, tanks x times [m]."""
    volumes: np.ndarray
    """Tank liquid volumes, tanks x times [m^3]."""
    events: tuple[Event, ...]
    max_pressure: dict[str, float]
    """Per line, the largest gauge pressure anywhere on the line over the run, valve inlet
    and profile points included, after the Joukowsky cap [Pa]."""
    min_pressure: dict[str, float]
    """Per line, the smallest gauge pressure anywhere on the line over the run [Pa]."""
    max_pressure_time: dict[str, float]
    """When the (uncapped) maximum occurred [s]."""
    min_pressure_time: dict[str, float]
    surge: dict[str, LineSurge]
    warnings: tuple[Finding, ...]
    drain_times: dict[str, float]
    """Time each tank first drained [s] (tanks that drained only)."""
    feeds: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Feed into each tank from outside the model, tanks x times [m^3/s] (zero without
    one)."""
    draw_offs: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Draw-off delivered by each tank, tanks x times [m^3/s]: the asked value, zero while
    the tank is drained."""
    end_rates: dict[str, float] = field(default_factory=dict)
    """Per tank, the rate of change of volume at the end of the run [m^3/s] (zero while it
    spills or stands drained)."""
    spills: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Surplus spilling over each tank's overflow, tanks x times [m^3/s]: lines, feed and
    draw-off's net inflow while the level is held at the overflow level, else zero."""
    end_states: dict[str, str] = field(default_factory=dict)
    """Per tank at the end of the run: ``"steady"`` (level no longer changing: inflows and
    outflows balance), ``"rising"``, ``"falling"``, ``"spilling"``, ``"drained"`` or
    ``"still"`` (nothing flowing in or out)."""
    method: str = "Radau"
    nfev: int = 0
    njev: int = 0
    nlu: int = 0
    nsteps: int = 0
    wall_time: float = 0.0
    """Wall-clock time of the integration [s]."""
    stats: dict = field(default_factory=dict)


class _Config:
    """Matrices for one configuration of open lines and spilling tanks."""

    def __init__(self, model: "_Model", open_lines: np.ndarray, spilling: np.ndarray):
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


class _Model:
    """Everything constant over a run: arrays built once from the system."""

    def __init__(self, system: System):
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
        self.m_dense = np.asarray(topo.incidence.toarray(), dtype=float)
        f_dense = np.asarray(topo.fixed_incidence.toarray(), dtype=float)
        self.f_dense = f_dense
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
        self.ft_tank = f_dense[self.tank_fixed, :].T if self.nt else np.zeros((self.nl, 0))
        self.t_rows = f_dense[self.tank_fixed, :] if self.nt else np.zeros((0, self.nl))
        self.v_min = np.array([g.volume(r.min_level) for g, r in zip(self.geoms, self.tanks)])
        self.v_over = np.array(
            [g.capacity if g.overflow_level is not None else np.inf for g in self.geoms]
        )
        self.v_restart = np.array([g.volume(min(restart_level(r), g.top))
                                   for g, r in zip(self.geoms, self.tanks)])
        self.ext_tanks = [k for k, r in enumerate(self.tanks) if r.has_external_flow]
        self.has_ext = bool(self.ext_tanks)
        self.valve_lines = np.flatnonzero(self.lines.has_valve)
        # +1 where the line discharges to air at its to-end, -1 at its from-end, 0 otherwise
        rec_to = np.array([k == "open_discharge" for k in self.lines.to_kind])
        rec_from = np.array([k == "open_discharge" for k in self.lines.from_kind])
        self.discharge_sign = np.where(rec_to, 1.0, np.where(rec_from, -1.0, 0.0))
        self.is_discharge = self.discharge_sign != 0.0
        self._stations()

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
        return np.array([f(x) for f, x in zip(self._level_fns, v.tolist())])

    def fixed_heads(self, v: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        h = self.h_fixed0.copy()
        if not self.nt:
            return h, np.zeros(0)
        levels = self.tank_levels(v)
        h[self.tank_fixed] = self.tank_head_offset + levels
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


def _line_end_heads(model: _Model, q, qdot, h_nodes_from, h_nodes_to):
    """Piezometric heads inside each line at its two ends, pipe side of any valve [m].

    Without a valve both ends follow from the node heads (less the entrance loss and the
    kinetic energy of the developed profile, ``alpha`` velocity heads, where the flow leaves
    a free surface; a line discharging into a free surface or the air keeps the head of
    what it discharges into, its exit loss being that ``alpha v^2/2g``). With a valve, the
    valve's end is found from the momentum balance of the pipe instead,
    ``H_a - H_b = h_pipe(Q) + (L/gA) dQ/dt`` with ``dQ/dt`` taken from the integrated
    trajectory: near the end of a closure ``K_valve Q^2`` multiplies a tiny, inexact flow by
    a huge coefficient, while the column's deceleration stays well conditioned.
    """
    lines = model.lines
    v = q / lines.area
    vh = v * np.abs(v) / (2.0 * G)
    fwd = q >= 0.0
    # Leaving a free surface into the line: piezometric head drops by (alpha + K_entrance)
    # v^2/2g, alpha the kinetic-energy coefficient (2 laminar, 1 turbulent), as in the
    # steady grade line (workbench.core.checks.line_profiles).
    alpha, _ = exit_k(np.abs(v) * (lines.diameter / lines.kinematic_viscosity))
    drop_a = np.where(fwd & model.from_free, (alpha + model.entrance_k) * np.abs(vh), 0.0)
    drop_b = np.where(~fwd & model.to_free, (alpha + model.entrance_k) * np.abs(vh), 0.0)
    h_a = h_nodes_from - drop_a
    h_b = h_nodes_to - drop_b
    if model.valve_lines.size:
        x_open = np.where(lines.has_valve, 1.0, np.nan)
        h_open, _ = lines.head_loss(q, x_open)
        k_ent, k_exit, _ = lines.end_k(q)
        h_pipe = h_open - (lines.valve_k_open + k_ent + k_exit) * vh
        drive = h_pipe + lines.inertance_head * qdot
        h_b = np.where(model.valve_at_to, h_a - drive, h_b)
        h_a = np.where(model.valve_at_from, h_b + drive, h_a)
    return h_a, h_b


def simulate(
    system: System,
    *,
    duration: float | None = None,
    progress: Callable[[float], None] | None = None,
    cancel: Callable[[], bool] | None = None,
    method: str = "Radau",
    rtol: float = 1e-5,
    atol: float | None = None,
    output_interval: float | None = None,
    initial_state: str | None = None,
    stop_when: str | None = "settings",
) -> TransientResult:
    """Simulate the rigid-column transient of a gravity system.

    Parameters
    ----------
    system : System
        A validated system; ``system.simulation`` gives the defaults below.
    duration : float, optional
        Simulated time [s]; default ``system.simulation.duration``.
    progress : callable, optional
        Called with the fraction of simulated time done (0..1) as the run advances.
    cancel : callable, optional
        Polled between steps; when it returns ``True`` the run stops cleanly and the result
        holds what was computed (``status`` 2).
    method : str
        A key of :data:`METHODS`.
    rtol, atol : float
        Integration tolerances; ``atol`` default scales with the initial flows and volumes.
    output_interval : float, optional
        Spacing of the reported series [s]; default the settings' or ``duration/1000``.
    initial_state : {"steady", "at_rest"}, optional
        Default the settings' (``"steady"`` without settings).
    stop_when : {"drained", None, "settings"}
        ``"drained"`` ends the run when every draining tank has drained; ``"settings"``
        takes the value from ``system.simulation``.

    Returns
    -------
    TransientResult

    Notes
    -----
    See the module docstring for the equations, events and the model's limits.

    Examples
    --------
    Flow establishing in 100 m of 100 mm pipe under 10 m of head, discharging to air,
    ``v = v_inf*tanh(t/T)`` with ``v_inf = sqrt(2gH/K_t)`` = 3.02 m/s (``K_t = 21.5``):

    >>> from workbench.core.model import (FluidProps, Line, Receiver, Reservoir,
    ...     SimulationSettings, System)
    >>> system = System("demo", FluidProps("water", 998.2, 1.0e-3),
    ...     {"R": Reservoir("R", "constant_level", 0.0, 10.0)}, {},
    ...     {"OUT": Receiver("OUT", "open_discharge", 0.0)},
    ...     {"L1": Line("L1", "R", "OUT", 100.0, 0.1, friction_factor=0.02)},
    ...     simulation=SimulationSettings(30.0, "at_rest"))
    >>> res = simulate(system)
    >>> res.success, round(float(res.flows[0, -1]) / (0.25 * 3.14159265 * 0.1**2), 3)
    (True, 3.02)
    """
    wall0 = _time.perf_counter()
    settings = system.simulation
    if duration is None:
        if settings is None:
            raise ValueError("no duration: give duration= or a [simulation] duration")
        duration = settings.duration
    if not (duration > 0.0 and math.isfinite(duration)):
        raise ValueError(f"duration must be a positive number of seconds, got {duration!r}")
    if duration > MAX_DURATION:  # far past any drain or transfer; near 1e300 s steps overflow
        raise ValueError(f"a simulated duration of {duration:.3g} s is more than "
                         f"{MAX_DURATION / 3.15576e7:.0f} years: give a shorter "
                         "simulation.duration (or --duration)")
    if method not in METHODS:
        raise ValueError(f"unknown method {method!r}; choose one of {', '.join(METHODS)}")
    if initial_state is None:
        initial_state = settings.initial_state if settings is not None else "steady"
    if initial_state not in ("steady", "at_rest"):
        raise ValueError(f"initial_state must be 'steady' or 'at_rest', got {initial_state!r}")
    if stop_when == "settings":
        stop_when = settings.stop_when if settings is not None else None
    if output_interval is None and settings is not None:
        output_interval = settings.output_interval
    if output_interval is None or not output_interval > 0.0:
        output_interval = duration / 1000.0
    asked = output_interval
    if duration / output_interval > MAX_OUTPUT_POINTS:  # memory and time stay bounded
        output_interval = duration / MAX_OUTPUT_POINTS

    model = _Model(system)
    run = _Run(model, duration, method, rtol, atol, output_interval, initial_state,
               stop_when, progress, cancel)
    if output_interval != asked:
        run.notes.append(Finding(
            "simulation.output_interval", "simulation",
            f"an output interval of {asked:.3g} s gives more than {MAX_OUTPUT_POINTS:,} points "
            f"over {duration:.6g} s: the series are reported every {output_interval:.3g} s "
            "instead (events keep their exact times)", "info", "workbench output limit"))
    result = run.execute()
    return _finish(model, run, result, _time.perf_counter() - wall0)


class _Run:
    """The stepping loop of one simulation (state kept between segments)."""

    def __init__(self, model, duration, method, rtol, atol, output_interval, initial_state,
                 stop_when, progress, cancel):
        self.model = model
        self.duration = float(duration)
        self.method = method
        self.rtol = rtol
        self.atol_arg = atol
        self.output_interval = output_interval
        self.initial_state = initial_state
        self.stop_when = stop_when
        self.progress = progress
        self.cancel = cancel
        self.events: list[Event] = []
        self.nfev = self.njev = self.nlu = self.nsteps = 0
        nl, nt = model.nl, model.nt
        self.drained = np.zeros(nt, bool)
        self.spilling = np.zeros(nt, bool)
        self.blocked = np.zeros(nl, bool)  # outlets of drained tanks
        self.blocked_by = np.zeros((nt, nl), bool)  # which tank holds each outlet shut
        self.drain_count = np.zeros(nt, dtype=int)
        self.drained_out: list[np.ndarray] = []  # drained tanks at each output time
        self.spilling_out: list[np.ndarray] = []  # spilling tanks at each output time
        self.backstopped = np.zeros(nl, bool)  # would draw air back from an open discharge
        self.t_out: list[float] = []
        self.y_out: list[np.ndarray] = []
        ns = len(model.st_frac)
        self.p_max = np.full(ns, -np.inf)
        self.p_min = np.full(ns, np.inf)
        self.p_max_t = np.zeros(ns)
        self.p_min_t = np.zeros(ns)
        self.h_static_max = np.full(nl, -np.inf)  # highest end-node head seen per line
        self.v_max = np.zeros(nl)
        self.peak_since_rev = np.zeros(nl)
        self.q_peak = np.zeros(nl)
        self.rev_count = np.zeros(nl, dtype=int)
        self.last_progress = -1.0
        self.drain_times: dict[str, float] = {}
        self.notes: list[Finding] = []
        self._cache = None
        self._valve_shut = None

    # ---------------------------------------------------------------- RHS / Jacobian
    def _openings(self, t: float) -> np.ndarray | None:
        if not self.model.valve_lines.size:
            return None
        x = self.model.lines.openings_at(t)
        if self.open_valve_floor.any():
            x = np.where(self.open_valve_floor, np.maximum(x, _X_FLOOR), x)
        return x

    def _losses(self, t, y):
        """Fixed heads, tank levels, head losses and slopes at a state, cached for the
        last state (the solver asks for the Jacobian, and the run for pressures, at points
        where the right-hand side was just evaluated)."""
        c = self._cache
        if c is not None and c[0] == t and np.array_equal(c[1], y):
            return c[2]
        nl = self.model.nl
        hf, levels = self.model.fixed_heads(y[nl:])
        h, dh = self.model.lines.head_loss(y[:nl], self._openings(t))
        out = (hf, levels, h, dh)
        self._cache = (t, y.copy(), out)
        return out

    def external_net(self, t):
        """Feed less the draw-off delivered, per tank, at time ``t`` [m^3/s]: a drained
        tank supplies no draw-off."""
        feed, draw = self.model.external(t)
        return feed - np.where(self.drained, 0.0, draw)

    def rhs(self, t, y):
        model, cfg = self.model, self.cfg
        nl = model.nl
        hf, _, h, _ = self._losses(t, y)
        g = (model.ft @ hf + h) * cfg.open_f
        out = np.empty(nl + model.nt)
        out[:nl] = cfg.s @ g
        out[:nl] *= -1.0
        out[nl:] = cfg.t_rows @ y[:nl]
        if model.has_ext:  # independent of the state: the Jacobian is unchanged
            out[nl:] += cfg.ext_on * self.external_net(t)
        return out

    def jac(self, t, y):
        model, cfg = self.model, self.cfg
        nl, nt = model.nl, model.nt
        _, _, _, dh = self._losses(t, y)
        dh = dh * cfg.open_f
        j = np.zeros((nl + nt, nl + nt))
        j[:nl, :nl] = -cfg.s * dh[None, :]
        if nt:
            levels = model.tank_levels(y[nl:])
            inv_a = np.array([1.0 / g.area_floor(lv, 1e-9) for g, lv in zip(model.geoms, levels)])
            j[:nl, nl:] = -cfg.s_tank * inv_a[None, :]
            j[nl:, :nl] = cfg.t_rows
        return j

    def heads(self, t, y):
        """Junction and fixed heads at a state, and the valve K per line."""
        model, cfg = self.model, self.cfg
        nl = model.nl
        hf, levels, h, _ = self._losses(t, y)
        g = model.ft @ hf + h * cfg.open_f
        hj = -(cfg.w @ g) if cfg.w.shape[0] else np.zeros(0)
        return np.concatenate([hj, hf]), None

    # ---------------------------------------------------------------- pressures
    def track(self, t, y, qdot):
        model = self.model
        nl = model.nl
        q = y[:nl]
        qdot = np.where(self.cfg.open, qdot, 0.0)
        h_nodes, _ = self.heads(t, y)
        topo = model.topo
        hn_from = h_nodes[topo.line_from]
        hn_to = h_nodes[topo.line_to]
        h_a, h_b = _line_end_heads(model, q, qdot, hn_from, hn_to)
        # A shut valve isolates the pipe from the node beyond it: the pipe side stands at
        # the head of the node it is still open to.
        shut = ~self.cfg.open & ~self.blocked & ~self.backstopped
        h_b = np.where(shut & model.valve_at_to, h_a, h_b)
        h_a = np.where(shut & model.valve_at_from, h_b, h_a)
        o = model.st_owner
        h_st = h_a[o] + model.st_frac * (h_b[o] - h_a[o])
        p = model.rho * G * (h_st - model.st_elev)
        # outlets of drained tanks run part-full or empty: no pressure is tracked there
        # Outlets of drained tanks run part-full or empty: no pressure is tracked there. In
        # the last 0.1 % of a valve closure the flow is below what the tolerances resolve,
        # and the deceleration of the column (hence the valve-end head) is noise: skip it;
        # the head there differs from the last tracked one by a negligible amount.
        tail = self.closing & (np.abs(q) < 1e-3 * self.q_peak)
        p = np.where((self.blocked | self.backstopped | tail)[o], np.nan, p)
        up = p > self.p_max
        self.p_max = np.where(up, p, self.p_max)
        self.p_max_t = np.where(up, t, self.p_max_t)
        dn = p < self.p_min
        self.p_min = np.where(dn, p, self.p_min)
        self.p_min_t = np.where(dn, t, self.p_min_t)
        self.h_static_max = np.maximum(self.h_static_max, np.maximum(hn_from, hn_to))
        self.v_max = np.maximum(self.v_max, np.abs(q) / model.lines.area)

    # ---------------------------------------------------------------- events
    # event components, in this order: (kind, size)
    _KINDS = ("drain", "overflow", "spill_end", "reversal", "discharge_stop", "release",
              "refill")

    def event_values(self, t, y):
        model = self.model
        nl = model.nl
        q = y[:nl]
        v = y[nl:]
        sign = model.discharge_sign
        if self.backstopped.any():
            h_nodes, _ = self.heads(t, y)
            drive = sign * (h_nodes[model.topo.line_from] - h_nodes[model.topo.line_to])
        else:
            drive = np.zeros(nl)
        net = model.t_rows @ q
        if model.has_ext:
            net = net + self.external_net(t)
        return np.concatenate([
            v - model.v_min,  # drained
            v - model.v_over,  # overflow
            net,  # net inflow: spill end
            q,  # reversal
            sign * q,  # flow turning back out of an open discharge
            drive,  # head returning above an open discharge
            v - model.v_restart,  # a drained tank refilled to its restart level
        ])

    def _arm(self):
        model = self.model
        nt, nl = model.nt, model.nl
        is_open = self.cfg.open
        self.armed = np.concatenate([
            ~self.drained,
            ~self.spilling & np.isfinite(model.v_over),
            self.spilling,
            is_open & ~model.is_discharge,
            is_open & model.is_discharge,
            self.backstopped & ~self.blocked,
            self.drained & ~self.spilling,
        ])
        self.direction = np.concatenate([
            np.full(nt, -1), np.full(nt, 1), np.full(nt, -1),
            np.zeros(nl, int), np.full(nl, -1), np.full(nl, 1), np.full(nt, 1),
        ])
        self.terminal = np.concatenate([
            np.ones(3 * nt, bool), np.zeros(nl, bool), np.ones(2 * nl + nt, bool),
        ])
        self.kind_of = np.concatenate([np.full(nt, 0), np.full(nt, 1), np.full(nt, 2),
                                       np.full(nl, 3), np.full(nl, 4), np.full(nl, 5),
                                       np.full(nt, 6)])
        self.index_of = np.concatenate([np.arange(nt)] * 3 + [np.arange(nl)] * 3
                                       + [np.arange(nt)])

    def find_events(self, sol, t_old, y_old, t_new, y_new):
        from scipy.optimize import brentq

        e_old = self.event_values(t_old, y_old)
        e_new = self.event_values(t_new, y_new)
        up = (e_old < 0.0) & (e_new >= 0.0) & (self.direction >= 0)
        down = (e_old > 0.0) & (e_new <= 0.0) & (self.direction <= 0)
        hits = np.flatnonzero((up | down) & self.armed)
        found = []
        for k in hits:
            def fun(t, k=k):
                return self.event_values(t, sol(t))[k]
            try:
                te = brentq(fun, t_old, t_new, xtol=4 * np.finfo(float).eps * max(1.0, abs(t_new)),
                            rtol=4 * np.finfo(float).eps)
            except ValueError:  # sign lost in the dense output: take the step end
                te = t_new
            found.append((te, int(k)))
        found.sort()
        return found

    # ---------------------------------------------------------------- output
    def record(self, t, y):
        self.t_out.append(float(t))
        y = np.array(y, dtype=float)
        y[: self.model.nl][~self.cfg.open] = 0.0  # a shut line's round-off is not a flow
        self.y_out.append(y)
        self.drained_out.append(self.drained.copy())
        self.spilling_out.append(self.spilling.copy())

    def report_progress(self, t, force=False):
        if self.progress is None:
            return
        frac = min(max(t / self.duration, 0.0), 1.0)
        if force or frac - self.last_progress >= 0.002:
            self.last_progress = frac
            self.progress(frac)

    # ---------------------------------------------------------------- main loop
    def initial(self):
        model = self.model
        nl, nt = model.nl, model.nt
        v0 = np.array([g.volume(r.level) if r.level <= g.top else np.nan
                       for g, r in zip(model.geoms, model.tanks)])
        if np.isnan(v0).any():
            bad = [r.id for r, v in zip(model.tanks, v0) if np.isnan(v)]
            raise ValueError(f"tank(s) {', '.join(bad)}: initial level above the top of the shape")
        q0 = np.zeros(nl)
        if self.initial_state == "steady":
            from workbench.core.network import solve_steady

            levels = {r.id: r.level for r in model.tanks}
            openings = {}
            for i in model.valve_lines:
                lid = model.topo.line_ids[i]
                openings[lid] = float(model.lines.openings_at(0.0)[i])
            res = solve_steady(model.system, levels=levels, openings=openings)
            if not res.success:
                raise _InitialStateError(
                    "the steady state at the initial levels and openings was not found: "
                    f"{res.message} (set the initial state to at_rest to start from rest)"
                )
            for i, lid in enumerate(model.topo.line_ids):
                q0[i] = res.lines[lid].flow
        return np.concatenate([q0, v0])

    def segment_breaks(self):
        """Segment ends: valve, feed and draw-off schedule break points, then the end."""
        times = set()
        for i in self.model.valve_lines:
            valve = self.model.system.lines[self.model.topo.line_ids[i]].valve
            if valve.schedule is not None:
                times.update(t for t in valve.schedule.times if 0.0 < t < self.duration)
        times.update(t for t in self.model.schedule_times() if 0.0 < t < self.duration)
        return sorted(times) + [self.duration]

    def configure(self, t_a, t_b, y):
        """Set the open lines for the segment [t_a, t_b]; returns the adjusted state."""
        model = self.model
        lines = model.lines
        self._cache = None
        x_a = lines.openings_at(t_a)
        x_b = lines.openings_at(t_b)
        shut_a = lines.closed(x_a)
        shut_b = lines.closed(x_b)
        valve_shut = shut_a & shut_b
        y = y.copy()
        prev = self._valve_shut
        if prev is not None:
            # valve moves landed exactly on the schedule's break points
            for i in model.valve_lines:
                if self.blocked[i]:
                    continue
                lid = model.topo.line_ids[i]
                if shut_a[i] and not prev[i]:
                    y[i] = 0.0
                    self._event(t_a, "valve.closed", lid, f"the valve on line {lid} is shut")
                if (prev[i] or shut_a[i]) and not valve_shut[i]:
                    self._event(t_a, "valve.opened", lid,
                                f"the valve on line {lid} starts to open")
        self._valve_shut = valve_shut
        self.open_valve_floor = lines.has_valve & ~valve_shut
        # valves shutting at the end of this segment: the last 0.1 % of their flow is not
        # used for pressures (see track)
        self.closing = lines.has_valve & ~valve_shut & shut_b
        for _ in range(model.nl + 1):
            open_lines = ~valve_shut & ~self.blocked & ~self.backstopped
            y[: model.nl][~open_lines] = 0.0
            self.cfg = _Config(model, open_lines, self.spilling)
            y[: model.nl] = self.cfg.project(y[: model.nl])
            # a discharge line at rest whose upstream head is below its outlet cannot start
            h_nodes, _ = self.heads(t_a, y)
            drive = model.discharge_sign * (h_nodes[model.topo.line_from]
                                             - h_nodes[model.topo.line_to])
            q = y[: model.nl]
            stop = open_lines & model.is_discharge & (model.discharge_sign * q <= 0.0) & (drive < 0.0)
            if not stop.any():
                break
            self.backstopped |= stop
            if t_a > 0.0:
                for i in np.flatnonzero(stop):
                    lid = model.topo.line_ids[i]
                    self._event(t_a, "line.reversal", lid,
                                f"line {lid} cannot discharge: the head upstream is below its "
                                "open outlet (air enters and the line stops)")
        # a reversal in the new configuration needs a real swing of the flow first
        self.peak_since_rev = np.zeros(model.nl)
        self._arm()
        return y

    def execute(self):
        from scipy import integrate

        model = self.model
        nl, nt = model.nl, model.nt
        try:
            y = self.initial()
        except _InitialStateError as exc:
            return -1, str(exc)
        # which tanks count as draining: a line leaves them by its positive direction, or
        # the initial flow draws from them
        leaves = (model.t_rows < 0).any(axis=1) if nt else np.zeros(0, bool)
        draws = (model.t_rows * y[:nl][None, :] < 0).any(axis=1) if nt else np.zeros(0, bool)
        asked = np.array([r.draw_off > 0.0 or (r.draw_off_schedule is not None
                                               and max(r.draw_off_schedule.flows) > 0.0)
                          for r in model.tanks], dtype=bool)
        self.draining_capable = leaves | draws | asked
        t = 0.0
        # tanks already at or beyond their limits at the start
        for k, r in enumerate(model.tanks):
            if y[nl + k] <= model.v_min[k] and self.draining_capable[k]:
                self._drain(k, t, y, started=True)
            if y[nl + k] >= model.v_over[k]:
                self.spilling[k] = True
                self._event(t, "tank.overflow", r.id,
                            f"tank {r.id} starts at or above its overflow level")
        if nt:
            scale_v = np.maximum(np.abs(y[nl:]), np.where(np.isfinite(model.v_over),
                                                             model.v_over, 0.0))
        else:
            scale_v = np.zeros(0)
        q_scale = max(float(np.max(np.abs(y[:nl]), initial=0.0)), 1e-4)
        if self.atol_arg is None:
            atol = np.concatenate([np.full(nl, 1e-6 * q_scale),
                                   np.maximum(1e-9 * scale_v, 1e-9)])
        else:
            atol = self.atol_arg
        self.q_peak = np.abs(y[:nl])

        breaks = self.segment_breaks()
        seg_start = 0.0
        grid = np.arange(0.0, self.duration + 0.5 * self.output_interval, self.output_interval)
        grid = grid[grid <= self.duration]
        grid_i = 0
        status = 0
        message = STATUS[0]
        self.open_valve_floor = np.zeros(nl, bool)
        for seg_end in breaks:
            y = self.configure(seg_start, seg_end, y)
            t = seg_start
            if t == 0.0:
                self.record(t, y)
                self.track(t, y, self.rhs(t, y)[:nl])
                grid_i = 1
            while t < seg_end:
                solver_cls = getattr(integrate, self.method)
                kwargs = dict(rtol=self.rtol, atol=atol)
                if self.method != "RK45":
                    kwargs["jac"] = self.jac
                solver = solver_cls(self.rhs, t, y, seg_end, **kwargs)
                restart = False
                while solver.status == "running":
                    if self.cancel is not None and self.cancel():
                        status, message = 2, f"cancelled at t = {t:.6g} s"
                        break
                    t_old, y_old = solver.t, solver.y.copy()
                    msg = solver.step()
                    self.nsteps += 1
                    if solver.status == "failed":
                        status, message = -1, (
                            f"integration failed at t = {solver.t:.6g} s: {msg}; results up "
                            "to then are kept. Check for a valve that shuts almost at once, a "
                            "line with almost no length or resistance, or a level at a tank's "
                            "limits; a slower valve move or a shorter duration may help")
                        break
                    t_new, y_new = solver.t, solver.y
                    sol = solver.dense_output()
                    found = self.find_events(sol, t_old, y_old, t_new, y_new)
                    t_stop = t_new
                    terminal_hits = []
                    for te, k in found:
                        if self.terminal[k]:
                            if not terminal_hits or te <= terminal_hits[0][0] + 1e-12 * max(1.0, te):
                                terminal_hits.append((te, k))
                    if terminal_hits:
                        t_stop = terminal_hits[0][0]
                    # output grid points inside the accepted part of the step
                    g_end = int(np.searchsorted(grid, t_stop, side="right"))
                    if g_end > grid_i:
                        tg = grid[grid_i:g_end]
                        tg = tg[tg > t_old]
                        if tg.size:
                            yg = sol(tg)
                            yg[:nl][~self.cfg.open] = 0.0
                            self.t_out.extend(tg.tolist())
                            self.y_out.extend(yg.T)
                            self.drained_out.extend([self.drained.copy()] * tg.size)
                            self.spilling_out.extend([self.spilling.copy()] * tg.size)
                        grid_i = g_end
                    for te, k in found:
                        if te <= t_stop and not self.terminal[k]:
                            self._reversal(int(self.index_of[k]), te, sol(te))
                    y_stop = y_new.copy() if t_stop == t_new else sol(t_stop)
                    self._peaks(y_stop[:nl])
                    delta = 1e-3 * (t_stop - t_old)
                    if delta > 0.0:
                        qdot = (y_stop[:nl] - sol(t_stop - delta)[:nl]) / delta
                    else:  # an event right at the step's start
                        qdot = self.rhs(t_stop, y_stop)[:nl]
                    self.track(t_stop, y_stop, qdot)
                    t, y = t_stop, y_stop
                    self.report_progress(t)
                    if terminal_hits:
                        stop = self._terminal(terminal_hits, y)
                        if self.t_out[-1] != t:
                            self.record(t, y)
                        if stop:
                            status, message = 1, (
                                f"every draining tank drained by t = {t:.6g} s")
                            break
                        y = self.configure(t, seg_end, y)
                        restart = True
                        break
                self.nfev += solver.nfev
                self.njev += getattr(solver, "njev", 0)
                self.nlu += getattr(solver, "nlu", 0)
                if status != 0:
                    break
                if not restart:
                    t, y = solver.t, solver.y.copy()
            if status != 0:
                break
            if self.t_out[-1] != seg_end:
                self.record(seg_end, y)
            # valve break point: closures landed exactly on the schedule time
            if seg_end >= self.duration:
                self._valve_end(seg_end)
            seg_start = seg_end
        if status in (1, 2, -1) and (not self.t_out or self.t_out[-1] != t):
            self.record(t, y)
        self.report_progress(t, force=True)
        self.t_final = t
        return status, message

    # ---------------------------------------------------------------- event actions
    def _event(self, t, code, element, message):
        self.events.append(Event(float(t), code, element, message))

    def _peaks(self, q):
        aq = np.abs(q)
        self.q_peak = np.maximum(self.q_peak, aq)
        self.peak_since_rev = np.maximum(self.peak_since_rev, aq)

    def _reversal(self, i, te, y):
        lid = self.model.topo.line_ids[i]
        threshold = max(1e-3 * self.q_peak[i], 1e-9)
        if self.peak_since_rev[i] < threshold:
            return
        self.peak_since_rev[i] = 0.0
        self.rev_count[i] += 1
        if self.rev_count[i] <= 50:
            self._event(te, "line.reversal", lid, f"flow in line {lid} reverses")
        elif self.rev_count[i] == 51:
            self._event(te, "line.reversal", lid,
                        f"flow in line {lid} keeps reversing; further reversals not listed")

    def _drain(self, k, t, y, started=False):
        model = self.model
        nl = model.nl
        rid = model.tank_ids[k]
        self.drained[k] = True
        self.drain_times.setdefault(rid, float(t))
        self.drain_count[k] += 1
        row = model.t_rows[k]
        tiny = 1e-9 * max(float(np.max(self.q_peak, initial=0.0)), 1e-12)
        drawing = (row != 0) & (row * y[:nl] < -tiny)
        # lines at rest that would draw from it by their positive direction stop as well
        outlets = drawing | ((row < 0) & (np.abs(y[:nl]) <= tiny))
        self.blocked_by[k] = outlets
        self.blocked |= outlets
        if not self._cycle_listed(k, t, rid):
            return
        names = ", ".join(model.topo.line_ids[i] for i in np.flatnonzero(drawing))
        res = model.tanks[k]
        what = "starts at or below" if started else "reaches"
        self._event(t, "tank.drained", rid,
                    f"tank {rid} {what} its drained level {res.min_level:g} m; "
                    f"outlet line(s) {names or 'none'} stop drawing")
        asked = float(model.external(t)[1][k])
        if asked > 0.0:
            self._event(t, "tank.draw_off_stopped", rid,
                        f"tank {rid} can no longer supply its draw-off of "
                        f"{asked * 1000:.4g} L/s: the draw-off stops (the tank is drained)")

    def _cycle_listed(self, k, t, rid):
        """Whether this drain or refill of tank ``k`` is listed as an event: a tank that
        keeps draining and refilling is listed 50 times, then once more in words."""
        n = self.drain_count[k]
        if n <= 50:
            return True
        if n == 51 and not self.drained[k]:
            return False
        if n == 51:
            self._event(t, "tank.drained", rid,
                        f"tank {rid} keeps draining and refilling; further cycles not listed")
        return False

    def _refill(self, k, t):
        """A drained tank refilled to its restart level: its outlets and draw-off resume."""
        model = self.model
        rid = model.tank_ids[k]
        self.drained[k] = False
        released = self.blocked_by[k].copy()
        self.blocked_by[k] = False
        self.blocked = self.blocked_by.any(axis=0) if model.nt else self.blocked
        if not self._cycle_listed(k, t, rid):
            return
        names = ", ".join(model.topo.line_ids[i] for i in np.flatnonzero(released))
        asked = float(model.external(t)[1][k])
        lvl = restart_level(model.tanks[k])
        self._event(t, "tank.refilled", rid,
                    f"tank {rid} refills to its restart level {lvl:.4g} m: "
                    + (f"outlet line(s) {names} open again" if names else "it is back in use")
                    + (f"; its draw-off of {asked * 1000:.4g} L/s resumes" if asked > 0.0
                       else ""))

    def _terminal(self, hits, y):
        """Apply terminal events; return True when the run should stop."""
        model = self.model
        for te, k in hits:
            kind, idx = int(self.kind_of[k]), int(self.index_of[k])
            if kind == 0:
                self._drain(idx, te, y)
            elif kind == 1:
                rid = model.tank_ids[idx]
                self.spilling[idx] = True
                lvl = model.geoms[idx].overflow_level
                self._event(te, "tank.overflow", rid,
                            f"tank {rid} reaches its overflow level {lvl:g} m and spills"
                            + self._overflow_cause(idx, te, y))
            elif kind == 2:
                rid = model.tank_ids[idx]
                self.spilling[idx] = False
                self._event(te, "tank.spill_end", rid, f"tank {rid} stops spilling")
            elif kind == 4:
                lid = model.topo.line_ids[idx]
                self.backstopped[idx] = True
                self._event(te, "line.reversal", lid,
                            f"flow in line {lid} would turn back out of its open discharge: "
                            "air enters and the line stops discharging")
            elif kind == 5:
                lid = model.topo.line_ids[idx]
                self.backstopped[idx] = False
                self._event(te, "line.restart", lid,
                            f"the head upstream of the discharge of line {lid} rises above it "
                            "again: the line restarts (full-bore assumed)")
            elif kind == 6:
                self._refill(idx, te)
        if self.stop_when == "drained":
            must = self.draining_capable
            if must.any() and self.drained[must].all():
                return True
        return False

    def _overflow_cause(self, k, t, y):
        """Words on what makes tank ``k`` overflow when it has a feed or draw-off."""
        model = self.model
        if k not in model.ext_tanks:
            return ""
        feed, draw = model.external(t)
        draw_k = 0.0 if self.drained[k] else float(draw[k])
        lines_net = float(model.t_rows[k] @ y[: model.nl])
        if feed[k] <= 0.0:
            return ""
        out_total = draw_k - min(lines_net, 0.0)
        if lines_net <= 0.0:
            return (f": its feed of {feed[k] * 1000:.4g} L/s is the cause, more than its "
                    f"outlets and draw-off take out ({out_total * 1000:.4g} L/s)")
        return (f": its feed of {feed[k] * 1000:.4g} L/s and a net {lines_net * 1000:.4g} L/s "
                f"from its lines are more than its draw-off takes out "
                f"({draw_k * 1000:.4g} L/s)")

    def _valve_end(self, t):
        """A valve shutting exactly at the end of the run."""
        model = self.model
        shut = model.lines.closed(model.lines.openings_at(t))
        for i in model.valve_lines:
            if shut[i] and not self._valve_shut[i] and not self.blocked[i]:
                lid = model.topo.line_ids[i]
                self._event(t, "valve.closed", lid, f"the valve on line {lid} is shut")


class _InitialStateError(RuntimeError):
    pass


def _finish(model: _Model, run: _Run, outcome, wall: float) -> TransientResult:
    from workbench.core.valve import relative_flow_coefficient

    status, message = outcome
    system = model.system
    nl = model.nl
    t = np.array(run.t_out)
    ys = np.array(run.y_out).T if run.y_out else np.zeros((nl + model.nt, 0))
    flows = ys[:nl]
    volumes = ys[nl:]
    levels = np.array([[g.level_extrapolated(v) for v in row]
                       for g, row in zip(model.geoms, volumes)]).reshape(model.nt, len(t))
    feeds, draw_offs = _external_series(model, run, t)
    end_rates, end_states = _end_states(model, run, ys, feeds, draw_offs, levels)
    spills = _spill_series(model, run, ys, feeds, draw_offs)
    fluid = system.fluid
    warnings: list[Finding] = list(run.notes)
    surge: dict[str, LineSurge] = {}
    max_p: dict[str, float] = {}
    min_p: dict[str, float] = {}
    max_t: dict[str, float] = {}
    min_t: dict[str, float] = {}
    for i, lid in enumerate(model.topo.line_ids):
        line = system.lines[lid]
        sel = slice(model.st_start[i],
                    model.st_start[i + 1] if i + 1 < len(model.st_start) else None)
        pmax_st = run.p_max[sel]
        pmin_st = run.p_min[sel]
        max_t[lid] = float(run.p_max_t[sel][int(np.argmax(pmax_st))])
        min_t[lid] = float(run.p_min_t[sel][int(np.argmin(pmin_st))])
        eff = None
        if line.valve is not None and line.valve.schedule is not None:
            valve = line.valve
            est = effective_closure_time(
                valve, lambda x, v=valve: relative_flow_coefficient(v.characteristic, x,
                                                                    v.rangeability),
                _rest_of_line_k(model, i, run))
            if est is not None and est.fastest_cut_at <= run.t_final:
                eff = est.effective_time
        screened, findings = screen_line(
            lid, line, fluid, atmospheric_pressure=system.atmospheric_pressure,
            station_max=pmax_st, station_min=pmin_st, station_elevation=model.st_elev[sel],
            static_head=float(run.h_static_max[i]), velocity_max=float(run.v_max[i]),
            effective_closure=eff, max_time=max_t[lid], min_time=min_t[lid])
        surge[lid] = screened
        warnings.extend(findings)
        max_p[lid] = screened.max_pressure
        min_p[lid] = screened.min_pressure
        separated = any(f.code == "surge.column_separation" for f in findings)
        if not separated and screened.min_pressure < SUBATMOSPHERIC_NOISE_PA:
            # below atmospheric at some time of the run, though not at vapour pressure: the
            # steady check's caution, with when and where
            j = int(np.argmin(pmin_st))
            where = float(model.st_frac[sel][j]) * line.length
            warnings.append(Finding(
                "profile.subatmospheric", lid,
                f"during the run the pressure on line {lid} falls to "
                f"{screened.min_pressure / 1000.0:.4g} kPa gauge at t = {min_t[lid]:.4g} s, "
                f"{where:.4g} m from {line.from_node!r} (elevation "
                f"{float(model.st_elev[sel][j]):.4g} m): air can be drawn in at joints, and "
                "thin-walled or plastic pipe can collapse; check the pipe's vacuum rating",
                "caution", "rigid-column pressures at the line's profile points; common "
                "practice"))
    for ev in run.events:
        if ev.code == "tank.overflow":
            k = model.tank_ids.index(ev.element)
            peak = float(np.max(spills[k], initial=0.0))
            surplus = (f" (the surplus spilling reaches {peak * 1000:.4g} L/s in this run)"
                       if peak > 0.0 else "")
            warnings.append(Finding(
                "tank.overflow", ev.element,
                f"{ev.message} at t = {ev.time:.6g} s: check the overflow capacity under the "
                f"worst-case inflow{surplus} (defer to local codes)", "danger",
                "common practice"))
    vortex_events, vortex_findings = _submergence(model, t, flows, levels)
    warnings.extend(vortex_findings)
    for k, tid in enumerate(model.tank_ids):
        if run.drain_count[k] >= 2:
            warnings.append(Finding(
                "tank.cycling", tid,
                f"tank {tid} drained {int(run.drain_count[k])} times, refilling in between: "
                "what flows in is less than its outlets and draw-off take at the drained "
                "level. In the plant the outlets would run part-full and draw air (vortexing) "
                "rather than stop and restart; the model stops them at min_level and restarts "
                f"them at the restart level {restart_level(model.tanks[k]):.4g} m", "caution",
                "common practice"))
    return TransientResult(
        success=status in (0, 1),
        status=status,
        message=message,
        t=t,
        line_ids=model.topo.line_ids,
        flows=flows,
        tank_ids=model.tank_ids,
        levels=levels,
        volumes=volumes,
        events=tuple(sorted([*run.events, *vortex_events], key=lambda e: e.time)),
        max_pressure=max_p,
        min_pressure=min_p,
        max_pressure_time=max_t,
        min_pressure_time=min_t,
        surge=surge,
        warnings=tuple(warnings),
        drain_times=dict(run.drain_times),
        feeds=feeds,
        draw_offs=draw_offs,
        end_rates=end_rates,
        end_states=end_states,
        spills=spills,
        method=run.method,
        nfev=run.nfev,
        njev=run.njev,
        nlu=run.nlu,
        nsteps=run.nsteps,
        wall_time=wall,
    )


def _submergence(model: _Model, t: np.ndarray, flows: np.ndarray, levels: np.ndarray):
    """When a draining tank's depth over an outlet falls below the vortex-prevention
    submergence ``S = D(1 + 2.3 Fr)`` (the steady check's rule, applied along the run).

    The depth is the tank's level over its bottom, where the outlet is (as in the steady
    check); ``Fr = v/sqrt(gD)`` with the line's velocity at that time. The crossing is
    placed by linear interpolation between output times. Returns the ``outlet.submergence``
    events and findings, one per outlet at most.
    """
    from workbench.core.checks import SUBMERGENCE_SOURCE

    events: list[Event] = []
    findings: list[Finding] = []
    if not len(t):
        return events, findings
    system = model.system
    for i, lid in enumerate(model.topo.line_ids):
        line = system.lines[lid]
        area = math.pi * line.diameter**2 / 4.0
        for end, sign in ((line.from_node, 1.0), (line.to_node, -1.0)):
            if end not in model.tank_ids:
                continue
            k = model.tank_ids.index(end)
            out = sign * flows[i]  # flow leaving the tank into the line [m^3/s]
            fr = np.abs(out) / area / math.sqrt(G * line.diameter)
            margin = levels[k] - line.diameter * (1.0 + 2.3 * fr)
            short = (out > 0.0) & (margin < 0.0)
            if not short.any():
                continue
            j = int(np.argmax(short))
            when = float(t[j])
            if j > 0 and margin[j - 1] >= 0.0 and out[j - 1] > 0.0:
                w = margin[j - 1] / (margin[j - 1] - margin[j])
                when = float(t[j - 1] + w * (t[j] - t[j - 1]))
            level = float(np.interp(when, t, levels[k]))
            rule = (f"the submergence a vortex-prevention rule asks for (S = D(1 + 2.3 Fr), "
                    f"Fr {fr[j]:.3g})")
            events.append(Event(
                when, "outlet.submergence", end,
                f"the depth over the outlet into line {lid}, {level:.4g} m, falls below {rule}: "
                "a vortex can draw air in"))
            start = "from the start" if j == 0 else f"from about t = {when:.4g} s"
            findings.append(Finding(
                "outlet.submergence", lid,
                f"during the run the depth over the outlet of {end!r} into line {lid} is below "
                f"{rule} {start}, at a level of {level:.4g} m: air can be drawn in by a vortex "
                "from then on, and the flows and drained time after it assume none is",
                "caution", SUBMERGENCE_SOURCE))
    return events, findings


def _external_series(model: _Model, run: _Run, t: np.ndarray):
    """Feed and delivered draw-off per tank at the output times [m^3/s]."""
    feeds = np.zeros((model.nt, len(t)))
    draws = np.zeros((model.nt, len(t)))
    if not model.has_ext:
        return feeds, draws
    for j, tj in enumerate(t.tolist()):
        feed, draw = model.external(tj)
        drained = run.drained_out[j] if j < len(run.drained_out) else run.drained
        feeds[:, j] = feed
        draws[:, j] = np.where(drained, 0.0, draw)
    return feeds, draws


def _spill_series(model: _Model, run: _Run, ys, feeds, draws) -> np.ndarray:
    """Surplus spilling over each tank's overflow at the output times [m^3/s]."""
    n = ys.shape[1]
    spills = np.zeros((model.nt, n))
    if not model.nt or not n or not run.spilling_out:
        return spills
    held = np.array(run.spilling_out[:n]).T.reshape(model.nt, -1)
    if held.shape[1] != n or not held.any():
        return spills
    net = model.t_rows @ ys[: model.nl] + feeds - draws
    return np.where(held, np.maximum(net, 0.0), 0.0)


#: A tank whose net inflow is below this fraction of the flow through it counts as steady
#: at the end of a run (common practice, no source).
STEADY_FRACTION = 1e-3


def _end_states(model: _Model, run: _Run, ys, feeds, draws, levels):
    """Per tank, the rate of change of volume at the end of the run [m^3/s] and a word for
    its state (see :attr:`TransientResult.end_states`)."""
    rates: dict[str, float] = {}
    states: dict[str, str] = {}
    if not model.nt or not ys.shape[1]:
        return rates, states
    q = ys[: model.nl, -1]
    for k, tid in enumerate(model.tank_ids):
        row = model.t_rows[k]
        line_net = float(row @ q)
        through = float(np.abs(row) @ np.abs(q)) + feeds[k, -1] + draws[k, -1]
        net = line_net + feeds[k, -1] - draws[k, -1]
        if run.spilling[k]:
            rates[tid], states[tid] = 0.0, "spilling"
            continue
        rates[tid] = net
        if through <= 1e-12:
            states[tid] = "drained" if run.drained[k] else "still"
        elif abs(net) <= STEADY_FRACTION * through:
            states[tid] = "steady"
        elif run.drained[k] and net <= 0.0:
            states[tid] = "drained"
        else:
            states[tid] = "rising" if net > 0.0 else "falling"
    return rates, states


def _rest_of_line_k(model: _Model, i: int, run: _Run) -> float:
    """Loss coefficient of line ``i`` without its valve, at its largest flow of the run."""
    lines = model.lines
    q = max(float(run.q_peak[i]), 1e-6 * lines.area[i])
    qs = np.zeros(model.nl)
    qs[i] = q
    x = np.full(model.nl, np.nan)
    x[i] = 1.0
    h, _ = lines.head_loss(qs, x)
    vh = (q / lines.area[i]) ** 2 / (2.0 * G)
    return max(float(h[i]) / vh - float(lines.valve_k_open[i]), 0.0)
