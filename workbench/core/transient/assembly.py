"""The result of a run: series from what was recorded, pressure screening per line, findings.

Per line the station envelopes go through :func:`workbench.core.surge.screen_line`
(Joukowsky cap, effective closure time, column separation); a sub-atmospheric minimum that
did not reach vapour pressure gets the steady check's caution with its time and place.
Overflows, repeated drain-refill cycles and the outlets' vortex submergence
(:mod:`.submergence`) add findings; :mod:`.end_states` says how each tank ends.
"""

from __future__ import annotations

import numpy as np

from workbench.core.checks import SUBATMOSPHERIC_TOLERANCE_M, reverse_cause
from workbench.core.finding_text import finding
from workbench.core.model import Finding, G, restart_level
from workbench.core.surge import LineSurge, effective_closure_time, screen_line
from workbench.core.transient import siphon, venting
from workbench.core.transient.end_states import end_states
from workbench.core.transient.junctions import junction_pressures
from workbench.core.transient.loop import Run
from workbench.core.transient.model import TransientModel
from workbench.core.transient.results import Event, TransientResult
from workbench.core.transient.submergence import submergence

#: Kept for importers: a run's minimum now counts as sub-atmospheric only below
#: ``-rho g SUBATMOSPHERIC_TOLERANCE_M`` (1 cm of liquid, see :mod:`workbench.core.checks`).
SUBATMOSPHERIC_NOISE_PA = -1.0


def finish(model: TransientModel, run: Run, outcome, wall: float) -> TransientResult:
    """Assemble the :class:`TransientResult` of a run that ended with ``outcome`` =
    ``(status, message)`` after ``wall`` seconds."""
    status, message = outcome
    state, rec = run.state, run.rec
    nl = model.nl
    t = np.array(rec.t_out)
    ys = np.array(rec.y_out).T if rec.y_out else np.zeros((model.n_state, 0))
    flows = ys[:nl]
    volumes = ys[nl:nl + model.nt]
    levels = np.array([[g.level_extrapolated(v) for v in row]
                       for g, row in zip(model.geoms, volumes)]).reshape(model.nt, len(t))
    feeds, draw_offs = external_series(model, run, t)
    end_rates, states = end_states(model, state, ys, feeds, draw_offs)
    spills = spill_series(model, run, ys, feeds, draw_offs)
    warnings: list[Finding] = list(state.notes)
    pressures = line_pressures(model, run)
    warnings.extend(pressures.pop("findings"))
    warnings.extend(overflow_findings(model, run, spills))
    vortex_events, vortex_findings = submergence(model, t, flows, levels)
    warnings.extend(vortex_findings)
    warnings.extend(cycling_findings(model, run))
    gas_p, gas_m = venting.gas_series(model, ys)
    inb, outb = venting.required_venting(model, ys, feeds, draw_offs, spills)
    warnings.extend(venting.vent_findings(model, t, gas_p, inb, outb))
    stop_events, stop_findings = venting.stopped_drains(model, state, t, ys, gas_p)
    warnings.extend(stop_findings)
    warnings.extend(venting.sealed_findings(model, t, gas_p, inb, outb, stop_findings))
    warnings.extend(reverse_findings(model, t, flows))
    warnings.extend(laminar_findings(model, flows))
    siphon_warnings, drain_notes = siphon.siphon_findings(model, state, levels)
    warnings.extend(siphon_warnings)
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
        events=tuple(sorted([*overflow_events(model, run, spills), *vortex_events,
                             *stop_events],
                            key=lambda e: e.time)),
        **pressures,
        warnings=tuple(warnings),
        drain_times=dict(state.drain_times),
        drain_notes=drain_notes,
        feeds=feeds,
        draw_offs=draw_offs,
        feed_volumes=run.fed.copy(),
        draw_off_volumes=run.drawn.copy(),
        spill_volumes=run.spilled.copy(),
        line_volumes=run.line_volumes.copy(),
        end_rates=end_rates,
        end_states=states,
        spills=spills,
        **junction_pressures(model, rec.junction_heads, flows),
        gas_tank_ids=model.gas.ids,
        gas_pressures=gas_p,
        gas_masses=gas_m,
        required_inbreathing=inb,
        required_outbreathing=outb,
        method=run.options.method,
        nfev=run.nfev,
        njev=run.njev,
        nlu=run.nlu,
        nsteps=run.nsteps,
        wall_time=wall,
    )


