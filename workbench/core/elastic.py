r"""Elastic surge (water hammer) in lines in series, by the method of characteristics.

The rigid-column solver (:mod:`workbench.core.transient`) treats each line as one
incompressible slug; for a valve closing in less than about five wave round trips ``2L/a``
that overstates or misses the peak (see :mod:`workbench.core.surge`). This module solves
the one-dimensional water-hammer equations instead, with the liquid compressible and the
pipe wall elastic, for a chain of lines in series between two ends (free surfaces,
receivers, dead ends) with valves at the ends or between the lines.

Method (Wylie & Streeter, *Fluid Transients in Systems*, 1993, ch. 3): along the
characteristic lines ``dx/dt = +a`` and ``dx/dt = -a``

.. math::

    C^+:\ H_P = C_P - B\,Q_P,\quad C_P = H_A + B\,Q_A - R\,Q_A|Q_A|

    C^-:\ H_P = C_M + B\,Q_P,\quad C_M = H_B - B\,Q_B + R\,Q_B|Q_B|

with ``B = a/(gA)`` [s/m^2] and ``R = f dx/(2 g D A^2)`` [s^2/m^5]. Every line is cut into
reaches with the **same time step** and a Courant number of exactly one
(``dx_i = a_i dt``), so the characteristics pass through grid nodes and no interpolation
smears the wave front. Lengths are fixed, so the reach counts are rounded and each line's
wave speed is adjusted to ``a_i' = L_i/(N_i dt)``; the adjustment is reported (the usual
practice, Wylie & Streeter 1993, ch. 3). Wave speeds themselves come from the Korteweg
formula in :func:`workbench.core.surge.wave_speed`.

Implementation: the state is kept as the two Riemann-like variables ``u = H + BQ`` and
``w = H - BQ``. With a Courant number of one, the interior update is a shift of ``u`` one
node downstream and of ``w`` one node upstream, each corrected by the friction term; ``w``
is stored reversed after ``u`` in one array so that one numpy call shifts both. There is no
Python loop over reaches; the only per-step Python work is at the line ends.

Friction is quasi-steady Darcy-Weisbach, odd in ``Q`` so reverse flow is handled:

* ``"initial"`` (default): the friction factor of each line (and its fittings' K) is taken
  from :func:`workbench.core.friction.darcy_friction` (and
  :func:`workbench.core.fittings.fitting_k`) at the **initial** Reynolds number and held;
  this is the usual choice for a surge run of seconds to minutes and the fastest. When the
  initial flow is zero there is no initial Reynolds number and ``"quasi_steady"`` is used;
* ``"quasi_steady"``: ``f`` is updated at every node and step from the local Reynolds number
  (laminar ``64/Re`` through Colebrook), through ``f*Re`` so that zero flow is regular.

Unsteady friction (e.g. Brunone's or Vardy's models) is **not** included: it would add
damping to the later cycles of the oscillation and steepen their decay, while the first
peak after a closure is nearly unchanged; for long, high-friction lines quasi-steady
friction also slightly understates line packing (from memory, common observation in the
water-hammer literature).

Column separation (vapour cavities) is not modelled. Where the computed pressure falls to
the liquid's vapour pressure (absolute, with the system's atmospheric pressure) the time and
place are recorded as a ``surge.column_separation`` finding and the result is marked
untrustworthy from that time on: a real line would form a cavity there and its collapse can
give a pressure *higher* than the computed peak.

Ends held fixed over the run: a tank's level is held at its initial value (a surge run
lasts seconds to minutes, during which a tank's level hardly moves), as are receivers'
pressures. A free discharge is a fixed head at the outlet elevation (atmospheric pressure
in the jet); flow reversing there would draw in air, which the model does not represent.
Unlike the steady and rigid-column line model (:func:`workbench.core.fittings.exit_k`,
2 velocity heads for a laminar profile), the initial steady state here takes one velocity
head at an exit, and ``1 + K_entrance`` at an entrance, in every flow regime.

These are screening calculations: surge protection is a matter for licensed practice and
local codes.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from workbench.core.model import G, Finding, Line, System, receiver_head, reservoir_head

#: Default tolerance on the wave-speed adjustment that makes every Courant number one [-].
SPEED_TOLERANCE = 0.05

#: Reaches on the line with the shortest wave travel time when none is requested [-].
AUTO_REACHES = 16

#: Upper limit on the total reach count of a chain chosen automatically [-].
MAX_AUTO_REACHES = 4000

#: Default run length after the last valve movement, in round trips of the chain [-].
DEFAULT_ROUND_TRIPS = 20

#: Steps recorded per block before the envelope, series and vapour check are updated [-].
_BLOCK = 256

STATUS_MESSAGES = {
    0: "The run reached its end; the results hold throughout.",
    1: "The run reached its end, but the pressure fell to vapour pressure: results after "
    "that time are not trustworthy (column separation is not modelled).",
    -1: "The elastic model could not be set up.",
    -2: "The run was cancelled.",
}


class ElasticSetupError(ValueError):
    """The lines cannot be run by the elastic model; the message says why in words."""


@dataclass(frozen=True)
class WaveSpeedUse:
    """The wave speed of one line: from the Korteweg formula and as used on the grid."""

    line: str
    korteweg: float
    """Wave speed from the Korteweg formula [m/s]."""
    used: float
    """Wave speed used, ``L/(N dt)`` [m/s]."""
    formula: str
    """How the Korteweg speed was obtained (formula and support factor, in words)."""

    @property
    def adjustment(self) -> float:
        """Relative change ``used/korteweg - 1`` [-]."""
        return self.used / self.korteweg - 1.0


@dataclass(frozen=True, eq=False)
class Envelope:
    """Extremes over the run at every grid node of one line."""

    line: str
    distance: np.ndarray
    """Chainage of the nodes from the line's from-end [m]."""
    elevation: np.ndarray
    """Pipe centreline elevation at the nodes, interpolated from the profile [m]."""
    max_head: np.ndarray
    """Highest piezometric head reached [m]."""
    min_head: np.ndarray
    """Lowest piezometric head reached [m]."""
    initial_head: np.ndarray
    """Steady head at ``t = 0`` [m]."""
    max_pressure: np.ndarray
    """Highest gauge pressure ``rho g (H - z)`` [Pa]."""
    min_pressure: np.ndarray
    """Lowest gauge pressure [Pa]."""


