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

``chemicals`` takes about 0.2 s to import, so it is imported on first use only, and only
where water's IAPWS properties are needed (water and the aqueous liquids; those routines
read no data tables); the pure catalogue liquids do not import it. Its data tables load
pandas and CSV files (about 0.5 s, holding the interpreter lock), so no liquid reads them
at run time. CoolProp (about 2.5 s to import, holding the interpreter lock) is never
imported at run time: it is the reference the tests and the table generator use.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass
from functools import lru_cache

from workbench.core.model import FluidProps

__all__ = [
    "CATALOGUE",
    "FluidPropertyError",
    "LiquidEntry",
    "SOLUTIONS",
    "SolutionEntry",
    "WATER_FORMULATION",
    "custom_properties",
    "liquid_names",
    "liquid_properties",
    "solution_properties",
    "water_properties",
]

#: 0 degC [K].
T_ZERO_CELSIUS = 273.15
#: Lowest temperature at which the IAPWS-95 routines of ``chemicals`` solve for
#: (supercooled) liquid water [K].
WATER_T_MIN = 235.0
#: Critical temperature of water, IAPWS-95 [K].
WATER_T_CRITICAL = 647.096

WATER_FORMULATION = (
    "water: IAPWS-95 density and speed of sound (bulk modulus rho*w^2), "
    "IAPWS 2008 viscosity, IAPWS-IF97 saturation pressure"
)


class FluidPropertyError(ValueError):
    """A liquid or temperature for which no properties can be given; the message says why."""


def _celsius(temperature_k: float) -> str:
    return f"{temperature_k - T_ZERO_CELSIUS:.1f} degC"


def _check_temperature(temperature_k: float) -> float:
    try:
        t = float(temperature_k)
    except (TypeError, ValueError):
        raise FluidPropertyError(f"expected a temperature in kelvin, got {temperature_k!r}") from None
    if not math.isfinite(t) or t <= 0.0:
        raise FluidPropertyError(f"expected a positive absolute temperature [K], got {temperature_k!r}")
    return t


# --------------------------------------------------------------------------------------
# Water


@lru_cache(maxsize=4096)
def _water_cached(temperature_k: float, pressure_pa: float) -> FluidProps:
    from chemicals.iapws import iapws95_properties, iapws95_Psat
    from chemicals.vapor_pressure import Psat_IAPWS
    from chemicals.viscosity import mu_IAPWS

    t, p = temperature_k, pressure_pa
    notes: list[str] = []
    if t < T_ZERO_CELSIUS:
        # IF97's saturation equation is not meant for supercooled liquid; IAPWS-95's is.
        psat = iapws95_Psat(t)
        notes.append(
            f"{_celsius(t)} is below 0 degC: water freezes; the values are IAPWS-95 "
            "extrapolations for supercooled liquid"
        )
    else:
        psat = Psat_IAPWS(t)
    p_eval = p
    if psat >= p:
        notes.append(
            f"{_celsius(t)} is at or above the boiling point at {p / 1000:.3g} kPa abs "
            f"(vapour pressure {psat / 1000:.4g} kPa): the liquid flashes; values are for "
            "liquid just above its saturation pressure"
        )
        # Evaluate the liquid branch: IAPWS-95 decides the phase by its own saturation
        # pressure, which differs from IF97's in the fifth digit.
        p_eval = 1.0001 * max(psat, iapws95_Psat(t))
    rho, _u, _s, _h, _cv, _cp, w, *_rest = iapws95_properties(t, p_eval)
    # Industrial form of IAPWS 2008 (no critical enhancement: it matters only within
    # a few kelvin of the critical point, far outside a liquid-handling plant).
    mu = mu_IAPWS(t, rho)
    return FluidProps(
        name="water",
        density=rho,
        viscosity=mu,
        vapor_pressure=psat,
        bulk_modulus=rho * w * w,
        temperature=t,
        formulation=WATER_FORMULATION,
        notes=tuple(notes),
    )


def water_properties(temperature_k: float, pressure_pa: float = 101325.0) -> FluidProps:
    """Properties of liquid water by the IAPWS formulations.

    .. math::

        \\rho = \\rho_{95}(T, p), \\quad \\mu = \\mu_{2008}(T, \\rho), \\quad
        p_{sat} = p_{sat,IF97}(T), \\quad K_s = \\rho\\, w^2

    Parameters
    ----------
    temperature_k : float
        Temperature, [K]; from 235 K (supercooled) to below the critical point 647.096 K.
    pressure_pa : float, optional
        Absolute pressure at which density and speed of sound are evaluated, [Pa];
        default one standard atmosphere.

    Returns
    -------
    FluidProps
        Density [kg/m^3], viscosity [Pa*s], vapour pressure [Pa abs], isentropic bulk
        modulus [Pa]; ``notes`` says when the temperature is below 0 degC (frozen; the
        values are for supercooled liquid) or at/above boiling at ``pressure_pa`` (the
        values are then for liquid just above saturation pressure).

    Raises
    ------
    FluidPropertyError
        Outside 235 K to 647.096 K, or for a non-positive pressure.

    Examples
    --------
    >>> w = water_properties(293.15)
    >>> round(w.density, 3), round(w.viscosity * 1e3, 4), round(w.vapor_pressure, 1)
    (998.207, 1.0016, 2339.2)

    References
    ----------
    Wagner, W., Pruss, A. (2002), J. Phys. Chem. Ref. Data 31, 387 (IAPWS-95);
    Huber, M. L. et al. (2009), J. Phys. Chem. Ref. Data 38, 101 (IAPWS 2008 viscosity);
    Wagner, W. et al. (2000), J. Eng. Gas Turbines Power 122, 150 (IAPWS-IF97).
    """
    t = _check_temperature(temperature_k)
    try:
        p = float(pressure_pa)
    except (TypeError, ValueError):
        raise FluidPropertyError(f"expected an absolute pressure in pascals, got {pressure_pa!r}") from None
    if not math.isfinite(p) or p <= 0.0:
        raise FluidPropertyError(f"expected a positive absolute pressure [Pa], got {pressure_pa!r}")
    if not (WATER_T_MIN <= t < WATER_T_CRITICAL):
        raise FluidPropertyError(
            f"water at {_celsius(t)} ({t:g} K) is outside the liquid range the IAPWS "
            f"formulations cover here ({WATER_T_MIN:g} K to the critical point "
            f"{WATER_T_CRITICAL:g} K)"
        )
    return _water_cached(t, p)


