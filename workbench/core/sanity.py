r"""Physical sanity of solver results: checks that every answer must pass before it is shown.

A solver can converge to the wrong thing (a bug, a corrupted array, an edge case no test
foresaw). These checks restate the physics the result claims to satisfy and compare,
independently of how the solver got there:

Steady (:func:`check_steady`)
    * every number finite (an isolated junction's head is ``nan`` by design and is skipped);
    * continuity at every junction, :math:`\sum Q_{in} - \sum Q_{out} = 0`;
    * the fixed heads in the result equal those of the system (levels, receivers);
    * energy along every path and around every loop: walking the flowing lines out from
      the fixed-head nodes, :math:`H_{to} = H_{from} - \mathrm{sign}(Q)\,h_L`, so the head
      difference between two fixed-head nodes equals the sum of the line losses on any path
      between them and the losses around a loop sum to zero; each junction's reported head
      must equal the head reached this way;
    * no flow through a shut valve (opening 0, so ``c(0) = 0``) or a line reported closed;
    * no negative reservoir level.

Transient (:func:`check_transient`)
    * every series finite; times increasing;
    * non-negative levels and volumes; level and volume of each tank agree through its
      geometry;
    * volume conservation: tanks joined only to each other, with no feed or draw-off, keep
      their total volume (to round-off, on any output grid); each tank obeys
      :math:`V(t) - V(0) = \int_0^t (\sum Q_{in} - \sum Q_{out} + Q_{feed} - Q_{draw})\,dt`
      (trapezoidal rule on the output grid, which includes every event time and schedule
      break point) where the grid resolves the flows, spilling tanks included (their spill
      counts as an outflow);
    * continuity at every junction at every output time;
    * no flow through a shut valve at any output time after the shut instant.

Each check returns a list of :class:`Violation`; an empty list means the result is sound.
The front ends call these after every solve and report a non-empty list as an internal
error ("please report"), never as a result.

References
----------
Continuity and the energy equation along a line with losses are the two laws the network
solver imposes (any fluid-mechanics text, e.g. White, *Fluid Mechanics*, ch. 6); the loop
form is the classical one of network analysis (Hardy Cross, 1936). Tolerances are common
practice, no source: far looser than the solver's own tolerances, far tighter than any
real error.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass

import numpy as np

from workbench.core.model import System, receiver_head, reservoir_head

__all__ = ["Violation", "check_steady", "check_transient", "describe"]

#: Relative tolerance of continuity, scaled by the largest flow at the node [-].
CONTINUITY_RTOL = 1e-7
#: Absolute floor of the continuity tolerance [m^3/s].
CONTINUITY_ATOL = 1e-10
#: Energy tolerance, relative to the head span of the system [-].
ENERGY_RTOL = 1e-6
#: Absolute floor of the energy tolerance [m].
ENERGY_ATOL = 1e-6
#: A level or volume this far below zero is a violation [m], [m^3].
NEGATIVE_TOL = 1e-9
#: Fewest output samples for a tank's own volume balance (and the coarsest spacing is
#: the run over half this many): coarser grids cannot resolve the flows' integral.
DENSE_SAMPLES = 100
#: Volume balance tolerance, relative to the volume that moved through the tank [-], on
#: top of the trapezoidal rule's error bound on the output grid (common practice, no source).
VOLUME_RTOL = 1e-3


@dataclass(frozen=True)
class Violation:
    """One broken law: which check, on which element, and the numbers in words."""

    check: str
    """``"finite"``, ``"continuity"``, ``"energy"``, ``"fixed_head"``, ``"closed_valve"``,
    ``"level"``, ``"volume"``, ``"time"``."""
    element: str
    message: str

    def __str__(self) -> str:
        where = f" at {self.element}" if self.element else ""
        return f"{self.check}{where}: {self.message}"


def describe(violations: list[Violation], limit: int = 3) -> str:
    """Short text for a message: the first few violations and how many more."""
    text = "; ".join(str(v) for v in violations[:limit])
    if len(violations) > limit:
        text += f"; and {len(violations) - limit} more"
    return text


def _fixed_head_values(system: System, levels: dict[str, float]) -> dict[str, float]:
    rho = system.fluid.density
    heads = {rid: reservoir_head(res, rho, levels.get(rid)) for rid, res in system.reservoirs.items()}
    heads.update({rid: receiver_head(rec, rho) for rid, rec in system.receivers.items()})
    return heads


def check_steady(system: System, result) -> list[Violation]:
    """Check a :class:`~workbench.core.network.SteadyResult` against the laws it must obey.

    Parameters
    ----------
    system : System
        The system that was solved.
    result : SteadyResult
        A result with ``success`` True (an unsuccessful result has nothing to check).

    Returns
    -------
    list of Violation
        Empty when the result is sound.
    """
    if not getattr(result, "success", False):
        return []
    levels = dict(getattr(result, "levels", {}) or {})
    fixed = _fixed_head_values(system, levels)
    isolated = {w.element for w in getattr(result, "warnings", ()) if w.code == "node.isolated"}
    out = _steady_complete_and_finite(system, result, isolated)
    if out:
        return out
    span = max(fixed.values()) - min(fixed.values()) if fixed else 0.0
    e_tol = ENERGY_ATOL + ENERGY_RTOL * max(span, 1.0)
    out += _levels_and_fixed_heads(result, levels, fixed, e_tol)
    out += _junction_continuity(system, result)
    out += _shut_lines_carry_nothing(system, result)
    out += _energy_along_paths(system, result, fixed, isolated, e_tol)
    return out


def _steady_complete_and_finite(system: System, result, isolated: set) -> list[Violation]:
    """Every line and node in the result, with finite numbers and no negative loss."""
    out: list[Violation] = []
    for lid in system.lines:
        if lid not in result.lines:
            out.append(Violation("finite", lid, "the line is missing from the result"))
    for nid in [*system.reservoirs, *system.junctions, *system.receivers]:
        if nid not in result.nodes:
            out.append(Violation("finite", nid, "the node is missing from the result"))
    if out:
        return out
    for lid, lr in result.lines.items():
        for name in ("flow", "velocity", "head_loss", "friction_loss", "minor_loss"):
            value = getattr(lr, name)
            if not np.isfinite(value):
                out.append(Violation("finite", lid, f"{name} is {value!r}"))
        for name in ("head_loss", "friction_loss", "minor_loss"):
            if getattr(lr, name) < 0.0:
                out.append(Violation("energy", lid, f"{name} {getattr(lr, name):.6g} m is negative"))
    for nid, nr in result.nodes.items():
        if nid in isolated:
            continue
        if not (np.isfinite(nr.head) and np.isfinite(nr.pressure)):
            out.append(Violation("finite", nid, f"head {nr.head!r}, pressure {nr.pressure!r}"))
    return out


def _levels_and_fixed_heads(result, levels: dict, fixed: dict, e_tol: float) -> list[Violation]:
    """No negative level; the fixed heads in the result are those the system defines."""
    out: list[Violation] = []
    for rid, level in levels.items():
        if level < -NEGATIVE_TOL:
            out.append(Violation("level", rid, f"level {level:.6g} m is negative"))
    for nid, h in fixed.items():
        got = result.nodes[nid].head
        if abs(got - h) > e_tol:
            out.append(Violation("fixed_head", nid, f"head {got:.9g} m in the result, "
                                 f"{h:.9g} m from the levels and elevations"))
    return out


def _junction_continuity(system: System, result) -> list[Violation]:
    """What flows into each junction flows out."""
    out: list[Violation] = []
    net = {j: 0.0 for j in system.junctions}
    scale = {j: 0.0 for j in system.junctions}
    for lid, line in system.lines.items():
        q = result.lines[lid].flow
        for node, sign in ((line.from_node, -1.0), (line.to_node, 1.0)):
            if node in net:
                net[node] += sign * q
                scale[node] = max(scale[node], abs(q))
    for j, value in net.items():
        tol = CONTINUITY_ATOL + CONTINUITY_RTOL * scale[j]
        if abs(value) > tol:
            out.append(Violation("continuity", j, f"net inflow {value:.6g} m3/s (flows up to "
                                 f"{scale[j]:.6g} m3/s meet there)"))
    return out


def _shut_lines_carry_nothing(system: System, result) -> list[Violation]:
    """Shut valves, closed, isolated and drained-back lines carry no flow."""
    out: list[Violation] = []
    for lid, line in system.lines.items():
        lr = result.lines[lid]
        opening = result.openings.get(lid, line.valve.opening if line.valve else None)
        shut = (line.valve is not None and opening is not None and opening <= 0.0)
        if (shut or lr.status == "closed") and lr.flow != 0.0:
            out.append(Violation("closed_valve", lid, f"flow {lr.flow:.6g} m3/s through a "
                                 "shut valve"))
        elif lr.status in ("isolated", "drains_back") and lr.flow != 0.0:
            out.append(Violation("continuity", lid, f"flow {lr.flow:.6g} m3/s in a line "
                                 f"reported as {lr.status.replace('_', ' ')} (no flow)"))
    return out


def _energy_along_paths(system: System, result, fixed: dict, isolated: set,
                        e_tol: float) -> list[Violation]:
    """Energy along every path of flowing lines from the fixed heads (and around loops)."""
    out: list[Violation] = []
    flowing = {lid: system.lines[lid] for lid, lr in result.lines.items()
               if lr.status == "flowing"}
    adjacency: dict[str, list[tuple[str, str, float]]] = {}
    for lid, line in flowing.items():
        lr = result.lines[lid]
        drop = np.sign(lr.flow) * lr.head_loss  # H_from - H_to
        adjacency.setdefault(line.from_node, []).append((lid, line.to_node, -drop))
        adjacency.setdefault(line.to_node, []).append((lid, line.from_node, drop))
    walked: dict[str, float] = dict(fixed)
    via: dict[str, str] = {}
    queue = deque(fixed)
    while queue:
        node = queue.popleft()
        for lid, other, rise in adjacency.get(node, ()):
            if other in walked:
                continue
            walked[other] = walked[node] + rise
            via[other] = lid
            queue.append(other)
    for j in system.junctions:
        if j in walked and j not in isolated:
            got = result.nodes[j].head
            if abs(got - walked[j]) > e_tol:
                out.append(Violation("energy", j, f"head {got:.9g} m in the result, "
                                     f"{walked[j]:.9g} m from a fixed head less the line "
                                     f"losses along the path (last line {via[j]})"))
    for lid, line in flowing.items():
        a, b = line.from_node, line.to_node
        if a in walked and b in walked:
            lr = result.lines[lid]
            drop = np.sign(lr.flow) * lr.head_loss
            gap = walked[a] - walked[b] - drop
            if abs(gap) > e_tol:
                out.append(Violation("energy", lid, f"path or loop through the line does not "
                                     f"close: head difference {walked[a] - walked[b]:.9g} m, "
                                     f"line loss {drop:.9g} m"))
    return out


def _closed_groups(system: System, result, volumes: np.ndarray, spilled: set) -> list[Violation]:
    """Tanks joined only to each other (no constant level, no receiver) keep their total.

    Every line takes from one node what it gives to the other, so the sum of the volumes of
    a group of tanks and junctions with no other outlet is invariant; the integrators used
    preserve linear invariants, so this holds to round-off on any output grid.
    """
    out: list[Violation] = []
    parent: dict[str, str] = {}

    def find(a: str) -> str:
        while parent.setdefault(a, a) != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        return a

    for line in system.lines.values():
        parent[find(line.from_node)] = find(line.to_node)
    open_ended = {find(n) for n in system.receivers} | {
        find(rid) for rid, r in system.reservoirs.items()
        if r.kind != "tank" or r.has_external_flow}
    groups: dict[str, list[int]] = {}
    for k, rid in enumerate(result.tank_ids):
        root = find(rid)
        if root not in open_ended:
            groups.setdefault(root, []).append(k)
    for members in groups.values():
        names = [result.tank_ids[k] for k in members]
        if len(members) < 2 or spilled & set(names) or volumes.shape[1] < 2:
            continue
        total = volumes[members].sum(axis=0)
        drift = float(np.max(np.abs(total - total[0])))
        if drift > 1e-8 * max(float(np.max(np.abs(volumes[members]))), 1e-9):
            out.append(Violation("volume", ", ".join(names), f"tanks joined only to each "
                                 f"other hold {total[0]:.9g} m3 at the start and drift by "
                                 f"{drift:.3g} m3 over the run"))
    return out


def check_transient(system: System, result) -> list[Violation]:
    """Check a :class:`~workbench.core.transient.TransientResult` against the laws it must obey.

    Parameters
    ----------
    system : System
    result : TransientResult
        A result with ``success`` True (an unsuccessful result has nothing to check).

    Returns
    -------
    list of Violation
        Empty when the result is sound.
    """
    if not getattr(result, "success", False):
        return []
    t = np.asarray(result.t, dtype=float)
    flows = np.asarray(result.flows, dtype=float).reshape(len(result.line_ids), t.size)
    levels = np.asarray(result.levels, dtype=float).reshape(len(result.tank_ids), t.size)
    volumes = np.asarray(result.volumes, dtype=float).reshape(len(result.tank_ids), t.size)
    external = _external_flows(result, volumes)
    out = _transient_finite(result, t, flows, levels, volumes, external)
    if out:
        return out
    if t.size and np.any(np.diff(t) < 0.0):
        return [Violation("time", "", "output times go backwards")]
    row = {lid: i for i, lid in enumerate(result.line_ids)}
    spilled = {ev.element for ev in result.events if ev.code == "tank.overflow"}
    # The balance of one tank needs its inflow integrated over the output grid: only
    # meaningful when the grid resolves the flows (a coarse grid can miss oscillations).
    dense = bool(t.size >= DENSE_SAMPLES and
                 np.max(np.diff(t)) <= (t[-1] - t[0]) / (DENSE_SAMPLES / 2))
    out.extend(_closed_groups(system, result, volumes, spilled))
    for k, rid in enumerate(result.tank_ids):
        out += _tank_levels_and_shape(system, rid, t, levels[k], volumes[k])
        if dense:
            out += _tank_balance(system, rid, t, flows, row, volumes[k], external[k])
    out += _junction_continuity_in_time(system, t, flows, row)
    out += _shut_valves_in_time(system, t, flows, row)
    return out


def _external_flows(result, volumes: np.ndarray) -> np.ndarray:
    """Per tank and output time, feed less draw-off less spill [m^3/s]."""
    external = np.zeros_like(volumes)
    for name, sign in (("feeds", 1.0), ("draw_offs", -1.0), ("spills", -1.0)):
        series = np.asarray(getattr(result, name, ()), dtype=float)
        if series.shape == volumes.shape:
            external = external + sign * series
    return external


def _transient_finite(result, t, flows, levels, volumes, external) -> list[Violation]:
    """Every series finite; every line's pressure range finite and ordered."""
    out: list[Violation] = []
    for name, arr in (("time", t), ("flows", flows), ("levels", levels), ("volumes", volumes),
                      ("feed, draw-off and spill", external)):
        if not np.all(np.isfinite(arr)):
            out.append(Violation("finite", "", f"the {name} series holds {np.sum(~np.isfinite(arr))} "
                                 "non-finite values"))
    for lid, high in result.max_pressure.items():
        low = result.min_pressure.get(lid, np.inf)
        # (-inf, +inf) is the solver's "never tracked" mark (a line standing empty or
        # part-full all run; shown as no value); anything else must be finite.
        never = high == -np.inf and low == np.inf
        if not never and not (np.isfinite(high) and np.isfinite(low)):
            out.append(Violation("finite", lid, f"pressure range {low!r} to {high!r} Pa"))
        elif not never and low > high:
            out.append(Violation("finite", lid, f"minimum pressure {low:.6g} Pa above the "
                                 f"maximum {high:.6g} Pa"))
    return out