def line_pressures(model: TransientModel, run: Run) -> dict:
    """Per line the screened extremes (``max_pressure``, ``min_pressure`` [Pa], their times
    [s], ``surge``) and the ``findings`` of the screening."""
    from workbench.core.valve import relative_flow_coefficient

    system, rec = model.system, run.rec
    out = {"max_pressure": {}, "min_pressure": {}, "max_pressure_time": {},
           "min_pressure_time": {}, "surge": {}, "findings": []}
    for i, lid in enumerate(model.topo.line_ids):
        line = system.lines[lid]
        sel = slice(model.st_start[i],
                    model.st_start[i + 1] if i + 1 < len(model.st_start) else None)
        pmax_st, pmin_st = rec.p_max[sel], rec.p_min[sel]
        max_t = float(rec.p_max_t[sel][int(np.argmax(pmax_st))])
        min_t = float(rec.p_min_t[sel][int(np.argmin(pmin_st))])
        eff = None
        cut_sign = 1.0
        if line.valve is not None and line.valve.schedule is not None:
            valve = line.valve
            est = effective_closure_time(
                valve, lambda x, v=valve: relative_flow_coefficient(
                    v.characteristic, x, v.rangeability, v.low_opening),
                rest_of_line_k(model, i, run))
            if est is not None and est.fastest_cut_at <= run.t_final:
                eff = est.effective_time
                cut_sign = _flow_sign_at(run, i, est.fastest_cut_at)
        first_vap = rec.first_vapour_t[sel]
        sep_t = float(np.nanmin(first_vap)) if np.isfinite(first_vap).any() else None
        screened, findings = screen_line(
            lid, line, system.fluid, atmospheric_pressure=system.atmospheric_pressure,
            station_max=pmax_st, station_min=pmin_st, station_elevation=model.st_elev[sel],
            static_head=float(rec.h_static_max[i]), velocity_max=float(rec.v_max[i]),
            effective_closure=eff, max_time=max_t, min_time=min_t, separation_time=sep_t,
            flow_sign=cut_sign)
        if state_broken(run, i):
            # a siphon that breaks slowly is reported as such (line.siphon_break), not as a
            # surge matter
            findings = [f for f in findings if f.code != "surge.column_separation"]
        out["surge"][lid] = screened
        out["findings"].extend(findings)
        out["max_pressure"][lid] = screened.max_pressure
        out["min_pressure"][lid] = screened.min_pressure
        out["max_pressure_time"][lid] = max_t
        out["min_pressure_time"][lid] = min_t
        separated = any(f.code == "surge.column_separation" for f in findings)
        if not separated and screened.min_pressure < -model.rho * G * SUBATMOSPHERIC_TOLERANCE_M:
            out["findings"].append(_subatmospheric(model, i, screened, pmin_st, min_t))
    return out


def _subatmospheric(model: TransientModel, i: int, screened: LineSurge, pmin_st,
                    min_t: float) -> Finding:
    """Below atmospheric at some time of the run, though not at vapour pressure: the steady
    check's caution, with when and where."""
    lid = model.topo.line_ids[i]
    line = model.system.lines[lid]
    sel = slice(model.st_start[i], model.st_start[i + 1] if i + 1 < len(model.st_start) else None)
    j = int(np.argmin(pmin_st))
    where = float(model.st_frac[sel][j]) * line.length
    return finding(
        "profile.subatmospheric", lid,
        f"during the run the pressure on line {lid} falls to {{p}} gauge at t = {min_t:.4g} "
        f"s, {{s}} from {line.from_node!r} (elevation {{z}}): air can be drawn in at joints, "
        "and thin-walled or plastic pipe can collapse; check the pipe's vacuum rating",
        "caution", "rigid-column pressures at the line's profile points", digits=4,
        p=(screened.min_pressure, "pressure"), s=(where, "length"),
        z=(float(model.st_elev[sel][j]), "elevation"))


def state_broken(run: Run, i: int) -> bool:
    """Line ``i``'s column parted at a high point during the run (:mod:`.siphon`)."""
    return bool(run.state.siphon_broken.size and run.state.siphon_broken[i])


def laminar_findings(model: TransientModel, flows: np.ndarray) -> list[Finding]:
    """``transient.laminar`` (info) for a line whose flow changes while laminar (peak Re up
    to 2000): the rigid column runs its flow changes too fast (Szymanski 1932)."""
    from workbench.core.checks import LAMINAR_TRANSIENT_CAUTION
    from workbench.core.friction import RE_LAMINAR

    out = []
    lines = model.lines
    nu = np.broadcast_to(lines.kinematic_viscosity, (model.nl,))
    for i, lid in enumerate(model.topo.line_ids):
        if model.system.lines[lid].friction_factor is not None or not flows.shape[1]:
            continue
        q = flows[i]
        peak = float(np.max(np.abs(q)))
        re_peak = peak / lines.area[i] * lines.diameter[i] / nu[i]
        if peak > 0.0 and re_peak <= RE_LAMINAR and float(np.ptp(q)) > 1e-3 * peak:
            out.append(Finding("transient.laminar", lid,
                               f"line {lid} runs laminar (Re up to {re_peak:.3g}): "
                               + LAMINAR_TRANSIENT_CAUTION, "info",
                               "Szymanski (1932), exact start-up of laminar pipe flow"))
    return out


