"""What each event does to the run: the switched state it changes and the event it lists.

``tank.drained`` holds the tank's outlets shut and stops its draw-off; ``tank.refilled``
opens them again; ``tank.overflow`` / ``tank.spill_end`` hold the level at the overflow or
release it; a discharge line whose flow would turn back out of its open outlet stops
(``line.reversal``) until the head upstream rises above the outlet again
(``line.restart``). The run loop reconfigures the lines after every terminal event.
"""

from __future__ import annotations

import numpy as np

from workbench.core.finding_text import slots
from workbench.core.model import restart_level
from workbench.core.transient import events as ev
from workbench.core.transient import siphon
from workbench.core.transient.model import TransientModel
from workbench.core.transient.state import RunState

#: Drains and refills (or reversals) of one tank (or line) listed before the rest are
#: summed up in one event.
LISTED_CYCLES = 50


def reversal(model: TransientModel, state: RunState, i: int, te: float) -> None:
    """Line ``i``'s flow changed sign at ``te`` [s]: listed after a real swing only (at
    least 0.1 % of the line's largest flow), so rounding near a rest state is not."""
    lid = model.topo.line_ids[i]
    threshold = max(1e-3 * state.q_peak[i], 1e-9)
    if state.peak_since_rev[i] < threshold:
        return
    state.peak_since_rev[i] = 0.0
    state.rev_count[i] += 1
    if state.rev_count[i] <= LISTED_CYCLES:
        state.event(te, "line.reversal", lid, f"flow in line {lid} reverses")
    elif state.rev_count[i] == LISTED_CYCLES + 1:
        state.event(te, "line.reversal", lid,
                    f"flow in line {lid} keeps reversing; further reversals not listed")


def drain(model: TransientModel, state: RunState, k: int, t: float, y: np.ndarray,
          started: bool = False) -> None:
    """Tank ``k`` reached its drained volume at ``t``: its outlets stop drawing."""
    nl = model.nl
    rid = model.tank_ids[k]
    state.drained[k] = True
    state.drain_times.setdefault(rid, float(t))
    state.drain_count[k] += 1
    row = model.t_rows[k]
    tiny = 1e-9 * max(float(np.max(state.q_peak, initial=0.0)), 1e-12)
    drawing = (row != 0) & (row * y[:nl] < -tiny)
    # lines at rest that would draw from it by their positive direction stop as well
    outlets = drawing | ((row < 0) & (np.abs(y[:nl]) <= tiny))
    state.blocked_by[k] = outlets
    state.blocked |= outlets
    if not _cycle_listed(state, k, t, rid):
        return
    names = ", ".join(model.topo.line_ids[i] for i in np.flatnonzero(drawing))
    res = model.tanks[k]
    what = "starts at or below" if started else "reaches"
    state.event(t, "tank.drained", rid, *slots(
        f"tank {rid} {what} its drained level {{level}}; outlet line(s) {names or 'none'} "
        "stop drawing", level=(res.min_level, "length", 4)))
    asked = float(model.external(t)[1][k])
    if asked > 0.0:
        state.event(t, "tank.draw_off_stopped", rid, *slots(
            f"tank {rid} can no longer supply its draw-off of {{q}}: the draw-off stops (the "
            "tank is drained)", q=(asked, "flow", 4)))


def _cycle_listed(state: RunState, k: int, t: float, rid: str) -> bool:
    """Whether this drain or refill of tank ``k`` is listed as an event: a tank that
    keeps draining and refilling is listed 50 times, then once more in words."""
    n = state.drain_count[k]
    if n <= LISTED_CYCLES:
        return True
    if n == LISTED_CYCLES + 1 and not state.drained[k]:
        return False
    if n == LISTED_CYCLES + 1:
        state.event(t, "tank.drained", rid,
                    f"tank {rid} keeps draining and refilling; further cycles not listed")
    return False


def refill(model: TransientModel, state: RunState, k: int, t: float) -> None:
    """A drained tank refilled to its restart level: its outlets and draw-off resume."""
    rid = model.tank_ids[k]
    state.drained[k] = False
    released = state.blocked_by[k].copy()
    state.blocked_by[k] = False
    state.blocked = state.blocked_by.any(axis=0) if model.nt else state.blocked
    if not _cycle_listed(state, k, t, rid):
        return
    names = ", ".join(model.topo.line_ids[i] for i in np.flatnonzero(released))
    asked = float(model.external(t)[1][k])
    lvl = restart_level(model.tanks[k])
    state.event(t, "tank.refilled", rid, *slots(
        f"tank {rid} refills to its restart level {{level}}: "
        + (f"outlet line(s) {names} open again" if names else "it is back in use")
        + ("; its draw-off of {q} resumes" if asked > 0.0 else ""),
        level=(lvl, "length", 4), q=(asked, "flow", 4)))


def overflow(model: TransientModel, state: RunState, k: int, t: float, y: np.ndarray) -> None:
    """Tank ``k`` reached its overflow level: the level is held and the surplus spills."""
    rid = model.tank_ids[k]
    state.spilling[k] = True
    lvl = model.geoms[k].overflow_level
    cause, values = overflow_cause(model, state, k, t, y)
    state.event(t, "tank.overflow", rid, *slots(
        f"tank {rid} reaches its overflow level {{level}} and spills" + cause,
        level=(lvl, "length", 4), **values))


