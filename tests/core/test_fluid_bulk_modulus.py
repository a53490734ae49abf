"""Bulk modulus of catalogue liquids from their reference equations of state (via CoolProp).

Outside references: handbook tables of the speed of sound in liquids, the `iapws` package
(IAPWS-95) for water, and CoolProp's own record of which publication each equation is.
"""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import pytest
from iapws import IAPWS95

from workbench.core.fluid import CATALOGUE, LiquidEntry, _eos_bulk_modulus, liquid_properties

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
def test_the_equation_of_state_route_gives_water_the_iapws95_bulk_modulus(t_c):
    # Water through the same function the catalogue uses (CoolProp's IAPWS-95), against
    # rho*w^2 of iapws.IAPWS95 (independent implementation, registry package).
    entry = LiquidEntry("water (test)", "perry_dippr", "7732-18-5", 273.16, 647.0, "test",
                        eos="Water")
    t = t_c + 273.15
    ref = IAPWS95(T=t, P=P_ATM / 1e6)
    bulk, note = _eos_bulk_modulus(entry, t, P_ATM)
    assert note == ""
    assert bulk == pytest.approx(ref.rho * ref.w**2, rel=1e-6)


def test_the_equation_of_state_route_gives_boiling_water_its_saturated_liquid_value():
    # At 100 degC and 1 atm water is just above its boiling point: the value is that of
    # saturated liquid, iapws.IAPWS95 at x = 0.
    entry = LiquidEntry("water (test)", "perry_dippr", "7732-18-5", 273.16, 647.0, "test",
                        eos="Water")
    ref = IAPWS95(T=373.15 + 0.5, x=0.0)
    bulk, _ = _eos_bulk_modulus(entry, 373.15 + 0.5, P_ATM)
    assert bulk == pytest.approx(ref.rho * ref.w**2, rel=1e-4)


def test_water_bulk_modulus_through_coolprop_agrees_with_the_workbench_water_value():
    # The existing water route (chemicals' IAPWS-95) and CoolProp's agree: one number for
    # the same formulation whichever library computes it.
    from workbench.core.fluid import water_properties

    entry = LiquidEntry("water (test)", "perry_dippr", "7732-18-5", 273.16, 647.0, "test",
                        eos="Water")
    bulk, _ = _eos_bulk_modulus(entry, 293.15, P_ATM)
    assert bulk == pytest.approx(water_properties(293.15).bulk_modulus, rel=1e-6)


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
def test_each_equation_of_state_is_the_publication_coolprop_names(key):
    import CoolProp.CoolProp as CP

    entry = CATALOGUE[key]
    bibtex, author, year = EOS_PUBLICATIONS[key]
    assert CP.get_fluid_param_string(entry.eos, "BibTeX-EOS") == bibtex
    assert CP.get_fluid_param_string(entry.eos, "CAS") == entry.cas
    assert author in entry.eos_source and year in entry.eos_source
    props = liquid_properties(key, 298.15)
    assert entry.eos_source in props.formulation


def test_exactly_the_liquids_with_an_equation_of_state_have_a_bulk_modulus():
    # CoolProp carries reference equations of state by CAS number; the catalogue entries
    # without one must be exactly those CoolProp has none for (a new CoolProp equation
    # makes this fail, as a reminder to use it).
    import CoolProp
    import CoolProp.CoolProp as CP

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


def test_water_and_liquids_without_an_equation_do_not_load_coolprop():
    # CoolProp takes seconds to load its fluid library: only liquids that need it may.
    code = (
        "import sys\n"
        "from workbench.core.fluid import liquid_properties, water_properties\n"
        "water_properties(293.15); liquid_properties('glycerol', 300.0)\n"
        "liquid_properties('sodium_chloride_3_5', 300.0)\n"
        "print('CoolProp' in sys.modules)\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=Path(__file__).resolve().parents[2])
    assert out.stdout.strip() == "False"
