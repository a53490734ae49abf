r"""Siphon break in a run: a line's column parts at a high point and the leg up to it lifts what it can.

A line between two fixed heads (no junction at either end) whose interior profile point
reaches the vapour pressure of the liquid breaks there (event ``line.siphon_break``, with
when, where and the source level). From then on the line's equation is that of the leg up
to the parting point, ending at the fixed head of a vapour cavity,

.. math::

    \frac{\rho\,s_c}{A}\,\frac{dQ}{dt} = \rho g\,\bigl(H_{up} - H_c - h_{up}(Q)\bigr),
    \qquad H_c = z_c + \frac{p_v - p_{atm}}{\rho g}

(``s_c`` the leg's length, ``h_up`` its losses: the entrance, the kinetic energy carried
into the cavity, ``alpha v^2/2g``, and the share ``s_c/L`` of the line's friction,
fittings and valve, spread in proportion to length as in the grade line), the rigid-column
momentum balance of the rising leg (see :mod:`workbench.core.siphon` for the steady form).
The leg beyond runs part-full. When the flow falls to zero (the source head reaches
``H_c``: nothing can be lifted) the line stops (``line.siphon_stop``, the tank keeps its
level); if the source head rises above ``H_c`` again (a feed) it restarts from rest
(``line.siphon_restart``). Once broken, a line stays in this mode for the rest of the run
(a cavity that refills to full bore is not modelled).
"""

from __future__ import annotations

import numpy as np

from workbench.core.finding_text import KeptText, finding, slots
from workbench.core.fittings import exit_k
from workbench.core.model import G


class SiphonLines:
    """Which lines can break and where their interior profile points are."""

    def __init__(self, model):
        from workbench.core.siphon import break_pressures

        system = model.system
        self.p_vap = system.fluid.vapor_pressure
        # absolute pressure at which each station's column parts: vapour pressure, or
        # atmospheric at an air valve (nan: never)
        self.p_break = np.full(len(model.st_frac), np.nan)
        for i, lid in enumerate(model.topo.line_ids):
            mine = model.st_owner == i
            dist = model.st_frac[mine] * system.lines[lid].length
            self.p_break[mine] = break_pressures(system, lid, dist)
        between_fixed = ~model.from_junction & ~model.to_junction
        interior = (model.st_frac > 0.0) & (model.st_frac < 1.0) & ~np.isnan(self.p_break)
        has_interior = np.bincount(model.st_owner, weights=interior.astype(float),
                                   minlength=model.nl) > 0
        self.candidate = between_fixed & has_interior
        self.stations = interior & self.candidate[model.st_owner]
        self.any = bool(self.candidate.any())


def lines_of(model) -> SiphonLines:
    """The model's :class:`SiphonLines`, built once."""
    found = getattr(model, "_siphon_lines", None)
    if found is None:
        found = SiphonLines(model)
        model._siphon_lines = found
    return found


def station_margins(eq, t: float, y: np.ndarray):
    """Absolute pressure less the vapour pressure at every station [Pa] (``inf`` where a
    line cannot break), with a full-bore grade line."""
    from workbench.core.transient.line_ends import line_end_heads

    model = eq.model
    sl = lines_of(model)
    out = np.full(len(model.st_frac), np.inf)
    if not sl.any:
        return out
    nl = model.nl
    q = y[:nl]
    h_nodes = eq.heads(t, y)
    qdot = eq.rhs(t, y)[:nl] if model.valve_lines.size else np.zeros(nl)
    h_a, h_b = line_end_heads(model, q, qdot, h_nodes[model.topo.line_from],
                              h_nodes[model.topo.line_to])
    o = model.st_owner
    h_st = h_a[o] + model.st_frac * (h_b[o] - h_a[o])
    p_abs = model.rho * G * (h_st - model.st_elev) + model.system.atmospheric_pressure
    return np.where(sl.stations, p_abs - np.nan_to_num(sl.p_break, nan=0.0), np.inf)


def crest_margins(eq, t: float, y: np.ndarray) -> np.ndarray:
    """Per line, the lowest margin above vapour pressure of its interior points [Pa]."""
    model = eq.model
    out = np.full(model.nl, np.inf)
    if lines_of(model).any:
        np.minimum.at(out, model.st_owner, station_margins(eq, t, y))
    return np.where(np.isfinite(out), out, 1e12)


def source_head(model, state, hf: np.ndarray, i: int) -> float:
    """Head of the node line ``i`` draws from while broken [m]."""
    topo = model.topo
    node = topo.line_from[i] if state.siphon_sign[i] > 0 else topo.line_to[i]
    return float(hf[node - topo.n_junctions])


