"""Coefficients of the catalogue's pure-liquid correlations, typed in, and their equations.

The catalogue liquids of :mod:`workbench.core.fluid` take density, viscosity and vapour
pressure from published correlations whose coefficients the ``chemicals`` package carries
in data tables. Looking a row up there loads those tables (pandas and a set of CSV files,
about 0.5 s holding the interpreter lock), so the rows of our liquids are typed here and
the equations are evaluated by ``chemicals``' own functions, which need no table:

* :data:`PERRY_DIPPR` -- Perry's Chemical Engineers' Handbook, 8th ed. (2008): DIPPR
  equation 105 for saturated-liquid density (table 2-32, chemicals'
  ``rho_data_Perry_8E_105_l``), DIPPR equation 101 for viscosity (table 2-313,
  ``mu_data_Perrys_8E_2_313``) and vapour pressure (table 2-8, ``Psat_data_Perrys2_8``).
* :data:`VDI_PPDS` -- VDI Heat Atlas, 2nd ed. (2010): PPDS equation 10 for saturated-liquid
  density (``rho_data_VDI_PPDS_2``), PPDS equation 9 for viscosity (``mu_data_VDI_PPDS_7``)
  and the Wagner 2.5-5 equation for vapour pressure (``Psat_data_VDI_PPDS_3``).

Each ``at`` method calls the package's evaluator (``chemicals.dippr.EQ101`` and ``EQ105``,
``chemicals.volume.volume_VDI_PPDS``, ``chemicals.viscosity.PPDS9``,
``chemicals.vapor_pressure.Wagner``), with their guards at and beyond the critical point;
none of them loads pandas. tests/core/test_fluid_coefficients.py checks every typed number
against the package's tables and every value against the package's own evaluation.

Adding a liquid: copy its rows from those tables (``.loc[CAS]``), its molar mass from
``chemicals.MW(CAS)`` and its critical temperature from ``chemicals.critical.Tc(CAS)``;
the tests name any number that differs.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "Dippr101",
    "Dippr105",
    "PERRY_DIPPR",
    "PerryDipprLiquid",
    "Ppds9Viscosity",
    "Ppds10Density",
    "VDI_PPDS",
    "VdiPpdsLiquid",
    "WagnerVaporPressure",
]

#: What ``chemicals``' truncated exponential returns for an argument that overflows (the
#: largest float); a value this large is an overflow, not a property.
_TRUNCATED_EXP = 1.7976931348622732e308


@dataclass(frozen=True)
class Dippr105:
    """DIPPR equation 105, saturated-liquid molar density.

    .. math:: \\rho_m = A / B^{1 + (1 - T/C)^D}

    with ``(1 - T/C)`` taken as 0 above ``C`` when ``D < 1`` (as ``chemicals.dippr.EQ105``).
    """

    A: float
    """[mol/m^3] (chemicals' tables give it in mol/m^3, Perry's in kmol/m^3)"""
    B: float
    """[-]"""
    C: float
    """[K]"""
    D: float
    """[-]"""
    t_min: float
    """Lowest temperature of the fit as tabulated [K]."""
    t_max: float
    """Highest temperature of the fit as tabulated [K]."""

    def at(self, t: float) -> float:
        """Molar density at ``t`` [K], [mol/m^3] (``chemicals.dippr.EQ105``)."""
        from chemicals.dippr import EQ105

        return EQ105(t, self.A, self.B, self.C, self.D)


@dataclass(frozen=True)
class Dippr101:
    """DIPPR equation 101: viscosity [Pa s] or vapour pressure [Pa].

    .. math:: y = \\exp(A + B/T + C \\ln T + D T^E)
    """

    A: float
    B: float
    C: float
    D: float
    E: float
    t_min: float
    """Lowest temperature of the fit as tabulated [K]."""
    t_max: float
    """Highest temperature of the fit as tabulated [K]."""

    def at(self, t: float) -> float:
        """Value at ``t`` [K], in the unit of the table (Pa s or Pa) (``chemicals.dippr.EQ101``)."""
        from chemicals.dippr import EQ101

        value = EQ101(t, self.A, self.B, self.C, self.D, self.E)
        if value >= _TRUNCATED_EXP:  # chemicals caps an overflowing exponential here
            raise OverflowError(f"DIPPR equation 101 overflows at {t} K")
        return value


@dataclass(frozen=True)
class Ppds10Density:
    """PPDS equation 10, saturated-liquid density (VDI Heat Atlas, D3.1).

    .. math:: \\rho = \\rho_c + A\\tau^{0.35} + B\\tau^{2/3} + C\\tau + D\\tau^{4/3},
              \\quad \\tau = 1 - T/T_c \\ (0 \\text{ at and above } T_c)
    """

    t_critical: float
    """T_c of the fit [K]."""
    rho_critical: float
    """rho_c of the fit [kg/m^3]."""
    A: float
    B: float
    C: float
    D: float

    def at(self, t: float) -> float:
        """Density at ``t`` [K], [kg/m^3] (``chemicals.volume.volume_VDI_PPDS``)."""
        from chemicals.volume import volume_VDI_PPDS

        return volume_VDI_PPDS(t, self.t_critical, self.rho_critical, self.A, self.B, self.C,
                               self.D)


@dataclass(frozen=True)
class Ppds9Viscosity:
    """PPDS equation 9, liquid viscosity (VDI Heat Atlas, D3.1).

    .. math:: \\mu = E \\exp(A x^{1/3} + B x^{4/3}), \\quad x = (C - T)/(T - D)

    (the real cube root for negative ``x``).
    """

    A: float
    B: float
    C: float
    """[K]"""
    D: float
    """[K]"""
    E: float
    """[Pa s]"""

    def at(self, t: float) -> float:
        """Viscosity at ``t`` [K], [Pa s] (``chemicals.viscosity.PPDS9``)."""
        from chemicals.viscosity import PPDS9

        return PPDS9(t, self.A, self.B, self.C, self.D, self.E)


@dataclass(frozen=True)
class WagnerVaporPressure:
    """Wagner equation, 2.5-5 form (VDI Heat Atlas, D3.1).

    .. math:: \\ln(p/p_c) = (A\\tau + B\\tau^{1.5} + C\\tau^{2.5} + D\\tau^5) / T_r,
              \\quad T_r = \\min(T/T_c, 1), \\ \\tau = 1 - T_r
    """

    t_critical: float
    """T_c of the fit [K]."""
    p_critical: float
    """p_c of the fit [Pa]."""
    A: float
    B: float
    C: float
    D: float
    t_melting: float
    """Melting point listed with the coefficients [K]."""

    def at(self, t: float) -> float:
        """Vapour pressure at ``t`` [K], [Pa] (``chemicals.vapor_pressure.Wagner``)."""
        from chemicals.vapor_pressure import Wagner

        return Wagner(t, self.t_critical, self.p_critical, self.A, self.B, self.C, self.D)


@dataclass(frozen=True)
class PerryDipprLiquid:
    """A liquid's Perry's Handbook DIPPR correlations and the constants they need."""

    molar_mass: float
    """[g/mol], as ``chemicals.MW(CAS)`` gives it (PubChem), to turn eq. 105's molar
    density into mass density."""
    t_critical: float
    """Critical temperature [K], as ``chemicals.critical.Tc(CAS)`` gives it (the critical
    point of the reference equation of state where there is one, else the IUPAC
    critically evaluated value); no liquid at or above it."""
    density: Dippr105
    """Perry's table 2-32 [mol/m^3]."""
    viscosity: Dippr101
    """Perry's table 2-313 [Pa s]."""
    vapor_pressure: Dippr101
    """Perry's table 2-8 [Pa]."""