def _flow_sign_at(run: Run, i: int, t: float) -> float:
    """Sign of line ``i``'s flow at time ``t`` from the recorded series (+1 without one)."""
    rec = run.rec
    if not rec.t_out:
        return 1.0
    q = np.interp(t, np.array(rec.t_out), np.array([y[i] for y in rec.y_out]))
    return -1.0 if q < 0.0 else 1.0


def reverse_findings(model: TransientModel, t: np.ndarray, flows: np.ndarray) -> list[Finding]:
    """``flow.reverse``: a line that runs from its ``to`` end to its ``from`` end during the
    run (by more than 0.1 % of its largest flow, the reversal events' threshold), with the
    first time and the cause named."""
    out = []
    system = model.system
    for i, lid in enumerate(model.topo.line_ids):
        q = flows[i]
        if not q.size:
            continue
        peak = float(np.max(np.abs(q)))
        back = np.flatnonzero(q < -1e-3 * peak) if peak > 0.0 else np.zeros(0, int)
        if not back.size:
            continue
        line = system.lines[lid]
        k = int(back[0])
        out.append(finding(
            "flow.reverse", lid,
            f"from t = {t[k]:.4g} s the line runs backwards, from {line.to_node!r} to "
            f"{line.from_node!r} (up to {{q}}): {reverse_cause(system, line.from_node, line.to_node)}"
            "; check that this is meant (a check valve, a level or a vessel pressure)",
            "caution", "rigid-column flows of the run", q=(float(-np.min(q)), "flow")))
    return out


def overflow_findings(model: TransientModel, run: Run, spills: np.ndarray) -> list[Finding]:
    """A ``tank.overflow`` danger for every overflow that spills, with the peak spill.

    A tank that starts at (or only touches) its overflow level and falls from there at
    once spills nothing: it gets the lesser ``tank.at_overflow`` (see :func:`_spilled`).
    """
    out = []
    events = run.state.events
    for i, ev in enumerate(events):
        if ev.code == "tank.overflow":
            k = model.tank_ids.index(ev.element)
            if not _spilled(events, i, run, spills[k]):
                out.append(_at_overflow(model, k, ev))
                continue
            peak = float(np.max(spills[k], initial=0.0))
            values = {name: (v, kind, d) for name, v, kind, d in ev.values}
            surplus = ""
            if peak > 0.0:
                surplus = " (the surplus spilling reaches {surplus} in this run)"
                values["surplus"] = (peak, "flow", 4)
            template = ev.template or ev.message.replace("{", "{{").replace("}", "}}")
            out.append(finding(
                "tank.overflow", ev.element,
                f"{template} at t = {ev.time:.6g} s: check the overflow capacity under the "
                f"worst-case inflow{surplus} (defer to local codes)", "danger",
                "rule of thumb", **values))
    return out


def overflow_events(model: TransientModel, run: Run, spills: np.ndarray) -> list[Event]:
    """The run's events, where an overflow that spilled nothing (see :func:`_spilled`) and
    its ``tank.spill_end`` at the same instant are one ``tank.at_overflow`` event: a tank
    that only touches its overflow level never "starts spilling" nor "stops spilling"."""
    from workbench.core.finding_text import slots

    events = list(run.state.events)
    out: list[Event] = []
    dropped: set[int] = set()
    for i, ev in enumerate(events):
        if i in dropped:
            continue
        if ev.code != "tank.overflow":
            out.append(ev)
            continue
        k = model.tank_ids.index(ev.element)
        if _spilled(events, i, run, spills[k]):
            out.append(ev)
            continue
        for j in range(i + 1, len(events)):
            later = events[j]
            if later.element == ev.element and later.code == "tank.spill_end":
                dropped.add(j)
                break
        verb = "starts at" if ev.time <= 0.0 else "reaches"
        message, template, kept = slots(
            f"tank {ev.element} {verb} its overflow level {{level}} and falls at once: more "
            "flows out than in, so it does not spill", 4,
            level=(float(model.geoms[k].overflow_level), "length"))
        out.append(Event(ev.time, "tank.at_overflow", ev.element, message, template, kept))
    return out


