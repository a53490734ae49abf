"""From the march's record to the result: envelopes, traces, cavity zones and findings."""

from __future__ import annotations

import numpy as np

from workbench.core.elastic.record import MarchOutput
from workbench.core.elastic.results import (
    STATUS_MESSAGES,
    CavityZone,
    ColumnSeparation,
    ElasticResult,
    Envelope,
    failed,
)
from workbench.core.elastic.setup import RunSetup
from workbench.core.finding_text import finding, slots
from workbench.core.model import Finding, G, System

SEPARATION_SOURCE = "Wylie & Streeter 1993 (column separation)"


def separation(setup: RunSetup, out: MarchOutput, system: System) -> ColumnSeparation | None:
    """Where and when the first vapour cavity formed (or vapour pressure was first reached)."""
    if out.sep[0] < 0:
        return None
    k, node = int(out.sep[0]), int(out.sep[1])
    i, x = setup.grid.locate(node)
    if setup.plan.cavities:
        p_abs = float(system.fluid.vapor_pressure)  # a cavity holds vapour pressure
    else:
        z = float(np.concatenate(setup.grid.z)[node])
        p_abs = float(system.fluid.density * G * (out.sep_head[0] - z)
                      + system.atmospheric_pressure)
    return ColumnSeparation(time=float(setup.times[k]), line=setup.lines[i].id, distance=x,
                            pressure_abs=p_abs)


def envelopes(setup: RunSetup, out: MarchOutput, system: System, cavities: bool):
    """Per line, the :class:`Envelope` of the run."""
    rho = system.fluid.density
    g = setup.grid
    env = {}
    for i, ln in enumerate(setup.lines):
        sl = slice(g.first(i), g.last(i) + 1)
        z = g.z[i]
        env[ln.id] = Envelope(
            line=ln.id, distance=g.x[i], elevation=z,
            max_head=out.h_max[sl].copy(), min_head=out.h_min[sl].copy(),
            initial_head=setup.h_init[sl].copy(),
            max_pressure=rho * G * (out.h_max[sl] - z), min_pressure=rho * G * (out.h_min[sl] - z),
            max_head_before_separation=(out.h_max_pre[sl].copy()
                                        if cavities and out.sep[0] >= 0 else None),
            cavity_max_volume=out.v_max[sl].copy() if cavities else None)
    return env


def cavity_zones(setup: RunSetup, out: MarchOutput) -> tuple[CavityZone, ...]:
    """Runs of neighbouring sections that held a cavity, per line."""
    g, times = setup.grid, setup.times
    zones = []
    for i, ln in enumerate(setup.lines):
        nodes = np.arange(g.first(i), g.last(i) + 1)
        hit = out.events[nodes] > 0
        if not hit.any():
            continue
        idx = np.flatnonzero(hit)
        breaks = np.flatnonzero(np.diff(idx) > 1)
        for part in np.split(idx, breaks + 1):
            ns = nodes[part]
            big = ns[int(np.argmax(out.v_max[ns]))]
            still_open = bool((out.vol[ns] > 0).any())
            zones.append(CavityZone(
                line=ln.id, start=float(g.x[i][part[0]]), end=float(g.x[i][part[-1]]),
                sections=len(ns), events=int(out.events[ns].sum()),
                first_open=float(times[int(out.first_open[ns].min())]),
                last_collapse=None if still_open else float(times[int(out.last_close[ns].max())]),
                max_volume=float(out.v_max[big]), max_volume_time=float(times[out.v_max_step[big]]),
                max_volume_at=float(g.x[i][big - g.first(i)])))
    return tuple(zones)


def rating_findings(setup: RunSetup, env: dict[str, Envelope]) -> list[Finding]:
    """DANGER where the envelope exceeds a line's pressure rating."""
    found = []
    for ln in setup.lines:
        e = env[ln.id]
        if ln.pressure_rating is not None and e.max_pressure.max() > ln.pressure_rating:
            found.append(finding(
                "surge.pressure", ln.id,
                f"line {ln.id}: the elastic surge envelope reaches {{p}} gauge, above its "
                "rating of {rating}; consider slower closure or surge protection, and have it "
                "reviewed under local codes",
                "danger", "method of characteristics (Wylie & Streeter 1993)", digits=4,
                p=(float(e.max_pressure.max()), "pressure"),
                rating=(ln.pressure_rating, "pressure")))
    return found


def separation_finding(sep: ColumnSeparation, cavities: bool) -> Finding:
    """The DANGER finding of a column separation."""
    if cavities:
        text = (f"line {sep.line}: the liquid column separates (a vapour cavity forms) at "
                f"{{x}} from its start, {sep.time:.3f} s into the surge run. "
                "The collapse of a vapour cavity can raise the pressure above the closure's "
                "own surge; the cavities are modelled, but the figures after that time are "
                "not trustworthy as design values. Get a specialist surge study.")
    else:
        text = (f"line {sep.line}: the computed pressure reaches vapour pressure at "
                f"{{x}} from its start, {sep.time:.3f} s into the surge run. "
                "Column separation is not modelled: the results after that time are not "
                "trustworthy, and a collapsing vapour cavity can raise the pressure above the "
                "computed peak. Surge protection needs specialist review.")
    return finding("surge.column_separation", sep.line, text, "danger", SEPARATION_SOURCE,
                   x=(sep.distance, "length", 4))