# --------------------------------------------------------------------------------------
# Catalogue

_PERRY = (
    "Perry's Chemical Engineers' Handbook, 8th ed. (2008): DIPPR eq. 105 density "
    "(table 2-32), DIPPR eq. 101 viscosity (table 2-313) and vapour pressure (table 2-8); "
    "coefficients as carried by the chemicals package"
)
_VDI = (
    "VDI Heat Atlas, 2nd ed. (2010): PPDS saturated-liquid density and viscosity "
    "equations, Wagner vapour-pressure equation; coefficients as carried by the chemicals "
    "package"
)
_LALIBERTE = (
    "Laliberte, M. (2009), J. Chem. Eng. Data 54, 1725 (aqueous electrolyte density and "
    "viscosity model; coefficients as distributed with the chemicals package, "
    "Electrolytes/Laliberte2009.tsv), with IAPWS water"
)


@dataclass(frozen=True)
class LiquidEntry:
    """A catalogue liquid: which correlations give its properties, and where they hold."""

    name: str
    """Readable name, e.g. ``"ethylene glycol"``."""
    method: str
    """Key of the correlation set in ``_METHODS``: ``"perry_dippr"``, ``"vdi_ppds"`` or
    ``"laliberte"``."""
    cas: str
    """CAS registry number of the pure substance (the solute for aqueous solutions)."""
    t_min: float
    """Lowest temperature of the correlations' common range [K]."""
    t_max: float
    """Highest temperature of the correlations' common range [K]."""
    source: str
    """The published source of the correlations and coefficients."""
    mass_fraction: float | None = None
    """Solute mass fraction of an aqueous solution [-]; ``None`` for a pure liquid."""
    coefficients: tuple[float, ...] = ()
    """Typed coefficients of the ``"laliberte"`` model (see ``source``); the DIPPR and PPDS
    ones are in :mod:`workbench.core.liquid_coefficients` by CAS number."""
    description: str = ""
    eos: str | None = None
    """CoolProp's name of the pure liquid's reference equation of state, which gives the
    isentropic bulk modulus (tabulated in :mod:`workbench.core.liquid_tables` under this
    name); ``None`` where there is none (the user gives a bulk modulus)."""
    eos_source: str = ""
    """The published equation of state behind ``eos``."""


# Laliberte (2009) coefficients, typed from the table distributed with the chemicals
# package (Electrolytes/Laliberte2009.tsv); tests/core/test_fluid.py checks them against
# that file. Order: density c0..c4, viscosity v1..v6.
_LALIBERTE_NAOH = (
    319.020509469838, 528.592358475315, -0.102197896602724, 0.000350420706415566,
    765.970470238438,
    448.457566713375, 0.00871452408983102, -431.97212334697, 0.0160144202049452,
    104.011738670148, 4.64493684488816,
)
_LALIBERTE_NACL = (
    -0.00324112223655149, 0.0636354335906616, 1.01371399467365, 0.0145951015210159,
    3317.34854426537,
    16.221788633396, 1.32293086770011, 1.48485985010431, 0.00746912559657377,
    30.7802007540575, 2.05826852322558,
)

# Reference equations of state whose speed of sound gives K_s = rho*w^2 (CoolProp's HEOS
# backend implements them; tests/core/test_fluid_bulk_modulus.py checks that CoolProp
# names the same publication for each fluid).
_EOS_ETHANOL = "Schroeder, Penoncello & Schroeder (2014), J. Phys. Chem. Ref. Data 43, 043102"
_EOS_METHANOL = ("de Reuck & Craven (1993), Methanol: International Thermodynamic Tables of "
                 "the Fluid State 12, IUPAC, Blackwell")
_EOS_SHORT = ("Lemmon & Span (2006), J. Chem. Eng. Data 51, 785 (short equations of state "
              "for 20 industrial fluids)")
_EOS_PROPYLENE_GLYCOL = ("Eisenbach, Scholz, Span, Cristancho, Lemmon & Thol (2021), "
                         "J. Phys. Chem. Ref. Data 50")
_EOS_DODECANE = "Lemmon & Huber (2004), Energy & Fuels 18, 960"

