"""Grade lines along each line's profile, and the findings an engineer expects from a steady result.

Profile: the energy grade line (EGL) starts at the upstream node head less the entrance
loss, falls with friction and fittings in proportion to length (the model does not know
where along the line the fittings sit), loses the valve's loss at the valve's end, and ends
at the downstream node head plus the exit loss. The hydraulic grade line is
``HGL = EGL - alpha v^2/2g``, ``alpha`` the kinetic-energy coefficient of the velocity profile
(2 for laminar flow, 1 for turbulent, blended between, :func:`workbench.core.fittings.exit_k`),
so at an exit into a free surface or the air the HGL meets the head discharged into, and a
laminar line's extra velocity head is taken where the profile develops, at its upstream end;
gauge pressure ``p = rho g (HGL - z)``; absolute pressure adds the
site's atmospheric pressure (:attr:`System.atmospheric_pressure`).

Findings carry stable codes (``regime.laminar``, ``regime.transitional``,
``correlation.range``, ``profile.subatmospheric``, ``profile.vapor``,
``profile.vapor_unchecked``, ``velocity.high``, ``velocity.low``, ``drain.self_venting``,
``outlet.submergence``, ``line.closed``, ``line.drains_back``, ``line.isolated``,
``node.isolated``), the element
id, words a user can act on, a severity and a source ("common practice" where there is none).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from workbench.core.friction import (
    RE_LAMINAR,
    RE_TURBULENT,
    friction_colebrook,
    in_published_range,
)
from workbench.core.model import Finding, G, System

#: Margin above the vapour pressure at which column separation is flagged [Pa]
#: (common practice, no source: dissolved air comes out of solution before the liquid boils).
VAPOR_MARGIN_PA = 10_000.0
#: Mean velocity above which a line is flagged [m/s] (common practice, no source).
VELOCITY_HIGH = 3.0
#: Mean velocity below which a flowing line is flagged [m/s] (common practice, no source).
VELOCITY_LOW = 0.3
#: Froude number v/sqrt(gD) above which a drain leaving a tank is not self-venting [-].
SELF_VENTING_FROUDE = 0.3
SELF_VENTING_SOURCE = (
    "Simpson (1968), Chem. Eng.; Hills (1983), Chem. Eng. (both from memory); physical basis: "
    "Taylor-bubble rise velocity about 0.35 sqrt(gD) (Davies & Taylor 1950)"
)
SUBMERGENCE_SOURCE = "ANSI/HI 9.8 pump-intake rule S = D(1 + 2.3 Fr), applied to a tank outlet"
COMMON_PRACTICE = "common practice, no source"


@dataclass(frozen=True, eq=False)
class ProfileResult:
    """Grade lines and pressures along one line, at its profile points (from-end first)."""

    distance: np.ndarray
    """Distance from the from-end [m]."""
    elevation: np.ndarray
    """Centreline elevation [m]."""
    hgl: np.ndarray
    """Hydraulic grade line ``z + p/(rho g)`` [m] (gauge based)."""
    egl: np.ndarray
    """Energy grade line ``HGL + v^2/2g`` [m]."""
    pressure_gauge: np.ndarray
    """[Pa]"""
    pressure_abs: np.ndarray
    """[Pa]"""


def profile_points(system: System, line_id: str) -> tuple[np.ndarray, np.ndarray]:
    """Distances [m] and elevations [m] of a line's profile, with both ends included."""
    line = system.lines[line_id]
    z_from = system.node_elevation(line.from_node)
    z_to = system.node_elevation(line.to_node)
    if not line.profile:
        return np.array([0.0, line.length]), np.array([z_from, z_to])
    pts = sorted((float(s), float(z)) for s, z in line.profile)
    if pts[0][0] > 0.0:
        pts.insert(0, (0.0, z_from))
    if pts[-1][0] < line.length:
        pts.append((line.length, z_to))
    arr = np.array(pts)
    return arr[:, 0], arr[:, 1]