@dataclass(frozen=True)
class VdiPpdsLiquid:
    """A liquid's VDI Heat Atlas PPDS and Wagner correlations."""

    t_critical: float
    """Critical temperature [K], as ``chemicals.critical.Tc(CAS)`` gives it; no liquid at
    or above it."""
    density: Ppds10Density
    viscosity: Ppds9Viscosity
    vapor_pressure: WagnerVaporPressure


#: Perry's Handbook DIPPR rows by CAS number, typed from the chemicals package (1.5.2).
PERRY_DIPPR: dict[str, PerryDipprLiquid] = {
    "64-17-5": PerryDipprLiquid(  # ethanol; Tc: reference equation of state
        46.06844, 514.71,
        Dippr105(1628.8, 0.27469, 514.0, 0.23178, 159.05, 514.0),
        Dippr101(7.875, 781.98, -3.0418, 0.0, 0.0, 200.0, 440.0),
        Dippr101(73.304, -7122.3, -7.1424, 2.8853e-06, 2.0, 159.05, 514.0),
    ),
    "67-56-1": PerryDipprLiquid(  # methanol; Tc: reference equation of state
        32.04186, 513.38,
        Dippr105(2326.7, 0.27073, 512.5, 0.24713, 175.47, 512.5),
        Dippr101(-25.317, 1789.2, 2.069, 0.0, 0.0, 175.47, 337.85),
        Dippr101(82.718, -6904.5, -8.8622, 7.4664e-06, 2.0, 175.47, 512.5),
    ),
    "67-63-0": PerryDipprLiquid(  # isopropanol; Tc: IUPAC
        60.09502, 508.3,
        Dippr105(1179.9, 0.2644, 508.3, 0.24653, 185.26, 508.3),
        Dippr101(-8.8918, 2357.6, -0.91376, 0.0, 0.0, 185.26, 355.3),
        Dippr101(96.094, -8575.4, -10.292, 1.6665e-17, 6.0, 185.26, 508.3),
    ),
    "67-64-1": PerryDipprLiquid(  # acetone; Tc: reference equation of state
        58.07914, 508.1,
        Dippr105(1233.2, 0.25886, 508.2, 0.2913, 178.45, 508.2),
        Dippr101(-14.918, 1023.4, 0.5961, 0.0, 0.0, 190.0, 329.44),
        Dippr101(69.006, -5599.6, -7.0985, 6.2237e-06, 2.0, 178.45, 508.2),
    ),
    "108-88-3": PerryDipprLiquid(  # toluene; Tc: reference equation of state
        92.13842, 591.75,
        Dippr105(879.2, 0.27136, 591.75, 0.29241, 178.18, 591.75),
        Dippr101(-226.08, 6805.7, 37.542, -0.060853, 1.0, 178.18, 383.78),
        Dippr101(76.945, -6729.8, -8.179, 5.3017e-06, 2.0, 178.18, 591.75),
    ),
    "64-19-7": PerryDipprLiquid(  # acetic acid; Tc: IUPAC
        60.05196, 590.7,
        Dippr105(1448.6, 0.25892, 591.95, 0.2529, 289.81, 591.95),
        Dippr101(-9.03, 1212.3, -0.322, 0.0, 0.0, 289.81, 391.05),
        Dippr101(53.27, -6304.5, -4.2985, 8.8865e-18, 6.0, 289.81, 591.95),
    ),
    "107-21-1": PerryDipprLiquid(  # ethylene glycol; Tc: reference equation of state
        62.06784, 719.0,
        Dippr105(1315.0, 0.25125, 720.0, 0.21868, 260.15, 720.0),
        Dippr101(-20.515, 2468.5, 1.2435, 2499800000000.0, -5.0, 260.15, 576.0),
        Dippr101(84.09, -10411.0, -8.1976, 1.6536e-18, 6.0, 260.15, 720.0),
    ),
    "57-55-6": PerryDipprLiquid(  # propylene glycol; Tc: IUPAC
        76.09442, 676.0,
        Dippr105(1092.3, 0.26106, 626.0, 0.20459, 213.15, 626.0),
        Dippr101(-804.54, 30487.0, 130.79, -0.15449, 1.0, 213.15, 500.8),
        Dippr101(212.8, -15420.0, -28.109, 2.1564e-05, 2.0, 213.15, 626.0),
    ),
    "112-40-3": PerryDipprLiquid(  # n-dodecane; Tc: reference equation of state
        170.33484, 658.1,
        Dippr105(332.67, 0.24664, 658.0, 0.28571, 263.57, 658.0),
        Dippr101(-7.8244, 1191.9, -0.49963, 3.9572e+23, -10.0, 262.15, 526.4),
        Dippr101(137.47, -11976.0, -16.698, 8.0906e-06, 2.0, 263.57, 658.0),
    ),
}

#: VDI Heat Atlas PPDS and Wagner rows by CAS number, typed from the chemicals package (1.5.2).
VDI_PPDS: dict[str, VdiPpdsLiquid] = {
    "56-81-5": VdiPpdsLiquid(  # glycerol; Tc: IUPAC
        850.0,
        Ppds10Density(850.05, 349.0, 1341.5932, -1168.205, 1429.7634, -527.771),
        Ppds9Viscosity(-3.91153, 6.54946, 582.48, 73.885, 0.0079964),
        WagnerVaporPressure(850.05, 7500000.0, -6.94758, -0.33345, -5.98569, -1.33011, 291.45),
    ),
}