def _tank_levels_and_shape(system: System, rid: str, t, lv, vol) -> list[Violation]:
    """No negative level or volume; level and volume agree through the tank's shape."""
    from workbench.core.tank import tank_geometry

    out: list[Violation] = []
    if lv.size and lv.min() < -NEGATIVE_TOL:
        i = int(np.argmin(lv))
        out.append(Violation("level", rid, f"level {lv[i]:.6g} m at t = {t[i]:.6g} s is negative"))
    if vol.size and vol.min() < -NEGATIVE_TOL:
        i = int(np.argmin(vol))
        out.append(Violation("volume", rid, f"volume {vol[i]:.6g} m3 at t = {t[i]:.6g} s "
                             "is negative"))
    geom = tank_geometry(system.reservoirs[rid])
    for i in np.unique(np.linspace(0, t.size - 1, min(t.size, 50)).astype(int)):
        h = float(lv[i])
        if 0.0 <= h <= geom.top:
            v = geom.volume(h)
            if abs(v - vol[i]) > 1e-6 * max(abs(v), 1e-3):
                out.append(Violation("volume", rid, f"level {h:.6g} m and volume "
                                     f"{vol[i]:.6g} m3 at t = {t[i]:.6g} s disagree "
                                     f"(the shape gives {v:.6g} m3)"))
                break
    return out