@dataclass(frozen=True)
class ColumnSeparation:
    """Where and when the computed pressure first reached vapour pressure."""

    time: float
    """[s]"""
    line: str
    distance: float
    """Chainage on that line [m]."""
    pressure_abs: float
    """Computed absolute pressure there [Pa] (at or below vapour pressure)."""


@dataclass(frozen=True, eq=False)
class ElasticResult:
    """Result of an elastic surge run, shaped like scipy's solver results.

    ``status``: 0 ran to the end and holds throughout; 1 ran to the end but reached vapour
    pressure (see :attr:`trusted_until`); -1 set-up failed (the message says why);
    -2 cancelled. ``success`` is ``status >= 0``.
    """

    success: bool
    status: int
    message: str
    line_ids: tuple[str, ...] = ()
    """The chain, upstream to downstream."""
    time: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Times of the series [s], every step from 0."""
    dt: float = float("nan")
    """Time step [s]."""
    reaches: dict[str, int] = field(default_factory=dict)
    wave_speeds: dict[str, WaveSpeedUse] = field(default_factory=dict)
    friction: str = ""
    """Friction model used (a key of :data:`FRICTION_MODELS`)."""
    initial_flow: float = float("nan")
    """Steady flow at ``t = 0`` along the chain [m^3/s]."""
    valve_line: str | None = None
    """The line whose valve the valve series refer to (``None``: no valve in the chain)."""
    valve_head: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Head at the pipe side of that valve [m]."""
    valve_pressure: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Gauge pressure at the pipe side of that valve [Pa]."""
    midline_head: dict[str, np.ndarray] = field(default_factory=dict)
    """Per line, head at the node nearest mid-length [m]."""
    midline_pressure: dict[str, np.ndarray] = field(default_factory=dict)
    """Per line, gauge pressure at the node nearest mid-length [Pa]."""
    envelopes: dict[str, Envelope] = field(default_factory=dict)
    column_separation: ColumnSeparation | None = None
    trusted_until: float | None = None
    """Time after which the results are not trustworthy [s]; ``None``: trusted throughout."""
    findings: tuple[Finding, ...] = ()
    notes: tuple[str, ...] = ()
    """Plain-language notes on the model (held levels, friction, adjustments)."""
    kernel: str = ""
    """Time-stepping kernel used: ``"compiled"`` or ``"numpy"`` (same numbers to round-off)."""

    @property
    def duration(self) -> float:
        """Simulated time [s]."""
        return float(self.time[-1]) if len(self.time) else 0.0


def _failed(message: str, status: int = -1, **kwargs) -> ElasticResult:
    return ElasticResult(success=False, status=status, message=message, **kwargs)


# ----------------------------------------------------------------------------- the chain


@dataclass(frozen=True)
class _End:
    """A chain end or a junction between two lines of the chain."""

    kind: str  # "fixed", "dead", "junction"
    node: str
    head: float = 0.0
    k_forward: float = 0.0  # loss coefficient for flow in the chain direction [-]
    k_backward: float = 0.0


def _line_degree(system: System) -> dict[str, list[str]]:
    touching: dict[str, list[str]] = {}
    for lid, line in system.lines.items():
        touching.setdefault(line.from_node, []).append(lid)
        touching.setdefault(line.to_node, []).append(lid)
    return touching


def series_chain(system: System, line_id: str) -> tuple[str, ...]:
    """The lines in series that contain ``line_id``, upstream to downstream.

    The chain grows through junctions joining exactly two lines and stops at reservoirs,
    receivers and dead ends (a junction with one line).

    Raises
    ------
    ElasticSetupError
        Unknown line; a branch (junction with three or more lines); two lines of the chain
        pointing against each other.
    """
    if line_id not in system.lines:
        raise ElasticSetupError(
            f"no line {line_id!r}; lines are: {', '.join(system.lines) or 'none'}"
        )
    touching = _line_degree(system)

    def step(node: str, came_from: str, upstream: bool) -> str | None:
        if node not in system.junctions:
            return None
        others = [lid for lid in touching.get(node, []) if lid != came_from]
        if not others:
            return None
        if len(others) > 1:
            raise ElasticSetupError(
                f"junction {node!r} joins {len(others) + 1} lines; the elastic model handles "
                "lines in series only (no branches)"
            )
        nxt = system.lines[others[0]]
        if (upstream and nxt.to_node != node) or (not upstream and nxt.from_node != node):
            raise ElasticSetupError(
                f"lines {came_from!r} and {nxt.id!r} meet at junction {node!r} pointing "
                "against each other; give lines in series the same direction"
            )
        return nxt.id

    chain = [line_id]
    seen = {line_id}
    while (prev := step(system.lines[chain[0]].from_node, chain[0], True)) is not None:
        if prev in seen:
            raise ElasticSetupError(f"lines around {line_id!r} form a loop")
        chain.insert(0, prev)
        seen.add(prev)
    while (nxt := step(system.lines[chain[-1]].to_node, chain[-1], False)) is not None:
        if nxt in seen:
            raise ElasticSetupError(f"lines around {line_id!r} form a loop")
        chain.append(nxt)
        seen.add(nxt)
    return tuple(chain)


def elastic_line_ids(system: System, extra: tuple[str, ...] | list[str] = ()) -> tuple[str, ...]:
    """Lines to run elastically: ``[lines.ID.surge] model = "elastic"`` plus ``extra``.

    Raises
    ------
    ElasticSetupError
        An id in ``extra`` that is not a line of the system.
    """
    unknown = [lid for lid in extra if lid not in system.lines]
    if unknown:
        raise ElasticSetupError(
            f"no line {', '.join(map(repr, unknown))}; lines are: "
            f"{', '.join(system.lines) or 'none'}"
        )
    chosen = [lid for lid, line in system.lines.items() if line.surge.model == "elastic"]
    chosen += [lid for lid in extra if lid not in chosen]
    return tuple(chosen)


# ----------------------------------------------------------------------------- losses


@dataclass(frozen=True)
class _LineLoss:
    """Head loss of a whole line as ``c_phi*phi(Re)*Q + c_lin*Q + c_quad*Q|Q|`` [m]."""

    c_phi: float  # nu*L/(2 g D^2 A)  (times phi = f*Re)
    c_lin: float  # sum k_re * nu/(2 g D A)     (fittings' K1/Re part)
    c_quad: float  # sum k_const/(2 g A^2)       (fittings' constant part)
    fixed_f: float | None  # a friction factor given in the file
    rel_roughness: float
    re_per_q: float  # Re = re_per_q*|Q|
    length: float
    area: float
    diameter: float

    def head_loss(self, q: float) -> float:
        from workbench.core.friction import friction_re_product

        if self.fixed_f is not None:
            phi = self.fixed_f * self.re_per_q * abs(q)
        else:
            phi = float(friction_re_product(self.re_per_q * abs(q), self.rel_roughness)[0])
        return self.c_phi * phi * q + self.c_lin * q + self.c_quad * q * abs(q)


def _line_loss(line: Line, density: float, viscosity: float) -> _LineLoss:
    from workbench.core.fittings import fitting_constants

    d = line.diameter
    area = math.pi * d * d / 4.0
    nu = viscosity / density
    k_re = 0.0
    k_const = 0.0
    for fit in line.fittings:
        loss = fitting_constants(fit, d)
        k_re += loss.k_re * fit.count
        k_const += loss.k_const * fit.count
    return _LineLoss(
        c_phi=nu * line.length / (2.0 * G * d * d * area),
        c_lin=k_re * nu / (2.0 * G * d * area),
        c_quad=k_const / (2.0 * G * area * area),
        fixed_f=line.friction_factor,
        rel_roughness=line.roughness / d,
        re_per_q=d / (area * nu),
        length=line.length,
        area=area,
        diameter=d,
    )


# ----------------------------------------------------------------------------- friction


#: Friction models by name -> description. The stepping code reads the name.
FRICTION_MODELS: dict[str, str] = {
    "initial": "quasi-steady Darcy-Weisbach, f (and fittings' K) at the initial Reynolds "
    "number, held over the run",
    "quasi_steady": "quasi-steady Darcy-Weisbach, f updated at every node and step from the "
    "local Reynolds number",
}


# ----------------------------------------------------------------------------- the run


def _node_elevations(system: System, line: Line, x: np.ndarray) -> np.ndarray:
    z_from = system.node_elevation(line.from_node)
    z_to = system.node_elevation(line.to_node)
    pts = list(line.profile)
    if not pts:
        pts = [(0.0, z_from), (line.length, z_to)]
    else:
        if pts[0][0] > 0.0:
            pts.insert(0, (0.0, z_from))
        if pts[-1][0] < line.length:
            pts.append((line.length, z_to))
    dist = np.array([p[0] for p in pts], dtype=float)
    elev = np.array([p[1] for p in pts], dtype=float)
    return np.interp(x, dist, elev)


def _choose_grid(travel: np.ndarray, requested: list[int | None], tolerance: float,
                 shortest_move: float = math.inf):
    """Reach counts and a common time step making every Courant number one.

    Automatic choice (no reach count requested): :data:`AUTO_REACHES` on the line of
    shortest travel time, and at least 10 steps over the shortest valve movement that takes
    longer than that step (a faster movement is a sudden one at any practical step), within
    :data:`MAX_AUTO_REACHES` reaches in all.

    Returns ``(counts, dt)``. The wave-speed adjustments are ``travel/(counts*dt) - 1``.
    """
    n_lines = len(travel)
    req = [(i, r) for i, r in enumerate(requested) if r]
    if req:
        dt0 = min(travel[i] / r for i, r in req)
    else:
        dt0 = float(travel.min()) / AUTO_REACHES
        if shortest_move > dt0:
            dt0 = min(dt0, shortest_move / 10.0)
        if travel.sum() / dt0 > MAX_AUTO_REACHES:
            dt0 = float(travel.sum()) / MAX_AUTO_REACHES
    if n_lines == 1:
        counts = np.array([max(1, round(travel[0] / dt0))])
        return counts, float(travel[0] / counts[0])

    def fit(dt):
        counts = np.maximum(1, np.rint(travel / dt)).astype(int)
        r = travel / counts
        dt_best = 0.5 * (r.max() + r.min())  # minimax relative adjustment
        adj = np.abs(r / dt_best - 1.0).max()
        return counts, float(dt_best), float(adj)

    best = fit(dt0)
    if best[2] > tolerance:
        # more reaches on the line of shortest travel time until the adjustment is within
        # tolerance (or give the best found within a reasonable reach count)
        ref = int(np.argmin(travel))
        n_ref = max(1, round(travel[ref] / dt0))
        cap = max(8 * int(best[0].sum()), MAX_AUTO_REACHES)
        for m in range(n_ref + 1, 8 * n_ref + 1):
            cand = fit(travel[ref] / m)
            if cand[0].sum() > cap:
                break
            if cand[2] < best[2]:
                best = cand
            if best[2] <= tolerance:
                break
    return best[0], best[1]


def simulate_elastic(
    system: System,
    line_id: str,
    *,
    duration: float | None = None,
    max_duration: float | None = None,
    reaches: int | dict[str, int] | None = None,
    friction: str = "initial",
    speed_tolerance: float = SPEED_TOLERANCE,
    wave_speeds: dict[str, float] | None = None,
    progress: Callable[[float], None] | None = None,
    cancel: Callable[[], bool] | None = None,
    kernel: str = "auto",
) -> ElasticResult:
    r"""Run the method of characteristics on the chain of lines in series containing a line.

    Parameters
    ----------
    system : System
        The validated system (SI).
    line_id : str
        A line of the chain; the whole chain (see :func:`series_chain`) is run.
    duration : float, optional
        Simulated time [s]. Default: the last valve movement plus
        :data:`DEFAULT_ROUND_TRIPS` round trips ``2*sum(L/a)`` of the chain, but no longer
        than the project's simulation duration when that is shorter.
    max_duration : float, optional
        Upper limit on the default duration [s] (e.g. a shorter ``--duration`` given for
        the whole run); ignored when ``duration`` is given.
    reaches : int or dict, optional
        Reach count for ``line_id`` (an int) or per line (a dict); default each line's
        ``surge.reaches``, else automatic (:data:`AUTO_REACHES` on the line with the
        shortest travel time ``L/a``, finer when a valve movement needs it, see
        :func:`_choose_grid`). Other lines follow from the common time step.
    friction : str
        A key of :data:`FRICTION_MODELS`.
    speed_tolerance : float
        Largest relative wave-speed adjustment accepted before the time step is refined [-].
    wave_speeds : dict, optional
        Wave speeds [m/s] per line that replace the Korteweg value (e.g. measured ones).
    progress : callable, optional
        Called with the fraction of simulated time done, 0..1.
    cancel : callable, optional
        Polled between blocks of steps; returning true stops the run (status -2).
    kernel : str
        ``"compiled"`` (numba), ``"numpy"`` or ``"auto"`` (the compiled kernel for a long
        run or once it is loaded, see :func:`workbench.core.elastic_kernel.choose_kernel`).
        Both give the same numbers to round-off. Without numba, numpy is always used.

    Returns
    -------
    ElasticResult
        Never raises for a physical set-up problem: ``success`` is false and ``message``
        says what is missing.

    Notes
    -----
    The initial state is the steady flow of the chain at the valve openings at ``t = 0``,
    computed with the same losses as the characteristic equations (so that nothing moves
    until a valve does): entrance ``(1 + K_entrance)`` velocity heads where flow leaves a
    free surface, exit into a free surface or the air taking the velocity head, friction,
    fittings and valve ``K = K_open/c(x)^2``. Piezometric heads are continuous through
    junctions between lines. The initial state is steady even when the project asks a
    rigid-column run to start at rest.

    References
    ----------
    Wylie, E. B. and Streeter, V. L. (1993). *Fluid Transients in Systems*. Prentice Hall,
    ch. 3 (characteristics, boundary conditions, series pipes, Courant number).

    Examples
    --------
    Instantaneous closure at the end of a frictionless 600 m line: the valve head rises by
    Joukowsky's ``a*v0/g``.

    >>> from workbench.core.model import (FluidProps, Line, Receiver, Reservoir, System,
    ...                                   Valve, ValveSchedule)
    >>> water = FluidProps("water", 998.2, 1.0e-3, 2339.2, 2.19e9)
    >>> shut = Valve("linear", 62.0, schedule=ValveSchedule((0.0, 1e-6), (1.0, 0.0)))
    >>> line = Line("L1", "R1", "OUT", 600.0, 0.3, friction_factor=0.0, entrance_k=0.0,
    ...             valve=shut)
    >>> system = System("doc", water, {"R1": Reservoir("R1", "constant_level", 0.0, 20.0)},
    ...                 {}, {"OUT": Receiver("OUT", "open_discharge", 0.0)}, {"L1": line})
    >>> res = simulate_elastic(system, "L1", wave_speeds={"L1": 1300.0}, duration=0.5)
    >>> round(float(res.valve_head[1] - res.valve_head[0]), 2)
    330.78
    """
    try:
        return _simulate(system, line_id, duration, max_duration, reaches, friction,
                         speed_tolerance, wave_speeds, progress, cancel, kernel)
    except (ElasticSetupError, ValueError, KeyError) as exc:
        # set-up problems (missing data, unknown fitting or characteristic names, bad wave
        # speed inputs) come back as a failed result whose message says what was wrong
        text = exc.args[0] if isinstance(exc, KeyError) and exc.args else exc
        return _failed(f"{STATUS_MESSAGES[-1]} {text}")


def run_elastic(
    system: System,
    line_ids: tuple[str, ...] | list[str],
    *,
    duration: float | None = None,
    max_duration: float | None = None,
    progress: Callable[[float], None] | None = None,
    cancel: Callable[[], bool] | None = None,
) -> dict[str, ElasticResult]:
    """Run every chain that contains one of ``line_ids`` once; map each chain line to it.

    This is the entry point of ``workbench simulate``: pass
    ``elastic_line_ids(system, extra)``. A chain that cannot be run gives a failed result
    (``success`` false) under each of its requested lines.

    Returns
    -------
    dict
        Line id -> the :class:`ElasticResult` of its chain, for every line of every chain
        run (requested lines first).
    """
    out: dict[str, ElasticResult] = {}
    todo = [lid for lid in line_ids]
    n = max(len(todo), 1)
    done = 0
    for lid in todo:
        if lid in out:
            done += 1
            continue
        try:
            chain = series_chain(system, lid)
        except ElasticSetupError as exc:
            out[lid] = _failed(f"{STATUS_MESSAGES[-1]} {exc}", line_ids=(lid,))
            done += 1
            continue
        sub = None
        if progress is not None:
            base = done / n
            sub = lambda frac, base=base: progress(base + frac / n)  # noqa: E731
        res = simulate_elastic(system, lid, duration=duration, max_duration=max_duration,
                               progress=sub, cancel=cancel)
        for member in chain:
            out.setdefault(member, res)
        done += 1
        if res.status == -2:
            break
    return out


def _simulate(system, line_id, duration, max_duration, reaches, friction, tolerance,
              speed_override, progress, cancel, kernel="auto") -> ElasticResult:
    from workbench.core.surge import wave_speed
    from workbench.core.valve import opening_at, relative_flow_coefficient, valve_k

    if friction not in FRICTION_MODELS:
        raise ElasticSetupError(
            f"unknown friction model {friction!r}; known: {', '.join(FRICTION_MODELS)}"
        )
    chain = series_chain(system, line_id)
    lines = [system.lines[lid] for lid in chain]
    fluid = system.fluid
    rho = fluid.density
    findings: list[Finding] = []
    notes: list[str] = []

    # --- wave speeds (Korteweg) -------------------------------------------------------
    speed_override = dict(speed_override or {})
    korteweg = []
    formulas = []
    for line in lines:
        if line.id in speed_override:
            korteweg.append(float(speed_override[line.id]))
            formulas.append("given for this run")
            continue
        if fluid.bulk_modulus is None:
            raise ElasticSetupError(
                f"the liquid {fluid.name!r} has no bulk modulus, which the wave speed of line "
                f"{line.id!r} needs; give [fluid] bulk_modulus"
            )
        ws = wave_speed(fluid.bulk_modulus, rho, line.diameter, line.wall_thickness,
                        line.elastic_modulus, line.poisson_ratio, line.support)
        korteweg.append(ws.speed)
        formulas.append(ws.formula)
        if ws.wall == "rigid":
            findings.append(Finding(
                "surge.rigid_pipe_speed", line.id,
                f"line {line.id}: no wall thickness or elastic modulus, so the wave speed is "
                f"that of a rigid pipe, {ws.speed:.0f} m/s, an upper bound: the surge is "
                "overstated", "info", "Korteweg formula (Wylie & Streeter 1993)"))
    a_k = np.array(korteweg)
    lengths = np.array([ln.length for ln in lines])
    travel = lengths / a_k

    # --- grid ---------------------------------------------------------------------------
    if isinstance(reaches, int):
        reaches = {line_id: reaches}
    requested = [
        (reaches or {}).get(ln.id, ln.surge.reaches) for ln in lines
    ]
    for ln, r in zip(lines, requested):
        if r is not None and r < 1:
            raise ElasticSetupError(f"line {ln.id}: reaches must be 1 or more, got {r}")
    moves = [
        t1 - t0
        for ln in lines if ln.valve is not None and ln.valve.schedule is not None
        for t0, t1, x0, x1 in zip(ln.valve.schedule.times, ln.valve.schedule.times[1:],
                                  ln.valve.schedule.openings, ln.valve.schedule.openings[1:])
        if x1 != x0
    ]
    counts, dt = _choose_grid(travel, requested, tolerance, min(moves, default=math.inf))
    a_used = lengths / (counts * dt)
    speeds = {
        ln.id: WaveSpeedUse(ln.id, float(a_k[i]), float(a_used[i]), formulas[i])
        for i, ln in enumerate(lines)
    }
    worst = max(abs(s.adjustment) for s in speeds.values())
    if worst > 1e-12:
        notes.append(
            "wave speeds adjusted so that every Courant number is one with a common time "
            f"step: largest change {100 * worst:.2f} %"
        )
    if worst > tolerance:
        findings.append(Finding(
            "surge.wave_speed_adjusted", chain[0],
            f"wave speeds had to be changed by up to {100 * worst:.1f} % to fit a common time "
            "step (tolerance " f"{100 * tolerance:.1f} %); give more reaches to reduce it",
            "caution", "Wylie & Streeter 1993, ch. 3 (common practice)"))

    # --- ends and losses -----------------------------------------------------------------
    losses = [_line_loss(ln, rho, fluid.viscosity) for ln in lines]
    areas = np.array([ls.area for ls in losses])

    def end_of(node: str, first_line: Line, upstream: bool) -> _End:
        if node in system.reservoirs:
            res = system.reservoirs[node]
            head = reservoir_head(res, rho)
            if res.kind == "tank":
                notes.append(f"tank {node}: level held at its initial value over the surge run")
        elif node in system.receivers:
            head = receiver_head(system.receivers[node], rho)
        else:
            return _End("dead", node)
        a2g = 2.0 * G * first_line_area(first_line) ** 2
        k_in = (1.0 + first_line.entrance_k) / a2g
        # flow leaving a free surface into the pipe loses (1 + K_entrance) velocity heads of
        # piezometric head; flow leaving the pipe keeps its piezometric head (the exit loss
        # is the velocity head, Wylie & Streeter 1993 ch. 3 convention)
        if upstream:
            return _End("fixed", node, head, k_forward=k_in, k_backward=0.0)
        return _End("fixed", node, head, k_forward=0.0, k_backward=k_in)

    def first_line_area(ln: Line) -> float:
        return math.pi * ln.diameter**2 / 4.0

    ends = [end_of(lines[0].from_node, lines[0], True)]
    for ln in lines[:-1]:
        ends.append(_End("junction", ln.to_node))
    ends.append(end_of(lines[-1].to_node, lines[-1], False))
    if ends[0].kind == "dead" and ends[-1].kind == "dead":
        raise ElasticSetupError(
            f"the chain {' - '.join(chain)} has no free surface or receiver at either end")

    # valves: the connection index each sits at, and its K in time
    valve_at: dict[int, tuple[Line, float]] = {}  # connection -> (line, 1/(2 g A^2))
    for i, ln in enumerate(lines):
        if ln.valve is None:
            continue
        conn = i if ln.valve.position == "from" else i + 1
        if conn in valve_at:
            raise ElasticSetupError(
                f"two valves meet at node {ends[conn].node!r}; the elastic model takes one")
        valve_at[conn] = (ln, 1.0 / (2.0 * G * losses[i].area ** 2))

    def valve_kappa(t_values: np.ndarray, ln: Line, inv: float) -> np.ndarray:
        v = ln.valve
        if v.schedule is not None and len(v.schedule.times) > 0:
            # opening_at's rule, for every step at once: piecewise linear, holding the first
            # and last openings outside the schedule
            x = np.interp(t_values, v.schedule.times, v.schedule.openings)
        else:
            x = np.full(len(t_values), opening_at(v, 0.0))
        c = relative_flow_coefficient(v.characteristic, x, v.rangeability)
        return np.asarray(valve_k(v.k_open, c), dtype=float) * inv

    # --- initial steady flow ------------------------------------------------------------
    t0 = np.array([0.0])
    kappa0 = {conn: float(valve_kappa(t0, ln, inv)[0]) for conn, (ln, inv) in valve_at.items()}

    def total_loss(q: float) -> float:
        h = 0.0
        for conn, end in enumerate(ends):
            k = end.k_forward if q >= 0 else end.k_backward
            k += kappa0.get(conn, 0.0)
            if k == math.inf:
                return math.copysign(math.inf, q) if q != 0 else 0.0
            h += k * q * abs(q)
        for ls in losses:
            h += ls.head_loss(q)
        return h

    closed = any(k == math.inf for k in kappa0.values()) or any(e.kind == "dead" for e in ends)
    if closed:
        q0 = 0.0
    else:
        dh = ends[0].head - ends[-1].head
        if dh == 0.0:
            q0 = 0.0
        else:
            from scipy.optimize import brentq

            qb = float(areas.max()) * math.sqrt(2.0 * G * abs(dh)) * 2.0 + 1e-12
            while abs(total_loss(math.copysign(qb, dh))) < abs(dh):
                qb *= 2.0
            lo, hi = (0.0, qb) if dh > 0 else (-qb, 0.0)
            q0 = brentq(lambda q: dh - total_loss(q), lo, hi, xtol=1e-15, rtol=1e-13,
                        maxiter=200)

    # friction per line, per reach
    model = friction
    if model == "initial" and q0 == 0.0:
        model = "quasi_steady"
        notes.append("no initial flow, so friction is updated every step (quasi-steady)")
    notes.append(f"friction: {FRICTION_MODELS[model]}; unsteady friction (not modelled) "
                 "would damp the later cycles more, the first peak hardly at all")

    # --- grid arrays ---------------------------------------------------------------------
    counts = [int(c) for c in counts]
    offsets = np.concatenate([[0], np.cumsum([c + 1 for c in counts])])
    n = int(offsets[-1])
    b_line = a_used / (G * areas)
    b_node = np.concatenate([np.full(c + 1, b_line[i]) for i, c in enumerate(counts)])
    inv2b = 0.5 / b_node

    # per-node loss per reach: term(Q) = cphi*phi(Re)*Q + clin*Q + cquad*Q|Q|
    frac = [1.0 / c for c in counts]
    if model == "initial":
        r_line = np.array([
            ls.head_loss(q0) / (q0 * abs(q0)) for ls in losses
        ]) * np.array(frac)
        r_node = np.concatenate([np.full(c + 1, r_line[i]) for i, c in enumerate(counts)])
        quasi = None
    else:
        r_node = np.concatenate(
            [np.full(c + 1, losses[i].c_quad * frac[i]) for i, c in enumerate(counts)])
        cphi = np.concatenate([np.full(c + 1, losses[i].c_phi * frac[i])
                               for i, c in enumerate(counts)])
        clin = np.concatenate([np.full(c + 1, losses[i].c_lin * frac[i])
                               for i, c in enumerate(counts)])
        repq = np.concatenate([np.full(c + 1, losses[i].re_per_q) for i, c in enumerate(counts)])
        rr = np.concatenate([np.full(c + 1, losses[i].rel_roughness)
                             for i, c in enumerate(counts)])
        fixed = np.concatenate([np.full(c + 1, np.nan if losses[i].fixed_f is None
                                        else losses[i].fixed_f) for i, c in enumerate(counts)])
        quasi = (cphi, clin, repq, rr, fixed)

    # initial heads: march from the upstream end (or back from the downstream one)
    h_init = np.empty(n)
    if q0 != 0.0 or ends[0].kind == "fixed":
        if ends[0].kind == "fixed":
            k0 = (ends[0].k_forward if q0 >= 0 else ends[0].k_backward) + kappa0.get(0, 0.0)
            h = ends[0].head - (0.0 if q0 == 0.0 else k0 * q0 * abs(q0))  # k0 may be inf
        else:
            h = ends[-1].head + total_loss(q0)
        for i, c in enumerate(counts):
            drop = losses[i].head_loss(q0) / c
            h_init[offsets[i]:offsets[i + 1]] = h - drop * np.arange(c + 1)
            h = h - losses[i].head_loss(q0)
            kap = kappa0.get(i + 1, 0.0)
            if i + 1 < len(counts):
                h = h - (0.0 if q0 == 0.0 else kap * q0 * abs(q0))
        if q0 == 0.0 and ends[-1].kind == "fixed":
            # a shut valve or dead end splits the chain: nodes downstream of the last
            # closure take the downstream head
            last_closed = max(
                [c for c, k in kappa0.items() if k == math.inf] +
                [i for i, e in enumerate(ends) if e.kind == "dead"], default=None)
            if last_closed is not None and last_closed < len(ends) - 1:
                h_init[offsets[last_closed]:] = ends[-1].head
    else:
        h_init[:] = ends[-1].head

    # --- time ----------------------------------------------------------------------------
    round_trip = 2.0 * float(travel.sum())
    last_move = 0.0
    for ln in lines:
        if ln.valve is not None and ln.valve.schedule is not None and ln.valve.schedule.times:
            last_move = max(last_move, float(ln.valve.schedule.times[-1]))
    if duration is None:
        duration = last_move + DEFAULT_ROUND_TRIPS * round_trip
        if system.simulation is not None and system.simulation.duration < duration:
            duration = system.simulation.duration
        if max_duration is not None and max_duration < duration:
            duration = max_duration
    if not duration > 0.0:
        raise ElasticSetupError(f"duration must be positive, got {duration!r}")
    n_steps = max(1, int(math.ceil(duration / dt - 1e-9)))
    times = dt * np.arange(n_steps + 1)
    kappa_t = {conn: valve_kappa(times, ln, inv) for conn, (ln, inv) in valve_at.items()}

    # --- node geometry, vapour heads -----------------------------------------------------
    xs = [np.linspace(0.0, ln.length, c + 1) for ln, c in zip(lines, counts)]
    zs = [_node_elevations(system, ln, x) for ln, x in zip(lines, xs)]
    z_node = np.concatenate(zs)
    if fluid.vapor_pressure is not None:
        h_vap = z_node + (fluid.vapor_pressure - system.atmospheric_pressure) / (rho * G)
    else:
        h_vap = None
        notes.append("the liquid has no vapour pressure: column separation is not checked")

    # --- stepping ------------------------------------------------------------------------
    # State X = [u at nodes 0..n-1, w at nodes n-1..0] (w stored reversed), u = H + BQ,
    # w = H - BQ. Each block of steps lives in the rows of ``xb``: row j+1 is computed from
    # row j, so the rows double as the record from which the envelope is taken.
    two_n = 2 * n
    xb = np.empty((_BLOCK + 1, two_n))
    xb[0, :n] = h_init + b_node * q0
    xb[0, n:] = (h_init - b_node * q0)[::-1]
    # per-slot coefficients in the same layout: loss term E = r2 * D|D| with D = X - X[::-1]
    inv2b2 = np.concatenate([inv2b, inv2b[::-1]])
    r2 = -np.concatenate([r_node, r_node[::-1]]) * inv2b2 * inv2b2
    d_buf = np.empty(two_n)
    e_buf = np.empty(two_n)
    e_head = e_buf[:-1]
    if quasi is not None:
        from workbench.core.friction import friction_re_product

        cphi, clin, repq, rr, fixed = quasi
        cphi2 = np.concatenate([cphi, cphi[::-1]])
        clin2 = np.concatenate([clin, clin[::-1]])
        repq2 = np.concatenate([repq, repq[::-1]]) * inv2b2
        rr2 = np.concatenate([rr, rr[::-1]])
        fixed2 = np.concatenate([fixed, fixed[::-1]])
        has_fixed = bool(np.isfinite(fixed2).any())
    frictionless = quasi is None and not np.any(r_node)
    rows = [xb[j] for j in range(_BLOCK + 1)]
    rows_rev = [row[::-1] for row in rows]
    rows_head = [row[:-1] for row in rows]
    rows_tail = [row[1:] for row in rows]

    # ends and junctions as plain Python numbers (per-step work there is scalar)
    bounds = []
    last_conn = len(ends) - 1
    for conn, end in enumerate(ends):
        kap = kappa_t.get(conn)
        kap = None if kap is None else kap.tolist()
        if conn == 0:
            code = 3 if end.kind == "dead" else 2
            bounds.append((code, end.head, end.k_forward, end.k_backward, float(b_line[0]),
                           0.0, kap, 0, two_n - 1))
        elif conn == last_conn:
            code = 1 if end.kind == "dead" else 0
            bounds.append((code, end.head, end.k_forward, end.k_backward, float(b_line[-1]),
                           0.0, kap, n - 1, n))
        else:
            p = int(offsets[conn]) - 1  # last node of the upstream line
            # slots: u at p (C_P), w at p+1 (C_M); set w at p and u at p+1
            bounds.append((4, 0.0, 0.0, 0.0, float(b_line[conn - 1]), float(b_line[conn]),
                           kap, p, p + 1))

    h_max = h_init.copy()
    h_min = h_init.copy()
    valve_node = None
    valve_line = None
    for conn in sorted(valve_at):
        ln, _ = valve_at[conn]
        valve_line = ln.id
        i = chain.index(ln.id)
        valve_node = int(offsets[i]) if conn == i else int(offsets[i + 1]) - 1
        if ln.id == line_id:
            break
    mid_nodes = {ln.id: int(offsets[i]) + counts[i] // 2 for i, ln in enumerate(lines)}
    series_nodes = sorted(set(mid_nodes.values()) | ({valve_node} if valve_node is not None
                                                      else set()))
    series = np.empty((n_steps + 1, len(series_nodes)))
    series[0] = h_init[series_nodes]
    sep: ColumnSeparation | None = None
    if h_vap is not None and np.any(h_init <= h_vap):
        k_node = int(np.argmin(h_init - h_vap))
        sep = _separation(0.0, k_node, h_init[k_node], z_node[k_node], chain, offsets, xs,
                          rho, system.atmospheric_pressure)

    status = 0
    k_step = 0
    cancelled = False
    from workbench.core import elastic_kernel  # numba, if present, loads only for a run

    used_kernel = elastic_kernel.choose_kernel(kernel, updates=float(n_steps) * n)
    if used_kernel == "compiled":
        try:
            k_step, cancelled, found = elastic_kernel.run_compiled(
                h_init, b_node, q0, r_node, quasi, bounds, kappa_t, n_steps, h_max, h_min,
                series, series_nodes, h_vap if sep is None else None, progress, cancel)
        except Exception as exc:  # numba could not compile or run it here: numpy instead
            elastic_kernel.note_failure(exc)
            notes.append(f"compiled kernel failed ({exc}); the numpy kernel was used")
            used_kernel = "numpy"
            h_max[:] = h_init
            h_min[:] = h_init
        else:
            if found is not None:
                k_sep, k_node, head = found
                sep = _separation(float(times[k_sep]), k_node, head, z_node[k_node], chain,
                                  offsets, xs, rho, system.atmospheric_pressure)
    inf = math.inf
    sqrt = math.sqrt
    subtract, add, multiply, absolute = np.subtract, np.add, np.multiply, np.abs
    while used_kernel == "numpy" and k_step < n_steps:
        m = min(_BLOCK, n_steps - k_step)
        for j in range(m):
            k = k_step + j + 1
            cur = rows[j]
            new = rows[j + 1]
            # interior: shift u downstream and w upstream, with the friction correction
            if frictionless:
                rows_tail[j + 1][:] = rows_head[j]
            else:
                if quasi is None:
                    subtract(cur, rows_rev[j], out=d_buf)
                    absolute(d_buf, out=e_buf)
                    multiply(e_buf, d_buf, out=e_buf)
                    multiply(e_buf, r2, out=e_buf)
                else:
                    subtract(cur, rows_rev[j], out=d_buf)
                    q2 = d_buf * inv2b2
                    re2 = np.abs(d_buf) * repq2
                    phi, _ = friction_re_product(re2, rr2)
                    if has_fixed:
                        phi = np.where(np.isfinite(fixed2), fixed2 * re2, phi)
                    e_buf[:] = -(cphi2 * phi + clin2) * q2
                    np.multiply(d_buf, np.abs(d_buf), out=d_buf)
                    e_buf += r2 * d_buf
                add(rows_head[j], e_head, out=rows_tail[j + 1])
            # ends and junctions: solve b*Q + k*Q|Q| = delta for Q, k by the flow's sign,
            # in the stable form Q = 2 delta/(b + sqrt(b^2 + 4 k |delta|)); k = inf: Q = 0
            for code, head, kf, kb, b1, b2, kap, s1, s2 in bounds:
                kv = 0.0 if kap is None else kap[k]
                if code == 0:  # downstream fixed head: C_P known, set w
                    cp = new.item(s1)
                    delta = cp - head
                    kk = kf + kv if delta >= 0.0 else kb + kv
                    q = 0.0 if kk == inf else 2.0 * delta / (
                        b1 + sqrt(b1 * b1 + 4.0 * kk * abs(delta)))
                    new[s2] = cp - 2.0 * b1 * q  # w = H - BQ = C_P - 2BQ
                elif code == 2:  # upstream fixed head: C_M known, set u
                    cm = new.item(s2)
                    delta = head - cm
                    kk = kf + kv if delta >= 0.0 else kb + kv
                    q = 0.0 if kk == inf else 2.0 * delta / (
                        b1 + sqrt(b1 * b1 + 4.0 * kk * abs(delta)))
                    new[s1] = cm + 2.0 * b1 * q  # u = H + BQ = C_M + 2BQ
                elif code == 1:  # downstream dead end: Q = 0
                    new[s2] = new.item(s1)
                elif code == 3:  # upstream dead end
                    new[s1] = new.item(s2)
                else:  # junction of two lines, with a valve's loss if one sits there
                    cp = new.item(s1)
                    cm = new.item(two_n - 1 - s2)
                    bs = b1 + b2
                    delta = cp - cm
                    q = 0.0 if kv == inf else 2.0 * delta / (
                        bs + sqrt(bs * bs + 4.0 * kv * abs(delta)))
                    new[two_n - 1 - s1] = cp - 2.0 * b1 * q
                    new[s2] = cm + 2.0 * b2 * q
        # block bookkeeping: heads of the m new rows, envelope, series, vapour check
        hb = xb[1:m + 1, :n] + xb[1:m + 1, n:][:, ::-1]
        hb *= 0.5
        np.maximum(h_max, hb.max(axis=0), out=h_max)
        np.minimum(h_min, hb.min(axis=0), out=h_min)
        series[k_step + 1:k_step + 1 + m] = hb[:, series_nodes]
        if sep is None and h_vap is not None:
            below = hb <= h_vap
            if below.any():
                row = int(np.argmax(below.any(axis=1)))
                k_node = int(np.argmin(hb[row] - h_vap))
                sep = _separation(float(times[k_step + 1 + row]), k_node, hb[row, k_node],
                                  z_node[k_node], chain, offsets, xs, rho,
                                  system.atmospheric_pressure)
        xb[0] = xb[m]
        k_step += m
        if progress is not None:
            progress(k_step / n_steps)
        if cancel is not None and cancel():
            cancelled = True
            break

    n_done = k_step
    if not (np.isfinite(h_max).all() and np.isfinite(h_min).all()):
        # a guard, not a model result: never report a run whose heads are not numbers
        return _failed(
            f"{STATUS_MESSAGES[-1]} The computed heads on {' - '.join(chain)} stopped being "
            "finite numbers; check the line data (diameters, lengths, valve coefficients) "
            "and report the project if they look sound.", line_ids=chain)
    times = times[:n_done + 1]
    series = series[:n_done + 1]
    if cancelled:
        status = -2
    elif sep is not None:
        status = 1
    trusted_until = None if sep is None else sep.time
    if sep is not None:
        findings.append(Finding(
            "surge.column_separation", sep.line,
            f"line {sep.line}: the computed pressure reaches vapour pressure at "
            f"{sep.distance:.1f} m from its start, {sep.time:.3f} s into the surge run. "
            "Column separation is not modelled: the results after that time are not "
            "trustworthy, and a collapsing vapour cavity can raise the pressure above the "
            "computed peak. Surge protection needs specialist review.",
            "danger", "Wylie & Streeter 1993 (column separation)"))

    # --- results -------------------------------------------------------------------------
    envelopes = {}
    for i, ln in enumerate(lines):
        sl = slice(int(offsets[i]), int(offsets[i + 1]))
        z = zs[i]
        env = Envelope(
            line=ln.id, distance=xs[i], elevation=z,
            max_head=h_max[sl].copy(), min_head=h_min[sl].copy(),
            initial_head=h_init[sl].copy(),
            max_pressure=rho * G * (h_max[sl] - z), min_pressure=rho * G * (h_min[sl] - z),
        )
        envelopes[ln.id] = env
        if ln.pressure_rating is not None and env.max_pressure.max() > ln.pressure_rating:
            findings.append(Finding(
                "surge.pressure", ln.id,
                f"line {ln.id}: the elastic surge envelope reaches "
                f"{env.max_pressure.max() / 1e3:.0f} kPa gauge, above its rating of "
                f"{ln.pressure_rating / 1e3:.0f} kPa; consider slower closure or surge "
                "protection, and have it reviewed under local codes",
                "danger", "method of characteristics (Wylie & Streeter 1993)"))
    col = {node: j for j, node in enumerate(series_nodes)}
    midline_head = {lid: series[:, col[node]].copy() for lid, node in mid_nodes.items()}
    midline_pressure = {lid: rho * G * (midline_head[lid] - z_node[mid_nodes[lid]])
                        for lid in midline_head}
    if valve_node is not None:
        valve_head = series[:, col[valve_node]].copy()
        valve_pressure = rho * G * (valve_head - z_node[valve_node])
    else:
        valve_head = np.zeros(0)
        valve_pressure = np.zeros(0)
    message = STATUS_MESSAGES[status]
    if sep is not None:
        message += (f" Vapour pressure first reached on line {sep.line} at "
                    f"{sep.distance:.1f} m, t = {sep.time:.3f} s.")
    return ElasticResult(
        success=status >= 0, status=status, message=message, line_ids=chain, time=times,
        dt=dt, reaches={ln.id: counts[i] for i, ln in enumerate(lines)}, wave_speeds=speeds,
        friction=model, initial_flow=float(q0), valve_line=valve_line, valve_head=valve_head,
        valve_pressure=valve_pressure, midline_head=midline_head,
        midline_pressure=midline_pressure, envelopes=envelopes, column_separation=sep,
        trusted_until=trusted_until, findings=tuple(findings), notes=tuple(notes),
        kernel=used_kernel,
    )


def _separation(time, k_node, head, z, chain, offsets, xs, rho, p_atm) -> ColumnSeparation:
    i = int(np.searchsorted(offsets, k_node, side="right")) - 1
    local = k_node - int(offsets[i])
    return ColumnSeparation(
        time=float(time), line=chain[i], distance=float(xs[i][local]),
        pressure_abs=float(rho * G * (head - z) + p_atm),
    )
