"""Water against IAPWS through the `iapws` package; catalogue liquids against handbook values."""

from __future__ import annotations

import csv
import math
import subprocess
import sys
from pathlib import Path

import chemicals
import pytest
from iapws import IAPWS95
from iapws._iapws import _Viscosity
from iapws.iapws97 import _PSat_T

from workbench.core.fluid import (
    CATALOGUE,
    FluidPropertyError,
    LiquidEntry,
    custom_properties,
    liquid_properties,
    water_properties,
)
from workbench.core.fluid.catalogue import METHODS

P_ATM = 101325.0
CELSIUS = [1.0, 5.0, 10.0, 20.0, 25.0, 40.0, 60.0, 80.0, 95.0]


# --- water: the iapws package as the outside reference ----------------------------------


@pytest.mark.parametrize("t_c", CELSIUS)
def test_water_density_matches_iapws95_from_the_iapws_package(t_c):
    # iapws.IAPWS95 (registry package, independent implementation of IAPWS-95).
    ref = IAPWS95(T=t_c + 273.15, P=P_ATM / 1e6)
    assert water_properties(t_c + 273.15).density == pytest.approx(ref.rho, rel=1e-9)


@pytest.mark.parametrize("t_c", CELSIUS)
def test_water_bulk_modulus_is_rho_w_squared_of_iapws95(t_c):
    # Isentropic bulk modulus K_s = rho * w^2 with w from iapws.IAPWS95.
    ref = IAPWS95(T=t_c + 273.15, P=P_ATM / 1e6)
    assert water_properties(t_c + 273.15).bulk_modulus == pytest.approx(ref.rho * ref.w**2, rel=1e-7)


@pytest.mark.parametrize("t_c", CELSIUS)
def test_water_viscosity_matches_iapws_2008_from_the_iapws_package(t_c):
    # iapws._iapws._Viscosity (IAPWS 2008); the critical enhancement it may add is
    # below 1e-8 relative this far from the critical point.
    t = t_c + 273.15
    ref = _Viscosity(IAPWS95(T=t, P=P_ATM / 1e6).rho, t)
    assert water_properties(t).viscosity == pytest.approx(ref, rel=1e-7)


@pytest.mark.parametrize("t_c", CELSIUS)
def test_water_vapour_pressure_matches_if97_from_the_iapws_package(t_c):
    # iapws.iapws97._PSat_T: IAPWS-IF97 saturation equation [MPa].
    t = t_c + 273.15
    assert water_properties(t).vapor_pressure == pytest.approx(_PSat_T(t) * 1e6, rel=1e-9)


@pytest.mark.parametrize(
    ("t_c", "rho", "mu_mpa_s", "psat_pa", "psat_tol"),
    [
        # HYDRAULICS.md table (IAPWS-95, IAPWS 2008, IF97 at 0.101325 MPa, computed with
        # the iapws package); tolerance half a unit in the last printed digit.
        (10.0, 999.702, 1.3059, 1228.2, 0.05),
        (20.0, 998.207, 1.0016, 2339.2, 0.05),
        (40.0, 992.216, 0.6527, 7384.4, 0.05),
        (60.0, 983.196, 0.4660, 19946.0, 0.5),
    ],
)
def test_water_matches_the_project_table(t_c, rho, mu_mpa_s, psat_pa, psat_tol):
    w = water_properties(t_c + 273.15)
    assert w.density == pytest.approx(rho, abs=0.0005)
    assert w.viscosity * 1e3 == pytest.approx(mu_mpa_s, abs=0.00005)
    assert w.vapor_pressure == pytest.approx(psat_pa, abs=psat_tol)
    assert w.notes == ()


def test_water_at_20c_matches_the_published_iapws_values():
    # IAPWS-95 at 20 degC, 0.101325 MPa: 998.207 kg/m^3; IAPWS 2008: 1.0016 mPa s;
    # IF97 saturation: 2.3392 kPa (values quoted in the project's foundation issue).
    w = water_properties(293.15)
    assert (round(w.density, 3), round(w.viscosity * 1e3, 4), round(w.vapor_pressure / 1e3, 4)) == (
        998.207, 1.0016, 2.3392,
    )


def test_water_viscosity_matches_the_iapws_2008_verification_point():
    # IAPWS R12-08, Table 4 (from memory): T = 298.15 K, rho = 998 kg/m^3 -> 889.735100 uPa s.
    # water_properties evaluates rho from (T, p); pick p so that rho is 998 kg/m^3.
    p = IAPWS95(T=298.15, rho=998.0).P * 1e6
    w = water_properties(298.15, p)
    assert w.density == pytest.approx(998.0, rel=1e-9)
    assert w.viscosity == pytest.approx(889.735100e-6, rel=1e-8)


