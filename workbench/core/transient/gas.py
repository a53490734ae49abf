r"""The gas spaces of tanks with a vent, as a part of the rigid-column state.

For each tank with a ``vent`` (sealed ones included) the state carries

.. math::

    X = m - \rho_{atm} V_g, \qquad V_g = V_{shell} - V,

the gas mass less the mass the gas space would hold at atmospheric pressure and the gas
temperature. ``X`` is the gas mass on a moving reference: the solver's relative tolerance
then applies to the gauge pressure (``X`` is about ``V_g p_gauge/(R T)``) rather than to
the absolute one, a hundred thousand times larger. With ``dV/dt`` the tank's volume
balance and ``mdot`` the vent's inflow (:func:`workbench.core.vent.vent_inflow`),

.. math::

    \frac{dX}{dt} = \dot m(p) + \rho_{atm} \frac{dV}{dt}

so a sealed tank keeps ``X - rho_atm V`` (its gas mass, up to a constant) to round-off: it
is a linear invariant of the equations, which Runge-Kutta and multistep methods keep. The
gauge pressure ``p - p_atm`` is added to the tank's surface head, ``p_gauge/(rho_l g)``,
in every line's driving head.

The gas space's pressure never falls below the liquid's vapour pressure: there the liquid
boils into the space and holds it at that pressure (``p = max(p_air, p_vapour)``; the air's
own partial pressure is not tracked separately, a simplification that matters only when the
tank would long since have collapsed).
"""

from __future__ import annotations

import numpy as np

from workbench.core.atmosphere import R_AIR
from workbench.core.model import Reservoir, System
from workbench.core.tank import TankGeometry
from workbench.core.vent import GAMMA_AIR, gas_density, vent_inflow

#: Smallest gas-space volume, as a fraction of the shell's (a tank filled to its top).
V_GAS_FLOOR = 1e-6


def shell_volume(res: Reservoir, geom: TankGeometry) -> float:
    """Volume up to the top of the gas space [m^3]: the shell height, else the overflow
    level, else the top of a closed shape."""
    top = res.shell_height if res.shell_height is not None else res.height
    if top is None:
        top = geom.top
    return geom.volume(min(top, geom.top))