def _spilled(events, i: int, run: Run, spill_k: np.ndarray) -> bool:
    """Whether the overflow ``events[i]`` spilled: its spell at the overflow level (up to the
    tank's next ``tank.spill_end``, else the end of the run) lasted, or a spill was recorded
    in it. A spell that ends at the instant it begins (what flows in is already less than
    what flows out) spilled nothing."""
    ev = events[i]
    t = np.asarray(run.rec.t_out, dtype=float)
    end = float(t[-1]) if t.size else ev.time
    for later in events[i + 1:]:
        if later.element == ev.element and later.code == "tank.spill_end":
            end = later.time
            break
    if end > ev.time:
        return True
    n = min(t.size, spill_k.size)
    at = (t[:n] >= ev.time) & (t[:n] <= end)
    return bool(np.any(spill_k[:n][at] > 0.0))


def _at_overflow(model: TransientModel, k: int, ev) -> Finding:
    """The note for a tank at its overflow level that did not spill (``tank.at_overflow``)."""
    rid = model.tank_ids[k]
    level = (float(model.geoms[k].overflow_level), "length", 4)
    if ev.time <= 0.0:
        return finding(
            "tank.at_overflow", rid,
            f"tank {rid} starts at its overflow level {{level}} but does not spill: its outlets "
            "and draw-off take more than flows in, so the level falls from the start; with "
            "less outflow it would spill", "info", "rigid-column flows of the run", level=level)
    return finding(
        "tank.at_overflow", rid,
        f"tank {rid} reaches its overflow level {{level}} at t = {ev.time:.6g} s but does "
        "not spill: what flows in falls below what flows out as it gets there; there is no "
        "margin left, so check the overflow capacity under the worst-case inflow (defer to "
        "local codes)", "caution", "rigid-column flows of the run", level=level)


def cycling_findings(model: TransientModel, run: Run) -> list[Finding]:
    """A ``tank.cycling`` caution for every tank that drained more than once."""
    out = []
    for k, tid in enumerate(model.tank_ids):
        n = int(run.state.drain_count[k])
        if n >= 2:
            out.append(finding(
                "tank.cycling", tid,
                f"tank {tid} drained {n} times, refilling in between: "
                "what flows in is less than its outlets and draw-off take at the drained "
                "level. In the plant the outlets would run part-full and draw air (vortexing) "
                "rather than stop and restart; the model stops them at min_level and restarts "
                "them at the restart level {restart}", "caution", "rule of thumb",
                restart=(restart_level(model.tanks[k]), "length", 4)))
    return out


def external_series(model: TransientModel, run: Run, t: np.ndarray):
    """Feed and delivered draw-off per tank at the output times [m^3/s]."""
    feeds = np.zeros((model.nt, len(t)))
    draws = np.zeros((model.nt, len(t)))
    if not model.has_ext:
        return feeds, draws
    drained_out = run.rec.drained_out
    for j, tj in enumerate(t.tolist()):
        feed, draw = model.external(tj)
        drained = drained_out[j] if j < len(drained_out) else run.state.drained
        feeds[:, j] = feed
        draws[:, j] = np.where(drained, 0.0, draw)
    return feeds, draws


def spill_series(model: TransientModel, run: Run, ys, feeds, draws) -> np.ndarray:
    """Surplus spilling over each tank's overflow at the output times [m^3/s]."""
    n = ys.shape[1]
    spills = np.zeros((model.nt, n))
    spilling_out = run.rec.spilling_out
    if not model.nt or not n or not spilling_out:
        return spills
    held = np.array(spilling_out[:n]).T.reshape(model.nt, -1)
    if held.shape[1] != n or not held.any():
        return spills
    net = model.t_rows @ ys[: model.nl] + feeds - draws
    return np.where(held, np.maximum(net, 0.0), 0.0)


def rest_of_line_k(model: TransientModel, i: int, run: Run) -> float:
    """Loss coefficient of line ``i`` without its valve, at its largest flow of the run."""
    lines = model.lines
    q = max(float(run.state.q_peak[i]), 1e-6 * lines.area[i])
    qs = np.zeros(model.nl)
    qs[i] = q
    x = np.full(model.nl, np.nan)
    x[i] = 1.0
    h, _ = lines.head_loss(qs, x)
    vh = (q / lines.area[i]) ** 2 / (2.0 * G)
    return max(float(h[i]) / vh - float(lines.valve_k_open[i]), 0.0)