def test_water_density_and_sound_speed_match_the_iapws95_verification_point():
    # IAPWS-95 release, Table 7 (from memory): T = 300 K, rho = 996.5560 kg/m^3 ->
    # p = 0.0992418352 MPa, w = 1501.51914 m/s.
    w = water_properties(300.0, 0.0992418352e6)
    assert w.density == pytest.approx(996.5560, rel=2e-8)
    assert math.sqrt(w.bulk_modulus / w.density) == pytest.approx(1501.51914, rel=1e-8)


@pytest.mark.parametrize(
    ("t_k", "psat_mpa"),
    # IAPWS-IF97, Table 35 (from memory): saturation pressure verification values.
    [(300.0, 0.353658941e-2), (500.0, 0.263889776e1), (600.0, 0.123443146e2)],
)
def test_water_vapour_pressure_matches_the_if97_verification_table(t_k, psat_mpa):
    assert water_properties(t_k, 20e6).vapor_pressure == pytest.approx(psat_mpa * 1e6, rel=1e-8)


def test_water_bulk_modulus_at_20c_is_the_value_the_surge_notes_use():
    # HYDRAULICS.md, surge: water K 2.19 GPa (computed).
    assert water_properties(293.15).bulk_modulus == pytest.approx(2.19e9, abs=0.005e9)


def test_water_below_freezing_carries_a_note_and_supercooled_values():
    w = water_properties(268.15)
    assert any("below 0 degC" in n and "supercooled" in n for n in w.notes)
    # iapws.IAPWS95 extrapolated to supercooled liquid (same equation of state).
    assert w.density == pytest.approx(IAPWS95(T=268.15, P=P_ATM / 1e6).rho, rel=1e-8)


def test_water_at_boiling_carries_a_note_and_liquid_values():
    w = water_properties(373.15)  # IF97: Tsat(0.101325 MPa) = 373.124 K
    assert any("boiling point" in n for n in w.notes)
    # Saturated-liquid density at 100 degC, iapws.IAPWS95 at x = 0.
    assert w.density == pytest.approx(IAPWS95(T=373.15, x=0.0).rho, rel=1e-5)


def test_water_at_100c_under_pressure_has_no_note():
    w = water_properties(373.15, 3e5)
    assert w.notes == ()
    assert w.density == pytest.approx(IAPWS95(T=373.15, P=0.3).rho, rel=1e-9)


@pytest.mark.parametrize(("t_k", "p_pa"), [(200.0, P_ATM), (650.0, 30e6), (-5.0, P_ATM),
                                           (math.nan, P_ATM), (300.0, 0.0), (300.0, -1.0)])
def test_water_outside_its_range_is_refused_in_words(t_k, p_pa):
    with pytest.raises(FluidPropertyError):
        water_properties(t_k, p_pa)


# --- catalogue ---------------------------------------------------------------------------

HANDBOOK = [
    # (name, T [degC], density kg/m^3, viscosity mPa s, vapour pressure kPa or None)
    # CRC Handbook of Chemistry and Physics, tables of liquid density, viscosity and vapour
    # pressure; all from memory. Tolerances: density 1 %, viscosity 6 %, vapour pressure 4 %
    # (DIPPR fits and handbook data differ by about this much).
    ("ethanol", 20.0, 789.3, 1.20, 5.95),
    ("methanol", 20.0, 791.4, 0.59, 13.0),
    ("acetone", 20.0, 789.9, 0.32, 24.6),
    ("toluene", 20.0, 866.8, 0.59, 2.91),
    ("isopropanol", 25.0, 781.3, 2.04, 6.05),
    ("acetic_acid", 25.0, 1044.6, 1.056, 2.07),
    ("ethylene_glycol", 20.0, 1113.5, 20.0, None),
    ("propylene_glycol", 25.0, 1032.8, 42.0, None),
    ("n_dodecane", 25.0, 745.2, 1.383, None),
    ("glycerol", 20.0, 1261.3, 1412.0, None),  # p_sat about 0.01 Pa: checked below
]


@pytest.mark.parametrize(("name", "t_c", "rho", "mu", "psat_kpa"), HANDBOOK)
def test_catalogue_liquids_match_handbook_values(name, t_c, rho, mu, psat_kpa):
    props = liquid_properties(name, t_c + 273.15)
    assert props.density == pytest.approx(rho, rel=0.01)
    assert props.viscosity * 1e3 == pytest.approx(mu, rel=0.06)
    if psat_kpa is not None:
        assert props.vapor_pressure / 1e3 == pytest.approx(psat_kpa, rel=0.04)
    assert not any("outside the range" in n for n in props.notes)