def _tank_balance(system: System, rid: str, t, flows, row: dict, vol,
                  external) -> list[Violation]:
    """The tank's volume change equals what its lines, feed, draw-off and spill moved.

    A spilling tank is checked too: its spill is part of ``external``, so a tank held at
    its overflow level while its lines take more than its feed brings is caught.
    """
    inflow = external.copy()
    for lid, line in system.lines.items():
        if line.to_node == rid:
            inflow += flows[row[lid]]
        if line.from_node == rid:
            inflow -= flows[row[lid]]
    moved = float(np.trapezoid(inflow, t))
    throughput = float(np.trapezoid(np.abs(inflow), t))
    # Where the flow is monotone over an output interval the exact integral lies between
    # the left and right sums, so half their difference bounds the trapezoid's error.
    if np.count_nonzero(np.diff(np.sign(inflow))) > 0.1 * t.size:
        return []  # the net inflow swings back and forth between samples: aliased
    sampling = float(np.sum(np.abs(np.diff(inflow)) * np.diff(t))) / 2.0
    change = float(vol[-1] - vol[0])
    tol = sampling + VOLUME_RTOL * throughput + 1e-9 * max(abs(vol[0]), 1.0)
    if abs(change - moved) <= tol:
        return []
    return [Violation("volume", rid, f"volume changed by {change:.6g} m3 while the lines, "
                      f"feed, draw-off and spill moved {moved:.6g} m3 in (net) over the run")]


