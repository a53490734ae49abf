"""Common plant liquids from published correlations: the :data:`CATALOGUE`, its names and
aliases, and :func:`liquid_properties` (water by :mod:`.water`).

Pure liquids by the DIPPR equations of Perry's Handbook or the VDI Heat Atlas PPDS and
Wagner equations (coefficients typed into :mod:`workbench.core.liquid_coefficients`),
aqueous NaOH and NaCl by Laliberte (:mod:`.electrolytes`); the bulk modulus from the
liquid's reference equation of state where one exists (:mod:`.bulk_modulus`).
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass
from functools import lru_cache

from workbench.core.finding_text import KeptText
from workbench.core.fluid.basics import (
    FluidPropertyError,
    check_temperature,
    water_boils_note,
)
from workbench.core.fluid.bulk_modulus import (
    EOS_DODECANE,
    EOS_ETHANOL,
    EOS_METHANOL,
    EOS_PROPYLENE_GLYCOL,
    EOS_SHORT,
    eos_bulk_modulus,
)
from workbench.core.fluid.electrolytes import LALIBERTE, LALIBERTE_NACL, LALIBERTE_NAOH, laliberte
from workbench.core.fluid.solutions import SOLUTIONS
from workbench.core.fluid.water import water_properties
from workbench.core.model import FluidProps

__all__ = ["CATALOGUE", "METHODS", "LiquidEntry", "liquid_names", "liquid_properties"]


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

@dataclass(frozen=True)
class LiquidEntry:
    """A catalogue liquid: which correlations give its properties, and where they hold."""

    name: str
    """Readable name, e.g. ``"ethylene glycol"``."""
    method: str
    """Key of the correlation set in ``METHODS``: ``"perry_dippr"``, ``"vdi_ppds"`` or
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