#: Catalogue of plant liquids by key. Ranges are the common range of the entry's
#: correlations as tabulated by their sources (checked against the chemicals package's
#: tables in the tests). The bulk modulus comes from the liquid's reference equation of
#: state where one exists (``eos``); for the others no source above covers it, so surge
#: estimates ask the user for one.
CATALOGUE: dict[str, LiquidEntry] = {
    "ethanol": LiquidEntry("ethanol", "perry_dippr", "64-17-5", 200.0, 440.0, _PERRY,
                           eos="Ethanol", eos_source=_EOS_ETHANOL),
    "methanol": LiquidEntry("methanol", "perry_dippr", "67-56-1", 175.47, 337.85, _PERRY,
                            eos="Methanol", eos_source=_EOS_METHANOL),
    "isopropanol": LiquidEntry("isopropanol (2-propanol)", "perry_dippr", "67-63-0",
                               185.26, 355.3, _PERRY),
    "acetone": LiquidEntry("acetone", "perry_dippr", "67-64-1", 190.0, 329.44, _PERRY,
                           eos="Acetone", eos_source=_EOS_SHORT),
    "toluene": LiquidEntry("toluene", "perry_dippr", "108-88-3", 178.18, 383.78, _PERRY,
                           eos="Toluene", eos_source=_EOS_SHORT),
    "acetic_acid": LiquidEntry("acetic acid (glacial)", "perry_dippr", "64-19-7",
                               289.81, 391.05, _PERRY),
    "ethylene_glycol": LiquidEntry("ethylene glycol (pure)", "perry_dippr", "107-21-1",
                                   260.15, 576.0, _PERRY),
    "propylene_glycol": LiquidEntry("propylene glycol (pure)", "perry_dippr", "57-55-6",
                                    213.15, 500.8, _PERRY, eos="PropyleneGlycol",
                                    eos_source=_EOS_PROPYLENE_GLYCOL),
    "n_dodecane": LiquidEntry(
        "n-dodecane", "perry_dippr", "112-40-3", 263.57, 526.4, _PERRY,
        description="pure n-dodecane; fuels such as diesel are mixtures: use the "
        "supplier's data with kind = \"custom\"",
        eos="n-Dodecane", eos_source=_EOS_DODECANE,
    ),
    "glycerol": LiquidEntry(
        "glycerol (pure)", "vdi_ppds", "56-81-5", 291.45, 563.0, _VDI,
        description="range: melting point 291.45 K (the Tm listed with the VDI "
        "vapour-pressure coefficients) to the normal boiling point, 563 K (from memory); "
        "glycerol supercools readily below its melting point",
    ),
    "sodium_hydroxide_50": LiquidEntry(
        "sodium hydroxide solution 50 % (caustic soda)", "laliberte", "1310-73-2",
        285.65, 343.15, _LALIBERTE, mass_fraction=0.50, coefficients=_LALIBERTE_NAOH,
        description="NaOH 50 % by mass in water; range = the viscosity fit's 12.5-70 degC "
        "(density fit 4-120 degC, w <= 0.503)",
    ),
    "sodium_chloride_3_5": LiquidEntry(
        "sodium chloride brine 3.5 %", "laliberte", "7647-14-5",
        278.15, 373.15, _LALIBERTE, mass_fraction=0.035, coefficients=_LALIBERTE_NACL,
        description="NaCl 3.5 % by mass in water (about seawater salinity, but not "
        "seawater); fits 0-140 and 5-154 degC, range capped at 100 degC here",
    ),
}

_LIQUID_ALIASES = {
    "ethyl_alcohol": "ethanol",
    "methyl_alcohol": "methanol",
    "ipa": "isopropanol",
    "2_propanol": "isopropanol",
    "isopropyl_alcohol": "isopropanol",
    "meg": "ethylene_glycol",
    "monoethylene_glycol": "ethylene_glycol",
    "mpg": "propylene_glycol",
    "glycerine": "glycerol",
    "glycerin": "glycerol",
    "dodecane": "n_dodecane",
    "caustic_soda_50": "sodium_hydroxide_50",
    "naoh_50": "sodium_hydroxide_50",
    "brine_3_5": "sodium_chloride_3_5",
    "nacl_3_5": "sodium_chloride_3_5",
}


def _normalise(name: str) -> str:
    key = name.strip().lower().replace("%", "").replace(".", "_")
    key = re.sub(r"[\s\-]+", "_", key).strip("_")
    return re.sub(r"_+", "_", key)


def liquid_names() -> list[str]:
    """Names :func:`liquid_properties` accepts: ``"water"`` and the catalogue keys."""
    return ["water", *CATALOGUE]


def _entry(name: str) -> LiquidEntry:
    key = _normalise(name)
    key = _LIQUID_ALIASES.get(key, key)
    if key in CATALOGUE:
        return CATALOGUE[key]
    if key in SOLUTIONS:
        raise FluidPropertyError(
            f"'{name}' needs its concentration: kind = \"{key}\" with "
            f"{SOLUTIONS[key].parameter} ({SOLUTIONS[key].range_text()})"
        )
    known = liquid_names()
    close = difflib.get_close_matches(key, known + list(_LIQUID_ALIASES), n=1, cutoff=0.6)
    hint = f" (did you mean '{_LIQUID_ALIASES.get(close[0], close[0])}'?)" if close else ""
    raise FluidPropertyError(
        f"unknown liquid '{name}'{hint}; known liquids: {', '.join(known)}; solutions "
        f"with a concentration: {', '.join(SOLUTIONS)}; or kind = \"custom\" with density "
        "and viscosity"
    )


