"""Write workbench/core/liquid_tables.py: bulk modulus tables of the catalogue's pure liquids.

Run by hand after changing the catalogue or CoolProp (never at install or at run time):

    .venv/bin/python tools/make_liquid_tables.py          # writes the module
    .venv/bin/python tools/make_liquid_tables.py --check  # exit 1 if the module is out of date

For each catalogue liquid with a reference equation of state (``LiquidEntry.eos``), the
isentropic bulk modulus ``K_s = rho * w**2`` of the liquid at 101.325 kPa is tabulated from
the equation as CoolProp implements it (HEOS backend), from the triple point to the end of
the catalogue's temperature range. Where the liquid boils at 101.325 kPa the value is that
of liquid just above its saturation pressure (``1.0001 * p_sat``), so a table has two
segments split at that temperature, the normal boiling point: K_s(T) has a kink there.

Within each segment the nodes are evenly spaced; the spacing is halved until the cubic
spline through them (scipy's not-a-knot ``CubicSpline``) is within ``TOLERANCE`` of
CoolProp at every mid- and quarter-point. The module stores the nodes, the values and the
spline's slopes at the nodes, so a cubic Hermite evaluation at run time reproduces the
spline without scipy.

CoolProp takes about 2.5 s to import; the application must never import it, which is why
this table exists.
"""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

OUTPUT = ROOT / "workbench" / "core" / "liquid_tables.py"
#: Pressure of the tables [Pa].
REFERENCE_PRESSURE = 101325.0
#: Largest relative difference between the spline and CoolProp at the check points.
TOLERANCE = 1e-6
#: Factor above saturation pressure at which boiling liquid is evaluated (as before).
ABOVE_SATURATION = 1.0001
#: Spacing to start from [K]; fewest nodes per segment.
FIRST_STEP = 4.0
MIN_NODES = 4


def eos_bulk_modulus(fluid: str, t: float, p: float) -> float:
    """K_s = rho * w**2 [Pa] of the liquid at (t [K], max(p, 1.0001 p_sat) [Pa])."""
    import CoolProp
    from CoolProp.CoolProp import AbstractState

    state = AbstractState("HEOS", fluid)
    state.update(CoolProp.QT_INPUTS, 0.0, t)
    p_eval = max(p, ABOVE_SATURATION * state.p())
    state.specify_phase(CoolProp.iphase_liquid)
    state.update(CoolProp.PT_INPUTS, p_eval, t)
    return state.rhomass() * state.speed_sound() ** 2


def eos_limits(fluid: str) -> tuple[float, float, float]:
    """Triple point, critical point and the temperature at which ``1.0001 p_sat`` reaches
    the reference pressure, [K]."""
    import CoolProp
    from CoolProp.CoolProp import AbstractState

    state = AbstractState("HEOS", fluid)
    t_triple, t_crit = state.Ttriple(), state.T_critical()
    state.update(CoolProp.PQ_INPUTS, REFERENCE_PRESSURE / ABOVE_SATURATION, 0.0)
    return t_triple, t_crit, state.T()


def segment(fluid: str, t_lo: float, t_hi: float) -> tuple[list[float], list[float], list[float], float]:
    """Nodes, values and spline slopes of one segment; the worst relative error found."""
    import numpy as np
    from scipy.interpolate import CubicSpline

    step = FIRST_STEP
    while True:
        n = max(MIN_NODES, math.ceil((t_hi - t_lo) / step) + 1)
        nodes = np.linspace(t_lo, t_hi, n)
        values = np.array([eos_bulk_modulus(fluid, t, REFERENCE_PRESSURE) for t in nodes])
        spline = CubicSpline(nodes, values)
        checks = np.concatenate([nodes[:-1] + f * np.diff(nodes) for f in (0.25, 0.5, 0.75)])
        exact = np.array([eos_bulk_modulus(fluid, t, REFERENCE_PRESSURE) for t in checks])
        worst = float(np.max(np.abs(spline(checks) / exact - 1.0)))
        if worst < TOLERANCE:
            slopes = spline(nodes, 1)
            return nodes.tolist(), values.tolist(), slopes.tolist(), worst
        step /= 2.0
        if step < 0.01:
            raise RuntimeError(f"{fluid}: no spacing down to 0.01 K meets {TOLERANCE:g}")