def test_glycerol_vapour_pressure_reaches_one_atmosphere_at_its_normal_boiling_point():
    # Glycerol boils at 290 degC (563 K) at 101.325 kPa (CRC Handbook, from memory);
    # the VDI Wagner equation puts it 2.4 K lower. Tolerance 3 K in T.
    low = liquid_properties("glycerol", 563.15 - 3.0).vapor_pressure
    high = liquid_properties("glycerol", 563.15 + 3.0).vapor_pressure
    assert low < 101325.0 < high


def test_catalogue_ranges_match_their_tables_for_vdi_and_laliberte_entries():
    # VDI Heat Atlas PPDS table (chemicals): glycerol Tm = 291.45 K.
    from chemicals.vapor_pressure import Psat_data_VDI_PPDS_3

    glycerol = CATALOGUE["glycerol"]
    assert glycerol.t_min == float(Psat_data_VDI_PPDS_3.loc[glycerol.cas, "Tm"])
    # Laliberte (2009) table: density and viscosity fit ranges [degC] and maximum mass
    # fraction; ours lies inside both and below the maximum.
    path = Path(chemicals.__file__).parent / "Electrolytes" / "Laliberte2009.tsv"
    with path.open(newline="", encoding="utf-8") as handle:
        rows = {row[1]: row for row in csv.reader(handle, delimiter="\t")}
    for entry in (e for e in CATALOGUE.values() if e.method == "laliberte"):
        row = rows[entry.cas]
        t_lo = max(float(row[9]), float(row[19])) + 273.15
        t_hi = min(float(row[10]), float(row[20])) + 273.15
        assert t_lo <= entry.t_min < entry.t_max <= t_hi + 1e-9
        assert entry.mass_fraction <= min(float(row[11]), float(row[21]))


def test_sodium_hydroxide_50_matches_handbook_density():
    # Perry's Handbook, density of aqueous NaOH: 50 % at 20 degC about 1525 kg/m^3
    # (from memory); Laliberte's model is fitted to such data.
    assert liquid_properties("sodium_hydroxide_50", 293.15).density == pytest.approx(1525.0, rel=0.01)


def test_brine_matches_handbook_density():
    # CRC Handbook, concentrative properties of aqueous NaCl: 3.5 % at 20 degC
    # about 1023 kg/m^3 (from memory, interpolated between 3 % and 4 %).
    assert liquid_properties("sodium_chloride_3_5", 293.15).density == pytest.approx(1023.2, rel=0.002)


@pytest.mark.parametrize(
    ("t_c", "w_nacl", "quantity", "published"),
    [
        # Laliberte (2009) spreadsheet, first NaCl rows, as quoted in the thermo package's
        # docs (Laliberte_density / Laliberte_viscosity examples). Laliberte used his own
        # water equations; IAPWS water moves the result by < 0.1 %.
        (0.0, 0.0037838838, "density", 1002.62501201),
        (5.0, 0.005810, "viscosity", 1.5285828581961414e-3),
    ],
)
def test_laliberte_model_reproduces_its_published_points(t_c, w_nacl, quantity, published):
    entry = LiquidEntry(
        "test brine", "laliberte", "7647-14-5", 273.15, 373.15, "test",
        mass_fraction=w_nacl, coefficients=CATALOGUE["sodium_chloride_3_5"].coefficients,
    )
    rho, mu, _ = METHODS["laliberte"](entry, t_c + 273.15)
    value = rho if quantity == "density" else mu
    assert value == pytest.approx(published, rel=1e-3)


def _laliberte_row(cas: str) -> list[float]:
    path = Path(chemicals.__file__).parent / "Electrolytes" / "Laliberte2009.tsv"
    with path.open(newline="", encoding="utf-8") as handle:
        for row in csv.reader(handle, delimiter="\t"):
            if row[1] == cas:
                return [float(row[i]) for i in (4, 5, 6, 7, 8, 13, 14, 15, 16, 17, 18)]
    raise AssertionError(cas)


@pytest.mark.parametrize("key", [k for k, e in CATALOGUE.items() if e.method == "laliberte"])
def test_typed_laliberte_coefficients_equal_the_distributed_table(key):
    entry = CATALOGUE[key]
    assert list(entry.coefficients) == pytest.approx(_laliberte_row(entry.cas), rel=1e-12)


