"""Numbers that validation messages compute (a plausible range, the site's perfect vacuum, a
node's elevation, a cone's height) follow the display unit system: the file's
``[project] units``, or the ``units`` a command asks for.

Conversions are those of NIST SP 811 (2008), appendix B: 1 in = 25.4 mm, 1 ft = 0.3048 m,
1 psi = 6894.757 Pa, so 1 ft3 = 0.028316846592 m3. Standard atmosphere at sea level:
101325 Pa (ISO 2533). What the user typed is quoted as typed; only the numbers the message
works out are converted.
"""

from __future__ import annotations

import re

import pytest

from workbench.project.document import ProjectError, load_project_text

IN, FT, PSI = 0.0254, 0.3048, 6894.757293168

BASE = """\
schema = 1

[project]
title = "Units of messages"
units = "{units}"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.TK]
kind = "tank"
shape = "cone_bottom"
diameter = "3.6 m"
cone_angle = "90 deg"
height = "{height}"
bottom_elevation = "6.5 m"
level = "1 m"
{tank}

[receivers.CH]
kind = "open_discharge"
elevation = "1.2 m"

[lines.L1]
from = "TK"
to = "CH"
length = "86 m"
inner_diameter = "{bore}"
material = "commercial_steel"
profile = [ {{ distance = "0 m", elevation = "6.5 m" }}, {{ distance = "86 m", elevation = "{end}" }} ]
"""

#: SI units a message must not name (outside what the user typed) on a US display.
SI_UNIT = re.compile(r"\d\s?(m|mm|kPa|Pa|bar|GPa|L/s|m3/s|m3/h)\b")


def problems(units="US", *, height="5.2 m", tank="", bore="102.3 mm", end="1.2 m",
             override=None) -> dict[str, str]:
    text = BASE.format(units=units, height=height, tank=tank, bore=bore, end=end)
    with pytest.raises(ProjectError) as info:
        load_project_text(text, "t.toml", units=override)
    return {p.key: p.message for p in info.value.problems}


def computed_part(message: str) -> str:
    """The message without the quoted text the user typed."""
    return re.sub(r"'[^']*'", "''", message)


def test_a_bore_out_of_range_gives_its_limits_in_inches_on_a_us_project():
    message = problems(bore="0.1 mm")["lines.L1.inner_diameter"]
    # 1 mm and 20 m in inches (NIST SP 811: 1 in = 25.4 mm): 0.03937 in and 787.4 in,
    # rounded inward to two figures so that every bore inside the words is accepted
    low, high = 1e-3 / IN, 20 / IN
    assert (low, high) == (pytest.approx(0.03937, rel=1e-4), pytest.approx(787.4, rel=1e-4))
    assert "from 0.04 in to 780 in" in message
    assert not SI_UNIT.search(computed_part(message)), message


@pytest.mark.parametrize("bore", ["0.04 in", "780 in"])
def test_a_bore_at_either_limit_the_words_give_is_accepted(bore):
    text = BASE.format(units="US", height="5.2 m", tank="", bore=bore, end="1.2 m")
    assert load_project_text(text, "t.toml").system.lines["L1"].diameter > 0.0


def test_the_same_bore_on_an_si_project_gives_its_limits_in_millimetres():
    message = problems("SI", bore="0.1 mm")["lines.L1.inner_diameter"]
    assert "from 1 mm to 20,000 mm" in message


def test_a_vent_rated_flow_out_of_range_is_a_gas_flow_in_cubic_feet_a_minute():
    tank = 'vent = { rated_flow = "1e9 m3/h", rated_pressure_drop = "0.5 kPa" }'
    message = problems(tank=tank)["reservoirs.TK.vent.rated_flow"]
    # 1e7 m3/h is 1e7 / (0.028316846592 * 60) = 5,885,780 ft3/min (NIST SP 811), rounded
    # down to two figures: 5,800,000 ft3/min
    high = 1e7 / (FT ** 3 * 60)
    assert high == pytest.approx(5_885_780, rel=1e-6)
    assert "5,800,000 ft3/min" in message
    assert "gpm" not in message and not SI_UNIT.search(computed_part(message)), message


def test_a_gauge_pressure_below_a_perfect_vacuum_names_the_atmosphere_in_psi():
    message = problems(tank='surface_pressure = "-200 kPa"')["reservoirs.TK.surface_pressure"]
    # standard atmosphere 101325 Pa (ISO 2533) in psi (NIST SP 811)
    atmosphere = f"{101325 / PSI:.4g} psi"
    assert f"at the site is {atmosphere}, so a gauge pressure must be above -{atmosphere}" \
        in message
    assert not SI_UNIT.search(computed_part(message)), message