def restart_values(model, state, hf: np.ndarray) -> np.ndarray:
    """Per line, how far the source head stands above the cavity head [m] (0 elsewhere)."""
    out = np.zeros(model.nl)
    for i in np.flatnonzero(state.siphon_stopped):
        out[i] = source_head(model, state, hf, i) - state.siphon_head[i]
    return out


def broken_losses(model, state, q: np.ndarray, hf: np.ndarray, h: np.ndarray,
                  dh: np.ndarray):
    """``h`` and ``dh`` with every broken line's entries replaced so that the line's
    equation is that of its rising leg ending at the cavity head (module docstring)."""
    lines = model.lines
    h, dh = h.copy(), dh.copy()
    fth = model.ft @ hf
    for i in np.flatnonzero(state.siphon_broken & ~state.siphon_stopped):
        s = state.siphon_sign[i]
        frac = state.siphon_frac[i]
        leg = frac if s > 0 else 1.0 - frac
        v = q[i] / lines.area[i]
        nu = np.broadcast_to(lines.kinematic_viscosity, (model.nl,))[i]
        alpha, _ = exit_k(np.array([abs(v) * lines.diameter[i] / nu]))
        k_end = float(model.entrance_k[i] + alpha[0])
        vh = v * abs(v) / (2.0 * G)
        h_up = k_end * vh + leg * (h[i] - k_end * vh)
        dh_end = k_end * abs(v) / (G * lines.area[i])
        dh_up = dh_end + leg * max(dh[i] - dh_end, 0.0)
        g = s * (state.siphon_head[i] - source_head(model, state, hf, i)) + h_up
        h[i] = g / leg - fth[i]
        dh[i] = dh_up / leg
    return h, dh


def broken_pressures(model, state, p: np.ndarray, h_a: np.ndarray, h_b: np.ndarray):
    """Station pressures [Pa] of broken lines: the rising leg's grade line up to the cavity,
    beyond it the grade line back from the outlet at the same gradient, never below the
    cavity's pressure (part-full)."""
    o = model.st_owner
    p = p.copy()
    rho_g = model.rho * G
    for i in np.flatnonzero(state.siphon_broken & ~state.siphon_stopped):
        mine = o == i
        frac = model.st_frac[mine]
        z = model.st_elev[mine]
        fc, hc = state.siphon_frac[i], state.siphon_head[i]
        if state.siphon_sign[i] > 0:
            up, start, end = frac <= fc, h_a[i], h_b[i]
            dist_up, dist_down = frac, 1.0 - frac
            leg = fc
        else:
            up, start, end = frac >= fc, h_b[i], h_a[i]
            dist_up, dist_down = 1.0 - frac, frac
            leg = 1.0 - fc
        grad = (start - hc) / leg if leg > 0.0 else 0.0
        h_up = start - grad * dist_up
        h_back = end + grad * dist_down
        p_cav = rho_g * (hc - z)
        p[mine] = np.where(up, rho_g * (h_up - z), np.maximum(rho_g * (h_back - z), p_cav))
    return p


def source_level(model, state, i: int, y: np.ndarray) -> tuple[str, dict]:
    """`` with the level of tank X at {level}`` and its value, for the tank line ``i``
    draws from (``("", {})`` if it draws from no tank)."""
    topo = model.topo
    node = topo.line_from[i] if state.siphon_sign[i] > 0 else topo.line_to[i]
    nid = topo.node_ids[node]
    if nid not in model.tank_ids:
        return "", {}
    k = model.tank_ids.index(nid)
    level = float(model.tank_levels(y[model.nl:model.nl + model.nt])[k])
    return f" with the level of tank {nid} at {{level}}", {"level": (level, "length", 4)}


def on_break(eq, state, i: int, t: float, y: np.ndarray) -> None:
    """Line ``i``'s column parts at ``t``: switch it to its rising leg and list the event."""
    model = eq.model
    lid = model.topo.line_ids[i]
    margins = station_margins(eq, t, y)
    mine = np.flatnonzero(model.st_owner == i)
    j = mine[int(np.argmin(margins[mine]))]
    line = model.system.lines[lid]
    sl = lines_of(model)
    state.siphon_sign[i] = 1.0 if y[i] >= 0.0 else -1.0
    state.siphon_broken[i] = True
    state.siphon_frac[i] = model.st_frac[j]
    p_b = float(sl.p_break[j])
    state.siphon_head[i] = model.st_elev[j] + (
        p_b - model.system.atmospheric_pressure) / (model.rho * G)
    text, vals = source_level(model, state, i, y)
    reason = ("the pressure falls below atmospheric and the air valve there lets air in"
              if p_b == model.system.atmospheric_pressure and line.air_valves
              else "the pressure reaches the vapour pressure")
    state.event(t, "line.siphon_break", lid, *slots(
        f"the liquid column in line {lid} parts {{s}} from {line.from_node!r} (elevation "
        f"{{z}}), where {reason}{text}: from here the line "
        "passes only what the leg up to that point can lift, and the leg beyond runs "
        "part-full", s=(model.st_frac[j] * line.length, "length", 4),
        z=(model.st_elev[j], "elevation", 4), **vals))