@pytest.mark.parametrize("key", [k for k, e in CATALOGUE.items() if e.method == "perry_dippr"])
def test_catalogue_range_is_the_common_range_of_perrys_tables(key):
    from chemicals.vapor_pressure import Psat_data_Perrys2_8
    from chemicals.viscosity import mu_data_Perrys_8E_2_313
    from chemicals.volume import rho_data_Perry_8E_105_l

    entry = CATALOGUE[key]
    tables = (rho_data_Perry_8E_105_l, mu_data_Perrys_8E_2_313, Psat_data_Perrys2_8)
    t_min = max(float(t.loc[entry.cas, "Tmin"]) for t in tables)
    t_max = min(float(t.loc[entry.cas, "Tmax"]) for t in tables)
    assert (entry.t_min, entry.t_max) == pytest.approx((t_min, t_max), abs=1e-9)


@pytest.mark.parametrize("key", sorted(CATALOGUE))
def test_every_catalogue_entry_names_its_source_and_range(key):
    entry = CATALOGUE[key]
    assert entry.source and entry.t_min < entry.t_max
    props = liquid_properties(key, 0.5 * (entry.t_min + entry.t_max))
    assert props.density > 0 and props.viscosity > 0
    assert entry.source in props.formulation


def test_out_of_range_temperature_gives_a_note():
    # Perry's table 2-313: methanol viscosity fit holds to 337.85 K.
    props = liquid_properties("methanol", 350.0)
    assert any("outside the range" in n and "extrapolated" in n for n in props.notes)


def test_temperature_where_a_correlation_breaks_down_is_refused_with_its_range():
    # Ethanol's critical temperature is 514 K (Perry's table 2-32 ends there): no liquid.
    with pytest.raises(FluidPropertyError, match=r"ethanol.*critical temperature.*hold from"):
        liquid_properties("ethanol", 600.0)


def test_hot_brine_at_one_atmosphere_warns_that_it_may_boil():
    props = liquid_properties("sodium_chloride_3_5", 373.0 + 0.5)
    assert any("may boil" in n for n in props.notes)


def test_liquid_above_its_boiling_point_gives_a_note():
    # Acetone boils at 56 degC at one atmosphere (CRC, from memory).
    props = liquid_properties("acetone", 60.0 + 273.15)
    assert any("boiling point" in n for n in props.notes)


@pytest.mark.parametrize(("typed", "key"), [("Ethylene Glycol", "ethylene_glycol"),
                                            ("MEG", "ethylene_glycol"), ("glycerine", "glycerol"),
                                            ("IPA", "isopropanol"), ("NaOH 50%", "sodium_hydroxide_50")])
def test_liquids_are_found_by_readable_names(typed, key):
    assert liquid_properties(typed, 300.0) == liquid_properties(key, 300.0)


def test_water_by_name_is_iapws_water():
    assert liquid_properties("Water", 300.0) == water_properties(300.0)


def test_unknown_liquid_suggests_the_nearest_and_lists_all():
    with pytest.raises(FluidPropertyError) as err:
        liquid_properties("ethylen glycol", 300.0)
    assert "did you mean 'ethylene_glycol'" in str(err.value)
    assert all(k in str(err.value) for k in CATALOGUE)


# --- custom ------------------------------------------------------------------------------


def test_custom_liquid_keeps_the_given_values():
    props = custom_properties(880.0, 0.25, vapor_pressure=100.0, bulk_modulus=1.5e9)
    assert (props.density, props.viscosity, props.vapor_pressure, props.bulk_modulus) == (
        880.0, 0.25, 100.0, 1.5e9,
    )


def test_custom_liquid_without_vapour_pressure_says_checks_are_skipped():
    assert any("vapour checks are skipped" in n for n in custom_properties(880.0, 0.25).notes)


@pytest.mark.parametrize("kwargs", [dict(density=0.0, viscosity=1e-3),
                                    dict(density=1000.0, viscosity=-1e-3),
                                    dict(density=math.nan, viscosity=1e-3),
                                    dict(density=1000.0, viscosity=1e-3, bulk_modulus=0.0),
                                    dict(density="heavy", viscosity=1e-3)])
def test_custom_liquid_rejects_nonsense(kwargs):
    with pytest.raises(FluidPropertyError):
        custom_properties(**kwargs)


# --- start-up cost ---------------------------------------------------------------------


def test_core_property_modules_import_without_loading_chemicals_or_fluids():
    code = (
        "import sys, workbench.core.fluid, workbench.core.pipes, workbench.core.atmosphere;"
        "print(sorted(m for m in ('chemicals', 'fluids', 'scipy', 'CoolProp') if m in sys.modules))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"
