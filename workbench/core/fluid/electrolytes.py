"""Aqueous electrolyte solutions of a fixed strength by the Laliberte (2009) model: the
solute's apparent density and viscosity mixed with IAPWS water (:mod:`.water`)."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from workbench.core.fluid.basics import T_ZERO_CELSIUS
from workbench.core.fluid.water import water_properties, water_psat

if TYPE_CHECKING:
    from workbench.core.fluid.catalogue import LiquidEntry

__all__ = ["LALIBERTE", "LALIBERTE_NACL", "LALIBERTE_NAOH", "laliberte"]


LALIBERTE = (
    "Laliberte, M. (2009), J. Chem. Eng. Data 54, 1725 (aqueous electrolyte density and "
    "viscosity model; coefficients as distributed with the chemicals package, "
    "Electrolytes/Laliberte2009.tsv), with IAPWS water"
)

# Laliberte (2009) coefficients, typed from the table distributed with the chemicals
# package (Electrolytes/Laliberte2009.tsv); tests/core/test_fluid.py checks them against
# that file. Order: density c0..c4, viscosity v1..v6.
LALIBERTE_NAOH = (
    319.020509469838, 528.592358475315, -0.102197896602724, 0.000350420706415566,
    765.970470238438,
    448.457566713375, 0.00871452408983102, -431.97212334697, 0.0160144202049452,
    104.011738670148, 4.64493684488816,
)
LALIBERTE_NACL = (
    -0.00324112223655149, 0.0636354335906616, 1.01371399467365, 0.0145951015210159,
    3317.34854426537,
    16.221788633396, 1.32293086770011, 1.48485985010431, 0.00746912559657377,
    30.7802007540575, 2.05826852322558,
)


def laliberte(entry: LiquidEntry, t: float) -> tuple[float, float, float | None]:
    """Laliberte (2009): apparent solute density and viscosity mixed with IAPWS water.

    rho_app = (c0 (1-w_w) + c1) exp(1e-6 (t + c4)^2) / ((1-w_w) + c2 + c3 t),
    1/rho = w_w/rho_w + w_s/rho_app;
    mu_s = exp((v1 (1-w_w)^v2 + v3)/(v4 t + 1)) / (v5 (1-w_w)^v6 + 1) [mPa s],
    ln mu = w_w ln mu_w + w_s ln mu_s;  t in degC.
    """
    c0, c1, c2, c3, c4, v1, v2, v3, v4, v5, v6 = entry.coefficients
    ws = float(entry.mass_fraction or 0.0)
    ww = 1.0 - ws
    tc = t - T_ZERO_CELSIUS
    # Water at its own saturation pressure where that exceeds 1 atm (no boiling note).
    water = water_properties(t, max(101325.0, 1.001 * water_psat(t)))
    rho_app = (c0 * ws + c1) * math.exp(1e-6 * (tc + c4) ** 2) / (ws + c2 + c3 * tc)
    rho = 1.0 / (ww / water.density + ws / rho_app)
    mu_s = math.exp((v1 * ws**v2 + v3) / (v4 * tc + 1.0)) / (v5 * ws**v6 + 1.0)  # mPa s
    mu = math.exp(ww * math.log(water.viscosity * 1e3) + ws * math.log(mu_s)) * 1e-3
    # No correlation for the solution's vapour pressure here: pure water's is an upper
    # bound (solutes lower it), which keeps the vapour check on the safe side.
    return rho, mu, water.vapor_pressure
