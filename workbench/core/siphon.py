r"""Siphon break: where a high point of a line would fall below the pressure at which the liquid
column parts, the line passes only what the leg up to that point can lift.

The column parts at a point of the profile where the absolute pressure would fall below
the vapour pressure of the liquid (the liquid boils there and a vapour cavity forms; in
practice dissolved air comes out a little before). The energy equation from the source up
to that point, with the point held at the vapour pressure ``p_v``,

.. math::

    H_{up} - K_{ent}\frac{v^2}{2g} - \frac{s_c}{L}\,(h_f + h_{fit})(Q) - h_{valve,up}(Q)
    - \alpha\frac{v^2}{2g} = z_c + \frac{p_v - p_{atm}}{\rho g}

then fixes the flow ``Q`` the line passes (``s_c`` the point's distance from the upstream
end, friction and fittings spread in proportion to length as in the grade line of
:mod:`workbench.core.checks`, the valve counted only if it lies upstream of the point).
The leg beyond runs part-full: its grade line, computed back from the outlet at that flow,
stands below the pipe where the pipe is not full, and the pressure there is the cavity's.
When the source head falls to ``z_c + (p_v - p_atm)/(rho g)`` (the point's height less
the water barometer) nothing can be lifted and the flow stops. Energy equation with
losses: any fluid-mechanics text (e.g. White, *Fluid Mechanics*, ch. 6); the siphon limit:
the same equation at zero flow.

The steady solve caps lines that run between two fixed heads (a tank or reservoir and a
receiver or another free surface); a line that meets a junction is flagged but not capped
(its flow would change the rest of the network).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.core.model import G, System


@dataclass(frozen=True)
class SiphonBreak:
    """Where and how a line's column parts in a steady solution."""

    line: str
    distance: float
    """Distance of the parting point from the line's from-end [m]."""
    elevation: float
    """[m]"""
    break_pressure: float
    """Absolute pressure at which the column parts there [Pa]: the vapour pressure, or
    the atmospheric pressure at an air valve."""

    full_bore_flow: float
    """Flow magnitude the line would pass running full [m^3/s]."""
    flow: float
    """Flow magnitude the leg up to the point can lift [m^3/s] (0: stopped)."""
    stop_head: float
    """Source head at which the flow stops, ``z_c + (p_break - p_atm)/(rho g)`` [m]."""
    source: str
    """The node the line draws from."""
    vented: bool = False
    """The column parts at an air valve (air comes in) rather than by boiling."""


def _line_profile(system: System, lines, i: int, lid: str, q: float, q_all: np.ndarray,
                  x_open, head_from: float, head_to: float):
    """The grade line of line ``i`` alone at flow ``q`` (others held at ``q_all``)."""
    from workbench.core.checks import line_profiles

    qs = np.array(q_all, dtype=float)
    qs[i] = q
    det = lines.details(qs, x_open)
    one = {k: np.asarray(v)[i:i + 1] for k, v in det.items()}
    return line_profiles(system, [lid], np.array([q]), np.array([head_from]),
                         np.array([head_to]), one, ["flowing"])[lid]


def break_pressures(system: System, lid: str, distance: np.ndarray) -> np.ndarray:
    """Absolute pressure at which the column parts at each profile point [Pa]: the vapour
    pressure, or the atmospheric pressure at a point with an air valve (it admits air as
    soon as the line falls below atmospheric). ``nan`` where neither applies."""
    p_v = system.fluid.vapor_pressure
    out = np.full(len(distance), np.nan if p_v is None else float(p_v))
    for s in system.lines[lid].air_valves:
        out[np.isclose(distance, s, rtol=0.0, atol=1e-6)] = system.atmospheric_pressure
    return out


def find_break(system: System, lines, i: int, lid: str, q_all: np.ndarray, x_open,
               head_from: float, head_to: float, tol_pa: float) -> SiphonBreak | None:
    """The siphon break of line ``i`` at the solution ``q_all``, or ``None`` when every point
    stays above the vapour pressure (within ``tol_pa``).

    The parting point is the one that limits the flow most: for each interior profile
    point the flow that puts it exactly at the vapour pressure, the smallest of them.
    """
    from workbench.core.checks import profile_points

    q_full = float(q_all[i])
    if q_full == 0.0 or len(profile_points(system, lid)[0]) <= 2:
        return None  # a straight run has no high point between its ends
    sign = 1.0 if q_full > 0.0 else -1.0

    def margin(qmag: float) -> np.ndarray:
        prof = _line_profile(system, lines, i, lid, sign * qmag, q_all, x_open,
                             head_from, head_to)
        p_break = break_pressures(system, lid, prof.distance)[1:-1]
        return np.where(np.isnan(p_break), np.inf, prof.pressure_abs[1:-1] - p_break), prof

    m_full, prof_full = margin(abs(q_full))
    if not m_full.size or float(m_full.min()) >= -tol_pa:
        return None
    from workbench.core.brent import brentq

    tiny = 1e-9 * abs(q_full)
    m0, _ = margin(tiny)
    if float(m0.min()) < 0.0:
        q_cap = 0.0
        j = int(np.argmin(m0))
    else:
        q_cap = brentq(lambda x: float(margin(x)[0].min()), tiny, abs(q_full),
                       xtol=1e-12 * abs(q_full), rtol=1e-12)
        j = int(np.argmin(margin(q_cap)[0]))
    s = float(prof_full.distance[1:-1][j])
    z = float(prof_full.elevation[1:-1][j])
    p_b = float(break_pressures(system, lid, prof_full.distance)[1:-1][j])
    rho_g = system.fluid.density * G
    line = system.lines[lid]
    return SiphonBreak(
        line=lid, distance=s, elevation=z, break_pressure=p_b, full_bore_flow=abs(q_full),
        flow=q_cap, stop_head=z + (p_b - system.atmospheric_pressure) / rho_g,
        source=line.from_node if sign > 0 else line.to_node,
        vented=bool(p_b == system.atmospheric_pressure and line.air_valves))


def broken_profile(system: System, prof, brk: SiphonBreak, forward: bool,
                   excess_head: float):
    """A capped line's grade line: as computed up to the parting point; beyond it, the
    grade line back from the outlet (``excess_head`` [m] below the one from upstream: the
    head the part-full leg dissipates), never below the cavity pressure.

    Returns ``(hgl, egl, p_gauge, p_abs)`` arrays.
    """
    rho_g = system.fluid.density * G
    p_atm = system.atmospheric_pressure
    beyond = prof.distance > brk.distance if forward else prof.distance < brk.distance
    p_cav = brk.break_pressure - p_atm
    if brk.flow == 0.0:
        p = np.where(beyond, p_cav, prof.pressure_gauge)
        egl = np.where(beyond, prof.elevation + p / rho_g, prof.egl)
    else:
        p_back = prof.pressure_gauge - rho_g * excess_head
        p = np.where(beyond, np.maximum(p_back, p_cav), prof.pressure_gauge)
        egl = np.where(beyond, prof.egl - excess_head, prof.egl)
    hgl = prof.elevation + p / rho_g
    return hgl, egl, p, p + p_atm


def stop_level(system: System, brk: SiphonBreak) -> float | None:
    """Level in the source tank or reservoir at which the flow stops [m above its bottom]
    (``None`` when the source is not a reservoir)."""
    res = system.reservoirs.get(brk.source)
    if res is None:
        return None
    gas = res.surface_pressure / (system.fluid.density * G)
    return brk.stop_head - gas - res.bottom_elevation


