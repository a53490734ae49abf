"""A tank's vent and gas-space keys read from a project file: load -> validate -> the core
model in SI, every refusal naming its key path, and a round trip through the format.

Effective areas: C_d A = (pi d^2/4)/sqrt(K) for a bore (orifice equation, ISO 5167-1);
Q_r sqrt(rho_r/(2 dp_r)) for a stated flow, rho_r = 1.2041 kg/m^3 for air at 20 degC and
1 atm (US Standard Atmosphere 1976 gas constant, from memory). NPS 2 schedule 40: OD
60.3 mm, wall 3.91 mm (ASME B36.10M).
"""

from __future__ import annotations

import math

import pytest

from workbench.core.model import Vent
from workbench.project.document import ProjectError, format_text, load_project_text

BASE = """\
schema = 1

[project]
title = "Vent keys"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.TK]
kind = "tank"
shape = "vertical_cylinder"
diameter = "4 m"
height = "3 m"
bottom_elevation = "10 m"
level = "1 m"
{tank}

[reservoirs.R]
kind = "constant_level"
bottom_elevation = "0 m"
level = "1 m"
{reservoir}

[receivers.OUT]
kind = "open_discharge"
elevation = "8 m"

[lines.L1]
from = "TK"
to = "OUT"
length = "2 m"
inner_diameter = "50 mm"
roughness = "0.045 mm"

[lines.L2]
from = "R"
to = "OUT"
length = "2 m"
inner_diameter = "50 mm"
roughness = "0.045 mm"
"""


def tank_of(tank: str, reservoir: str = ""):
    return load_project_text(BASE.format(tank=tank, reservoir=reservoir)).system.reservoirs["TK"]


def problems_of(tank: str, reservoir: str = "") -> dict[str, str]:
    with pytest.raises(ProjectError) as info:
        tank_of(tank, reservoir)
    return {p.key: p.message for p in info.value.problems}


def test_a_tank_without_a_vent_is_open_as_before():
    res = tank_of("")
    assert res.vent is None and res.gas_pressure == 0.0 and res.design_vacuum is None


def test_a_bored_vent_becomes_its_effective_area_and_the_design_figures_si():
    res = tank_of('vent = { inner_diameter = "50 mm", k = 1.5 }\ndesign_vacuum = "0.5 kPa"\n'
                  'design_pressure = "2 kPa"\ngas_pressure = "-0.1 kPa"\n'
                  'gas_process = "adiabatic"\nshell_height = "3.5 m"')
    assert res.vent.effective_area == pytest.approx(math.pi * 0.05**2 / 4 / math.sqrt(1.5),
                                                    rel=1e-12)
    assert (res.design_vacuum, res.design_pressure, res.gas_pressure) == pytest.approx(
        (500.0, 2000.0, -100.0))
    assert res.gas_process == "adiabatic" and res.shell_height == pytest.approx(3.5)


def test_a_nominal_size_vent_takes_its_bore_from_the_pipe_tables():
    res = tank_of('vent = { nominal_size = "2 in", schedule = "40", k = 1.5 }')
    # ASME B36.10M: NPS 2 OD 60.3 mm, schedule 40 wall 3.91 mm -> bore 52.48 mm
    assert res.vent.diameter == pytest.approx(0.0603 - 2 * 0.00391, abs=1e-6)


def test_a_rated_vent_is_scaled_from_air_at_20_degc_and_1_atm():
    res = tank_of('vent = { rated_flow = "300 m3/h", rated_pressure_drop = "0.5 kPa" }')
    expected = 300 / 3600 * math.sqrt(1.2041 / (2 * 500.0))
    assert res.vent.effective_area == pytest.approx(expected, rel=2e-4)


def test_vent_none_is_a_sealed_tank():
    res = tank_of('vent = "none"')
    assert res.vent == Vent(0.0) and res.vent.sealed


@pytest.mark.parametrize(("tank", "key", "words"), [
    ('vent = "blocked"', "reservoirs.TK.vent", "none"),
    ('vent = { inner_diameter = "50 mm" }', "reservoirs.TK.vent.k", "loss coefficient"),
    ('vent = { k = 1.5 }', "reservoirs.TK.vent", "inner_diameter"),
    ('vent = { inner_diameter = "50 mm", k = 0 }', "reservoirs.TK.vent.k", "above 0"),
    ('vent = { inner_diameter = "50 mm", k = 1, rated_flow = "1 m3/h" }',
     "reservoirs.TK.vent.rated_flow", "not both"),
    ('vent = { rated_flow = "300 m3/h" }', "reservoirs.TK.vent.rated_pressure_drop",
     "missing"),
    ('vent = { rated_flow = "300 m3/h", rated_pressure_drop = "0.5 kPa", k = 2 }',
     "reservoirs.TK.vent.k", "rated"),
    ('vent = { inner_diameter = "50 mm", k = 1.5, bore = 2 }', "reservoirs.TK.vent.bore",
     "unknown"),
    ('vent = "none"\ndesign_vacuum = "-0.5 kPa"', "reservoirs.TK.design_vacuum", "positive"),
    ('gas_pressure = "1 kPa"', "reservoirs.TK.gas_pressure", "with a vent"),
    ('vent = "none"\nsurface_pressure = "1 kPa"', "reservoirs.TK.surface_pressure",
     "gas_pressure"),
    ('vent = "none"\nshell_height = "2 m"', "reservoirs.TK.shell_height", "overflow"),
    ('vent = "none"\ngas_process = "polytropic"', "reservoirs.TK.gas_process", "isothermal"),
])
def test_a_wrong_vent_key_is_refused_by_its_key_path(tank, key, words):
    found = problems_of(tank)
    assert key in found, found
    assert words in found[key]


def test_a_constant_level_reservoir_refuses_a_vent():
    found = problems_of("", 'vent = "none"')
    assert "reservoirs.R.vent" in found


def test_the_vent_keys_survive_a_round_trip_through_the_canonical_format():
    text = BASE.format(tank='vent = { inner_diameter = "50 mm", k = 1.5 }  # goose-neck\n'
                            'design_vacuum = "0.5 kPa"', reservoir="")
    again = format_text(format_text(text))
    assert "# goose-neck" in again
    assert (load_project_text(text).system.reservoirs["TK"]
            == load_project_text(again).system.reservoirs["TK"])


def test_a_vent_field_is_set_by_its_key_path_as_the_form_does():
    from workbench.project.edit import set_value

    project = load_project_text(BASE.format(tank='vent = { inner_diameter = "50 mm", k = 1.5 }',
                                            reservoir=""))
    edited = set_value(project, "reservoirs.TK.vent.inner_diameter", "80 mm")
    assert edited.system.reservoirs["TK"].vent.diameter == pytest.approx(0.08)
    assert edited.system.reservoirs["TK"].vent.k == pytest.approx(1.5)


@pytest.mark.parametrize(("tank", "key"), [
    ('vent = { inner_diameter = "1e-320 m", k = 1.5 }', "reservoirs.TK.vent.inner_diameter"),
    ('vent = { inner_diameter = "50 mm", k = 1e300 }', "reservoirs.TK.vent.k"),
    ('vent = { rated_flow = "300 m3/h", rated_pressure_drop = "1e-9 Pa" }',
     "reservoirs.TK.vent.rated_pressure_drop"),
    ('vent = "none"\ndesign_vacuum = "500 kPa"', "reservoirs.TK.design_vacuum"),
])
def test_an_implausible_vent_figure_is_refused_by_its_key_path(tank, key):
    found = problems_of(tank)
    assert key in found and "not plausible" in found[key], found
