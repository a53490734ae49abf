"""The [fluid] keys of solutions (mass_fraction, salinity) and catalogue bulk moduli, read
from a project file: load -> validate -> the liquid's numbers, and clear refusals."""

from __future__ import annotations

import pytest

from workbench.project.document import ProjectError, load_project_text

BASE = """
schema = 1

[project]
title = "Fluid keys"
site_elevation = "0 m"

[fluid]
{fluid}

[reservoirs.T1]
kind = "constant_level"
bottom_elevation = "10 m"
level = "2 m"

[receivers.OUT]
kind = "open_discharge"
elevation = "0 m"

[lines.L1]
from = "T1"
to = "OUT"
length = "100 m"
inner_diameter = "102.26 mm"
roughness = "0.045 mm"
"""


def fluid_of(fluid: str):
    return load_project_text(BASE.format(fluid=fluid)).system.fluid


def problems_of(fluid: str) -> dict[str, str]:
    with pytest.raises(ProjectError) as info:
        load_project_text(BASE.format(fluid=fluid))
    return {p.key: p.message for p in info.value.problems}


def test_seawater_from_a_project_file_has_the_iapws08_density():
    # iapws.SeaWater (IAPWS-08) at 20 degC, 0.101325 MPa, 35 g/kg; tolerance 0.1 %.
    from iapws import SeaWater

    fluid = fluid_of('kind = "seawater"\nsalinity = "35 g/kg"\ntemperature = "20 degC"')
    assert fluid.density == pytest.approx(SeaWater(T=293.15, P=0.101325, S=0.035).rho, rel=1e-3)
    assert fluid.bulk_modulus is None
    assert "Sharqawy" in fluid.formulation


@pytest.mark.parametrize("salinity", ['"3.5 %"', '"35 permille"', '"0.035 kg/kg"'])
def test_salinity_may_be_written_in_any_unit_of_a_mass_ratio(salinity):
    # 35 g/kg = 3.5 % = 35 permille = 0.035 kg/kg (definitions).
    base = fluid_of('kind = "seawater"\nsalinity = "35 g/kg"\ntemperature = "20 degC"')
    other = fluid_of(f'kind = "seawater"\nsalinity = {salinity}\ntemperature = "20 degC"')
    assert other.density == pytest.approx(base.density, rel=1e-12)


def test_ethylene_glycol_water_from_a_project_file_matches_the_ashrae_density():
    # ASHRAE Handbook - Fundamentals ch. 31, 30 % ethylene glycol by volume at 70 degF:
    # 65.30 lb/ft^3 (see tests/core/test_fluid_solutions.py); 30 % by volume is 32.4 %
    # by mass (glycol s.g. 1.1155); tolerance 1 %.
    fluid = fluid_of('kind = "ethylene_glycol_water"\nmass_fraction = 0.3236\n'
                     'temperature = "70 degF"')
    assert fluid.density == pytest.approx(65.30 * 16.018463, rel=0.01)
    assert "Melinder" in fluid.formulation
    assert any("upper bound" in n for n in fluid.notes)


def test_ethanol_from_a_project_file_carries_its_bulk_modulus_and_the_users_overrides():
    # Ethanol at 20 degC: sound speed 1162 m/s (Kaye & Laby, as in
    # tests/core/test_fluid_bulk_modulus.py), so K/rho = 1162^2 within 2 %.
    fluid = fluid_of('kind = "ethanol"\ntemperature = "20 degC"')
    assert fluid.bulk_modulus / fluid.density == pytest.approx(1162.0**2, rel=0.02)
    given = fluid_of('kind = "ethanol"\ntemperature = "20 degC"\nbulk_modulus = "0.9 GPa"')
    assert given.bulk_modulus == 0.9e9
    assert "bulk modulus given in the project file" in given.notes


def test_a_glycol_without_a_bulk_modulus_takes_the_users_value():
    fluid = fluid_of('kind = "propylene_glycol_water"\nmass_fraction = 0.4\n'
                     'temperature = "5 degC"\nbulk_modulus = "2.5 GPa"')
    assert fluid.bulk_modulus == 2.5e9


@pytest.mark.parametrize(
    ("fluid", "key", "words"),
    [
        ('kind = "ethylene_glycol_water"\nmass_fraction = 30\ntemperature = "20 degC"',
         "fluid.mass_fraction", ["out of range", "0 to 0.6", "30 % is 0.3"]),
        ('kind = "ethylene_glycol_water"\nmass_fraction = "30 %"\ntemperature = "20 degC"',
         "fluid.mass_fraction", ["expected a number", "without quotes"]),
        ('kind = "propylene_glycol_water"\ntemperature = "20 degC"',
         "fluid.mass_fraction", ["missing required key 'mass_fraction'", "mass_fraction = 0.3"]),
        ('kind = "seawater"\ntemperature = "20 degC"',
         "fluid.salinity", ["missing required key 'salinity'", "35 g/kg"]),
        ('kind = "seawater"\nsalinity = "150 g/kg"\ntemperature = "20 degC"',
         "fluid.salinity", ["out of range", "0 to 120 g/kg"]),
        ('kind = "seawater"\nsalinity = "35 ppt"\ntemperature = "20 degC"',
         "fluid.salinity", ["g/kg", "ambiguous"]),
        ('kind = "seawater"\nsalinity = 35\ntemperature = "20 degC"',
         "fluid.salinity", ["bare number", "35 g/kg"]),
        ('kind = "ethylene_glycol_water"\nmass_fraction = 0.3\nsalinity = "35 g/kg"\n'
         'temperature = "20 degC"', "fluid.salinity", ['applies only to kind = "seawater"']),
        ('kind = "water"\nmass_fraction = 0.3\ntemperature = "20 degC"',
         "fluid.mass_fraction", ['applies only to kind = "ethylene_glycol_water"']),
        ('kind = "ethylene_glycol_water"\nmass_fraction = 0.3\ntemperature = "-20 degC"',
         "fluid.temperature", ["below its freezing point", "-14.6 degC"]),
        ('kind = "seawater"\nsalinity = "35 g/kg"\ntemperature = "130 degC"',
         "fluid.temperature", ["outside the range", "120 degC"]),
    ],
)
def test_solution_keys_are_refused_in_words_naming_the_key(fluid, key, words):
    problems = problems_of(fluid)
    assert key in problems, problems
    for word in words:
        assert word in problems[key], problems[key]


def test_the_new_kinds_are_valid_choices_of_fluid_kind():
    from workbench.project.schema import choices_for

    kinds = choices_for("fluid", "kind")
    assert {"ethylene_glycol_water", "propylene_glycol_water", "seawater"} <= set(kinds)
    assert kinds[0] == "water" and kinds[-1] == "custom"
