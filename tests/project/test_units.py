"""Reading quantities with units, and showing them in SI and US display units."""

from __future__ import annotations

import math

import pytest

from workbench.project.units import (
    QUANTITY_KINDS,
    UnitError,
    display_unit,
    format_quantity,
    get_registry,
    parse_pressure,
    parse_quantity,
    to_display,
)

# Exact conversion factors: NIST SP 811 (2008), Appendix B; 1 in = 25.4 mm and
# 1 ft = 0.3048 m (international yard and pound agreement, 1959); 1 US gallon =
# 231 in^3 = 3.785411784 L; 1 bar = 100 kPa; standard atmosphere 101.325 kPa (ISO 2533).
INCH = 0.0254
FOOT = 0.3048
US_GALLON = 231 * INCH**3
PSI = 0.45359237 * 9.80665 / INCH**2  # lbf/in^2: avoirdupois pound x standard gravity

GOOD = [
    # (text, kind, SI value, source)
    ("150 mm", "diameter", 0.150, "SI prefix"),
    ("6 in", "diameter", 6 * INCH, "NIST SP 811: 1 in = 0.0254 m exactly"),
    ("12 ft", "length", 12 * FOOT, "NIST SP 811: 1 ft = 0.3048 m exactly"),
    ("0.045 mm", "roughness", 0.045e-3, "SI prefix"),
    ("20 degC", "temperature", 293.15, "ITS-90 / SI: T[K] = t[degC] + 273.15"),
    ("68 degF", "temperature", 293.15, "NIST SP 811: t[degC] = (t[degF] - 32)/1.8"),
    ("3.5 m^3/h", "flow", 3.5 / 3600, "definition of the hour"),
    ("3.5 m3/h", "flow", 3.5 / 3600, "trade spelling m3 = m^3 (common practice, no source)"),
    ("120 gpm", "flow", 120 * US_GALLON / 60, "NIST SP 811: US gallon = 231 in^3"),
    ("12 L/s", "flow", 0.012, "SI: 1 L = 1e-3 m^3"),
    ("10 bar", "pressure", 1.0e6, "NIST SP 811: 1 bar = 1e5 Pa"),
    ("1.5 barg", "pressure", 1.5e5, "gauge suffix (common practice, no source)"),
    ("50 kPa(g)", "pressure", 5.0e4, "gauge suffix (common practice, no source)"),
    ("14.7 psig", "pressure", 14.7 * PSI, "NIST SP 811: 1 psi = 6894.757 Pa"),
    ("1 bara", "pressure", 1.0e5 - 101325.0, "absolute to gauge at the ISO 2533 atmosphere"),
    ("101.325 kPa abs", "pressure", 0.0, "ISO 2533 standard atmosphere"),
    ("14.7 psia", "pressure", 14.7 * PSI - 101325.0, "NIST SP 811 and ISO 2533"),
    ("2.34 kPa", "pressure_abs", 2340.0, "plain unit means absolute for vapour pressures"),
    ("207 GPa", "modulus", 207e9, "SI prefix"),
    ("2 h", "time", 7200.0, "definition of the hour"),
    ("1.0 mPa*s", "viscosity", 1.0e-3, "SI prefix"),
    ("1 cP", "viscosity", 1.0e-3, "NIST SP 811: 1 cP = 1e-3 Pa*s"),
    ("998 kg/m3", "density", 998.0, "trade spelling m3 = m^3"),
    ("60 deg", "angle", math.pi / 3, "definition of the degree"),
    ("1e3 mm", "length", 1.0, "exponent notation"),
    ("-3.5 m", "elevation", -3.5, "elevations may be negative"),
    ("10 mH2O", "pressure", 10 * 9806.65, "conventional metre of water: 9806.65 Pa (NIST SP 811)"),
]


@pytest.mark.parametrize("text, kind, expected, source", GOOD)
def test_a_quantity_typed_with_units_reads_as_its_si_value(text, kind, expected, source):
    assert parse_quantity(text, kind) == pytest.approx(expected, rel=1e-9, abs=1e-9)


def test_an_absolute_pressure_is_made_gauge_with_the_site_atmosphere():
    # 1 bar absolute at a site where the atmosphere is 90 kPa: 10 kPa gauge (arithmetic).
    assert parse_quantity("1 bara", "pressure", atmosphere=90_000.0) == pytest.approx(10_000.0)


def test_a_pressure_keeps_the_reference_its_unit_states():
    assert parse_pressure("3 barg") == (pytest.approx(3e5), "gauge")
    assert parse_pressure("3 bara") == (pytest.approx(3e5), "absolute")
    assert parse_pressure("3 bar") == (pytest.approx(3e5), None)


