"""Typed correlation coefficients of the catalogue's pure liquids against the chemicals package.

Outside reference: the ``chemicals`` package (registry package): its data tables of Perry's
Handbook DIPPR coefficients (``rho_data_Perry_8E_105_l``, ``mu_data_Perrys_8E_2_313``,
``Psat_data_Perrys2_8``) and VDI Heat Atlas PPDS/Wagner coefficients (``rho_data_VDI_PPDS_2``,
``mu_data_VDI_PPDS_7``, ``Psat_data_VDI_PPDS_3``), its molar masses (``chemicals.MW``) and
critical temperatures (``chemicals.critical.Tc``), and its own evaluation of each equation
from those tables (the route the workbench took before the coefficients were typed in).
Loading the tables imports pandas; that is fine here, never at run time (last test).
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.test_import_hygiene import fresh_stdout
from workbench.core.fluid import CATALOGUE, FluidPropertyError, liquid_properties
from workbench.core.liquid_coefficients import PERRY_DIPPR, VDI_PPDS

PERRY_KEYS = [k for k, e in CATALOGUE.items() if e.method == "perry_dippr"]
VDI_KEYS = [k for k, e in CATALOGUE.items() if e.method == "vdi_ppds"]


# --- the typed numbers are the tables' -------------------------------------------------


def test_every_correlation_liquid_has_typed_coefficients_and_no_row_is_spare():
    assert {CATALOGUE[k].cas for k in PERRY_KEYS} == set(PERRY_DIPPR)
    assert {CATALOGUE[k].cas for k in VDI_KEYS} == set(VDI_PPDS)


@pytest.mark.parametrize("key", PERRY_KEYS)
def test_typed_perry_dippr_coefficients_equal_the_chemicals_tables(key):
    # chemicals.volume.rho_data_Perry_8E_105_l (Perry's 8th ed. table 2-32, eq. 105),
    # chemicals.viscosity.mu_data_Perrys_8E_2_313 (table 2-313, eq. 101),
    # chemicals.vapor_pressure.Psat_data_Perrys2_8 (table 2-8, eq. 101).
    from chemicals.vapor_pressure import Psat_data_Perrys2_8
    from chemicals.viscosity import mu_data_Perrys_8E_2_313
    from chemicals.volume import rho_data_Perry_8E_105_l

    cas = CATALOGUE[key].cas
    ours = PERRY_DIPPR[cas]
    rho = rho_data_Perry_8E_105_l.loc[cas]
    assert (ours.density.A, ours.density.B, ours.density.C, ours.density.D,
            ours.density.t_min, ours.density.t_max) == tuple(
        float(rho[c]) for c in ("C1", "C2", "C3", "C4", "Tmin", "Tmax"))
    for typed, table in ((ours.viscosity, mu_data_Perrys_8E_2_313),
                         (ours.vapor_pressure, Psat_data_Perrys2_8)):
        row = table.loc[cas]
        assert (typed.A, typed.B, typed.C, typed.D, typed.E, typed.t_min, typed.t_max) == tuple(
            float(row[c]) for c in ("C1", "C2", "C3", "C4", "C5", "Tmin", "Tmax"))


@pytest.mark.parametrize("key", VDI_KEYS)
def test_typed_vdi_ppds_coefficients_equal_the_chemicals_tables(key):
    # chemicals.volume.rho_data_VDI_PPDS_2 (PPDS eq. 10), chemicals.viscosity.mu_data_VDI_PPDS_7
    # (PPDS eq. 9), chemicals.vapor_pressure.Psat_data_VDI_PPDS_3 (Wagner 2.5-5).
    from chemicals.vapor_pressure import Psat_data_VDI_PPDS_3
    from chemicals.viscosity import mu_data_VDI_PPDS_7
    from chemicals.volume import rho_data_VDI_PPDS_2

    cas = CATALOGUE[key].cas
    ours = VDI_PPDS[cas]
    r, m, s = (rho_data_VDI_PPDS_2.loc[cas], mu_data_VDI_PPDS_7.loc[cas],
               Psat_data_VDI_PPDS_3.loc[cas])
    d = ours.density
    assert (d.t_critical, d.rho_critical, d.A, d.B, d.C, d.D) == tuple(
        float(r[c]) for c in ("Tc", "rhoc", "A", "B", "C", "D"))
    v = ours.viscosity
    assert (v.A, v.B, v.C, v.D, v.E) == tuple(float(m[c]) for c in ("A", "B", "C", "D", "E"))
    p = ours.vapor_pressure
    assert (p.t_critical, p.p_critical, p.A, p.B, p.C, p.D, p.t_melting) == tuple(
        float(s[c]) for c in ("Tc", "Pc", "A", "B", "C", "D", "Tm"))


@pytest.mark.parametrize("key", PERRY_KEYS + VDI_KEYS)
def test_typed_critical_temperature_and_molar_mass_equal_chemicals(key):
    # chemicals.critical.Tc (first method it holds: reference equation of state or IUPAC)
    # and chemicals.MW (PubChem identifiers database).
    import chemicals
    from chemicals.critical import Tc

    cas = CATALOGUE[key].cas
    typed = PERRY_DIPPR.get(cas) or VDI_PPDS[cas]
    assert typed.t_critical == Tc(cas)
    if cas in PERRY_DIPPR:
        assert typed.molar_mass == chemicals.MW(cas)


# --- our evaluation is chemicals' evaluation -------------------------------------------


def _chemicals_route(key: str, t: float) -> tuple[float, float, float]:
    """Density [kg/m^3], viscosity [Pa s], vapour pressure [Pa] the way the workbench got
    them before: chemicals' table lookups and its equation functions."""
    import chemicals
    from chemicals.dippr import EQ101, EQ105
    from chemicals.vapor_pressure import Psat_data_Perrys2_8, Psat_data_VDI_PPDS_3, Wagner
    from chemicals.viscosity import PPDS9, mu_data_Perrys_8E_2_313, mu_data_VDI_PPDS_7
    from chemicals.volume import rho_data_Perry_8E_105_l, rho_data_VDI_PPDS_2, volume_VDI_PPDS

    cas = CATALOGUE[key].cas
    if CATALOGUE[key].method == "perry_dippr":
        r = rho_data_Perry_8E_105_l.loc[cas]
        rho = EQ105(t, r["C1"], r["C2"], r["C3"], r["C4"]) * chemicals.MW(cas) / 1000.0
        m = mu_data_Perrys_8E_2_313.loc[cas]
        mu = EQ101(t, m["C1"], m["C2"], m["C3"], m["C4"], m["C5"])
        s = Psat_data_Perrys2_8.loc[cas]
        psat = EQ101(t, s["C1"], s["C2"], s["C3"], s["C4"], s["C5"])
    else:
        r = rho_data_VDI_PPDS_2.loc[cas]
        rho = volume_VDI_PPDS(t, r["Tc"], r["rhoc"], r["A"], r["B"], r["C"], r["D"])
        m = mu_data_VDI_PPDS_7.loc[cas]
        mu = PPDS9(t, m["A"], m["B"], m["C"], m["D"], m["E"])
        s = Psat_data_VDI_PPDS_3.loc[cas]
        psat = Wagner(t, s["Tc"], s["Pc"], s["A"], s["B"], s["C"], s["D"])
    return float(rho), float(mu), float(psat)


