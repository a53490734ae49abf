r"""The computing grid of an elastic run: wave speeds, reaches, one time step.

Every line is cut into reaches with the **same time step** and a Courant number of exactly
one (``dx_i = a_i dt``), so the characteristics pass through grid nodes and no interpolation
smears the wave front. Lengths are fixed, so the reach counts are rounded and each line's
wave speed is adjusted to ``a_i' = L_i/(N_i dt)``; the adjustment is reported and kept
within a tolerance (the usual practice, Wylie & Streeter, *Fluid Transients in Systems*,
1993, ch. 3). Wave speeds come from the Korteweg formula in
:func:`workbench.core.surge.wave_speed`.

Nodes of all lines sit in one array, line after line, each line from its from-end
(``offsets[i]`` is the first node of line ``i``, ``offsets[i+1] - 1`` its last).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from workbench.core.elastic.results import ElasticSetupError, WaveSpeedUse
from workbench.core.finding_text import finding
from workbench.core.model import Finding, Line, System

#: Default tolerance on the wave-speed adjustment that makes every Courant number one [-].
SPEED_TOLERANCE = 0.05

#: Reaches on the line with the shortest wave travel time when none is requested [-].
AUTO_REACHES = 16

#: Upper limit on the total reach count chosen automatically [-].
MAX_AUTO_REACHES = 4000


@dataclass(frozen=True, eq=False)
class Grid:
    """Reaches, time step and node geometry of the lines run together."""

    line_ids: tuple[str, ...]
    counts: tuple[int, ...]
    """Reaches per line [-]."""
    dt: float
    """Common time step [s]."""
    offsets: np.ndarray
    """First node of each line, and the node count at the end [-]."""
    speeds: dict[str, WaveSpeedUse]
    x: tuple[np.ndarray, ...]
    """Chainage of each line's nodes [m]."""
    z: tuple[np.ndarray, ...]
    """Elevation of each line's nodes [m]."""

    @property
    def n(self) -> int:
        """Nodes in all [-]."""
        return int(self.offsets[-1])

    def first(self, i: int) -> int:
        """First node of line ``i``."""
        return int(self.offsets[i])

    def last(self, i: int) -> int:
        """Last node of line ``i``."""
        return int(self.offsets[i + 1]) - 1

    def per_node(self, values) -> np.ndarray:
        """One value per line spread over that line's nodes."""
        return np.concatenate([np.full(c + 1, float(v)) for v, c in zip(values, self.counts)])

    def locate(self, node: int) -> tuple[int, float]:
        """Line index and chainage [m] of a grid node."""
        i = int(np.searchsorted(self.offsets, node, side="right")) - 1
        return i, float(self.x[i][node - int(self.offsets[i])])


def node_elevations(system: System, line: Line, x: np.ndarray) -> np.ndarray:
    """Pipe elevation at chainages ``x`` [m], interpolated from the profile and end nodes."""
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


def choose_grid(travel: np.ndarray, requested: list[int | None], tolerance: float,
                shortest_move: float = math.inf):
    """Reach counts and a common time step making every Courant number one.

    Automatic choice (no reach count requested): :data:`AUTO_REACHES` on the line of
    shortest travel time, and at least 10 steps over the shortest valve movement that takes
    longer than that step (a faster movement is a sudden one at any practical step), within
    :data:`MAX_AUTO_REACHES` reaches in all. With several lines the reaches on the line of
    shortest travel time are raised until every adjustment ``travel/(counts*dt) - 1`` is
    within ``tolerance`` (or the best found within a reasonable count).

    Returns ``(counts, dt)``.
    """
    req = [(i, r) for i, r in enumerate(requested) if r]
    if req:
        dt0 = min(travel[i] / r for i, r in req)
    else:
        dt0 = float(travel.min()) / AUTO_REACHES
        if shortest_move > dt0:
            dt0 = min(dt0, shortest_move / 10.0)
        if travel.sum() / dt0 > MAX_AUTO_REACHES:
            dt0 = float(travel.sum()) / MAX_AUTO_REACHES
    if len(travel) == 1:
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


