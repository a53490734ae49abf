"""Grade lines along each line's profile, and the findings an engineer expects from a steady result.

Profile: the energy grade line (EGL) starts at the upstream node head less the entrance
loss, falls with friction and fittings in proportion to length (the model does not know
where along the line the fittings sit), loses the valve's loss at the valve's end, and ends
at the downstream node head plus the exit loss. The hydraulic grade line is
``HGL = EGL - v^2/2g``; gauge pressure ``p = rho g (HGL - z)``; absolute pressure adds the
site's atmospheric pressure (:attr:`System.atmospheric_pressure`).

Findings carry stable codes (``regime.laminar``, ``regime.transitional``,
``correlation.range``, ``profile.subatmospheric``, ``profile.vapor``,
``profile.vapor_unchecked``, ``velocity.high``, ``velocity.low``, ``drain.self_venting``,
``outlet.submergence``, ``line.closed``, ``line.drains_back``, ``node.isolated``), the element
id, words a user can act on, a severity and a source ("common practice" where there is none).
"""

from __future__ import annotations

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


def line_profile(system: System, line_id: str, q: float, head_from: float, head_to: float,
                 losses: dict[str, float], status: str = "flowing") -> ProfileResult:
    """Grade lines and pressures along one line at flow ``q``.

    Parameters
    ----------
    system : System
    line_id : str
    q : float
        Flow, positive from-end to to-end [m^3/s].
    head_from, head_to : float
        Node heads at the two ends [m]; ``nan`` when undetermined.
    losses : dict
        Magnitudes [m] of ``entrance_loss``, ``exit_loss``, ``valve_loss``,
        ``friction_loss``, ``fittings_loss`` and ``velocity_head`` for this line.
    status : str
        ``"flowing"``, ``"closed"`` (valve shut) or ``"drains_back"`` (no flow, open to air).
    """
    line = system.lines[line_id]
    rho = system.fluid.density
    s, z = profile_points(system, line_id)
    length = line.length
    if status != "flowing" or q == 0.0:
        # Static: each side of a shut valve stands at the head of its own end.
        if status == "closed" and line.valve is not None and line.valve.position == "from":
            static = head_to
        elif status == "drains_back":
            static = head_from if system.node_kind(line.to_node) == "receiver" else head_to
        else:
            static = head_from
        hgl = np.full(s.shape, static)
        egl = hgl.copy()
        p = rho * G * (hgl - z)
        if status == "drains_back":
            p = np.maximum(p, 0.0)  # above the standing liquid the line is open to the air
    else:
        vh = abs(losses["velocity_head"])
        distributed = abs(losses["friction_loss"]) + abs(losses["fittings_loss"])
        valve = abs(losses["valve_loss"])
        forward = q > 0.0
        s_flow = s if forward else length - s  # distance along the flow
        e_up = (head_from if forward else head_to) - abs(losses["entrance_loss"])
        egl = e_up - distributed * np.clip(s_flow / length, 0.0, 1.0)
        if line.valve is not None and valve > 0.0:
            valve_upstream = (line.valve.position == "from") == forward
            if valve_upstream:
                egl = egl - valve  # every point lies downstream of the valve
        hgl = egl - vh
        p = rho * G * (hgl - z)
    return ProfileResult(s, z, hgl, egl, p, p + system.atmospheric_pressure)


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
    g = G
    for i, lid in enumerate(line_ids):
        line = system.lines[lid]
        st = status[i]
        if st == "closed":
            out.append(Finding("line.closed", lid, "the valve is shut: the line carries no flow",
                               "info", "model"))
        elif st == "drains_back":
            recv = line.to_node if system.node_kind(line.to_node) == "receiver" else line.from_node
            out.append(Finding(
                "line.drains_back", lid,
                f"the head upstream is below the open discharge {recv!r}, and air cannot push "
                "liquid back into the line: no flow; in practice the line stands part-full or "
                "drains back, so check the levels and the outlet elevation",
                "caution", "model (an open discharge cannot supply liquid)"))
        flowing = st == "flowing" and q[i] != 0.0
        re = float(details["reynolds"][i])
        v = abs(float(details["velocity"][i]))
        fixed_f = line.friction_factor is not None
        if flowing and not fixed_f:
            if re <= RE_LAMINAR:
                out.append(Finding(
                    "regime.laminar", lid,
                    f"laminar flow (Re {_fmt(re)}): f = 64/Re; the exit loss of a fully "
                    "developed laminar profile is nearer 2 velocity heads than the 1 used",
                    "info", "Hagen-Poiseuille; laminar below Re about 2000 (common practice)"))
            elif re < RE_TURBULENT:
                f_lam = 64.0 / re
                f_turb = float(friction_colebrook(re, line.roughness / line.diameter))
                out.append(Finding(
                    "regime.transitional", lid,
                    f"transitional flow (Re {_fmt(re, 4)}): friction is uncertain here; laminar "
                    f"branch f = {_fmt(f_lam, 4)}, turbulent (Colebrook) branch f = "
                    f"{_fmt(f_turb, 4)}; the result uses a smooth blend "
                    f"f = {_fmt(float(details['friction_factor'][i]), 4)}",
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
        prof = profiles.get(lid)
        if prof is not None and st != "drains_back" and np.all(np.isfinite(prof.hgl)):
            k = int(np.argmin(prof.pressure_gauge))
            p_min = float(prof.pressure_gauge[k])
            if p_min < 0.0:
                out.append(Finding(
                    "profile.subatmospheric", lid,
                    f"pressure falls to {_fmt(p_min / 1000.0)} kPa gauge at {_fmt(prof.distance[k])} "
                    f"m from {line.from_node!r} (elevation {_fmt(prof.elevation[k], 4)} m): air "
                    "can be drawn in at joints, and thin-walled or plastic pipe can collapse; "
                    "check the pipe's vacuum rating",
                    "caution", "grade line from the solution; common practice"))
            if p_vap is not None:
                ka = int(np.argmin(prof.pressure_abs))
                p_abs = float(prof.pressure_abs[ka])
                if p_abs <= p_vap + VAPOR_MARGIN_PA:
                    out.append(Finding(
                        "profile.vapor", lid,
                        f"absolute pressure {_fmt(p_abs / 1000.0)} kPa at {_fmt(prof.distance[ka])} m "
                        f"is within {VAPOR_MARGIN_PA / 1000:g} kPa of the vapour pressure "
                        f"({_fmt(p_vap / 1000.0)} kPa): the liquid column separates (siphon "
                        "break), so the full-bore flow computed is not physically possible; "
                        "lower the crest or raise the downstream pressure",
                        "danger", f"vapour pressure of the fluid; margin {VAPOR_MARGIN_PA:g} Pa, "
                        "common practice"))
        if flowing:
            out.extend(_outlet_findings(system, lid, q[i], v, levels))
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