def assemble(setup: RunSetup, out: MarchOutput, steps: int, cancelled: bool,
             system: System, kernel: str) -> ElasticResult:
    """The :class:`ElasticResult` of a march."""
    names = " - ".join(ln.id for ln in setup.lines)
    if not (np.isfinite(out.h_max).all() and np.isfinite(out.h_min).all()):
        # a guard, not a model result: never report a run whose heads are not numbers
        return failed(
            f"{STATUS_MESSAGES[-1]} The computed heads on {names} stopped being finite "
            "numbers; check the line data (diameters, lengths, valve coefficients) and "
            "report the project if they look sound.", line_ids=tuple(setup.grid.line_ids))
    rho = system.fluid.density
    cav = setup.plan.cavities and setup.plan.h_vap is not None
    sep = separation(setup, out, system)
    env = envelopes(setup, out, system, cav)
    findings = list(setup.findings)
    if sep is not None:
        findings.append(separation_finding(sep, cav))
    zones = cavity_zones(setup, out) if cav else ()
    findings += cavity_findings(zones, env, rho)
    findings += rating_findings(setup, env)
    status = -2 if cancelled else (1 if sep is not None else 0)
    times = setup.times[:steps + 1]
    series = out.series[:steps + 1]
    col = {int(node): j for j, node in enumerate(setup.plan.series_nodes)}
    z_node = np.concatenate(setup.grid.z)
    mid_head = {lid: series[:, col[p]].copy() for lid, p in setup.mid_nodes.items()}
    mid_pressure = {lid: rho * G * (mid_head[lid] - z_node[p])
                    for lid, p in setup.mid_nodes.items()}
    if setup.valve_node is not None:
        valve_head = series[:, col[setup.valve_node]].copy()
        valve_pressure = rho * G * (valve_head - z_node[setup.valve_node])
    else:
        valve_head = valve_pressure = np.zeros(0)
    message, template, values = STATUS_MESSAGES[status], "", ()
    if sep is not None:
        message, template, values = slots(
            STATUS_MESSAGES[status].replace("{", "{{").replace("}", "}}")
            + f" Vapour pressure first reached on line {sep.line} at {{x}}, "
            f"t = {sep.time:.3f} s.", x=(sep.distance, "length", 4))
    g = setup.grid
    i_req = g.line_ids.index(setup.line_id)
    return ElasticResult(
        success=status >= 0, status=status, message=message, template=template,
        values=values, line_ids=g.line_ids, time=times,
        dt=g.dt, reaches=dict(zip(g.line_ids, g.counts)), wave_speeds=g.speeds,
        friction=setup.friction, initial_flow=float(setup.flows[i_req]),
        valve_line=setup.valve_line, valve_head=valve_head, valve_pressure=valve_pressure,
        midline_head=mid_head, midline_pressure=mid_pressure, envelopes=env,
        column_separation=sep, trusted_until=None if sep is None else sep.time,
        findings=tuple(findings), notes=tuple(setup.notes), kernel=kernel,
        initial_flows=dict(zip(g.line_ids, map(float, setup.flows))),
        traces={label: series[:, col[p]].copy() for label, p in setup.traces.items()},
        cavity_volume=out.cavity_volume[:steps + 1].copy() if cav else np.zeros(0),
        cavity_zones=zones,
        vapour_head=({} if setup.plan.h_vap is None else
                     {ln.id: setup.plan.h_vap[g.first(i):g.last(i) + 1].copy()
                      for i, ln in enumerate(setup.lines)}))


#: The published basis of the cavity model, as findings and notes name it.
CAVITY_SOURCE = ("discrete vapour cavity model (Wylie & Streeter 1993, ch. 8; Bergant, "
                 "Simpson & Tijsseling 2006)")

#: Neighbouring sections with cavities from which a zone counts as "many small cavities".
MANY_SECTIONS = 3


def cavity_findings(zones, env: dict[str, Envelope], rho: float) -> list[Finding]:
    """DANGER per cavity zone, with the collapse and the model's known limits in words."""
    found = []
    for z in zones:
        e = env[z.line]
        peak = float(e.max_pressure.max())
        pre = e.max_head_before_separation
        before = float((rho * G * (pre - e.elevation)).max()) if pre is not None else peak
        where = ("at {start}" if z.sections == 1
                 else f"along {{start}} to {{end}} ({z.sections} computing sections)")
        collapse = ("still open at the end of the run" if z.last_collapse is None
                    else f"the last collapses at {z.last_collapse:.2f} s")
        text = (f"line {z.line}: vapour cavities {where}, the first at {z.first_open:.2f} s, "
                f"largest {{volume}} at {{at}}, {collapse}. "
                "Highest pressure on the line {peak} gauge with the collapses, "
                "{before} before the column first separated. Cavity collapse "
                "can burst or move a pipe; these figures are screening estimates, not design "
                "values: get a specialist surge study.")
        if z.sections >= MANY_SECTIONS:
            text += (" Many small cavities along a reach: the model is known to give "
                     "spurious pressure spikes there; treat the peaks as indicative.")
        found.append(finding(
            "surge.cavity_collapse", z.line, text, "danger", CAVITY_SOURCE, digits=4,
            start=(z.start, "length"), end=(z.end, "length"),
            volume=(z.max_volume, "small_volume", 3), at=(z.max_volume_at, "length"),
            peak=(peak, "pressure"), before=(before, "pressure")))
    return found