class GasSpaces:
    """Constant data of the gas spaces of one run (``ng`` tanks with a vent)."""

    def __init__(self, system: System, tanks: list[Reservoir], geoms: list[TankGeometry]):
        self.p_atm = system.atmospheric_pressure
        self.temperature = system.fluid.temperature or 293.15
        """Gas temperature: the liquid's [K]."""
        self.rho_atm = self.p_atm / (R_AIR * self.temperature)
        """Density of the outside air, and of the gas space at atmospheric pressure [kg/m^3]."""
        self.tank = np.array([k for k, r in enumerate(tanks) if r.vent is not None], np.intp)
        """Tank index of each gas space."""
        self.ng = len(self.tank)
        sel = [tanks[k] for k in self.tank]
        self.ids = tuple(r.id for r in sel)
        self.area = np.array([r.vent.effective_area for r in sel])
        """``C_d A`` of each vent [m^2] (0 sealed)."""
        self.v_shell = np.array([shell_volume(r, geoms[k]) for k, r in zip(self.tank, sel)])
        self.exponent = np.array([GAMMA_AIR if r.gas_process == "adiabatic" else 1.0
                                  for r in sel])
        self.p0 = np.array([r.gas_pressure for r in sel])
        """Initial gauge pressures [Pa]."""
        self.p_floor = float(system.fluid.vapor_pressure or 0.0)
        """Lowest absolute pressure of a gas space: the liquid's vapour pressure [Pa]."""

    def v_gas(self, v_tanks: np.ndarray) -> np.ndarray:
        """Gas volumes from the tanks' liquid volumes [m^3]."""
        vg = self.v_shell - v_tanks[self.tank]
        return np.maximum(vg, V_GAS_FLOOR * self.v_shell)

    def state(self, v_tanks: np.ndarray, x: np.ndarray):
        """Absolute pressure [Pa], density [kg/m^3] and volume [m^3] of each gas space."""
        vg = self.v_gas(v_tanks)
        rho = np.maximum((x + self.rho_atm * vg) / vg, 1e-12 * self.rho_atm)
        p = np.maximum(self.p_atm * (rho / self.rho_atm) ** self.exponent, self.p_floor)
        return p, rho, vg

    def gauge(self, v_tanks: np.ndarray, x: np.ndarray) -> np.ndarray:
        """Gauge pressures of the gas spaces [Pa]."""
        return self.state(v_tanks, x)[0] - self.p_atm

    def excess(self, v_tanks: np.ndarray, p_gauge: np.ndarray) -> np.ndarray:
        """The state ``X`` at gauge pressures ``p_gauge`` [Pa] and liquid volumes [kg]."""
        vg = self.v_gas(v_tanks)
        rho = np.array([gas_density(self.p_atm + p, self.p_atm, self.rho_atm, n)
                        for p, n in zip(p_gauge.tolist(), self.exponent.tolist())])
        return (rho - self.rho_atm) * vg

    def inflow(self, p: np.ndarray, rho: np.ndarray) -> np.ndarray:
        """Mass flow of air into each gas space through its vent [kg/s]."""
        return np.array([vent_inflow(a, pk, self.p_atm, rk, self.rho_atm)
                         for a, pk, rk in zip(self.area.tolist(), p.tolist(), rho.tolist())])

    def derivatives(self, v_tanks: np.ndarray, x: np.ndarray):
        """``dp/dV``, ``dp/dX`` (analytic) and ``dmdot/dp`` (central difference) per gas
        space: ``p = p_atm (rho/rho_atm)^n`` with ``rho = X/V_g + rho_atm``."""
        p, rho, vg = self.state(v_tanks, x)
        n = self.exponent
        dp_drho = np.where(p > self.p_floor, n * p / rho, 0.0)  # held at vapour pressure
        dp_dv = dp_drho * (x / vg) / vg  # d rho/dV = X/V_g^2 at fixed X
        dp_dx = dp_drho / vg
        h = np.maximum(1e-7 * np.abs(p - self.p_atm), 1e-6)
        dm_dp = (self.inflow(p + h, rho) - self.inflow(p - h, rho)) / (2.0 * h)
        return dp_dv, dp_dx, dm_dp


def steady_gas_pressures(model, solve, p0: np.ndarray, max_iterations: int = 100):
    """The steady state with each vented tank's gas space at the pressure its vent needs to
    pass the air its steady outflow makes room for; sealed tanks keep ``p0``.

    The fixed point of :func:`workbench.core.steady_vent.vented_steady` (the one `solve`
    reports too). ``solve(system)`` returns a steady result with ``lines[id].flow``.

    Returns the steady result and the gauge pressures [Pa]; raises ``ValueError`` when a
    vent cannot pass the flow or the iteration does not settle.
    """
    from dataclasses import replace

    from workbench.core.steady_vent import vented_steady

    gas = model.gas
    system = model.system
    if gas.ng:  # the run's initial gas pressures (p0) as the sealed tanks' ones
        reservoirs = dict(system.reservoirs)
        for tid, p in zip(gas.ids, np.asarray(p0, dtype=float).tolist()):
            reservoirs[tid] = replace(reservoirs[tid], gas_pressure=p)
        system = replace(system, reservoirs=reservoirs)
    state = vented_steady(system, solve, max_iterations=max_iterations)
    p = np.array([state.pressures[tid] for tid in gas.ids], dtype=float)
    bad = [tid for tid in gas.ids if not np.isfinite(state.pressures[tid])]
    if bad:
        raise ValueError(f"tank {bad[0]}: its vent cannot pass the air for its steady "
                         f"outflow of {state.outflows[bad[0]] * 1000:.4g} L/s")
    if not state.settled:
        raise ValueError("the gas-space pressures at the steady outflow did not settle")
    return state.result, p
