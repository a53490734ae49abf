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

from workbench.core.finding_text import finding
from workbench.core.friction import (
    RE_LAMINAR,
    RE_TURBULENT,
    friction_colebrook,
    in_published_range,
)
from workbench.core.model import Finding, G, System

#: Margin above the vapour pressure at which a point is flagged as near it [Pa]
#: (common practice, no source: dissolved air comes out of solution before the liquid boils).
VAPOR_MARGIN_PA = 10_000.0
#: Head below atmospheric [m of liquid] that a point must reach to be reported as
#: sub-atmospheric, and the band around the vapour pressure read as "at" it. Below it a
#: gauge pressure is round-off, not a finding: the steady heads are differences of node
#: heads of tens of metres (double round-off about 1e-14 m, seen as -1.2e-13 kPa at open
#: discharges), a rigid-column run integrates heads to its relative tolerance (seen as
#: -7 Pa, 0.7 mm, at a discharge), and a project file's elevations are given to the
#: centimetre at best. 1 cm of water is about 98 Pa.
SUBATMOSPHERIC_TOLERANCE_M = 0.01
#: Laminar flow changes in a rigid-column run: the model lumps the velocity profile into one
#: column, while the exact start-up of laminar pipe flow (Szymanski 1932) develops the
#: profile from the wall; computed from the exact series (tests/core/test_laminar_caution.py)
#: the exact flow reaches 63 / 90 / 99 % of its final value 1.32 / 1.36 / 1.37 times later.
LAMINAR_TRANSIENT_CAUTION = (
    "the rigid-column model moves a laminar line's liquid as one column; the exact start-up "
    "of laminar pipe flow reaches 90 % of its final flow about 1.36 times later (99 %: 1.37 "
    "times), so laminar flow changes here are up to about a third too fast")
#: Mean velocity above which a line is flagged [m/s] (common practice, no source).
VELOCITY_HIGH = 3.0
#: Mean velocity below which a flowing line is flagged [m/s] (common practice, no source).
VELOCITY_LOW = 0.3
#: Froude number v/sqrt(gD) above which a drain leaving a tank is not self-venting [-].
SELF_VENTING_FROUDE = 0.3
SELF_VENTING_SOURCE = (
    "Simpson (1968), Chem. Eng.; Hills (1983), Chem. Eng.; physical basis: "
    "Taylor-bubble rise velocity about 0.35 sqrt(gD) (Davies & Taylor 1950)"
)
SUBMERGENCE_SOURCE = "ANSI/HI 9.8 pump-intake rule S = D(1 + 2.3 Fr), applied to a tank outlet"
#: What a user reads as the source of a limit that is the trade's rule with no publication.
RULE_OF_THUMB = "rule of thumb"


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
        Per line ``"flowing"``, ``"siphon_break"`` (flowing, capped; the caller redraws the
        leg beyond the parting point), ``"closed"`` (valve shut) or ``"drains_back"`` (no
        flow, open to the air).

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
    flowing = ((stat == "flowing") | (stat == "siphon_break")) & (q != 0.0)
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


@dataclass(frozen=True)
class _LowPoint:
    """The lowest gauge and absolute pressure along one line's profile (nan: no profile)."""

    gauge: float = math.nan
    """[Pa]"""
    gauge_at: float = math.nan
    """Distance from the from-end [m]."""
    gauge_elevation: float = math.nan
    """[m]"""
    absolute: float = math.nan
    """[Pa]"""
    absolute_at: float = math.nan
    """[m]"""
    absolute_elevation: float = math.nan
    """[m]"""