def test_a_profile_end_away_from_its_node_gives_both_elevations_in_feet():
    message = problems(end="2.2 m")["lines.L1.profile[2].elevation"]
    assert f"elevation {2.2 / FT:.4g} ft" in message and f"at {1.2 / FT:.4g} ft" in message
    assert f"within {0.05 / FT:.2g} ft" in message
    assert not SI_UNIT.search(computed_part(message)), message


def test_a_tank_below_its_cone_gives_the_cone_height_in_feet():
    # a 90 deg cone on a 3.6 m diameter is 1.8 m deep (tan 45 deg = 1)
    message = problems(height="1 m")["reservoirs.TK.height"]
    assert f"({1.8 / FT:.4g} ft)" in message


def test_a_negative_feed_suggests_the_draw_off_in_the_display_flow_unit():
    message = problems(tank='inflow = "-5 L/s"')["reservoirs.TK.inflow"]
    # 5 L/s in US gallons a minute: US gallon = 231 in3 (NIST SP 811)
    assert f'draw_off = "{5e-3 / (231 * IN ** 3) * 60:.4g} gpm"' in message


def test_the_units_a_command_asks_for_override_the_files_own():
    message = problems("SI", end="2.2 m", override="US")["lines.L1.profile[2].elevation"]
    assert f"{2.2 / FT:.4g} ft" in message
    message = problems("US", end="2.2 m", override="SI")["lines.L1.profile[2].elevation"]
    assert "elevation 2.2 m" in message and "within 0.05 m" in message


def test_a_missing_key_is_shown_with_an_example_in_the_display_units():
    text = BASE.format(units="US", height="5.2 m", tank="", bore="102.3 mm", end="1.2 m")
    text = text.replace('kind = "open_discharge"\nelevation = "1.2 m"', 'kind = "vessel"')
    text = text.replace('{ distance = "86 m", elevation = "1.2 m" }', '')
    with pytest.raises(ProjectError) as info:
        load_project_text(text, "t.toml")
    found = {p.key: p.message for p in info.value.problems}
    # the schema's examples 50 kPa and 2 m in psi and ft (NIST SP 811), to 3 digits
    assert f'pressure = "{50e3 / PSI:.3g} psi"' in found["receivers.CH.pressure"]
    assert f'elevation = "{2 / FT:.3g} ft"' in found["receivers.CH.elevation"]


def test_a_site_above_the_troposphere_gives_its_limits_in_feet():
    text = BASE.format(units="US", height="5.2 m", tank="", bore="102.3 mm", end="1.2 m")
    text = text.replace('units = "US"', 'units = "US"\nsite_elevation = "15 km"')
    with pytest.raises(ProjectError) as info:
        load_project_text(text, "t.toml")
    message = {p.key: p.message for p in info.value.problems}["project.site_elevation"]
    # the troposphere's top, 11019 m (ISO 2533), in feet (NIST SP 811)
    assert f"{11019 / FT:.0f} ft above sea level" in message
    assert not SI_UNIT.search(computed_part(message)), message


def test_a_fluid_outside_its_fits_is_refused_with_its_range_in_fahrenheit():
    text = BASE.format(units="US", height="5.2 m", tank="", bore="102.3 mm", end="1.2 m")
    text = text.replace('kind = "water"\ntemperature = "20 degC"',
                        'kind = "seawater"\nsalinity = "35 g/kg"\ntemperature = "130 degC"')
    with pytest.raises(ProjectError) as info:
        load_project_text(text, "t.toml")
    message = {p.key: p.message for p in info.value.problems}["fluid.temperature"]
    # 130 degC and the fit's top, 120 degC, in degF: F = 9/5 C + 32 (NIST SP 811)
    assert "at 266 degF" in message and "to 248 degF" in message
    assert "degC" not in message


def test_a_hot_waters_note_gives_its_temperature_and_pressures_in_us_units():
    from workbench.output.common import finding_message

    text = BASE.format(units="US", height="5.2 m", tank="", bore="102.3 mm", end="1.2 m")
    project = load_project_text(text.replace('temperature = "20 degC"',
                                             'temperature = "101 degC"'), "t.toml")
    notes = [finding_message(n, "US") for n in project.system.fluid.notes]
    # 101 degC = 213.8 degF; 1 atm = 14.7 psia (ISO 2533, NIST SP 811)
    boiling = [n for n in notes if "boiling point" in n]
    assert boiling and "214 degF" in boiling[0] and "at 14.7 psia" in boiling[0], notes
    assert "kPa" not in boiling[0] and "degC" not in boiling[0]
