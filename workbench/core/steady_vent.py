r"""The steady state of a system whose tanks breathe through vents: one function for `solve`
and for the steady start of `simulate`.

A vented tank that drains steadily pulls air in through its vent; the vent passes that air
only under a vacuum, and the vacuum lowers the tank's head by ``p/(rho g)``, hence its
outflow. The steady state is the fixed point

.. math::

    Q = \text{steady}(p), \qquad p = p_{qs}(Q_{out})

where ``steady`` is the network solved with each vented tank's gas-space gauge pressure as
its surface pressure and ``p_qs`` the pressure at which the vent passes the air the outflow
makes room for, ``mdot(p) = rho(p) Q_out``
(:func:`workbench.core.vent.quasi_steady_pressure`: the orifice equation of ISO 5167-1 with
the expansibility of ISO 5167-2, choked flow). At low flow this is the orifice drop
``dp = rho_air (Q/(C_d A))^2/2``. The iteration is damped after ten sweeps; the vacuum
changes the head by a small part of it, so a few sweeps suffice. Sealed tanks
(``vent = "none"``) keep their initial gas pressure. Pure floats; no I/O.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from workbench.core.model import System, draw_off_at, inflow_at

__all__ = ["VentedSteady", "net_outflows", "vented_steady"]


@dataclass(frozen=True)
class VentedSteady:
    """The steady state with the vented tanks' gas spaces at their steady pressures."""

    result: object
    """The steady result (``lines[id].flow`` ...) at those pressures; ``None`` if a solve
    failed (``solve`` raised)."""
    pressures: dict[str, float]
    """Per tank with a vent, the gas-space gauge pressure [Pa]: ``nan`` where the vent
    cannot pass the air for the outflow (a choked vent), a sealed tank's initial one."""
    outflows: dict[str, float] = field(default_factory=dict)
    """Per tank with a vent, the steady net liquid outflow [m^3/s] (lines, draw-off less
    feed) at those pressures."""
    settled: bool = True
    """The fixed point was reached (relative change below 1e-7)."""


def net_outflows(system: System, result, tanks, t: float = 0.0) -> dict[str, float]:
    """Per tank in ``tanks``, its net liquid outflow [m^3/s] in the steady ``result``: what
    its lines take out less what they bring, plus its draw-off less its feed at time ``t``."""
    out = {tid: draw_off_at(system.reservoirs[tid], t) - inflow_at(system.reservoirs[tid], t)
           for tid in tanks}
    for lid, line in system.lines.items():
        flow = result.lines[lid].flow
        if line.from_node in out:
            out[line.from_node] += flow
        if line.to_node in out:
            out[line.to_node] -= flow
    return out


def _with_gas_pressures(system: System, pressures: dict[str, float]) -> System:
    """``system`` with each gas space's gauge pressure as its tank's surface pressure."""
    reservoirs = dict(system.reservoirs)
    for tid, p in pressures.items():
        reservoirs[tid] = replace(reservoirs[tid], surface_pressure=p)
    return replace(system, reservoirs=reservoirs)


def vented_steady(system: System, solve, *, first=None, t: float = 0.0,
                  max_iterations: int = 100) -> VentedSteady:
    """The steady state of ``system`` with its vented tanks at their steady gas pressures.

    Parameters
    ----------
    system : System
    solve : callable
        ``solve(system)`` returns a steady result with ``lines[id].flow`` [m^3/s] (the
        levels and openings are the caller's choice).
    first : optional
        ``solve(system)`` at zero gauge pressure when the caller has it (saves one solve).
    t : float
        Time of the feed and draw-off [s].

    Returns
    -------
    VentedSteady
        Stops at the first tank whose vent cannot pass its air (``nan`` there).

    Notes
    -----
    Fixed point in the module docstring; gas density ``rho = rho_atm (p/p_atm)^(1/n)`` with
    ``n`` 1 (isothermal) or 1.4 (adiabatic); never below the liquid's vapour pressure.
    """
    from workbench.core.atmosphere import R_AIR
    from workbench.core.vent import GAMMA_AIR, quasi_steady_pressure

    tanks = {tid: r for tid, r in system.reservoirs.items() if r.vent is not None}
    p_atm = system.atmospheric_pressure
    rho_atm = p_atm / (R_AIR * (system.fluid.temperature or 293.15))
    p_floor = float(system.fluid.vapor_pressure or 0.0)
    p = {tid: float(r.gas_pressure) for tid, r in tanks.items()}
    vented = [tid for tid, r in tanks.items() if r.vent.effective_area > 0.0]
    res = first if first is not None and not any(p.values()) else None
    for sweep in range(max_iterations):
        if res is None:
            res = solve(_with_gas_pressures(system, p))
        out = net_outflows(system, res, tanks, t)
        if not vented:
            return VentedSteady(res, p, out)
        p_new = dict(p)
        for tid in vented:
            n = GAMMA_AIR if tanks[tid].gas_process == "adiabatic" else 1.0
            pa = quasi_steady_pressure(tanks[tid].vent.effective_area, out[tid], p_atm,
                                       rho_atm, n)
            if not math.isfinite(pa):
                p_new[tid] = math.nan
                return VentedSteady(res, p_new, out, settled=False)
            p_new[tid] = max(pa, p_floor) - p_atm
        if all(abs(p_new[k] - p[k]) <= 1e-7 * (1.0 + abs(p_new[k])) for k in vented):
            return VentedSteady(res, p, out)
        weight = 1.0 if sweep < 10 else 0.5
        p = {k: p[k] + weight * (p_new[k] - p[k]) for k in p}
        res = None
    return VentedSteady(res, p, net_outflows(system, res, tanks, t), settled=False)