def _refuse_supercritical(entry: LiquidEntry, t: float, t_critical: float) -> None:
    if t >= t_critical:
        raise FluidPropertyError(
            f"{entry.name} at {_celsius(t)} is above its critical temperature "
            f"({_celsius(t_critical)}): there is no liquid; its correlations hold from "
            f"{_celsius(entry.t_min)} to {_celsius(entry.t_max)}"
        )


def _perry_dippr(entry: LiquidEntry, t: float) -> tuple[float, float, float | None]:
    """Perry's DIPPR equations 105 (density), 101 (viscosity, vapour pressure), typed
    coefficients (:mod:`workbench.core.liquid_coefficients`)."""
    from workbench.core.liquid_coefficients import PERRY_DIPPR

    c = PERRY_DIPPR[entry.cas]
    _refuse_supercritical(entry, t, c.t_critical)
    rho = c.density.at(t) * c.molar_mass / 1000.0
    return rho, c.viscosity.at(t), c.vapor_pressure.at(t)


def _vdi_ppds(entry: LiquidEntry, t: float) -> tuple[float, float, float | None]:
    """VDI Heat Atlas PPDS equations 10 (density), 9 (viscosity) and Wagner's vapour
    pressure, typed coefficients (:mod:`workbench.core.liquid_coefficients`)."""
    from workbench.core.liquid_coefficients import VDI_PPDS

    c = VDI_PPDS[entry.cas]
    _refuse_supercritical(entry, t, c.t_critical)
    return c.density.at(t), c.viscosity.at(t), c.vapor_pressure.at(t)


def _laliberte(entry: LiquidEntry, t: float) -> tuple[float, float, float | None]:
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
    water = water_properties(t, max(101325.0, 1.001 * _water_psat(t)))
    rho_app = (c0 * ws + c1) * math.exp(1e-6 * (tc + c4) ** 2) / (ws + c2 + c3 * tc)
    rho = 1.0 / (ww / water.density + ws / rho_app)
    mu_s = math.exp((v1 * ws**v2 + v3) / (v4 * tc + 1.0)) / (v5 * ws**v6 + 1.0)  # mPa s
    mu = math.exp(ww * math.log(water.viscosity * 1e3) + ws * math.log(mu_s)) * 1e-3
    # No correlation for the solution's vapour pressure here: pure water's is an upper
    # bound (solutes lower it), which keeps the vapour check on the safe side.
    return rho, mu, water.vapor_pressure


def _water_psat(t: float) -> float:
    from chemicals.vapor_pressure import Psat_IAPWS

    return Psat_IAPWS(t)


_METHODS = {
    "perry_dippr": _perry_dippr,
    "vdi_ppds": _vdi_ppds,
    "laliberte": _laliberte,
}


@lru_cache(maxsize=1024)
def _liquid_cached(key: str, t: float, p: float) -> FluidProps:
    entry = CATALOGUE[key]
    try:
        rho, mu, psat = _METHODS[entry.method](entry, t)
    except (OverflowError, ZeroDivisionError):
        # Far outside their range the equations overflow (or meet a pole): no value.
        rho = mu = math.nan
    if not all(math.isfinite(v) and v > 0.0 for v in (rho, mu)):
        raise FluidPropertyError(
            f"{entry.name}: no physical values at {_celsius(t)}; its correlations hold from "
            f"{_celsius(entry.t_min)} to {_celsius(entry.t_max)} ({entry.source})"
        )
    notes: list[str] = []
    if not (entry.t_min <= t <= entry.t_max):
        notes.append(
            f"{_celsius(t)} is outside the range of the {entry.name} correlations "
            f"({_celsius(entry.t_min)} to {_celsius(entry.t_max)}): values are extrapolated"
        )
    if psat is None:
        notes.append(f"no vapour pressure for {entry.name}: vapour checks are skipped")
    elif entry.method != "laliberte" and psat >= p:
        notes.append(
            f"{entry.name} at {_celsius(t)} is at or above its boiling point at "
            f"{p / 1000:.3g} kPa abs (vapour pressure {psat / 1000:.4g} kPa)"
        )
    if entry.method == "laliberte":
        notes.append("vapour pressure is pure water's: an upper bound for the solution")
        if psat is not None and psat >= p:
            notes.append(
                f"at {_celsius(t)} water's vapour pressure ({psat / 1000:.4g} kPa) reaches "
                f"{p / 1000:.3g} kPa abs: the solution may boil (its boiling point is higher "
                "than water's, by an amount not computed here)"
            )
    formulation = entry.source
    if entry.mass_fraction is not None:
        formulation = f"{entry.name}: {entry.source}"
    bulk = None
    if entry.eos is not None:
        bulk, note = _eos_bulk_modulus(entry, t, p)
        if note:
            notes.append(note)
        else:
            formulation += f"; bulk modulus rho*w^2 from the equation of state of {entry.eos_source}"
    return FluidProps(
        name=entry.name,
        density=rho,
        viscosity=mu,
        vapor_pressure=psat,
        bulk_modulus=bulk,
        temperature=t,
        formulation=formulation,
        notes=tuple(notes),
    )


