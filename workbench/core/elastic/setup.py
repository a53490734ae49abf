"""Setting up an elastic run: lines, grid, steady start, valves and the march plan."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from workbench.core.elastic.grid import Grid, build_grid
from workbench.core.elastic.losses import FRICTION_MODELS, line_loss, reach_friction
from workbench.core.elastic.plan import MarchPlan, build_boundaries
from workbench.core.elastic.results import ElasticSetupError
from workbench.core.elastic.steady import LineEnds, fixed_head, line_heads, steady_state
from workbench.core.model import Finding, G, Line, System

#: Default run length after the last valve movement, in round trips of the lines [-].
DEFAULT_ROUND_TRIPS = 20


@dataclass(frozen=True, eq=False)
class RunSetup:
    """An elastic run ready to march, with what the result needs to be assembled."""

    line_id: str
    lines: tuple[Line, ...]
    grid: Grid
    flows: tuple[float, ...]
    """Initial flow per line [m^3/s]."""
    h_init: np.ndarray
    friction: str
    times: np.ndarray
    plan: MarchPlan
    mid_nodes: dict[str, int]
    traces: dict[str, int]
    """Label -> grid node of the valve and junction traces."""
    valve_line: str | None
    valve_node: int | None
    findings: list[Finding]
    notes: list[str]


def line_ends(system: System, lines: list[Line]) -> list[LineEnds]:
    """How each line meets its nodes (losses, entrance, valve at ``t = 0``)."""
    from workbench.core.elastic.plan import valve_kappa

    fluid = system.fluid
    out = []
    for ln in lines:
        loss = line_loss(ln, fluid.density, fluid.viscosity)
        k_v = 0.0 if ln.valve is None else float(valve_kappa(np.array([0.0]), ln)[0])
        out.append(LineEnds(
            line=ln, loss=loss,
            k_entrance=(1.0 + ln.entrance_k) / (2.0 * G * loss.area ** 2),
            from_fixed=fixed_head(system, ln.from_node) is not None,
            to_fixed=fixed_head(system, ln.to_node) is not None,
            k_valve=k_v))
    return out


def _duration(system: System, lines, grid: Grid, duration, max_duration) -> float:
    if duration is None:
        round_trip = 2.0 * sum(ln.length / grid.speeds[ln.id].korteweg for ln in lines)
        last_move = max([float(ln.valve.schedule.times[-1]) for ln in lines
                         if ln.valve is not None and ln.valve.schedule is not None
                         and ln.valve.schedule.times] + [0.0])
        duration = last_move + DEFAULT_ROUND_TRIPS * round_trip
        if system.simulation is not None and system.simulation.duration < duration:
            duration = system.simulation.duration
        if max_duration is not None and max_duration < duration:
            duration = max_duration
    if not duration > 0.0:
        raise ElasticSetupError(f"duration must be positive, got {duration!r}")
    return duration


def _record_nodes(lines, grid: Grid, line_id: str, plan_bounds):
    """Mid-line nodes, trace nodes and the valve whose trace the result leads with."""
    mid = {ln.id: grid.first(i) + grid.counts[i] // 2 for i, ln in enumerate(lines)}
    traces: dict[str, int] = {}
    valve_line = valve_node = None
    for i, ln in enumerate(lines):
        if ln.valve is None:
            continue
        node = grid.first(i) if ln.valve.position == "from" else grid.last(i)
        traces[f"valve {ln.id}"] = node
        if valve_line != line_id:
            valve_line, valve_node = ln.id, node
    nodes = [node for j, node in enumerate(plan_bounds.junction_node.tolist())
             if plan_bounds.junction_ptr[j + 1] - plan_bounds.junction_ptr[j] >= 2]
    for node in nodes + plan_bounds.vj_node.tolist():
        i, _ = grid.locate(node)
        name = lines[i].to_node if node == grid.last(i) else lines[i].from_node
        traces[f"junction {name}"] = node
    return mid, traces, valve_line, valve_node


def prepare(system: System, line_id: str, lines: list[Line], *, duration, max_duration,
            reaches, friction, tolerance, speeds, cavities: bool = False) -> RunSetup:
    """Everything up to the march: grid, steady start, boundaries and the plan."""
    if friction not in FRICTION_MODELS:
        raise ElasticSetupError(
            f"unknown friction model {friction!r}; known: {', '.join(FRICTION_MODELS)}")
    findings: list[Finding] = []
    notes: list[str] = []
    fluid = system.fluid
    grid = build_grid(system, lines, line_id, reaches, tolerance, dict(speeds or {}),
                      findings, notes)
    for node in dict.fromkeys(nd for ln in lines for nd in (ln.from_node, ln.to_node)):
        if node in system.reservoirs and system.reservoirs[node].kind == "tank":
            notes.append(f"tank {node}: level held at its initial value over the surge run")
    ends = line_ends(system, lines)
    flows, heads = steady_state(system, ends)
    model = friction
    if model == "initial" and any(q == 0.0 for q in flows):
        model = "quasi_steady"
        notes.append("no initial flow, so friction is updated every step (quasi-steady)")
    notes.append(f"friction: {FRICTION_MODELS[model]}; unsteady friction (not modelled) "
                 "would damp the later cycles more, the first peak hardly at all")
    dt = grid.dt
    run_for = _duration(system, lines, grid, duration, max_duration)
    n_steps = max(1, int(math.ceil(run_for / dt - 1e-9)))
    times = dt * np.arange(n_steps + 1)
    bounds, _ = build_boundaries(system, ends, grid, times, notes)
    h_init = np.concatenate([line_heads(e, q, heads, c)
                             for e, q, c in zip(ends, flows, grid.counts)])
    b_node = grid.per_node([grid.speeds[ln.id].used / (G * e.loss.area)
                            for ln, e in zip(lines, ends)])
    q_node = grid.per_node(flows)
    z_node = np.concatenate(grid.z)
    if fluid.vapor_pressure is not None:
        h_vap = z_node + (fluid.vapor_pressure - system.atmospheric_pressure) / (
            fluid.density * G)
    else:
        h_vap = None
        notes.append("the liquid has no vapour pressure: column separation is not checked")
    interior = np.ones(grid.n, dtype=bool)
    interior[grid.offsets[:-1]] = False
    interior[grid.offsets[1:] - 1] = False
    mid, traces, valve_line, valve_node = _record_nodes(lines, grid, line_id, bounds)
    series_nodes = np.array(sorted(set(mid.values()) | set(traces.values())), dtype=np.int64)
    state0 = np.concatenate([h_init + b_node * q_node, (h_init - b_node * q_node)[::-1]])
    plan = MarchPlan(
        n=grid.n, n_steps=n_steps, dt=dt, state0=state0, b_node=b_node,
        friction=reach_friction(model, [e.loss for e in ends], list(grid.counts), flows),
        bounds=bounds, h_vap=h_vap, cavities=cavities, interior=interior,
        series_nodes=series_nodes)
    return RunSetup(line_id, tuple(lines), grid, tuple(flows), h_init, model, times, plan,
                    mid, traces, valve_line, valve_node, findings, notes)