#: Catalogue of plant liquids by key. Ranges are the common range of the entry's
#: correlations as tabulated by their sources (checked against the chemicals package's
#: tables in the tests). The bulk modulus comes from the liquid's reference equation of
#: state where one exists (``eos``); for the others no source above covers it, so surge
#: estimates ask the user for one.
CATALOGUE: dict[str, LiquidEntry] = {
    "ethanol": LiquidEntry("ethanol", "perry_dippr", "64-17-5", 200.0, 440.0, _PERRY,
                           eos="Ethanol", eos_source=EOS_ETHANOL),
    "methanol": LiquidEntry("methanol", "perry_dippr", "67-56-1", 175.47, 337.85, _PERRY,
                            eos="Methanol", eos_source=EOS_METHANOL),
    "isopropanol": LiquidEntry("isopropanol (2-propanol)", "perry_dippr", "67-63-0",
                               185.26, 355.3, _PERRY),
    "acetone": LiquidEntry("acetone", "perry_dippr", "67-64-1", 190.0, 329.44, _PERRY,
                           eos="Acetone", eos_source=EOS_SHORT),
    "toluene": LiquidEntry("toluene", "perry_dippr", "108-88-3", 178.18, 383.78, _PERRY,
                           eos="Toluene", eos_source=EOS_SHORT),
    "acetic_acid": LiquidEntry("acetic acid (glacial)", "perry_dippr", "64-19-7",
                               289.81, 391.05, _PERRY),
    "ethylene_glycol": LiquidEntry("ethylene glycol (pure)", "perry_dippr", "107-21-1",
                                   260.15, 576.0, _PERRY),
    "propylene_glycol": LiquidEntry("propylene glycol (pure)", "perry_dippr", "57-55-6",
                                    213.15, 500.8, _PERRY, eos="PropyleneGlycol",
                                    eos_source=EOS_PROPYLENE_GLYCOL),
    "n_dodecane": LiquidEntry(
        "n-dodecane", "perry_dippr", "112-40-3", 263.57, 526.4, _PERRY,
        description="pure n-dodecane; fuels such as diesel are mixtures: use the "
        "supplier's data with kind = \"custom\"",
        eos="n-Dodecane", eos_source=EOS_DODECANE,
    ),
    "glycerol": LiquidEntry(
        "glycerol (pure)", "vdi_ppds", "56-81-5", 291.45, 563.0, _VDI,
        description="range: melting point 291.45 K (the Tm listed with the VDI "
        "vapour-pressure coefficients) to the normal boiling point, 563 K; "
        "glycerol supercools readily below its melting point",
    ),
    "sodium_hydroxide_50": LiquidEntry(
        "sodium hydroxide solution 50 % (caustic soda)", "laliberte", "1310-73-2",
        285.65, 343.15, LALIBERTE, mass_fraction=0.50, coefficients=LALIBERTE_NAOH,
        description="NaOH 50 % by mass in water; range = the viscosity fit's 12.5-70 degC "
        "(density fit 4-120 degC, w <= 0.503)",
    ),
    "sodium_chloride_3_5": LiquidEntry(
        "sodium chloride brine 3.5 %", "laliberte", "7647-14-5",
        278.15, 373.15, LALIBERTE, mass_fraction=0.035, coefficients=LALIBERTE_NACL,
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
        raise FluidPropertyError(KeptText(
            f"{entry.name} at {{t}} is above its critical temperature ({{critical}}): there "
            "is no liquid; its correlations hold from {low} to {high}", 3,
            t=(t, "temperature"), critical=(t_critical, "temperature"),
            low=(entry.t_min, "temperature"), high=(entry.t_max, "temperature")))


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



METHODS = {
    "perry_dippr": _perry_dippr,
    "vdi_ppds": _vdi_ppds,
    "laliberte": laliberte,
}


@lru_cache(maxsize=1024)
def _liquid_cached(key: str, t: float, p: float) -> FluidProps:
    entry = CATALOGUE[key]
    try:
        rho, mu, psat = METHODS[entry.method](entry, t)
    except (OverflowError, ZeroDivisionError):
        # Far outside their range the equations overflow (or meet a pole): no value.
        rho = mu = math.nan
    if not all(math.isfinite(v) and v > 0.0 for v in (rho, mu)):
        raise FluidPropertyError(KeptText(
            f"{entry.name}: no physical values at {{t}}; its correlations hold from {{low}} "
            f"to {{high}} ({entry.source})", 3, t=(t, "temperature"),
            low=(entry.t_min, "temperature"), high=(entry.t_max, "temperature")))
    notes: list[str] = []
    if not (entry.t_min <= t <= entry.t_max):
        notes.append(KeptText(
            f"{{t}} is outside the range of the {entry.name} correlations ({{low}} to "
            "{high}): values are extrapolated", t=(t, "temperature", 3),
            low=(entry.t_min, "temperature", 3), high=(entry.t_max, "temperature", 3)
        ))
    if psat is None:
        notes.append(f"no vapour pressure for {entry.name}: vapour checks are skipped")
    elif entry.method != "laliberte" and psat >= p:
        notes.append(KeptText(
            f"{entry.name} at {{t}} is at or above its boiling point at {{p}} (vapour "
            "pressure {psat})", t=(t, "temperature", 3), p=(p, "pressure_abs"),
            psat=(psat, "pressure_abs", 4)
        ))
    if entry.method == "laliberte":
        notes.append("vapour pressure is pure water's: an upper bound for the solution")
        if psat is not None and psat >= p:
            notes.append(water_boils_note(t, p, psat))
    formulation = entry.source
    if entry.mass_fraction is not None:
        formulation = f"{entry.name}: {entry.source}"
    bulk = None
    if entry.eos is not None:
        bulk, note = eos_bulk_modulus(entry, t, p)
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
    t = check_temperature(temperature_k)
    key = next(k for k, e in CATALOGUE.items() if e is entry)
    return _liquid_cached(key, t, float(pressure_pa))