def overflow_cause(model: TransientModel, state: RunState, k: int, t: float,
                   y: np.ndarray) -> tuple[str, dict]:
    """Words on what makes tank ``k`` overflow when it has a feed or draw-off: a template
    with slots and the slots' SI values (see :func:`workbench.core.finding_text.slots`)."""
    if k not in model.ext_tanks:
        return "", {}
    feed, draw = model.external(t)
    draw_k = 0.0 if state.drained[k] else float(draw[k])
    # flows of shut lines are the integrator's round-off (about 1e-45), not a flow
    shut = state.blocked | state.backstopped
    if state.valve_shut is not None:
        shut = shut | state.valve_shut
    lines_net = float(model.t_rows[k] @ np.where(shut, 0.0, y[: model.nl]))
    if feed[k] <= 0.0:
        return "", {}
    out_total = draw_k - min(lines_net, 0.0)
    if lines_net <= 0.0:
        return (": its feed of {feed} is the cause, more than its outlets and draw-off take "
                "out ({out})", {"feed": (feed[k], "flow", 4), "out": (out_total, "flow", 4)})
    return (": its feed of {feed} and a net {net} from its lines are more than its draw-off "
            "takes out ({draw})",
            {"feed": (feed[k], "flow", 4), "net": (lines_net, "flow", 4),
             "draw": (draw_k, "flow", 4)})


def end_spills_in_deficit(eq, t: float, y: np.ndarray) -> bool:
    """End the spill of every tank whose net inflow is negative at a (re)configuration.

    The ``tank.spill_end`` event watches the net inflow falling *through* zero; at a
    restart the net inflow can already be negative -- a tank that starts at its overflow
    level with its outlets taking more than its feed, or whose upstream tank just drained
    -- and no crossing would ever come, holding the tank full while its lines drain it.
    Returns True when a spill was ended (the configuration must be rebuilt).
    """
    model, state = eq.model, eq.state
    if not model.nt or not state.spilling.any():
        return False
    net = model.t_rows @ y[:model.nl]
    if model.has_ext:
        net = net + eq.external_net(t)
    ending = state.spilling & (net < 0.0)
    for k in np.flatnonzero(ending):
        _spill_end(model, state, int(k), t)
    return bool(ending.any())


def _spill_end(model: TransientModel, state: RunState, k: int, t: float) -> None:
    rid = model.tank_ids[k]
    state.spilling[k] = False
    state.event(t, "tank.spill_end", rid, f"tank {rid} stops spilling")


def _discharge_stop(model: TransientModel, state: RunState, i: int, t: float) -> None:
    lid = model.topo.line_ids[i]
    state.backstopped[i] = True
    state.event(t, "line.reversal", lid,
                f"flow in line {lid} would turn back out of its open discharge: "
                "air enters and the line stops discharging")


def _release(model: TransientModel, state: RunState, i: int, t: float) -> None:
    lid = model.topo.line_ids[i]
    state.backstopped[i] = False
    state.event(t, "line.restart", lid,
                f"the head upstream of the discharge of line {lid} rises above it "
                "again: the line restarts (full-bore assumed)")


def sealed_stop(model: TransientModel, state: RunState, i: int, t: float,
                y: np.ndarray) -> None:
    """Line ``i`` stopped or reversed at ``t``: a tank it connects to whose gas space is
    under vacuum has had its drain stopped by that vacuum (``tank.sealed_stop``, once)."""
    if not model.ng:
        return
    gas, nl, nt = model.gas, model.nl, model.nt
    p = gas.gauge(y[nl:nl + nt], y[nl + nt:model.ne])
    for g, k in enumerate(gas.tank.tolist()):
        tid = gas.ids[g]
        if model.t_rows[k, i] == 0.0 or p[g] >= -1.0 or tid in state.sealed_stops:
            continue
        state.sealed_stops[tid] = float(t)
        level = model.geoms[k].level_extrapolated(float(y[nl + k]))
        lid = model.topo.line_ids[i]
        state.event(t, "tank.sealed_stop", tid, *slots(
            f"the drain of tank {tid} through line {lid} stops at a level of {{level}}: "
            "the vacuum in its gas space, {vacuum}, balances the head over the outlet",
            level=(level, "length", 4), vacuum=(-p[g], "pressure", 3)))


def apply_terminal(model: TransientModel, state: RunState, events: ev.EventSet, hits,
                   y: np.ndarray, stop_when: str | None, eq=None) -> bool:
    """Apply the terminal events ``hits`` (``(time, component)``); return True when the
    run should stop (``stop_when == "drained"`` and every draining tank drained)."""
    for te, k in hits:
        kind, idx = int(events.kind_of[k]), int(events.index_of[k])
        if kind == ev.DRAIN:
            drain(model, state, idx, te, y)
        elif kind == ev.OVERFLOW:
            overflow(model, state, idx, te, y)
        elif kind == ev.SPILL_END:
            _spill_end(model, state, idx, te)
        elif kind == ev.DISCHARGE_STOP:
            _discharge_stop(model, state, idx, te)
            sealed_stop(model, state, idx, te, y)
        elif kind == ev.RELEASE:
            _release(model, state, idx, te)
        elif kind == ev.REFILL:
            refill(model, state, idx, te)
        elif kind == ev.SIPHON:
            siphon.on_break(eq, state, idx, te, y)
        elif kind == ev.SIPHON_STOP:
            siphon.on_stop(model, state, idx, te, y)
        elif kind == ev.SIPHON_RESTART:
            siphon.on_restart(model, state, idx, te, y)
    if stop_when == "drained":
        must = state.draining_capable
        if must.any() and state.drained[must].all():
            return True
    return False


def valve_end(model: TransientModel, state: RunState, t: float) -> None:
    """A valve shutting exactly at the end of the run."""
    shut = model.lines.closed(model.lines.openings_at(t))
    for i in model.valve_lines:
        if shut[i] and not state.valve_shut[i] and not state.blocked[i]:
            lid = model.topo.line_ids[i]
            state.event(t, "valve.closed", lid, f"the valve on line {lid} is shut")