def _temperatures(key: str) -> list[float]:
    """41 points over the entry's range, and extrapolations: 15 K below it and up to just
    below the critical temperature (where the values carry a note)."""
    from chemicals.critical import Tc

    entry = CATALOGUE[key]
    inside = np.linspace(entry.t_min, entry.t_max, 41).tolist()
    t_c = Tc(entry.cas)
    return [entry.t_min - 15.0, *inside, 0.5 * (entry.t_max + t_c), t_c - 1e-3]


@pytest.mark.parametrize("key", PERRY_KEYS + VDI_KEYS)
def test_properties_equal_chemicals_own_evaluation_to_1e_12(key):
    for t in _temperatures(key):
        props = liquid_properties(key, t)
        ours = (props.density, props.viscosity, props.vapor_pressure)
        assert ours == pytest.approx(_chemicals_route(key, t), rel=1e-12, abs=0.0), t


@pytest.mark.parametrize("key", PERRY_KEYS + VDI_KEYS)
def test_liquid_is_refused_at_chemicals_critical_temperature(key):
    # The previous route refused at and above chemicals.critical.Tc(CAS).
    from chemicals.critical import Tc

    with pytest.raises(FluidPropertyError, match="critical temperature"):
        liquid_properties(key, Tc(CATALOGUE[key].cas))


@pytest.mark.parametrize(
    ("key", "t_k"),
    [
        # DIPPR 101 viscosity of n-dodecane (D T^E, E = -10) overflows at 10 K; the PPDS 9
        # viscosity of glycerol has a pole at T = D = 73.885 K (chemicals' VDI table).
        ("n_dodecane", 10.0),
        ("glycerol", 73.885),
    ],
)
def test_temperature_where_an_equation_overflows_is_refused_in_words(key, t_k):
    with pytest.raises(FluidPropertyError, match="no physical values.*hold from"):
        liquid_properties(key, t_k)


# --- nothing loads the tables at run time ----------------------------------------------


def test_no_liquid_loads_pandas_or_the_chemicals_tables():
    # chemicals' data tables import pandas and read CSV files (about 0.5 s, holding the
    # interpreter lock): every liquid a project can name is computed without them
    # (pattern: tests/test_import_hygiene.py).
    code = (
        "import sys\n"
        "from workbench.core.fluid import CATALOGUE, SOLUTIONS, liquid_properties, "
        "solution_properties, water_properties\n"
        "for key, e in CATALOGUE.items():\n"
        "    if e.mass_fraction is None:\n"
        "        for t in (e.t_min, 0.5 * (e.t_min + e.t_max), e.t_max):\n"
        "            liquid_properties(key, t)\n"
        "pure = sorted(m for m in ('chemicals', 'pandas') if m in sys.modules)\n"
        "water_properties(293.15)\n"
        "for key, e in CATALOGUE.items():\n"
        "    liquid_properties(key, 0.5 * (e.t_min + e.t_max))\n"
        "for key, e in SOLUTIONS.items():\n"
        "    solution_properties(key, 300.0, 0.5 * e.fraction_max)\n"
        "print(f\"pure liquids: {pure}; all liquids: {'pandas' in sys.modules}\")\n"
    )
    out = fresh_stdout(code)
    # The pure liquids' equations are chemicals' own evaluators (chemicals.dippr, .volume,
    # .viscosity, .vapor_pressure), which import the package but never its tables.
    assert out == "pure liquids: ['chemicals']; all liquids: False"