def line_profiles(system: System, line_ids, q: np.ndarray, head_from: np.ndarray,
                  head_to: np.ndarray, details: dict[str, np.ndarray],
                  status: list[str]) -> dict[str, ProfileResult]:
    """Grade lines and pressures along every line at flows ``q``, vectorised over all points.

    Parameters
    ----------
    system : System
    line_ids : sequence of str
        Line ids in the order of the arrays.
    q : ndarray
        Flow per line, positive from-end to to-end [m^3/s].
    head_from, head_to : ndarray
        Node heads at the two ends of each line [m]; ``nan`` when undetermined.
    details : dict of ndarray
        :meth:`workbench.core.line.LineSet.details` at ``q`` (losses [m], signed or not).
    status : list of str
        Per line ``"flowing"``, ``"closed"`` (valve shut) or ``"drains_back"`` (no flow,
        open to the air).

    Returns
    -------
    dict
        Line id -> :class:`ProfileResult`.
    """
    n = len(line_ids)
    lines = [system.lines[lid] for lid in line_ids]
    s_parts, z_parts = [], []
    for lid in line_ids:
        s_i, z_i = profile_points(system, lid)
        s_parts.append(s_i)
        z_parts.append(z_i)
    counts = np.array([len(x) for x in s_parts])
    idx = np.repeat(np.arange(n), counts)
    s = np.concatenate(s_parts) if n else np.zeros(0)
    z = np.concatenate(z_parts) if n else np.zeros(0)
    length = np.array([ln.length for ln in lines], dtype=float)
    q = np.asarray(q, dtype=float)
    stat = np.array(status, dtype=object)
    flowing = (stat == "flowing") & (q != 0.0)
    forward = q > 0.0
    vh = np.abs(details["velocity_head"])
    alpha = np.asarray(details["kinetic_energy_coefficient"], dtype=float)
    distributed = np.abs(details["friction_loss"]) + np.abs(details["fittings_loss"])
    valve = np.abs(details["valve_loss"])
    valve_from = np.array([ln.valve is not None and ln.valve.position == "from" for ln in lines])
    e_up = np.where(forward, head_from, head_to) - np.abs(details["entrance_loss"])
    # Every point lies downstream of a valve at the upstream end.
    valve_up = valve_from == forward
    s_flow = np.where(forward[idx], s, length[idx] - s)
    egl_flow = (e_up[idx] - distributed[idx] * np.clip(s_flow / length[idx], 0.0, 1.0)
                - np.where(valve_up, valve, 0.0)[idx])
    hgl_flow = egl_flow - (alpha * vh)[idx]
    # Static lines: each side of a shut valve stands at the head of its own end; a line
    # that drains back stands at the head of its far end from the discharge.
    to_receiver = np.array([ln.to_node in system.receivers for ln in lines])
    static = np.where(
        (stat == "closed") & valve_from, head_to,
        np.where((stat == "drains_back") & ~to_receiver, head_to, head_from))
    moving = flowing[idx]
    hgl = np.where(moving, hgl_flow, static[idx])
    egl = np.where(moving, egl_flow, static[idx])
    p = system.fluid.density * G * (hgl - z)
    # Above the standing liquid a drained-back line is open to the air.
    p = np.where((stat == "drains_back")[idx], np.maximum(p, 0.0), p)
    p_abs = p + system.atmospheric_pressure
    ends = np.cumsum(counts).tolist()
    starts = [0] + ends[:-1]
    arrays = (s, z, hgl, egl, p, p_abs)
    return {lid: ProfileResult(*(a[b:e] for a in arrays))
            for lid, b, e in zip(line_ids, starts, ends, strict=True)}


def _fmt(x: float, digits: int = 3) -> str:
    return f"{x:.{digits}g}"