def _eos_bulk_modulus(entry: LiquidEntry, t: float, p: float) -> tuple[float | None, str]:
    """Isentropic bulk modulus of the liquid from its reference equation of state.

    ``K_s = rho * w**2`` of the equation named by ``entry.eos_source``, interpolated in a
    table generated from CoolProp's implementation of it (``core/liquid_tables.py``, made
    by ``tools/make_liquid_tables.py``): liquid at 101.325 kPa, or just above saturation
    pressure where the liquid boils at 101.325 kPa. A cubic Hermite evaluation of the
    table's spline is within 1e-6 of the equation (tests/core/test_fluid_bulk_modulus.py
    checks 1e-5 at random temperatures).

    ``p`` does not enter: between 70 and 105 kPa (site elevations of about -300 to
    3000 m) K_s of these liquids changes by at most 0.15 % from its 101.325 kPa value,
    0.07 % in wave speed (n-dodecane just below its boiling point; 0.06 % or less for the
    others, tested), well inside the equations' uncertainty in liquid sound speed.

    Returns ``(K_s [Pa], "")``, or ``(None, note)`` outside the table: below the triple
    point, at or above the critical point, or above the catalogue's range.
    """
    from bisect import bisect_right

    from workbench.core.liquid_tables import TABLES

    table = TABLES[entry.eos]
    no_value = "give [fluid] bulk_modulus for surge wave speeds"
    if not (table.t_triple <= t < table.t_critical):
        return None, (
            f"no bulk modulus for {entry.name} at {_celsius(t)}: its equation of state covers "
            f"liquid from the triple point {_celsius(table.t_triple)} to the critical point "
            f"{_celsius(table.t_critical)}; {no_value}"
        )
    for nodes, values, slopes in table.segments:
        if nodes[0] <= t <= nodes[-1]:
            break
    else:
        return None, (
            f"no bulk modulus for {entry.name} at {_celsius(t)}: it is tabulated from its "
            f"equation of state up to {_celsius(table.segments[-1][0][-1])}, the end of "
            f"the correlations' range; {no_value}"
        )
    i = min(bisect_right(nodes, t), len(nodes) - 1) - 1
    h = nodes[i + 1] - nodes[i]
    s = (t - nodes[i]) / h
    s2, s3 = s * s, s * s * s
    bulk = ((2.0 * s3 - 3.0 * s2 + 1.0) * values[i] + (s3 - 2.0 * s2 + s) * h * slopes[i]
            + (-2.0 * s3 + 3.0 * s2) * values[i + 1] + (s3 - s2) * h * slopes[i + 1])
    return bulk, ""


def liquid_properties(name: str, temperature_k: float, pressure_pa: float = 101325.0) -> FluidProps:
    """Properties of water or a catalogue liquid at a temperature.

    Parameters
    ----------
    name : str
        ``"water"`` or a :data:`CATALOGUE` key; case, spaces and hyphens do not matter
        and a few aliases (``"MEG"``, ``"IPA"``, ``"glycerine"``) are understood.
    temperature_k : float
        Temperature, [K]
    pressure_pa : float, optional
        Absolute pressure, [Pa]; used for water's density and for the boiling note.

    Returns
    -------
    FluidProps
        With ``notes`` when the temperature is outside the correlations' range (values
        extrapolated) or at/above the boiling point. ``bulk_modulus`` is the isentropic
        one of the liquid's reference equation of state where the entry has one
        (``eos``), else ``None``.

    Raises
    ------
    FluidPropertyError
        For an unknown name (the message lists the known ones and the nearest match) or
        a temperature at which the correlations give no physical value.

    Examples
    --------
    >>> round(liquid_properties("ethylene glycol", 293.15).density, 1)
    1113.7
    """
    if not isinstance(name, str):
        raise FluidPropertyError(f"expected a liquid name, got {name!r}")
    if _normalise(name) == "water":
        return water_properties(temperature_k, pressure_pa)
    entry = _entry(name)
    t = _check_temperature(temperature_k)
    key = next(k for k, e in CATALOGUE.items() if e is entry)
    return _liquid_cached(key, t, float(pressure_pa))


# --------------------------------------------------------------------------------------
# Aqueous solutions of a given concentration (CoolProp incompressible-liquid fits)

_MELINDER = (
    "Melinder, A. (2010), Properties of Secondary Working Fluids for Indirect Systems, "
    "IIR: density and viscosity polynomials in temperature and mass fraction, and the "
    "freezing point, as implemented in CoolProp's incompressible-liquid library "
    "(fluid {incomp})"
)
_SHARQAWY = (
    "Sharqawy, M. H., Lienhard, J. H. V, Zubair, S. M. (2010), Desalination and Water "
    "Treatment 16, 354: seawater density, viscosity and vapour pressure, as fitted in "
    "CoolProp's incompressible-liquid library (fluid {incomp})"
)