def korteweg_speeds(system: System, lines: list[Line], override: dict[str, float],
                    findings: list[Finding]) -> tuple[list[float], list[str]]:
    """Wave speed of each line [m/s] and how it was obtained (a given speed wins)."""
    from workbench.core.surge import wave_speed

    fluid = system.fluid
    speeds, formulas = [], []
    for line in lines:
        if line.id in override:
            speeds.append(float(override[line.id]))
            formulas.append("given for this run")
            continue
        if fluid.bulk_modulus is None:
            raise ElasticSetupError(
                f"the liquid {fluid.name!r} has no bulk modulus, which the wave speed of line "
                f"{line.id!r} needs; give [fluid] bulk_modulus"
            )
        ws = wave_speed(fluid.bulk_modulus, fluid.density, line.diameter, line.wall_thickness,
                        line.elastic_modulus, line.poisson_ratio, line.support)
        speeds.append(ws.speed)
        formulas.append(ws.formula)
        if ws.wall == "rigid":
            findings.append(finding(
                "surge.rigid_pipe_speed", line.id,
                f"line {line.id}: no wall thickness or elastic modulus, so the wave speed is "
                "that of a rigid pipe, {a}, an upper bound: the surge is overstated", "info",
                "Korteweg formula (Wylie & Streeter 1993)", a=(ws.speed, "velocity", 4)))
    return speeds, formulas


def _shortest_move(lines: list[Line]) -> float:
    moves = [
        t1 - t0
        for ln in lines if ln.valve is not None and ln.valve.schedule is not None
        for t0, t1, x0, x1 in zip(ln.valve.schedule.times, ln.valve.schedule.times[1:],
                                  ln.valve.schedule.openings, ln.valve.schedule.openings[1:])
        if x1 != x0
    ]
    return min(moves, default=math.inf)


def build_grid(system: System, lines: list[Line], line_id: str, reaches, tolerance: float,
               override: dict[str, float], findings: list[Finding],
               notes: list[str]) -> Grid:
    """The grid for ``lines``: reaches requested for ``line_id`` (an int) or per line (a
    dict), else each line's ``surge.reaches``, else automatic (:func:`choose_grid`)."""
    speeds_k, formulas = korteweg_speeds(system, lines, override, findings)
    a_k = np.array(speeds_k)
    lengths = np.array([ln.length for ln in lines])
    if isinstance(reaches, int):
        reaches = {line_id: reaches}
    requested = [(reaches or {}).get(ln.id, ln.surge.reaches) for ln in lines]
    for ln, r in zip(lines, requested):
        if r is not None and r < 1:
            raise ElasticSetupError(f"line {ln.id}: reaches must be 1 or more, got {r}")
    counts, dt = choose_grid(lengths / a_k, requested, tolerance, _shortest_move(lines))
    a_used = lengths / (counts * dt)
    speeds = {ln.id: WaveSpeedUse(ln.id, float(a_k[i]), float(a_used[i]), formulas[i])
              for i, ln in enumerate(lines)}
    worst = max(abs(s.adjustment) for s in speeds.values())
    if worst > 1e-12:
        notes.append("wave speeds adjusted so that every Courant number is one with a common "
                     f"time step: largest change {100 * worst:.2f} %")
    if worst > tolerance:
        findings.append(Finding(
            "surge.wave_speed_adjusted", lines[0].id,
            f"wave speeds had to be changed by up to {100 * worst:.1f} % to fit a common time "
            f"step (tolerance {100 * tolerance:.1f} %); give more reaches to reduce it",
            "caution", "Wylie & Streeter 1993, ch. 3"))
    counts_t = tuple(int(c) for c in counts)
    xs = tuple(np.linspace(0.0, ln.length, c + 1) for ln, c in zip(lines, counts_t))
    zs = tuple(node_elevations(system, ln, x) for ln, x in zip(lines, xs))
    offsets = np.concatenate([[0], np.cumsum([c + 1 for c in counts_t])]).astype(int)
    return Grid(tuple(ln.id for ln in lines), counts_t, float(dt), offsets, speeds, xs, zs)