def steady_findings(system: System, line_ids, details: dict[str, np.ndarray], q: np.ndarray,
                    status: list[str], profiles: dict[str, ProfileResult],
                    levels: dict[str, float], isolated: tuple[str, ...] = ()) -> list[Finding]:
    """The findings of a steady solution, in line order then node order.

    Parameters
    ----------
    system : System
    line_ids : sequence of str
        Line ids in the order of the arrays.
    details : dict of ndarray
        :meth:`workbench.core.line.LineSet.details` at the solution.
    q : ndarray
        Flows [m^3/s].
    status : list of str
        Per line ``"flowing"``, ``"closed"`` or ``"drains_back"``.
    profiles : dict
        :class:`ProfileResult` per line id.
    levels : dict
        Reservoir id -> level used [m above bottom].
    isolated : tuple of str
        Junctions left with no open path to a known head.
    """
    out: list[Finding] = []
    fluid = system.fluid
    p_vap = fluid.vapor_pressure
    n = len(line_ids)
    reynolds = np.asarray(details["reynolds"], dtype=float)
    speed = np.abs(np.asarray(details["velocity"], dtype=float))
    f_used = np.asarray(details["friction_factor"], dtype=float).tolist()
    re_list, v_list = reynolds.tolist(), speed.tolist()
    q_list = np.asarray(q, dtype=float).tolist()
    # Lowest gauge and absolute pressure along each profile, all lines at once.
    profs = [profiles.get(lid) for lid in line_ids]
    have = [p is not None for p in profs]
    p_min_g = [math.nan] * n
    s_min_g = [math.nan] * n
    p_min_a = [math.nan] * n
    s_min_a = [math.nan] * n
    z_min_g = [math.nan] * n
    if any(have):
        chosen = [p for p in profs if p is not None]
        counts = np.array([len(p.distance) for p in chosen])
        starts = np.concatenate([[0], np.cumsum(counts)[:-1]])
        pg = np.concatenate([p.pressure_gauge for p in chosen])
        pa = np.concatenate([p.pressure_abs for p in chosen])
        dist = np.concatenate([p.distance for p in chosen])
        elev = np.concatenate([p.elevation for p in chosen])
        owner = np.repeat(np.arange(len(chosen)), counts)
        for values, p_out, s_out, z_out in ((pg, p_min_g, s_min_g, z_min_g),
                                            (pa, p_min_a, s_min_a, None)):
            low = np.minimum.reduceat(values, starts)
            # First point reaching the minimum of its line.
            hit = np.flatnonzero(values == low[owner])
            first = np.full(len(chosen), -1)
            first[owner[hit][::-1]] = hit[::-1]
            k = 0
            for i in range(n):
                if have[i]:
                    j = first[k]
                    p_out[i] = float(low[k])
                    s_out[i] = float(dist[j]) if j >= 0 else math.nan
                    if z_out is not None:
                        z_out[i] = float(elev[j]) if j >= 0 else math.nan
                    k += 1
    for i, lid in enumerate(line_ids):
        line = system.lines[lid]
        st = status[i]
        if st == "closed":
            out.append(Finding("line.closed", lid, "the valve is shut: the line carries no flow",
                               "info", "model"))
        elif st == "isolated":
            out.append(Finding("line.isolated", lid,
                               "the line lies among junctions cut off from every known head by "
                               "shut valves: no flow, its pressures are undetermined",
                               "info", "model"))
        elif st == "drains_back":
            recv = line.to_node if line.to_node in system.receivers else line.from_node
            out.append(Finding(
                "line.drains_back", lid,
                f"the head upstream is below the open discharge {recv!r}, and air cannot push "
                "liquid back into the line: no flow; in practice the line stands part-full or "
                "drains back, so check the levels and the outlet elevation",
                "caution", "model (an open discharge cannot supply liquid)"))
        flowing = st == "flowing" and q_list[i] != 0.0
        re = re_list[i]
        v = v_list[i]
        fixed_f = line.friction_factor is not None
        if flowing and not fixed_f:
            if re <= RE_LAMINAR:
                out.append(Finding(
                    "regime.laminar", lid,
                    f"laminar flow (Re {_fmt(re)}): f = 64/Re; the exit loss is taken as 2 "
                    "velocity heads, the kinetic energy of a fully developed laminar profile",
                    "info", "Hagen-Poiseuille; laminar below Re about 2000 (common practice); "
                    "exit: kinetic-energy coefficient 2 of the Hagen-Poiseuille profile"))
            elif re < RE_TURBULENT:
                f_lam = 64.0 / re
                f_turb = float(friction_colebrook(re, line.roughness / line.diameter))
                out.append(Finding(
                    "regime.transitional", lid,
                    f"transitional flow (Re {_fmt(re, 4)}): friction is uncertain here; laminar "
                    f"branch f = {_fmt(f_lam, 4)}, turbulent (Colebrook) branch f = "
                    f"{_fmt(f_turb, 4)}; the result uses a smooth blend "
                    f"f = {_fmt(f_used[i], 4)}",
                    "caution", "regime limits 2000 and 4000, common practice; Colebrook (1939)"))
            rr = line.roughness / line.diameter
            if re >= RE_TURBULENT and not in_published_range("colebrook", re, rr):
                out.append(Finding(
                    "correlation.range", lid,
                    f"Re {_fmt(re)} or relative roughness {_fmt(rr)} lies outside the range of "
                    "the Colebrook correlation (Re 4000 to 1e8, eps/D up to 0.05): treat the "
                    "friction factor as an extrapolation",
                    "caution", "Moody (1944) chart range (from memory)"))
        if flowing:
            if v > VELOCITY_HIGH:
                out.append(Finding(
                    "velocity.high", lid,
                    f"velocity {_fmt(v)} m/s is above {VELOCITY_HIGH:g} m/s: erosion, noise and "
                    "larger surge on closure",
                    "caution", COMMON_PRACTICE))
            elif v < VELOCITY_LOW:
                out.append(Finding(
                    "velocity.low", lid,
                    f"velocity {_fmt(v)} m/s is below {VELOCITY_LOW:g} m/s: solids may settle and "
                    "gas may collect at high points",
                    "info", COMMON_PRACTICE))
        if have[i] and st != "drains_back" and math.isfinite(p_min_g[i]):
            if p_min_g[i] < 0.0:
                out.append(Finding(
                    "profile.subatmospheric", lid,
                    f"pressure falls to {_fmt(p_min_g[i] / 1000.0)} kPa gauge at "
                    f"{_fmt(s_min_g[i])} m from {line.from_node!r} (elevation "
                    f"{_fmt(z_min_g[i], 4)} m): air can be drawn in at joints, and thin-walled "
                    "or plastic pipe can collapse; check the pipe's vacuum rating",
                    "caution", "grade line from the solution; common practice"))
            if p_vap is not None and p_min_a[i] <= p_vap + VAPOR_MARGIN_PA:
                out.append(Finding(
                    "profile.vapor", lid,
                    f"absolute pressure {_fmt(p_min_a[i] / 1000.0)} kPa at {_fmt(s_min_a[i])} m "
                    f"is within {VAPOR_MARGIN_PA / 1000:g} kPa of the vapour pressure "
                    f"({_fmt(p_vap / 1000.0)} kPa): the liquid column separates (siphon "
                    "break), so the full-bore flow computed is not physically possible; "
                    "lower the crest or raise the downstream pressure",
                    "danger", f"vapour pressure of the fluid; margin {VAPOR_MARGIN_PA:g} Pa, "
                    "common practice"))
        if flowing:
            out.extend(_outlet_findings(system, lid, q_list[i], v, levels))
    if p_vap is None:
        out.append(Finding(
            "profile.vapor_unchecked", "fluid",
            f"the fluid {fluid.name!r} has no vapour pressure: column separation was not checked",
            "info", "model"))
    for jid in isolated:
        out.append(Finding(
            "node.isolated", jid,
            "every line at this junction is shut or carries no flow, so its head is "
            "undetermined (trapped liquid); it is reported without a value",
            "caution", "model"))
    return out