@dataclass(frozen=True)
class SolutionEntry:
    """An aqueous solution whose concentration the user gives, and where its fits hold."""

    name: str
    """Readable name, e.g. ``"ethylene glycol-water"``."""
    incomp: str
    """CoolProp's id of the incompressible-liquid fit (``"MEG"``, ``"MPG"``, ``"MITSW"``)."""
    parameter: str
    """The ``[fluid]`` key that gives the concentration: ``"mass_fraction"`` or ``"salinity"``."""
    fraction_max: float
    """Largest solute mass fraction of the fit [kg/kg] (the smallest is 0)."""
    t_min: float
    """Lowest temperature of the fit [K]; the freezing point, where the source gives one,
    may be higher: below it the solution is refused."""
    t_max: float
    """Highest temperature of the fit [K]."""
    source: str
    """The published source of the fits."""
    vapor_pressure_from_source: bool
    """``True``: the fit gives the solution's vapour pressure; ``False``: pure water's
    (IAPWS) is used, an upper bound for a solution of a less volatile solute."""
    description: str = ""

    def concentration_text(self, fraction: float) -> str:
        """The concentration as a user reads it: ``"30 % glycol by mass"``, ``"35 g/kg"``."""
        if self.parameter == "salinity":
            return f"salinity {fraction * 1000:.4g} g/kg"
        return f"{fraction * 100:.4g} % glycol by mass"

    def range_text(self) -> str:
        """The concentration range in the unit the user types."""
        if self.parameter == "salinity":
            return f"0 to {self.fraction_max * 1000:g} g/kg"
        return f"0 to {self.fraction_max:g}"


#: Solutions by ``[fluid] kind``. Ranges are those CoolProp reports for its fits (checked in
#: tests/core/test_fluid_solutions.py); glycol fits hold from the freezing point up.
SOLUTIONS: dict[str, SolutionEntry] = {
    "ethylene_glycol_water": SolutionEntry(
        "ethylene glycol-water", "MEG", "mass_fraction", 0.6, 173.15, 373.15,
        _MELINDER.format(incomp="MEG"), vapor_pressure_from_source=False,
        description="ethylene glycol (MEG) in water, e.g. chilled-water and cooling circuits; "
        "uninhibited glycol: inhibited commercial fluids differ slightly",
    ),
    "propylene_glycol_water": SolutionEntry(
        "propylene glycol-water", "MPG", "mass_fraction", 0.6, 173.15, 373.15,
        _MELINDER.format(incomp="MPG"), vapor_pressure_from_source=False,
        description="propylene glycol (MPG) in water, e.g. food-plant chilled circuits",
    ),
    "seawater": SolutionEntry(
        "seawater", "MITSW", "salinity", 0.12, 273.15, 393.15,
        _SHARQAWY.format(incomp="MITSW"), vapor_pressure_from_source=True,
        description="seawater of a given absolute salinity (open ocean about 35 g/kg); "
        "fit range 0-120 degC, 0-120 g/kg",
    ),
}


# CoolProp's incompressible-liquid fits, coefficients typed from the fluid data compiled into
# CoolProp 8.0.0 (its JSON entries "MEG", "MPG" and "MITSW"; tests/core/test_fluid_solutions.py
# checks them against the installed package and our evaluation against its results). CoolProp
# evaluates a fit in the temperature and mass fraction offsets from the fit's base values,
#     f(T, x) = sum_ij c[i][j] (T - t_base)^i (x - x_base)^j,
# density as f itself [kg/m^3], viscosity [Pa s] and seawater's vapour pressure [Pa] as exp(f),
# and the glycol freezing point as the polynomial sum_j c[j] (x - x_base)^j [K].


@dataclass(frozen=True)
class _IncompressibleFit:
    """Coefficients of one CoolProp incompressible-liquid fit (see the comment above)."""

    t_base: float
    """Base temperature of the fit [K]."""
    x_base: float
    """Base mass fraction of the fit [-]."""
    density: tuple[tuple[float, ...], ...]
    """c[i][j] of the density [kg/m^3]; i counts powers of temperature, j of fraction."""
    log_viscosity: tuple[tuple[float, ...], ...]
    """c[i][j] of ln(viscosity [Pa s])."""
    freezing: tuple[float, ...] | None = None
    """c[j] of the freezing point [K] in powers of fraction; ``None``: no freezing fit
    (CoolProp's seawater one returns about 4e-10 K, i.e. none: the fit's 0 degC holds)."""
    log_vapor_pressure: tuple[tuple[float, ...], ...] | None = None
    """c[i][j] of ln(vapour pressure [Pa]); ``None``: the fit has none."""


