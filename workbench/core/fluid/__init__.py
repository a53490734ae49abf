"""Liquid properties at the system temperature: water by IAPWS, a short catalogue, custom.

Every solver needs the density and viscosity of the liquid; the vapour check needs its
vapour pressure and the surge estimate its bulk modulus. This module gives them as a
:class:`~workbench.core.model.FluidProps` in SI units:

* :func:`water_properties` -- ordinary water from the IAPWS formulations: density and
  speed of sound by IAPWS-95 (Wagner & Pruss 2002), viscosity by the IAPWS 2008 release
  (Huber et al. 2009), vapour pressure by the IAPWS-IF97 saturation equation (supercooled
  liquid below 0 degC: IAPWS-95 saturation). The isentropic bulk modulus is
  ``K_s = rho * w**2``. The fast routines of the ``chemicals`` package do the work;
  results are cached by (temperature, pressure), so a solver loop pays about 0.1 ms once
  and well under a microsecond afterwards.
* :data:`CATALOGUE` and :func:`liquid_properties` -- common plant liquids from published
  correlations whose coefficients the ``chemicals`` package carries (DIPPR equations of
  Perry's Handbook; VDI Heat Atlas PPDS and Wagner equations), typed from its tables into
  :mod:`workbench.core.liquid_coefficients` and evaluated there, and aqueous sodium
  hydroxide and sodium chloride by the Laliberte (2009) electrolyte model (coefficients
  typed here, water by IAPWS). Each entry names its source
  and its valid temperature range; outside it the values are extrapolated with a note.
  Where a reference equation of state exists for the pure liquid, its isentropic bulk
  modulus ``K_s = rho * w**2`` comes from that equation (the entry names the equation's
  publication), interpolated in a table generated from CoolProp's implementation
  (:mod:`workbench.core.liquid_tables`, written by ``tools/make_liquid_tables.py``);
  elsewhere it is ``None`` and surge wave speeds need the user's value.
* :data:`SOLUTIONS` and :func:`solution_properties` -- ethylene and propylene glycol in
  water at a mass fraction (Melinder 2010) and seawater at a salinity (Sharqawy et al.
  2010), from CoolProp's incompressible-liquid fits, whose coefficients are typed here
  and evaluated with numpy; outside a fit's range of temperature or concentration the
  values are refused with the range.
* :func:`custom_properties` -- numbers the user gives.

One module per concern: :mod:`.basics` (the error, temperature checks), :mod:`.water`,
:mod:`.catalogue` (with :mod:`.electrolytes` for the Laliberte model and
:mod:`.bulk_modulus` for the equation-of-state bulk moduli), :mod:`.solutions` (with
:mod:`.incompressible_fits`), :mod:`.custom`. Import from this package, not the modules.

``chemicals`` takes about 0.2 s to import, so it is imported on first use only, and only
where water's IAPWS properties are needed (water and the aqueous liquids; those routines
read no data tables); the pure catalogue liquids do not import it. Its data tables load
pandas and CSV files (about 0.5 s, holding the interpreter lock), so no liquid reads them
at run time. CoolProp (about 2.5 s to import, holding the interpreter lock) is never
imported at run time: it is the reference the tests and the table generator use.
"""


from __future__ import annotations

from workbench.core.fluid.basics import T_ZERO_CELSIUS, FluidPropertyError
from workbench.core.fluid.catalogue import CATALOGUE, LiquidEntry, liquid_names, liquid_properties
from workbench.core.fluid.custom import custom_properties
from workbench.core.fluid.solutions import SOLUTIONS, SolutionEntry, solution_properties
from workbench.core.fluid.water import (
    WATER_FORMULATION,
    WATER_T_CRITICAL,
    WATER_T_MIN,
    water_properties,
)

__all__ = [
    "CATALOGUE",
    "FluidPropertyError",
    "LiquidEntry",
    "SOLUTIONS",
    "SolutionEntry",
    "T_ZERO_CELSIUS",
    "WATER_FORMULATION",
    "WATER_T_CRITICAL",
    "WATER_T_MIN",
    "custom_properties",
    "liquid_names",
    "liquid_properties",
    "solution_properties",
    "water_properties",
]