def _outlet_findings(system: System, lid: str, q: float, v: float,
                     levels: dict[str, float]) -> list[Finding]:
    """Self-venting and submergence checks where the flow leaves a reservoir into ``lid``."""
    line = system.lines[lid]
    out: list[Finding] = []
    if q > 0.0:
        source, downward_end = line.from_node, 1
    else:
        source, downward_end = line.to_node, -1
    if source not in system.reservoirs:
        return out
    res = system.reservoirs[source]
    d = line.diameter
    fr = v / np.sqrt(G * d)
    s, z = profile_points(system, lid)
    z_next = z[1] if downward_end == 1 else z[-2]
    z_out = res.bottom_elevation
    if z_next < z_out and fr > SELF_VENTING_FROUDE:
        far_end = line.to_node if q > 0.0 else line.from_node
        to_air = (far_end in system.receivers
                  and system.receivers[far_end].kind == "open_discharge")
        out.append(Finding(
            "drain.self_venting", lid,
            f"Froude number {_fmt(fr)} at the outlet of {source!r} is above about "
            f"{SELF_VENTING_FROUDE:g}: the line is not self-venting; if the tank draws down "
            "to the outlet or air gets in, gas is carried down and the flow can surge or "
            "pulse; vent the line or size it for a lower Froude number",
            # A drain to the air takes in air as the tank empties; a flooded line less so.
            "caution" if to_air else "info", SELF_VENTING_SOURCE))
    level = levels.get(source, res.level)
    s_req = d * (1.0 + 2.3 * fr)
    if level < s_req:
        out.append(Finding(
            "outlet.submergence", lid,
            f"liquid depth {_fmt(level)} m over the outlet of {source!r} is below the "
            f"{_fmt(s_req)} m a vortex-prevention rule asks for (S = D(1 + 2.3 Fr), Fr "
            f"{_fmt(fr)}): air can be drawn in by a vortex",
            "caution", SUBMERGENCE_SOURCE))
    return out