def profile_low_points(line_ids, profiles: dict[str, ProfileResult]) -> list[_LowPoint]:
    """The first point of lowest gauge and of lowest absolute pressure of each line."""
    out = []
    for lid in line_ids:
        prof = profiles.get(lid)
        if prof is None or not len(prof.distance):
            out.append(_LowPoint())
            continue
        jg = int(np.argmin(prof.pressure_gauge))
        ja = int(np.argmin(prof.pressure_abs))
        out.append(_LowPoint(
            float(prof.pressure_gauge[jg]), float(prof.distance[jg]), float(prof.elevation[jg]),
            float(prof.pressure_abs[ja]), float(prof.distance[ja]), float(prof.elevation[ja])))
    return out


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
        Per line ``"flowing"``, ``"closed"``, ``"drains_back"``, ``"isolated"`` or
        ``"siphon_break"``.
    profiles : dict
        :class:`ProfileResult` per line id.
    levels : dict
        Reservoir id -> level used [m above bottom].
    isolated : tuple of str
        Junctions left with no open path to a known head.
    """
    out: list[Finding] = []
    reynolds = np.asarray(details["reynolds"], dtype=float).tolist()
    speed = np.abs(np.asarray(details["velocity"], dtype=float)).tolist()
    f_used = np.asarray(details["friction_factor"], dtype=float).tolist()
    q_list = np.asarray(q, dtype=float).tolist()
    lows = profile_low_points(line_ids, profiles)
    for i, lid in enumerate(line_ids):
        st = status[i]
        out.extend(_status_findings(system, lid, st))
        flowing = st in ("flowing", "siphon_break") and q_list[i] != 0.0
        if flowing:
            out.extend(_regime_findings(system, lid, reynolds[i], f_used[i]))
            out.extend(_velocity_findings(lid, speed[i]))
            out.extend(_reverse_findings(system, lid, q_list[i]))
        if st != "drains_back":
            out.extend(pressure_findings(system, lid, lows[i]))
        if flowing:
            out.extend(_outlet_findings(system, lid, q_list[i], speed[i], levels))
    if system.fluid.vapor_pressure is None:
        out.append(Finding(
            "profile.vapor_unchecked", "fluid",
            f"the fluid {system.fluid.name!r} has no vapour pressure: column separation was "
            "not checked", "info", "model"))
    for jid in isolated:
        out.append(Finding(
            "node.isolated", jid,
            "every line at this junction is shut or carries no flow, so its head is "
            "undetermined (trapped liquid); it is reported without a value",
            "caution", "model"))
    return out


def _status_findings(system: System, lid: str, st: str) -> list[Finding]:
    """Why a line carries no flow: shut, cut off, or running back from an open discharge."""
    line = system.lines[lid]
    if st == "closed":
        return [Finding("line.closed", lid, "the valve is shut: the line carries no flow",
                        "info", "model")]
    if st == "isolated":
        return [Finding("line.isolated", lid,
                        "the line lies among junctions cut off from every known head by shut "
                        "valves: no flow, its pressures are undetermined", "info", "model")]
    if st == "drains_back":
        recv = line.to_node if line.to_node in system.receivers else line.from_node
        return [Finding(
            "line.drains_back", lid,
            f"the head upstream is below the open discharge {recv!r}, and air cannot push "
            "liquid back into the line: no flow; in practice the line stands part-full or "
            "drains back, so check the levels and the outlet elevation",
            "caution", "model (an open discharge cannot supply liquid)")]
    return []


def _regime_findings(system: System, lid: str, re: float, f_used: float) -> list[Finding]:
    """Laminar and transitional flow, and a turbulent point outside Colebrook's range."""
    line = system.lines[lid]
    if line.friction_factor is not None:
        return []
    out = []
    if re <= RE_LAMINAR:
        out.append(Finding(
            "regime.laminar", lid,
            f"laminar flow (Re {_fmt(re)}): f = 64/Re; the exit loss is taken as 2 "
            "velocity heads, the kinetic energy of a fully developed laminar profile",
            "info", "Hagen-Poiseuille; laminar below Re about 2000 (rule of thumb); "
            "exit: kinetic-energy coefficient 2 of the Hagen-Poiseuille profile"))
    elif re < RE_TURBULENT:
        f_turb = float(friction_colebrook(re, line.roughness / line.diameter))
        out.append(Finding(
            "regime.transitional", lid,
            f"transitional flow (Re {_fmt(re, 4)}): friction is uncertain here; laminar "
            f"branch f = {_fmt(64.0 / re, 4)}, turbulent (Colebrook) branch f = "
            f"{_fmt(f_turb, 4)}; the result uses a smooth blend f = {_fmt(f_used, 4)}",
            "caution", "regime limits Re 2000 and 4000 (rule of thumb); Colebrook (1939)"))
    rr = line.roughness / line.diameter
    if re >= RE_TURBULENT and not in_published_range("colebrook", re, rr):
        out.append(Finding(
            "correlation.range", lid,
            f"Re {_fmt(re)} or relative roughness {_fmt(rr)} lies outside the range of "
            "the Colebrook correlation (Re 4000 to 1e8, eps/D up to 0.05): treat the "
            "friction factor as an extrapolation",
            "caution", "range of the Moody (1944) chart, Trans. ASME 66"))
    return out