def on_stop(model, state, i: int, t: float, y: np.ndarray) -> None:
    """A broken line's flow fell to zero: nothing more can be lifted over the high point."""
    lid = model.topo.line_ids[i]
    state.siphon_stopped[i] = True
    text, vals = source_level(model, state, i, y)
    state.event(t, "line.siphon_stop", lid, *slots(
        f"the flow in line {lid} stops{text}: the source has fallen to the height the liquid "
        "can be lifted over the high point (head {head})",
        head=(state.siphon_head[i], "head", 4), **vals))


def on_restart(model, state, i: int, t: float, y: np.ndarray) -> None:
    """The source rose above the cavity head again: the line restarts from rest."""
    lid = model.topo.line_ids[i]
    state.siphon_stopped[i] = False
    text, vals = source_level(model, state, i, y)
    state.event(t, "line.siphon_restart", lid, *slots(
        f"the source of line {lid} rises above the head the high point needs{text}: the "
        "line restarts", **vals))


def start_broken(model, state, breaks: dict, y: np.ndarray) -> None:
    """Lines the steady start found broken (``SteadyResult.siphon_breaks``): broken from
    t = 0, stopped when nothing can be lifted."""
    for lid, brk in breaks.items():
        i = model.topo.line_ids.index(lid)
        line = model.system.lines[lid]
        state.siphon_broken[i] = True
        state.siphon_sign[i] = -1.0 if y[i] < 0.0 else 1.0
        state.siphon_frac[i] = brk.distance / line.length
        state.siphon_head[i] = brk.stop_head
        text, vals = source_level(model, state, i, y)
        state.event(0.0, "line.siphon_break", lid, *slots(
            f"the liquid column in line {lid} is parted from the start, {{s}} from "
            f"{line.from_node!r} (elevation {{z}}), where the pressure is at the vapour "
            f"pressure{text}: the line passes only what the leg up to that point can lift",
            s=(brk.distance, "length", 4), z=(brk.elevation, "elevation", 4), **vals))
        if brk.flow == 0.0:
            on_stop(model, state, i, 0.0, y)


def siphon_findings(model, state, levels: np.ndarray):
    """``line.siphon_break`` (danger) per line that broke, and per tank a drain note
    (``tank id -> words``) where a stopped siphon keeps it from draining.

    ``levels`` are the tank levels at the end of the run [m] (tanks x times, last column).
    """
    findings, notes = [], {}
    for i, lid in enumerate(model.topo.line_ids):
        if not state.siphon_broken[i]:
            continue
        first = next(e for e in state.events if e.code == "line.siphon_break" and e.element == lid)
        stop = next((e for e in state.events if e.code == "line.siphon_stop"
                     and e.element == lid), None)
        topo = model.topo
        node = topo.line_from[i] if state.siphon_sign[i] > 0 else topo.line_to[i]
        nid = topo.node_ids[node]
        after, vals = "", {name: (v, kind, d) for name, v, kind, d in first.values}
        if stop is not None and nid in model.tank_ids and nid not in state.drain_times:
            k = model.tank_ids.index(nid)
            level = float(levels[k, -1]) if levels.size else float("nan")
            notes[nid] = KeptText(f"does not drain: the siphon over line {lid} breaks and "
                                  "stops at level {level}", level=(level, "length", 4))
            after = (f"; tank {nid} does not drain: the siphon over line {lid} breaks and "
                     f"stops at level {{stop_level}} (t = {stop.time:.4g} s)")
            vals["stop_level"] = (level, "length", 4)
        findings.append(finding(
            "line.siphon_break", lid,
            f"at t = {first.time:.4g} s {first.template or first.message}{after}. A siphon "
            "that breaks is not a surge matter, but the flows and times after the break are "
            "those of a part-full leg; lower the high point, or vent it only where air may "
            "enter safely",
            "danger", "energy equation of the rising leg with its high point at the vapour "
            "pressure (rigid column)", **vals))
    return findings, notes
