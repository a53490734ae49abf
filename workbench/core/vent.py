r"""A tank's gas space and its vent: pressure from the gas held, air through the vent.

Gas space
---------
The gas above the liquid is an ideal gas (air, ``R = 287.05 J/(kg K)`` of the US Standard
Atmosphere 1976) at the liquid's temperature ``T``. Its absolute pressure follows from the
gas mass ``m`` and volume ``V_g`` (the shell's volume up to its top less the liquid's) by a
polytrope through atmospheric conditions,

.. math::

    p = p_{atm} \left(\frac{\rho}{\rho_{atm}}\right)^n, \qquad \rho = m/V_g,\quad
    \rho_{atm} = \frac{p_{atm}}{R T},

``n = 1`` for an isothermal gas space (Boyle's law at fixed mass; the default: a tank's
shell and liquid exchange heat with the gas over a drain's minutes to hours) and
``n = gamma = 1.4`` for an adiabatic one (quick moves; the air let in is taken at the gas
space's entropy, heat exchange neglected).

Vent flow
---------
A vent of bore ``A`` and loss coefficient ``K`` (``dp = K rho v^2/2``) passes, from the
side at the higher pressure ``p_1`` (density ``rho_1``) to the other at ``p_2``,

.. math::

    \dot m = \varepsilon\, C_d A \sqrt{2 \rho_1 (p_1 - p_2)},\qquad C_d A = A/\sqrt{K},

the incompressible orifice equation with the expansibility factor of ISO 5167-2:2003 for an
orifice at ``beta -> 0`` (a vent opening from a large space), from
``fluids.flow_meter.orifice_expansibility``; that equation was fitted for
``p_2/p_1 >= 0.80`` and is used beyond it up to the critical ratio
(``fluids.compressible.P_critical_flow``, 0.528 for air), below which the flow is choked
and held at its critical value. A vent stated as a flow of air ``Q_r`` at a pressure drop
``dp_r`` (air at 20 degC and 1 atm, as vent makers state capacity) has
``C_d A = Q_r sqrt(rho_r/(2 dp_r))``. Near zero difference the square root is rounded off
over ``DP_SMOOTH`` so the flow stays differentiable:
``mdot * sqrt(|dp|)/(dp^2 + DP_SMOOTH^2)^(1/4)`` (a relative change below 1e-6 from
``|dp| = 1 Pa`` up).

Required venting
----------------
For liquid movement, API 2000 (7th ed., 2014) / ISO 28300:2008 set the inbreathing
requirement equal to the maximum liquid outflow rate and the outbreathing requirement equal
to the maximum inflow rate (for liquids stored below 40 degC with no flashing: thermal
breathing and flashing are extra and are not computed here).
"""

from __future__ import annotations

import math

from workbench.core.atmosphere import R_AIR

#: Isentropic exponent of air [-] (diatomic ideal gas; common practice, 1.40 at 20 degC).
GAMMA_AIR = 1.4

#: Conditions at which a vent's stated flow is given: air at 20 degC and 1 atm.
RATED_TEMPERATURE = 293.15
RATED_PRESSURE = 101_325.0
RATED_AIR_DENSITY = RATED_PRESSURE / (R_AIR * RATED_TEMPERATURE)
"""[kg/m^3], about 1.204."""

#: Pressure difference over which the vent law's square root is rounded off [Pa].
DP_SMOOTH = 1e-3

REQUIRED_VENTING_SOURCE = ("API 2000 (7th ed.) / ISO 28300:2008: inbreathing for liquid "
                           "movement equals the maximum outflow rate, outbreathing the "
                           "maximum inflow rate")


def bore_effective_area(diameter: float, k: float) -> float:
    """``C_d A = (pi d^2/4)/sqrt(K)`` of a vent of bore ``diameter`` [m] and loss
    coefficient ``k`` [-] (``k > 0``) [m^2]."""
    return math.pi * diameter * diameter / 4.0 / math.sqrt(k)


def rated_effective_area(rated_flow: float, rated_pressure_drop: float) -> float:
    """``C_d A = Q_r sqrt(rho_r/(2 dp_r))`` of a vent passing ``rated_flow`` [m^3/s] of air
    at 20 degC and 1 atm with a drop of ``rated_pressure_drop`` [Pa] [m^2]."""
    return rated_flow * math.sqrt(RATED_AIR_DENSITY / (2.0 * rated_pressure_drop))


def gas_pressure(mass: float, volume: float, p_atm: float, rho_atm: float,
                 exponent: float = 1.0) -> float:
    """Absolute pressure of ``mass`` [kg] of gas in ``volume`` [m^3],
    ``p = p_atm (rho/rho_atm)^n`` [Pa]."""
    return p_atm * (mass / (volume * rho_atm)) ** exponent