_INCOMP_FITS: dict[str, _IncompressibleFit] = {
    "MEG": _IncompressibleFit(
        t_base=304.878, x_base=0.308462,
        density=(
            (1034.0, 131.1, 0.749, -106.2, -96.23, 489.1),
            (-0.4781, -0.6876, 0.7855, 1.229, -7.211, 0.0),
            (-0.002692, 0.004805, -0.003995, -0.01153, 0.0, 0.0),
            (4.725e-06, 1.69e-06, 4.982e-05, 0.0, 0.0, 0.0),
        ),
        log_viscosity=(
            (-6.437255, 2.471, 0.03328, 1.659, 3.089, -18.65),
            (-0.0255, -0.01171, 0.01086, 0.003157, 0.01831, 0.0),
            (0.0001782, 0.0001052, 0.0001051, 0.0004063, 0.0, 0.0),
            (-7.669e-07, -1.634e-06, -6.475e-06, 0.0, 0.0, 0.0),
        ),
        freezing=(257.9, -80.8, -133.4, -72.93, 100.6, 11.4),
    ),
    "MPG": _IncompressibleFit(
        t_base=305.8583, x_base=0.307031,
        density=(
            (1018.0, 76.04, -24.98, -155.0, -113.1, 234.2),
            (-0.5406, -0.945, 0.27, 2.829, -2.221, 0.0),
            (-0.002666, 0.005541, -0.004018, -0.007175, 0.0, 0.0),
            (1.347e-05, -1.343e-05, 3.376e-05, 0.0, 0.0, 0.0),
        ),
        log_viscosity=(
            (-6.224055, 3.328, 0.5453, -3.9, -1.587, 35.64),
            (-0.03045, -0.03984, -0.00086, 0.1054, 0.04475, 0.0),
            (0.0002525, 0.0004332, -0.0001593, -0.001589, 0.0, 0.0),
            (-1.399e-06, -1.86e-06, -4.465e-07, 0.0, 0.0, 0.0),
        ),
        freezing=(259.9, -66.31, -109.4, -228.3, -340.9, 146.5),
    ),
    "MITSW": _IncompressibleFit(
        t_base=333.15, x_base=0.06,
        density=(
            (1027.453, 735.8869, -0.5539933, 35.62186, 955.8692, -40607.96),
            (-0.5344166, -0.3162168, 0.07281257, 1.008607, -69.92442, 0.0),
            (-0.002586938, 0.01108874, 0.001005488, 0.04584576, 0.0, 0.0),
            (9.645543e-06, -3.347615e-05, 6.331083e-05, 0.0, 0.0, 0.0),
        ),
        log_viscosity=(
            (-7.525886, 2.594336, 1.002852, -10.9672, 11.93372, 1194.663),
            (-0.01458715, 0.004295508, -0.02948796, 0.05636889, -0.07837899, 0.0),
            (8.596225e-05, -2.535294e-05, 0.0005298163, -0.0008049656, 0.0, 0.0),
            (-5.652294e-07, 6.443543e-08, 8.257508e-07, 0.0, 0.0, 0.0),
        ),
        log_vapor_pressure=(
            (9.867011, -0.6257486, -0.4402794, -0.3124263, -5.37504, -150.008),
            (0.04626598, 3.944406e-05, -0.0009964331, -0.01074101, 0.2440279, 0.0),
            (-0.0001646446, -1.152724e-06, -1.908068e-06, 0.0005749479, 0.0, 0.0),
            (5.36429e-07, -5.064038e-09, -4.651789e-08, 0.0, 0.0, 0.0),
        ),
    ),
}


def _incomp_values(incomp: str, t: float, x: float) -> dict[str, float]:
    """Density [kg/m^3], viscosity [Pa s], freezing point [K] (``nan``: none) and vapour
    pressure [Pa] (``nan``: none) of a CoolProp incompressible-liquid fit at (t [K], x [-])."""
    from numpy import exp, nan
    from numpy.polynomial.polynomial import polyval, polyval2d

    fit = _INCOMP_FITS[incomp]
    dt, dx = t - fit.t_base, x - fit.x_base
    return {
        "density": float(polyval2d(dt, dx, fit.density)),
        "viscosity": float(exp(polyval2d(dt, dx, fit.log_viscosity))),
        "freezing": nan if fit.freezing is None else float(polyval(dx, fit.freezing)),
        "vapor_pressure": (nan if fit.log_vapor_pressure is None
                           else float(exp(polyval2d(dt, dx, fit.log_vapor_pressure)))),
    }


def _water_vapour_pressure(t: float) -> float:
    """Pure water's vapour pressure [Pa]: as :func:`water_properties` where it holds
    (IF97 from 0 degC, IAPWS-95 for supercooled liquid to 235 K); IF97 extrapolated below."""
    from chemicals.iapws import iapws95_Psat

    if T_ZERO_CELSIUS <= t or t < WATER_T_MIN:
        return _water_psat(t)
    return iapws95_Psat(t)


def solution_properties(
    kind: str, temperature_k: float, fraction: float, pressure_pa: float = 101325.0
) -> FluidProps:
    """Properties of a glycol-water mixture or seawater at a temperature and concentration.

    Density and viscosity from CoolProp's incompressible-liquid fits of the published
    tables (:data:`SOLUTIONS` names each source). Vapour pressure: seawater's from its
    fit; for glycol solutions pure water's (IAPWS), which is higher than the solution's
    and so errs on the safe side in vapour checks. No bulk modulus: the sources give no
    speed of sound, so surge wave speeds need ``[fluid] bulk_modulus``.

    Parameters
    ----------
    kind : str
        A :data:`SOLUTIONS` key: ``"ethylene_glycol_water"``, ``"propylene_glycol_water"``
        or ``"seawater"``.
    temperature_k : float
        Temperature, [K].
    fraction : float
        Solute mass fraction, [kg/kg]: glycol mass fraction (0.3 for 30 % by mass), or
        the absolute salinity of seawater (0.035 for 35 g/kg).
    pressure_pa : float, optional
        Absolute pressure, [Pa]; for the boiling note.

    Returns
    -------
    FluidProps
        ``bulk_modulus`` is ``None``.

    Raises
    ------
    FluidPropertyError
        For an unknown kind, a concentration outside the fit's range, or a temperature
        below the freezing point or outside the fit's range (the message gives the range).

    Examples
    --------
    >>> round(solution_properties("ethylene_glycol_water", 293.15, 0.3).density, 1)
    1038.0
    """
    if kind not in SOLUTIONS:
        raise FluidPropertyError(
            f"unknown solution '{kind}'; known: {', '.join(SOLUTIONS)}"
        )
    entry = SOLUTIONS[kind]
    try:
        x = float(fraction)
    except (TypeError, ValueError):
        raise FluidPropertyError(f"{entry.name}: expected a mass fraction, got {fraction!r}") from None
    if not (math.isfinite(x) and 0.0 <= x <= entry.fraction_max):
        given = f"{x * 1000:g} g/kg" if entry.parameter == "salinity" else f"{x:g}"
        raise FluidPropertyError(
            f"{entry.name}: {entry.parameter.replace('_', ' ')} {given} is outside the range "
            f"of its fits, {entry.range_text()} ({entry.source})"
        )
    t = _check_temperature(temperature_k)
    p = float(pressure_pa)
    if not (math.isfinite(p) and p > 0.0):
        raise FluidPropertyError(f"expected a positive absolute pressure [Pa], got {pressure_pa!r}")
    return _solution_cached(kind, t, x, p)