def _velocity_findings(lid: str, v: float) -> list[Finding]:
    """Mean velocity outside the usual band for process lines."""
    if v > VELOCITY_HIGH:
        return [finding(
            "velocity.high", lid,
            "velocity {v} is above {limit}: erosion, noise and larger surge on closure",
            "caution", RULE_OF_THUMB, v=(v, "velocity"), limit=(VELOCITY_HIGH, "velocity"))]
    if v < VELOCITY_LOW:
        return [finding(
            "velocity.low", lid,
            "velocity {v} is below {limit}: solids may settle and gas may collect at high "
            "points", "info", RULE_OF_THUMB, v=(v, "velocity"), limit=(VELOCITY_LOW, "velocity"))]
    return []


def _reverse_findings(system: System, lid: str, q: float) -> list[Finding]:
    """``flow.reverse``: the line runs from its ``to`` end to its ``from`` end."""
    if q >= 0.0:
        return []
    line = system.lines[lid]
    return [finding(
        "flow.reverse", lid,
        f"the line runs backwards, from {line.to_node!r} to {line.from_node!r} ({{q}}): "
        f"{reverse_cause(system, line.from_node, line.to_node)}; check that this is meant "
        "(a check valve, a level or a vessel pressure)",
        "caution", "energy equation of the solution", q=(abs(q), "flow"))]


def reverse_cause(system: System, from_node: str, to_node: str) -> str:
    """Words naming why the head at ``to_node`` stands above that at ``from_node``."""
    def what(nid: str) -> str:
        if nid in system.receivers:
            rec = system.receivers[nid]
            if rec.kind == "vessel":
                return f"the pressure in vessel {nid!r}"
            return f"the open discharge {nid!r}"
        if nid in system.reservoirs:
            res = system.reservoirs[nid]
            word = "tank" if res.kind == "tank" else "reservoir"
            if res.surface_pressure:
                return f"the level and gas pressure of {word} {nid!r}"
            return f"the level of {word} {nid!r}"
        return f"the network beyond junction {nid!r}"

    return f"{what(to_node)} holds a higher head than {what(from_node)}"


def pressure_findings(system: System, lid: str, low: _LowPoint) -> list[Finding]:
    """``profile.subatmospheric`` and ``profile.vapor`` from a line's lowest pressures.

    A point is sub-atmospheric only when its gauge pressure is below minus
    :data:`SUBATMOSPHERIC_TOLERANCE_M` of liquid head: less than that is round-off of the
    heads (see the constant). The vapour check words the case: *near* (within
    :data:`VAPOR_MARGIN_PA` above), *at* (within the same head tolerance), *below* the
    vapour pressure, and *below absolute zero* (impossible: the column parts first).
    """
    out: list[Finding] = []
    line = system.lines[lid]
    rho_g = system.fluid.density * G
    tol = rho_g * SUBATMOSPHERIC_TOLERANCE_M
    if math.isfinite(low.gauge) and low.gauge < -tol:
        out.append(finding(
            "profile.subatmospheric", lid,
            f"pressure falls to {{p}} gauge at {{s}} from {line.from_node!r} (elevation "
            "{z}): air can be drawn in at joints, and thin-walled or plastic pipe can "
            "collapse; check the pipe's vacuum rating",
            "caution", "grade line from the solution",
            p=(low.gauge, "pressure"), s=(low.gauge_at, "length"),
            z=(low.gauge_elevation, "elevation", 4)))
    p_vap = system.fluid.vapor_pressure
    if p_vap is not None and math.isfinite(low.absolute):
        vapour = vapour_finding(lid, low.absolute, low.absolute_at, p_vap, tol,
                                system.atmospheric_pressure, rho_g)
        if vapour is not None:
            out.append(vapour)
    return out


