"""Event functions of a run and their location by root finding on the dense output.

Every event is a component of one vector function of ``(t, y)`` whose sign change marks
it, as in ``scipy.integrate.solve_ivp`` (``direction`` +1 rising, -1 falling, 0 both;
``terminal`` events stop the step there and restart the integrator). The components, in
this order, ``nt`` per tank or ``nl`` per line:

==================  ====  =============================================================
kind                size  function
==================  ====  =============================================================
``DRAIN``           nt    ``V - V_min`` falling: the tank drains
``OVERFLOW``        nt    ``V - V_overflow`` rising: it starts to spill
``SPILL_END``       nt    net inflow falling through zero: it stops spilling
``REVERSAL``        nl    ``Q`` (either way, not terminal): the flow reverses
``DISCHARGE_STOP``  nl    ``s Q`` falling: flow would turn back out of an open discharge
``RELEASE``         nl    ``s (H_from - H_to)`` rising: head returns above the discharge
``REFILL``          nt    ``V - V_restart`` rising: a drained tank refilled
``SIPHON``          nl    lowest ``p_abs - p_v`` at interior points falling: the column parts
``SIPHON_STOP``     nl    ``s Q`` of a broken line falling: nothing more can be lifted
``SIPHON_RESTART``  nl    source head less the cavity head rising: a stopped line restarts
==================  ====  =============================================================

(``s`` is +1 where a line discharges to air at its to-end, -1 at its from-end.)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.core.transient.equations import Equations

DRAIN, OVERFLOW, SPILL_END, REVERSAL, DISCHARGE_STOP, RELEASE, REFILL = range(7)
SIPHON, SIPHON_STOP, SIPHON_RESTART = range(7, 10)


@dataclass(frozen=True)
class EventSet:
    """Which event components are watched in the current configuration, and how."""

    armed: np.ndarray
    """Watched components [bool]."""
    direction: np.ndarray
    """+1 rising, -1 falling, 0 either way."""
    terminal: np.ndarray
    """Components that stop the step [bool]."""
    kind_of: np.ndarray
    """Kind of each component (``DRAIN`` ... ``REFILL``)."""
    index_of: np.ndarray
    """Tank or line index of each component."""


def event_values(eq: Equations, t: float, y: np.ndarray) -> np.ndarray:
    """All event components at a state (see the module docstring)."""
    model, state = eq.model, eq.state
    nl = model.nl
    q = y[:nl]
    v = y[nl:nl + model.nt]
    sign = model.discharge_sign
    if state.backstopped.any():
        drive = eq.discharge_drive(t, y)
    else:
        drive = np.zeros(nl)
    net = model.t_rows @ q
    if model.has_ext:
        net = net + eq.external_net(t)
    return np.concatenate([
        v - model.v_min,  # drained
        v - model.v_over,  # overflow
        net,  # net inflow: spill end
        q,  # reversal
        sign * q,  # flow turning back out of an open discharge
        drive,  # head returning above an open discharge
        v - model.v_restart,  # a drained tank refilled to its restart level
        *_siphon_values(eq, t, y),
    ])


def _siphon_values(eq: Equations, t: float, y: np.ndarray):
    """The three siphon components (module docstring); quiet zeros where none can break."""
    from workbench.core.transient import siphon

    model, state = eq.model, eq.state
    nl = model.nl
    if not siphon.lines_of(model).any:
        return np.ones(nl), np.ones(nl), np.zeros(nl)
    return (siphon.crest_margins(eq, t, y), state.siphon_sign * y[:nl],
            siphon.restart_values(model, state, eq.losses(t, y)[0]))


def arm(eq: Equations) -> EventSet:
    """The events to watch after a (re)configuration."""
    model, state = eq.model, eq.state
    nt, nl = model.nt, model.nl
    is_open = eq.cfg.open
    armed = np.concatenate([
        ~state.drained,
        ~state.spilling & np.isfinite(model.v_over),
        state.spilling,
        is_open & ~model.is_discharge,
        is_open & model.is_discharge & ~state.siphon_broken,
        state.backstopped & ~state.blocked,
        state.drained & ~state.spilling,
        *_siphon_armed(eq, is_open),
    ])
    direction = np.concatenate([
        np.full(nt, -1), np.full(nt, 1), np.full(nt, -1),
        np.zeros(nl, int), np.full(nl, -1), np.full(nl, 1), np.full(nt, 1),
        np.full(nl, -1), np.full(nl, -1), np.full(nl, 1),
    ])
    terminal = np.concatenate([
        np.ones(3 * nt, bool), np.zeros(nl, bool), np.ones(2 * nl + nt, bool),
        np.ones(3 * nl, bool),
    ])
    sizes = (nt, nt, nt, nl, nl, nl, nt, nl, nl, nl)
    kind_of = np.concatenate([np.full(n, kind) for kind, n in enumerate(sizes)])
    index_of = np.concatenate([np.arange(n) for n in sizes])
    return EventSet(armed, direction, terminal, kind_of, index_of)


def _siphon_armed(eq: Equations, is_open: np.ndarray):
    """Armed siphon components: a line that can break and runs full; a broken line
    flowing; a broken line stopped."""
    from workbench.core.transient import siphon

    state = eq.state
    can = siphon.lines_of(eq.model).candidate
    broken, stopped = state.siphon_broken, state.siphon_stopped
    return (can & is_open & ~broken, broken & ~stopped & is_open, broken & stopped)


def find_events(eq: Equations, events: EventSet, sol, t_old, y_old, t_new, y_new):
    """Events in the step ``[t_old, t_new]``, as ``(time, component)`` sorted by time.

    Each armed component that changes sign in its direction is located by ``brentq`` on the
    step's dense output ``sol`` (to a few ulp of the time).
    """
    from scipy.optimize import brentq

    e_old = event_values(eq, t_old, y_old)
    e_new = event_values(eq, t_new, y_new)
    up = (e_old < 0.0) & (e_new >= 0.0) & (events.direction >= 0)
    # a spilling tank whose net inflow is exactly zero at a restart (its lines at rest)
    # stops spilling as soon as the net inflow turns negative
    from_zero = (e_old == 0.0) & (e_new < 0.0) & (events.kind_of == SPILL_END)
    down = ((e_old > 0.0) & (e_new <= 0.0) | from_zero) & (events.direction <= 0)
    hits = np.flatnonzero((up | down) & events.armed)
    found = []
    for k in hits:
        if events.kind_of[k] == REVERSAL:  # the flow itself: no need for the other components
            def fun(t, i=int(events.index_of[k])):
                return sol(t)[i]
        else:
            def fun(t, k=k):
                return event_values(eq, t, sol(t))[k]
        try:
            te = brentq(fun, t_old, t_new, xtol=4 * np.finfo(float).eps * max(1.0, abs(t_new)),
                        rtol=4 * np.finfo(float).eps)
        except ValueError:  # sign lost in the dense output: take the step end
            te = t_new
        found.append((te, int(k)))
    found.sort()
    return found


def first_terminal(events: EventSet, found):
    """The terminal events at the earliest terminal time of ``found`` (ties within 1e-12
    relative are taken together)."""
    hits = []
    for te, k in found:
        if events.terminal[k]:
            if not hits or te <= hits[0][0] + 1e-12 * max(1.0, te):
                hits.append((te, k))
    return hits
