"""Bulk modulus of catalogue liquids from their reference equations of state.

The values come from tables generated with CoolProp (workbench/core/liquid_tables.py, by
tools/make_liquid_tables.py); CoolProp is not imported at run time. Outside references:
handbook tables of the speed of sound in liquids, the `iapws` package (IAPWS-95) for water,
and CoolProp itself (a registry package, test-only dependency) for the tables and for its
record of which publication each equation is.
"""

from __future__ import annotations

import importlib.util
import math
from pathlib import Path

import numpy as np
import pytest
from iapws import IAPWS95

from workbench.core.fluid import CATALOGUE, liquid_properties
from workbench.core.liquid_tables import REFERENCE_PRESSURE, TABLES

ROOT = Path(__file__).resolve().parents[2]
NO_COOLPROP = "CoolProp (the reference for these checks) is not installed: pip install -e '.[test]'"


@pytest.fixture(scope="module")
def CP():
    """CoolProp's high-level interface; the test is skipped where CoolProp is missing."""
    return pytest.importorskip("CoolProp.CoolProp", reason=NO_COOLPROP)


@pytest.fixture(scope="module")
def generator():
    """tools/make_liquid_tables.py as a module (it needs CoolProp)."""
    pytest.importorskip("CoolProp", reason=NO_COOLPROP)
    spec = importlib.util.spec_from_file_location(
        "make_liquid_tables", ROOT / "tools" / "make_liquid_tables.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


EOS_KEYS = sorted(k for k, e in CATALOGUE.items() if e.eos is not None)

P_ATM = 101325.0


def rigid_pipe_wave_speed(name: str, t_c: float) -> float:
    """sqrt(K/rho) with the liquid's own K and density: the wave speed in a rigid pipe,
    which is the speed of sound the surge model sees [m/s]."""
    props = liquid_properties(name, t_c + 273.15)
    return math.sqrt(props.bulk_modulus / props.density)


@pytest.mark.parametrize(
    ("name", "t_c", "sound_speed"),
    [
        # Kaye & Laby, Tables of Physical and Chemical Constants, velocity of sound in
        # liquids at 20 degC, as reproduced in a flowmeter manual's data appendix
        # (ethyl alcohol 1162, methyl alcohol 1121, acetone 1190 m/s).
        ("ethanol", 20.0, 1162.0),
        ("methanol", 20.0, 1121.0),
        ("acetone", 20.0, 1190.0),
        # The Engineering ToolBox, "Liquids - speed of sound" table at 25 degC (acetone
        # 1170, ethanol 1144, methanol 1103, toluene 1306 m/s).
        ("acetone", 25.0, 1170.0),
        ("ethanol", 25.0, 1144.0),
        ("methanol", 25.0, 1103.0),
        ("toluene", 25.0, 1306.0),
    ],
)
def test_wave_speed_of_a_catalogue_liquid_in_a_rigid_pipe_matches_handbook_sound_speed(
    name, t_c, sound_speed
):
    # Tolerance 1 %: tabulated values are given to 3-4 figures from various measurements,
    # and the short equations of state (acetone, toluene) claim about 1 % in liquid sound
    # speed; our density is Perry's DIPPR one, within 0.3 % of the equation's.
    assert rigid_pipe_wave_speed(name, t_c) == pytest.approx(sound_speed, rel=0.01)


def test_n_dodecane_sound_speed_is_near_the_published_value():
    # n-Dodecane at 25 degC: about 1279 m/s (measurements used by Lemmon & Huber 2004;
    # from memory), tolerance 1.5 %.
    assert rigid_pipe_wave_speed("n_dodecane", 25.0) == pytest.approx(1279.0, rel=0.015)


@pytest.mark.parametrize("t_c", [1.0, 10.0, 20.0, 40.0, 60.0, 90.0])
def test_the_table_generators_equation_of_state_route_gives_water_the_iapws95_bulk_modulus(
    generator, t_c
):
    # Water through the function the table generator uses (CoolProp's IAPWS-95), against
    # rho*w^2 of iapws.IAPWS95 (independent implementation, registry package).
    t = t_c + 273.15
    ref = IAPWS95(T=t, P=P_ATM / 1e6)
    assert generator.eos_bulk_modulus("Water", t, P_ATM) == pytest.approx(ref.rho * ref.w**2,
                                                                         rel=1e-6)


def test_the_table_generator_gives_boiling_water_its_saturated_liquid_value(generator):
    # At 100.5 degC and 1 atm water is just above its boiling point: the value is that of
    # saturated liquid, iapws.IAPWS95 at x = 0.
    ref = IAPWS95(T=373.15 + 0.5, x=0.0)
    bulk = generator.eos_bulk_modulus("Water", 373.15 + 0.5, P_ATM)
    assert bulk == pytest.approx(ref.rho * ref.w**2, rel=1e-4)


def test_the_table_generators_water_agrees_with_the_workbench_water_value(generator):
    # The workbench's water route (chemicals' IAPWS-95) and CoolProp's agree: one number
    # for the same formulation whichever library computes it.
    from workbench.core.fluid import water_properties

    bulk = generator.eos_bulk_modulus("Water", 293.15, P_ATM)
    assert bulk == pytest.approx(water_properties(293.15).bulk_modulus, rel=1e-6)


def coolprop_liquid_bulk_modulus(CP, fluid: str, t: float, p: float) -> float:
    """rho*w^2 straight from CoolProp's PropsSI, written here independently of the
    generator: liquid at p, or at 1.0001 times the saturation pressure where p is at or
    below it (the workbench's convention for a liquid at its boiling point)."""
    p_eval = max(p, 1.0001 * CP.PropsSI("P", "T", t, "Q", 0.0, fluid))
    rho = CP.PropsSI("Dmass", "T", t, "P|liquid", p_eval, fluid)
    w = CP.PropsSI("speed_of_sound", "T", t, "P|liquid", p_eval, fluid)
    return rho * w * w


@pytest.mark.parametrize("key", EOS_KEYS)
def test_tabulated_bulk_modulus_matches_coolprop_at_random_temperatures(CP, key):
    # Live CoolProp (registry package) at 60 random temperatures over the table's range,
    # and either side of the normal boiling point where the table's two segments meet.
    entry = CATALOGUE[key]
    table = TABLES[entry.eos]
    rng = np.random.default_rng(sum(map(ord, key)))
    t_boil = table.segments[0][0][-1]
    temperatures = [*rng.uniform(table.t_triple, entry.t_max, 60),
                    table.t_triple, entry.t_max, t_boil - 0.01, t_boil + 0.005]
    for t in temperatures:
        t = float(min(max(t, table.t_triple), entry.t_max))
        ours = liquid_properties(key, t).bulk_modulus
        ref = coolprop_liquid_bulk_modulus(CP, entry.eos, t, REFERENCE_PRESSURE)
        assert ours == pytest.approx(ref, rel=1e-5), (key, t)


@pytest.mark.parametrize("key", EOS_KEYS)
def test_site_pressure_changes_the_bulk_modulus_by_less_than_0_15_percent(CP, key):
    # The tables are at 101.325 kPa; site pressures run from about 70 kPa (3000 m) to 105
    # kPa. Live CoolProp over the table's range: the largest change is 0.14 % (n-dodecane
    # at 70 kPa just below its boiling point there); 0.056 % or less for the other liquids.
    entry = CATALOGUE[key]
    table = TABLES[entry.eos]
    worst = 0.0
    for t in np.linspace(table.t_triple, entry.t_max, 120):
        at_ref = coolprop_liquid_bulk_modulus(CP, entry.eos, t, REFERENCE_PRESSURE)
        for p in (70e3, 85e3, 105e3):
            worst = max(worst, abs(coolprop_liquid_bulk_modulus(CP, entry.eos, t, p) / at_ref - 1))
    assert worst < (1.5e-3 if key == "n_dodecane" else 6e-4)
    assert worst > 1e-5  # the check sees a pressure effect at all


@pytest.mark.parametrize("key", EOS_KEYS)
def test_each_table_runs_from_the_triple_point_to_the_end_of_the_catalogue_range(CP, key):
    entry = CATALOGUE[key]
    table = TABLES[entry.eos]
    assert table.t_triple == pytest.approx(CP.PropsSI("Ttriple", entry.eos), abs=1e-9)
    assert table.t_critical == pytest.approx(CP.PropsSI("Tcrit", entry.eos), rel=1e-9)
    assert table.segments[0][0][0] == table.t_triple
    assert table.segments[-1][0][-1] == entry.t_max
    assert table.eos_reference == CP.get_fluid_param_string(entry.eos, "BibTeX-EOS")


def test_the_tables_hold_exactly_the_liquids_with_an_equation_of_state():
    assert set(TABLES) == {CATALOGUE[k].eos for k in EOS_KEYS}


def test_above_the_tabulated_range_there_is_no_bulk_modulus_and_the_note_says_why():
    # Ethanol's catalogue range ends at 440 K; its critical point is 514.7 K.
    props = liquid_properties("ethanol", 450.0)
    assert props.bulk_modulus is None
    assert any("tabulated" in n and "bulk_modulus" in n for n in props.notes)


# CoolProp's record of the publication behind each equation of state (its BibTeX key), and
# the author and year our entry must name.
EOS_PUBLICATIONS = {
    "ethanol": ("Schroeder-JPCRD-2014", "Schroeder", "2014"),
    "methanol": ("deReuck-BOOK-1993", "de Reuck", "1993"),
    "acetone": ("Lemmon-JCED-2006", "Lemmon", "2006"),
    "toluene": ("Lemmon-JCED-2006", "Lemmon", "2006"),
    "propylene_glycol": ("Eisenbach-JPCRD-2021", "Eisenbach", "2021"),
    "n_dodecane": ("Lemmon-EF-2004", "Lemmon", "2004"),
}


@pytest.mark.parametrize("key", sorted(EOS_PUBLICATIONS))
def test_each_equation_of_state_is_the_publication_coolprop_names(CP, key):
    entry = CATALOGUE[key]
    bibtex, author, year = EOS_PUBLICATIONS[key]
    assert CP.get_fluid_param_string(entry.eos, "BibTeX-EOS") == bibtex
    assert CP.get_fluid_param_string(entry.eos, "CAS") == entry.cas
    assert author in entry.eos_source and year in entry.eos_source
    props = liquid_properties(key, 298.15)
    assert entry.eos_source in props.formulation


def test_exactly_the_liquids_with_an_equation_of_state_have_a_bulk_modulus(CP):
    # CoolProp carries reference equations of state by CAS number; the catalogue entries
    # without one must be exactly those CoolProp has none for (a new CoolProp equation
    # makes this fail, as a reminder to use it and re-run tools/make_liquid_tables.py).
    import CoolProp

    cas_with_eos = {CP.get_fluid_param_string(f, "CAS") for f in CoolProp.__fluids__}
    for key, entry in CATALOGUE.items():
        if entry.method == "laliberte":
            assert entry.eos is None  # aqueous solutions: no pure-fluid equation applies
            continue
        assert (entry.eos is not None) == (entry.cas in cas_with_eos), key
        t = 0.5 * (max(entry.t_min, 273.15) + min(entry.t_max, 330.0))
        assert (liquid_properties(key, t).bulk_modulus is not None) == (entry.eos is not None)


def test_a_liquid_below_its_triple_point_has_no_bulk_modulus_and_says_why():
    # Methanol's triple point is 175.61 K (de Reuck & Craven 1993, as CoolProp reports);
    # Perry's range starts at 175.47 K.
    props = liquid_properties("methanol", 175.5)
    assert props.bulk_modulus is None
    assert any("triple point" in n and "bulk_modulus" in n for n in props.notes)


def test_bulk_modulus_falls_as_the_liquid_warms():
    # Liquids soften with temperature (common practice, no source): K_s of ethanol at
    # 50 degC is below that at 10 degC.
    assert (liquid_properties("ethanol", 323.15).bulk_modulus
            < liquid_properties("ethanol", 283.15).bulk_modulus)