def vapour_finding(lid: str, p_abs: float, at: float, p_vap: float, tol: float,
                   p_atm: float, rho_g: float, when: str = "") -> Finding | None:
    """The ``profile.vapor`` finding for a lowest absolute pressure ``p_abs`` [Pa] at ``at``
    [m], or ``None`` when it stays more than :data:`VAPOR_MARGIN_PA` above ``p_vap``.

    Never prints a pressure below the vapour pressure: below it the liquid cannot stand, so
    the message gives the shortfall in head instead (and names absolute zero when the
    computed grade line falls below even that).
    """
    source = "vapour pressure of the liquid; the margin for dissolved air is a rule of thumb"
    vals = dict(s=(at, "length"), pv=(p_vap, "pressure_abs"))
    if p_abs > p_vap + VAPOR_MARGIN_PA:
        return None
    if p_abs > p_vap + tol:
        return finding(
            "profile.vapor", lid,
            "absolute pressure {p} at {s}" + when + " is within {margin} of the vapour "
            "pressure ({pv}): dissolved air comes out of solution and the column can part; "
            "keep a margin (lower the crest, or raise the downstream pressure)",
            "caution", source, p=(p_abs, "pressure_abs"), margin=(VAPOR_MARGIN_PA, "pressure"),
            **vals)
    if p_abs >= p_vap - tol:
        return finding(
            "profile.vapor", lid,
            "the pressure at {s}" + when + " is at the vapour pressure ({pv}): the liquid "
            "column parts there (siphon break) and the line cannot pass more than it does; "
            "lower the crest or raise the downstream pressure",
            "danger", source, **vals)
    below = "below absolute zero" if p_abs < 0.0 else "below the vapour pressure"
    return finding(
        "profile.vapor", lid,
        "the computed grade line at {s}" + when + f" falls {{short}} {below} "
        "(vapour pressure {pv}): impossible, the liquid column parts there first (siphon "
        "break), so the full-bore flow computed cannot happen; lower the crest or raise "
        "the downstream pressure",
        "danger", source, short=((p_vap - p_abs) / rho_g, "head"), **vals)


def _outlet_findings(system: System, lid: str, q: float, v: float,
                     levels: dict[str, float]) -> list[Finding]:
    """Self-venting and submergence checks where the flow leaves a reservoir into ``lid``.

    Self-venting is judged only where the level can fall to the outlet: a tank, not a
    constant-level reservoir (whose level is held by definition).
    """
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
    if res.kind == "tank" and z_next < z_out and fr > SELF_VENTING_FROUDE:
        far_end = line.to_node if q > 0.0 else line.from_node
        to_air = (far_end in system.receivers
                  and system.receivers[far_end].kind == "open_discharge")
        out.append(Finding(
            "drain.self_venting", lid,
            f"Froude number {_fmt(fr)} at the outlet of {source!r} is above about "
            f"{SELF_VENTING_FROUDE:g}: the line is not self-venting; as the tank draws down "
            "to the outlet, or if air gets in, gas is carried down and the flow can surge or "
            "pulse; vent the line or size it for a lower Froude number",
            # A drain to the air takes in air as the tank empties; a flooded line less so.
            "caution" if to_air else "info", SELF_VENTING_SOURCE))
    level = levels.get(source, res.level)
    s_req = d * (1.0 + 2.3 * fr)
    if level < s_req:
        out.append(finding(
            "outlet.submergence", lid,
            f"liquid depth {{level}} over the outlet of {source!r} is below the {{need}} a "
            f"vortex-prevention rule asks for (S = D(1 + 2.3 Fr), Fr {_fmt(fr)}): air can be "
            "drawn in by a vortex",
            "caution", SUBMERGENCE_SOURCE, level=(level, "length"), need=(s_req, "length")))
    return out
