"""Isentropic bulk modulus of a catalogue liquid from its reference equation of state,
``K_s = rho * w**2``, interpolated in the tables of :mod:`workbench.core.liquid_tables`."""

from __future__ import annotations

from typing import TYPE_CHECKING

from workbench.core.finding_text import KeptText

if TYPE_CHECKING:
    from workbench.core.fluid.catalogue import LiquidEntry

__all__ = ["EOS_DODECANE", "EOS_ETHANOL", "EOS_METHANOL", "EOS_PROPYLENE_GLYCOL", "EOS_SHORT",
           "eos_bulk_modulus"]


# Reference equations of state whose speed of sound gives K_s = rho*w^2 (CoolProp's HEOS
# backend implements them; tests/core/test_fluid_bulk_modulus.py checks that CoolProp
# names the same publication for each fluid).
EOS_ETHANOL = "Schroeder, Penoncello & Schroeder (2014), J. Phys. Chem. Ref. Data 43, 043102"
EOS_METHANOL = ("de Reuck & Craven (1993), Methanol: International Thermodynamic Tables of "
                 "the Fluid State 12, IUPAC, Blackwell")
EOS_SHORT = ("Lemmon & Span (2006), J. Chem. Eng. Data 51, 785 (short equations of state "
              "for 20 industrial fluids)")
EOS_PROPYLENE_GLYCOL = ("Eisenbach, Scholz, Span, Cristancho, Lemmon & Thol (2021), "
                         "J. Phys. Chem. Ref. Data 50")
EOS_DODECANE = "Lemmon & Huber (2004), Energy & Fuels 18, 960"


def eos_bulk_modulus(entry: LiquidEntry, t: float, p: float) -> tuple[float | None, str]:
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
        return None, KeptText(
            f"no bulk modulus for {entry.name} at {{t}}: its equation of state covers liquid "
            f"from the triple point {{triple}} to the critical point {{critical}}; {no_value}",
            3, t=(t, "temperature"), triple=(table.t_triple, "temperature"),
            critical=(table.t_critical, "temperature"))
    for nodes, values, slopes in table.segments:
        if nodes[0] <= t <= nodes[-1]:
            break
    else:
        return None, KeptText(
            f"no bulk modulus for {entry.name} at {{t}}: it is tabulated from its equation "
            f"of state up to {{end}}, the end of the correlations' range; {no_value}", 3,
            t=(t, "temperature"), end=(table.segments[-1][0][-1], "temperature"))
    i = min(bisect_right(nodes, t), len(nodes) - 1) - 1
    h = nodes[i + 1] - nodes[i]
    s = (t - nodes[i]) / h
    s2, s3 = s * s, s * s * s
    bulk = ((2.0 * s3 - 3.0 * s2 + 1.0) * values[i] + (s3 - 2.0 * s2 + s) * h * slopes[i]
            + (-2.0 * s3 + 3.0 * s2) * values[i + 1] + (s3 - s2) * h * slopes[i + 1])
    return bulk, ""
