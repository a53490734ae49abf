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
one matrix product; junction heads for pressures are recovered from the same factors. From
100 lines the matrices are sparse (:mod:`.sparse`: SuperLU instead of the pseudo-inverse, a
sparse Jacobian), so 10,000 parallel lines take seconds and megabytes, not gigabytes.

The state ends with two volume accumulators per tank, integrated with the flows: the net
volume in through its lines, and the volume spilled (the surplus while it is held at its
overflow). With the feed and draw-off totals they close each tank's balance to round-off
however fast it cycles between output samples (``spill_volumes``, ``line_volumes``).

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

Modules
-------
``model`` (constant arrays, configurations, stations), ``equations`` (right-hand side,
Jacobian, heads), ``state`` (the switched state), ``events`` (event functions and their
location), ``handlers`` (what each event does), ``loop`` (segments, steps, restarts),
``recording`` (series and pressure envelopes), ``assembly`` (the result and its findings),
``sparse`` (the matrices of a large system), ``submergence`` and ``end_states``
(post-processing), ``options`` (checked arguments),
``results`` (the result types).
"""

from __future__ import annotations

import time as _time
from typing import Callable

from workbench.core.model import System
from workbench.core.transient.assembly import SUBATMOSPHERIC_NOISE_PA, finish
from workbench.core.transient.end_states import STEADY_FRACTION
from workbench.core.transient.loop import Run
from workbench.core.transient.model import TransientModel
from workbench.core.transient.options import (
    MAX_DURATION,
    MAX_OUTPUT_POINTS,
    METHODS,
    resolve_options,
)
from workbench.core.transient.results import STATUS, Event, TransientResult
from workbench.core.transient.state import RunState

#: Most lines simulated with LSODA, whose Jacobian is dense (8 bytes times lines squared).
LSODA_LINES = 2_000

__all__ = [
    "MAX_DURATION",
    "MAX_OUTPUT_POINTS",
    "METHODS",
    "STATUS",
    "STEADY_FRACTION",
    "SUBATMOSPHERIC_NOISE_PA",
    "Event",
    "TransientResult",
    "simulate",
]


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
    junction_pressures: bool = False,
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
    junction_pressures : bool
        Keep each junction's gauge pressure at the output times
        (``TransientResult.junction_pressures``, see :mod:`.junctions`); off by default, as
        it costs a head evaluation per output time.

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
    options, notes = resolve_options(
        system, duration=duration, method=method, rtol=rtol, atol=atol,
        output_interval=output_interval, initial_state=initial_state, stop_when=stop_when)
    model = TransientModel(system)
    if method == "LSODA" and model.nl > LSODA_LINES:
        raise ValueError(f"LSODA keeps a dense Jacobian: with {model.nl:,} lines choose Radau "
                         f"or BDF (sparse), or simulate at most {LSODA_LINES:,} lines")
    state = RunState.empty(model.nl, model.nt)
    state.notes.extend(notes)
    run = Run(model, options, state, progress, cancel)
    if junction_pressures:
        run.rec.junction_heads.heads_of = run.eq.heads
        run.rec.junction_heads.heads_many_of = run.eq.heads_many
    outcome = run.execute()
    return finish(model, run, outcome, _time.perf_counter() - wall0)
