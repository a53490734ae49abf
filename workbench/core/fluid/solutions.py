"""Aqueous solutions whose concentration the user gives: ethylene and propylene glycol in
water (Melinder 2010) and seawater (Sharqawy et al. 2010), from the fits of
:mod:`.incompressible_fits`; outside a fit's range the values are refused with the range."""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

from workbench.core.finding_text import KeptText
from workbench.core.fluid.basics import (
    FluidPropertyError,
    check_temperature,
    water_boils_note,
)
from workbench.core.fluid.incompressible_fits import incomp_values
from workbench.core.fluid.water import water_vapour_pressure
from workbench.core.model import FluidProps

__all__ = ["SOLUTIONS", "SolutionEntry", "solution_properties"]


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
    t = check_temperature(temperature_k)
    p = float(pressure_pa)
    if not (math.isfinite(p) and p > 0.0):
        raise FluidPropertyError(f"expected a positive absolute pressure [Pa], got {pressure_pa!r}")
    return _solution_cached(kind, t, x, p)


@lru_cache(maxsize=1024)
def _solution_cached(kind: str, t: float, x: float, p: float) -> FluidProps:
    entry = SOLUTIONS[kind]
    what = f"{entry.name}, {entry.concentration_text(x)}"
    fit = incomp_values(entry.incomp, t, x)
    t_freeze = fit["freezing"]
    freezes = math.isfinite(t_freeze) and t_freeze > entry.t_min
    if freezes and t < t_freeze:
        raise FluidPropertyError(KeptText(
            f"{what} at {{t}} is below its freezing point {{freeze}}: ice forms; its fits "
            f"hold from the freezing point to {{high}} ({entry.source})", 3,
            t=(t, "temperature"), freeze=(t_freeze, "temperature"),
            high=(entry.t_max, "temperature")))
    if not (entry.t_min <= t <= entry.t_max):
        low = "the freezing point {low}" if freezes else "{low}"
        raise FluidPropertyError(KeptText(
            f"{what} at {{t}} is outside the range of its fits, from {low} to {{high}} "
            f"({entry.source})", 3, t=(t, "temperature"),
            low=(t_freeze if freezes else entry.t_min, "temperature"),
            high=(entry.t_max, "temperature")))
    notes: list[str] = []
    if entry.vapor_pressure_from_source:
        psat = fit["vapor_pressure"]
        formulation = f"{what}: {entry.source}"
        if psat >= p:
            # The fits do not depend on pressure: the values are those of liquid just
            # above its saturation pressure.
            notes.append(KeptText(
                f"{entry.name} at {{t}} is at or above its boiling point at {{p}} (vapour "
                "pressure {psat}): values are for liquid just above its saturation pressure",
                t=(t, "temperature", 3), p=(p, "pressure_abs"), psat=(psat, "pressure_abs", 4)
            ))
    else:
        psat = water_vapour_pressure(t)
        formulation = (f"{what}: {entry.source}; vapour pressure: pure water's (IAPWS), an "
                       "upper bound for the solution")
        notes.append("vapour pressure is pure water's: an upper bound for the solution")
        if psat >= p:
            notes.append(water_boils_note(t, p, psat))
    rho, mu = fit["density"], fit["viscosity"]
    if not all(math.isfinite(v) and v > 0.0 for v in (rho, mu)):
        raise FluidPropertyError(KeptText(f"{what}: no physical values at {{t}} ({entry.source})",
                                          3, t=(t, "temperature")))
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