def _junction_continuity_in_time(system: System, t, flows, row: dict) -> list[Violation]:
    """Continuity at every junction at every output time."""
    out: list[Violation] = []
    for j in system.junctions:
        net = np.zeros(t.size)
        scale = np.zeros(t.size)
        for lid, line in system.lines.items():
            q = flows[row[lid]]
            if line.to_node == j:
                net += q
            if line.from_node == j:
                net -= q
            scale = np.maximum(scale, np.abs(q))
        bad = np.abs(net) > 1e-6 * scale + CONTINUITY_ATOL
        if bad.any():
            i = int(np.argmax(np.abs(net)))
            out.append(Violation("continuity", j, f"net inflow {net[i]:.6g} m3/s at "
                                 f"t = {t[i]:.6g} s"))
    return out


def _shut_valves_in_time(system: System, t, flows, row: dict) -> list[Violation]:
    """No flow through a shut valve (strictly after the instant it shuts, where the series
    may hold the flow just before the event)."""
    from workbench.core.valve import opening_at

    out: list[Violation] = []
    for lid, line in system.lines.items():
        if line.valve is None or lid not in row:
            continue
        q = flows[row[lid]]
        x = np.array([opening_at(line.valve, float(ti)) for ti in t])
        shut = x <= 0.0
        if line.valve.schedule is None:
            check = shut
        else:
            check = shut & np.concatenate([[shut[0]], shut[:-1]]) & \
                np.concatenate([[True], np.diff(t) > 0.0])
        scale = max(float(np.max(np.abs(q))) if q.size else 0.0, 1e-9)
        bad = check & (np.abs(q) > 1e-9 * scale + 1e-15)
        if bad.any():
            i = int(np.flatnonzero(bad)[0])
            out.append(Violation("closed_valve", lid, f"flow {q[i]:.6g} m3/s at t = {t[i]:.6g} s "
                                 "through a shut valve"))
    return out