BAD = [
    # (input, kind, words the message must contain)
    ("15 mmm", "length", "'15 mmm' is not a length: unknown unit 'mmm'"),
    ("10 kPa", "length", "expected a length, got a pressure"),
    ("3 m", "pressure", "expected a pressure, got a length"),
    ("1,5 m", "length", "decimal point"),  # pint reads this as 15 m
    ("1 000 m", "length", "without spaces"),  # pint reads this as 0 m
    ("1_000 m", "length", "without spaces"),
    ("inf m", "length", "finite"),
    ("nan m", "length", "finite"),
    ("1e400 m", "length", "finite"),
    ("12", "length", "a unit is needed"),
    (12, "length", "bare number 12"),
    (12.5, "diameter", "bare number 12.5"),
    (True, "length", "expected a length"),
    ("2*3 m", "length", "expected a number followed by a unit"),
    ("3 m 3", "length", "numbers are not allowed inside the unit"),
    ("__import__('os').system('true') m", "length", "must start with a number"),
    ("3 m; import os", "length", "characters a unit cannot have"),
    ("3 m)", "length", "cannot read the unit"),
    # a unit pint would read as m^100000, after seconds of CPU (found by the fuzz test)
    ("3" + " m" * 100_000, "length", "characters long (a unit has at most 100)"),
    ("", "length", "must start with a number"),
    ("5 kPa(g)", "length", "got a pressure"),  # pint reads 'kPa(g)' as kPa x gram
    ("-300 degC", "temperature", "below absolute zero"),
    ("60 %", "angle", "not an angle"),
    ("3 kPa", "elevation", "expected an elevation"),
]


@pytest.mark.parametrize("text, kind, words", BAD)
def test_text_that_is_not_a_valid_quantity_is_refused_in_words(text, kind, words):
    with pytest.raises(UnitError) as info:
        parse_quantity(text, kind)
    assert words in str(info.value)


def test_the_registry_is_built_once_for_the_program():
    assert get_registry() is get_registry()


@pytest.mark.parametrize("kind, system, unit", [
    ("flow", "SI", "L/s"), ("flow", "US", "gpm"),
    ("pressure", "SI", "kPa"), ("pressure", "US", "psi"),
    ("length", "SI", "m"), ("length", "US", "ft"),
    ("diameter", "SI", "mm"), ("diameter", "US", "in"),
    ("temperature", "SI", "degC"), ("temperature", "US", "degF"),
    # air through a tank vent: vents are rated in m3/h, and in ft3/min (SCFM) in US practice
    # (common practice, no source); never a liquid unit such as gpm
    ("gas_flow", "SI", "m3/h"), ("gas_flow", "US", "ft3/min"),
])
def test_display_units_are_the_trades_usual_units(kind, system, unit):
    assert display_unit(kind, system) == unit


@pytest.mark.parametrize("value, kind, system, expected, source", [
    (0.0254, "diameter", "US", 1.0, "NIST SP 811: 1 in = 0.0254 m"),
    (0.3048, "length", "US", 1.0, "NIST SP 811: 1 ft = 0.3048 m"),
    (US_GALLON / 60, "flow", "US", 1.0, "NIST SP 811: US gallon = 231 in^3"),
    (6894.757293168, "pressure", "US", 1.0, "NIST SP 811: 1 psi = 6894.757 Pa"),
    (373.15, "temperature", "US", 212.0, "water boils at 212 degF at 1 atm (definition)"),
    (0.001, "flow", "SI", 1.0, "1 L/s = 1e-3 m^3/s"),
    (0.3048 ** 3 / 60, "gas_flow", "US", 1.0, "NIST SP 811: 1 ft = 0.3048 m, so 1 ft3/min"),
    (1 / 3600, "gas_flow", "SI", 1.0, "1 m3/h = 1/3600 m^3/s"),
])
def test_si_values_convert_to_the_display_unit(value, kind, system, expected, source):
    assert to_display(value, kind, system) == pytest.approx(expected, rel=1e-6)


@pytest.mark.parametrize("kind", sorted(QUANTITY_KINDS))
@pytest.mark.parametrize("system", ["SI", "US"])
def test_formatted_quantities_read_back_to_the_same_value(kind, system):
    value = parse_quantity(QUANTITY_KINDS[kind].example, kind)
    text = format_quantity(value, kind, system, digits=8)
    assert parse_quantity(text, kind) == pytest.approx(value, rel=1e-6)


def test_formatting_rounds_to_significant_digits():
    assert format_quantity(0.0125, "flow", "SI") == "12.5 L/s"
    assert format_quantity(0.10226, "diameter", "SI", digits=4) == "102.3 mm"
    assert format_quantity(101325.0, "pressure", "SI", digits=4) == "101.3 kPa"


@pytest.mark.parametrize("text, kind, system, expected, source", [
    ("50 kPa", "pressure", "US", f"{50e3 / 6894.757293168:.3g} psi", "NIST SP 811: 1 psi = 6894.757 Pa"),
    ("2 m", "elevation", "US", f"{2 / 0.3048:.3g} ft", "NIST SP 811: 1 ft = 0.3048 m"),
    ("20 degC", "temperature", "US", "68 degF", "F = 9/5 C + 32 (definition)"),
    ("50 kPa", "pressure", "SI", "50 kPa", "SI: as the schema writes it"),
    ("40", "number", "US", "40", "a plain number has no units"),
])
def test_an_example_is_shown_in_the_display_units(text, kind, system, expected, source):
    from workbench.project.units import example_text

    assert example_text(text, kind, system) == expected