def build() -> tuple[str, list[str]]:
    """The module's text and a report line per liquid."""
    import CoolProp
    import CoolProp.CoolProp as CP

    from workbench.core.fluid import CATALOGUE

    report: list[str] = []
    blocks: list[str] = []
    for key, entry in CATALOGUE.items():
        if entry.eos is None:
            continue
        t_triple, t_crit, t_boil = eos_limits(entry.eos)
        t_lo, t_hi = t_triple, entry.t_max
        if t_hi >= t_crit:
            raise RuntimeError(f"{key}: catalogue range ends above the critical point")
        bounds = [(t_lo, min(t_hi, t_boil))]
        if t_hi > t_boil:
            bounds.append((t_boil, t_hi))
        segs = []
        for lo, hi in bounds:
            nodes, values, slopes, worst = segment(entry.eos, lo, hi)
            segs.append((nodes, values, slopes))
            report.append(f"{key:18s} {lo:8.3f}-{hi:8.3f} K  {len(nodes):4d} nodes  "
                          f"worst {worst:.1e}")
        bibtex = CP.get_fluid_param_string(entry.eos, "BibTeX-EOS")
        lines = [
            f"    {entry.eos!r}: BulkModulusTable(",
            f"        eos_reference={bibtex!r},",
            f"        t_triple={t_triple!r},",
            f"        t_critical={t_crit!r},",
            "        segments=(",
        ]
        for nodes, values, slopes in segs:
            lines.append("            (")
            for name, seq in (("T [K]", nodes), ("K_s [Pa]", values), ("dK_s/dT [Pa/K]", slopes)):
                lines.append(f"                # {name}")
                lines.append("                (")
                for i in range(0, len(seq), 4):
                    lines.append("                    " + " ".join(f"{v!r}," for v in seq[i:i + 4]))
                lines.append("                ),")
            lines.append("            ),")
        lines += ["        ),", "    ),"]
        blocks.append("\n".join(lines))

    header = f'''"""Isentropic bulk modulus tables of the catalogue's pure liquids (GENERATED: do not edit).

Generated by tools/make_liquid_tables.py from the liquids' reference equations of state as
implemented in CoolProp {CoolProp.__version__} (git revision {CoolProp.__gitrevision__}), HEOS backend:
K_s = rho * w**2 of liquid at {REFERENCE_PRESSURE:g} Pa, or just above saturation pressure
({ABOVE_SATURATION:g} * p_sat) where the liquid boils at that pressure (second segment).
Equations of state (CoolProp's BibTeX keys, resolved in its CoolPropBibTeXLibrary.bib):
{chr(10).join(f"    {CATALOGUE[k].eos}: {CATALOGUE[k].eos_source}" for k in CATALOGUE if CATALOGUE[k].eos)}

Each segment gives nodes, values and the slopes of scipy's not-a-knot cubic spline through
them; a cubic Hermite evaluation reproduces that spline, within {TOLERANCE:g} (relative) of
CoolProp at the generator's check points. Re-run the script after changing the catalogue.
"""

from __future__ import annotations

from typing import NamedTuple

#: CoolProp version the tables were generated with.
COOLPROP_VERSION = {CoolProp.__version__!r}
#: Pressure of the tables [Pa].
REFERENCE_PRESSURE = {REFERENCE_PRESSURE!r}


class BulkModulusTable(NamedTuple):
    """K_s(T) of one liquid on the liquid side at the reference pressure."""

    eos_reference: str
    """CoolProp's BibTeX key of the equation of state."""
    t_triple: float
    """Triple point of the equation of state [K]: no liquid below."""
    t_critical: float
    """Critical point of the equation of state [K]."""
    segments: tuple[tuple[tuple[float, ...], tuple[float, ...], tuple[float, ...]], ...]
    """(T [K], K_s [Pa], dK_s/dT [Pa/K]) node tuples, in order of temperature; segments
    meet at the normal boiling point."""


#: Tables by CoolProp fluid name (``LiquidEntry.eos``).
TABLES: dict[str, BulkModulusTable] = {{
'''
    return header + "\n".join(blocks) + "\n}\n", report


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--check", action="store_true",
                        help="compare with the module on disk instead of writing it")
    args = parser.parse_args()
    text, report = build()
    print("\n".join(report))
    if args.check:
        same = OUTPUT.exists() and OUTPUT.read_text() == text
        print("up to date" if same else f"{OUTPUT} is out of date: re-run without --check")
        return 0 if same else 1
    OUTPUT.write_text(text)
    print(f"wrote {OUTPUT.relative_to(ROOT)} ({len(text)} characters)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
