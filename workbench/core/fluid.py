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
  Perry's Handbook; VDI Heat Atlas PPDS and Wagner equations), and aqueous sodium hydroxide and
  sodium chloride by the Laliberte (2009) electrolyte model. Each entry names its source
  and its valid temperature range; outside it the values are extrapolated with a note.
* :func:`custom_properties` -- numbers the user gives.

``chemicals`` takes about 0.2 s to import, so it is imported on first use only.
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
    "WATER_FORMULATION",
    "custom_properties",
    "liquid_names",
    "liquid_properties",
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
    """Typed coefficients where the model is not in ``chemicals`` (see ``source``)."""
    description: str = ""


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

#: Catalogue of plant liquids by key. Ranges are the common range of the entry's
#: correlations as tabulated by their sources (checked against the chemicals package's
#: tables in the tests). Bulk modulus is not given for catalogue liquids: no correlation
#: in the sources above covers it, so surge estimates ask the user for one.
CATALOGUE: dict[str, LiquidEntry] = {
    "ethanol": LiquidEntry("ethanol", "perry_dippr", "64-17-5", 200.0, 440.0, _PERRY),
    "methanol": LiquidEntry("methanol", "perry_dippr", "67-56-1", 175.47, 337.85, _PERRY),
    "isopropanol": LiquidEntry("isopropanol (2-propanol)", "perry_dippr", "67-63-0",
                               185.26, 355.3, _PERRY),
    "acetone": LiquidEntry("acetone", "perry_dippr", "67-64-1", 190.0, 329.44, _PERRY),
    "toluene": LiquidEntry("toluene", "perry_dippr", "108-88-3", 178.18, 383.78, _PERRY),
    "acetic_acid": LiquidEntry("acetic acid (glacial)", "perry_dippr", "64-19-7",
                               289.81, 391.05, _PERRY),
    "ethylene_glycol": LiquidEntry("ethylene glycol (pure)", "perry_dippr", "107-21-1",
                                   260.15, 576.0, _PERRY),
    "propylene_glycol": LiquidEntry("propylene glycol (pure)", "perry_dippr", "57-55-6",
                                    213.15, 500.8, _PERRY),
    "n_dodecane": LiquidEntry(
        "n-dodecane", "perry_dippr", "112-40-3", 263.57, 526.4, _PERRY,
        description="pure n-dodecane; fuels such as diesel are mixtures: use the "
        "supplier's data with kind = \"custom\"",
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
    known = liquid_names()
    close = difflib.get_close_matches(key, known + list(_LIQUID_ALIASES), n=1, cutoff=0.6)
    hint = f" (did you mean '{_LIQUID_ALIASES.get(close[0], close[0])}'?)" if close else ""
    raise FluidPropertyError(
        f"unknown liquid '{name}'{hint}; known liquids: {', '.join(known)}, "
        "or kind = \"custom\" with density and viscosity"
    )


def _refuse_supercritical(entry: LiquidEntry, t: float) -> None:
    from chemicals.critical import Tc

    t_c = Tc(entry.cas)
    if t_c is not None and t >= t_c:
        raise FluidPropertyError(
            f"{entry.name} at {_celsius(t)} is above its critical temperature "
            f"({_celsius(t_c)}): there is no liquid; its correlations hold from "
            f"{_celsius(entry.t_min)} to {_celsius(entry.t_max)}"
        )


def _perry_dippr(entry: LiquidEntry, t: float) -> tuple[float, float, float | None]:
    import chemicals
    from chemicals.dippr import EQ101, EQ105
    from chemicals.vapor_pressure import Psat_data_Perrys2_8
    from chemicals.viscosity import mu_data_Perrys_8E_2_313
    from chemicals.volume import rho_data_Perry_8E_105_l

    _refuse_supercritical(entry, t)
    cas = entry.cas
    r = rho_data_Perry_8E_105_l.loc[cas]
    rho = EQ105(t, r["C1"], r["C2"], r["C3"], r["C4"]) * chemicals.MW(cas) / 1000.0
    m = mu_data_Perrys_8E_2_313.loc[cas]
    mu = EQ101(t, m["C1"], m["C2"], m["C3"], m["C4"], m["C5"])
    s = Psat_data_Perrys2_8.loc[cas]
    psat = EQ101(t, s["C1"], s["C2"], s["C3"], s["C4"], s["C5"])
    return float(rho), float(mu), float(psat)


def _vdi_ppds(entry: LiquidEntry, t: float) -> tuple[float, float, float | None]:
    from chemicals.vapor_pressure import Psat_data_VDI_PPDS_3, Wagner
    from chemicals.viscosity import PPDS9, mu_data_VDI_PPDS_7
    from chemicals.volume import rho_data_VDI_PPDS_2, volume_VDI_PPDS

    _refuse_supercritical(entry, t)
    r = rho_data_VDI_PPDS_2.loc[entry.cas]
    rho = volume_VDI_PPDS(t, r["Tc"], r["rhoc"], r["A"], r["B"], r["C"], r["D"])
    m = mu_data_VDI_PPDS_7.loc[entry.cas]
    mu = PPDS9(t, m["A"], m["B"], m["C"], m["D"], m["E"])
    s = Psat_data_VDI_PPDS_3.loc[entry.cas]
    psat = Wagner(t, s["Tc"], s["Pc"], s["A"], s["B"], s["C"], s["D"])
    return float(rho), float(mu), float(psat)


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
    rho, mu, psat = _METHODS[entry.method](entry, t)
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
    return FluidProps(
        name=entry.name,
        density=rho,
        viscosity=mu,
        vapor_pressure=psat,
        bulk_modulus=None,
        temperature=t,
        formulation=formulation,
        notes=tuple(notes),
    )


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
        extrapolated) or at/above the boiling point. ``bulk_modulus`` is ``None`` for
        catalogue liquids.

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