def gas_density(p_abs: float, p_atm: float, rho_atm: float, exponent: float = 1.0) -> float:
    """Density of the gas space at absolute pressure ``p_abs`` [Pa] (inverse of
    :func:`gas_pressure`) [kg/m^3]."""
    return rho_atm * (p_abs / p_atm) ** (1.0 / exponent)


def _one_way(effective_area: float, p_up: float, p_down: float, rho_up: float,
             gamma: float) -> float:
    """Mass flow from the side at ``p_up`` to the side at ``p_down < p_up`` [kg/s]."""
    from fluids.compressible import P_critical_flow
    from fluids.flow_meter import orifice_expansibility

    p_down = max(p_down, P_critical_flow(p_up, gamma))  # choked below the critical ratio
    eps = orifice_expansibility(1.0, 0.0, p_up, p_down, gamma)
    return eps * effective_area * math.sqrt(2.0 * rho_up * (p_up - p_down))


def vent_inflow(effective_area: float, p_gas: float, p_atm: float, rho_gas: float,
                rho_air: float, gamma: float = GAMMA_AIR) -> float:
    """Mass flow of air into the gas space through the vent [kg/s] (negative outwards).

    Parameters
    ----------
    effective_area : float
        ``C_d A`` of the vent [m^2]; 0 for a sealed tank.
    p_gas, p_atm : float
        Absolute pressures of the gas space and the atmosphere [Pa].
    rho_gas, rho_air : float
        Densities of the gas space and the outside air [kg/m^3] (the upstream one is used).
    gamma : float
        Isentropic exponent [-].

    Examples
    --------
    A 50 mm bore with K = 1.5 under 100 Pa of vacuum passes about 24.8 g/s
    (``A/sqrt(K) sqrt(2 rho dp)``, expansibility 0.9997):

    >>> round(vent_inflow(bore_effective_area(0.05, 1.5), 101225.0, 101325.0, 1.2, 1.2), 5)
    0.02483
    """
    if effective_area <= 0.0 or p_gas == p_atm:
        return 0.0
    dp = p_atm - p_gas
    if dp > 0.0:
        m = _one_way(effective_area, p_atm, p_gas, rho_air, gamma)
    else:
        m = -_one_way(effective_area, p_gas, p_atm, rho_gas, gamma)
    return m * math.sqrt(abs(dp)) / (dp * dp + DP_SMOOTH * DP_SMOOTH) ** 0.25


def quasi_steady_pressure(effective_area: float, outflow: float, p_atm: float,
                          rho_atm: float, exponent: float = 1.0,
                          gamma: float = GAMMA_AIR) -> float:
    """Absolute gas-space pressure [Pa] at which the vent passes the air that a steady
    liquid ``outflow`` [m^3/s] (negative: inflow) makes room for: ``mdot(p) = rho(p) Q``.

    Returns ``nan`` when no pressure does (a sealed tank with a flow, or a vent choked
    below the flow).
    """
    from workbench.core.brent import brentq

    if outflow == 0.0:
        return p_atm
    if effective_area <= 0.0:
        return math.nan

    def balance(p):
        return vent_inflow(effective_area, p, p_atm, gas_density(p, p_atm, rho_atm, exponent),
                           rho_atm, gamma) - gas_density(p, p_atm, rho_atm, exponent) * outflow

    if outflow > 0.0:
        lo, hi = 1e-3 * p_atm, p_atm
    else:
        lo, hi = p_atm, 2.0 * p_atm
        while balance(hi) > 0.0 and hi < 1e3 * p_atm:
            hi *= 2.0
    if balance(lo) * balance(hi) > 0.0:
        return math.nan
    return brentq(balance, lo, hi, xtol=1e-9, rtol=1e-14)


def vent_capacity(effective_area: float, differential: float, p_atm: float, rho_atm: float,
                  inbreathing: bool = True, exponent: float = 1.0,
                  gamma: float = GAMMA_AIR) -> float:
    """Volume flow of gas space the vent makes room for at a pressure ``differential`` [Pa]
    across it (vacuum when ``inbreathing``, else pressure): the liquid flow it can follow
    at that differential [m^3/s]."""
    if effective_area <= 0.0:
        return 0.0
    p = p_atm - differential if inbreathing else p_atm + differential
    rho = gas_density(p, p_atm, rho_atm, exponent)
    return abs(vent_inflow(effective_area, p, p_atm, rho, rho_atm, gamma)) / rho