@lru_cache(maxsize=1024)
def _solution_cached(kind: str, t: float, x: float, p: float) -> FluidProps:
    entry = SOLUTIONS[kind]
    what = f"{entry.name}, {entry.concentration_text(x)}"
    fit = _incomp_values(entry.incomp, t, x)
    t_freeze = fit["freezing"]
    freezes = math.isfinite(t_freeze) and t_freeze > entry.t_min
    if freezes and t < t_freeze:
        raise FluidPropertyError(
            f"{what} at {_celsius(t)} is below its freezing point {_celsius(t_freeze)}: ice "
            f"forms; its fits hold from the freezing point to {_celsius(entry.t_max)} "
            f"({entry.source})"
        )
    if not (entry.t_min <= t <= entry.t_max):
        low = f"the freezing point {_celsius(t_freeze)}" if freezes else _celsius(entry.t_min)
        raise FluidPropertyError(
            f"{what} at {_celsius(t)} is outside the range of its fits, from {low} to "
            f"{_celsius(entry.t_max)} ({entry.source})"
        )
    notes: list[str] = []
    if entry.vapor_pressure_from_source:
        psat = fit["vapor_pressure"]
        formulation = f"{what}: {entry.source}"
        if psat >= p:
            # The fits do not depend on pressure: the values are those of liquid just
            # above its saturation pressure.
            notes.append(
                f"{entry.name} at {_celsius(t)} is at or above its boiling point at "
                f"{p / 1000:.3g} kPa abs (vapour pressure {psat / 1000:.4g} kPa): values are "
                "for liquid just above its saturation pressure"
            )
    else:
        psat = _water_vapour_pressure(t)
        formulation = (f"{what}: {entry.source}; vapour pressure: pure water's (IAPWS), an "
                       "upper bound for the solution")
        notes.append("vapour pressure is pure water's: an upper bound for the solution")
        if psat >= p:
            notes.append(
                f"at {_celsius(t)} water's vapour pressure ({psat / 1000:.4g} kPa) reaches "
                f"{p / 1000:.3g} kPa abs: the solution may boil (its boiling point is higher "
                "than water's, by an amount not computed here)"
            )
    rho, mu = fit["density"], fit["viscosity"]
    if not all(math.isfinite(v) and v > 0.0 for v in (rho, mu)):
        raise FluidPropertyError(f"{what}: no physical values at {_celsius(t)} ({entry.source})")
    return FluidProps(
        name=what,
        density=rho,
        viscosity=mu,
        vapor_pressure=float(psat),
        bulk_modulus=None,
        temperature=t,
        formulation=formulation,
        notes=tuple(notes),
    )


def custom_properties(
    density: float,
    viscosity: float,
    vapor_pressure: float | None = None,
    bulk_modulus: float | None = None,
    temperature_k: float | None = None,
    name: str = "custom liquid",
) -> FluidProps:
    """Properties the user gives (``kind = "custom"``), checked for sense.

    Parameters
    ----------
    density : float
        [kg/m^3], positive.
    viscosity : float
        Dynamic viscosity [Pa*s], positive.
    vapor_pressure : float, optional
        Absolute vapour pressure [Pa], non-negative; ``None``: vapour checks are skipped
        (a note says so).
    bulk_modulus : float, optional
        [Pa], positive; ``None``: surge wave speeds need one.
    temperature_k : float, optional
        [K], for the record.
    name : str, optional
        Readable name.

    Raises
    ------
    FluidPropertyError
        For a non-finite or non-positive value.
    """

    def positive(value, what, allow_zero=False):
        try:
            v = float(value)
        except (TypeError, ValueError):
            raise FluidPropertyError(f"{what}: expected a number, got {value!r}") from None
        if not math.isfinite(v) or v < 0.0 or (v == 0.0 and not allow_zero):
            raise FluidPropertyError(f"{what}: expected a positive value, got {value!r}")
        return v

    rho = positive(density, "density [kg/m^3]")
    mu = positive(viscosity, "viscosity [Pa*s]")
    psat = None if vapor_pressure is None else positive(vapor_pressure, "vapor_pressure [Pa]", True)
    k = None if bulk_modulus is None else positive(bulk_modulus, "bulk_modulus [Pa]")
    t = None if temperature_k is None else _check_temperature(temperature_k)
    notes = []
    if psat is None:
        notes.append("no vapour pressure given: vapour checks are skipped")
    return FluidProps(
        name=name,
        density=rho,
        viscosity=mu,
        vapor_pressure=psat,
        bulk_modulus=k,
        temperature=t,
        formulation="custom: values given by the user",
        notes=tuple(notes),
    )
