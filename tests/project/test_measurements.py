"""Site tests in a project: ``[measurements.NAME]`` checked, and their CSV files read.

Sources: the CSV layout is RFC 4180 (a header row, comma-separated fields, CRLF line ends
allowed); timestamps are ISO 8601 as Python's ``datetime.fromisoformat`` reads them; the
byte-order mark is the Unicode U+FEFF that spreadsheet programs write at the start of a
"UTF-8 CSV" (common practice, no source). Unit factors are checked against the SI
definitions (1 ft = 0.3048 m exactly, NIST SP 811; 1 min = 60 s; 1 L = 1e-3 m3).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from workbench.project.document import ProjectError, load_project, load_project_text
from workbench.project.measurement_csv import CsvError, read_readings
from workbench.project.measurements import check_measurements, measurements_of

BASE = """schema = 1
[project]
title = "t"
[fluid]
kind = "water"
temperature = "15 degC"
[reservoirs.T]
kind = "tank"
shape = "vertical_cylinder"
diameter = "2 m"
bottom_elevation = "5 m"
level = "3 m"
[junctions.J]
elevation = "2 m"
[receivers.O]
kind = "open_discharge"
elevation = "0 m"
[lines.L]
from = "T"
to = "J"
length = "30 m"
inner_diameter = "80 mm"
roughness = "0.05 mm"
[lines.M]
from = "J"
to = "O"
length = "30 m"
inner_diameter = "80 mm"
roughness = "0.05 mm"
[lines.M.valve]
characteristic = "linear"
k_open = 0.2
[simulation]
duration = "30 min"
"""


def _read(tmp_path: Path, content: bytes | str, **kw):
    path = tmp_path / "log.csv"
    if isinstance(content, str):
        content = content.encode("utf-8")
    path.write_bytes(content)
    args = dict(shown="log.csv", time_column="t", time_unit="min", value_column="level",
                value_kind="length", value_unit="m")
    args.update(kw)
    return read_readings(path, **args)


def test_times_and_readings_are_converted_with_their_units(tmp_path):
    got = _read(tmp_path, "t,level\n0,10\n1.5,9\n", value_unit="ft")
    assert got.times == (0.0, 90.0)  # 1 min = 60 s
    assert got.values == pytest.approx((3.048, 2.7432))  # 1 ft = 0.3048 m (NIST SP 811)


def test_cells_may_carry_their_own_units_when_the_table_gives_none(tmp_path):
    got = _read(tmp_path, "t,level\n0 s,3.2 m\n2 h,250 cm\n", time_unit=None, value_unit=None)
    assert got.times == (0.0, 7200.0)
    assert got.values == pytest.approx((3.2, 2.5))


def test_iso_timestamps_count_from_the_first_row(tmp_path):
    text = "t,level\n2026-11-12T07:40:00Z,3.6\n2026-11-12T07:41:30Z,3.5\n2026-11-12T08:40:00Z,1\n"
    got = _read(tmp_path, text, time_unit="iso")
    assert got.times == (0.0, 90.0, 3600.0)


def test_timestamps_with_and_without_a_time_zone_are_refused_naming_the_row(tmp_path):
    text = "t,level\n2026-11-12T07:40:00+00:00,3.6\n2026-11-12T07:41:00,3.5\n"
    with pytest.raises(CsvError, match=r"log.csv: row 3, column 't': .*time zone"):
        _read(tmp_path, text, time_unit="iso")


def test_rows_with_a_missing_value_are_skipped_and_counted(tmp_path):
    got = _read(tmp_path, "t,level,quality\n0,3,good\n1,,comms\n2,NA,bad\n3,2.7,good\n")
    assert got.times == (0.0, 180.0)
    assert got.skipped_rows == (3, 4)  # 1 = the header row


def test_a_byte_order_mark_and_crlf_line_ends_are_read(tmp_path):
    got = _read(tmp_path, b"\xef\xbb\xbft,level\r\n0,3.0\r\n1,2.9\r\n")
    assert got.times == (0.0, 60.0) and got.values == (3.0, 2.9)


def test_a_semicolon_separated_export_is_read(tmp_path):
    got = _read(tmp_path, "t;level\n0;3.0\n1;2.9\n")
    assert got.values == (3.0, 2.9)


def test_a_row_of_text_is_refused_naming_the_file_row_and_column(tmp_path):
    with pytest.raises(CsvError) as info:
        _read(tmp_path, "t,level\n0,3.0\n1,pump tripped\n")
    assert "log.csv: row 3, column 'level': 'pump tripped' is not a number" in str(info.value)


def test_a_decimal_comma_is_refused_not_misread(tmp_path):
    with pytest.raises(CsvError, match="row 2, column 'level'"):
        _read(tmp_path, 't,level\n0,"3,2"\n')


def test_a_missing_column_is_named_with_the_nearest_one(tmp_path):
    with pytest.raises(CsvError, match=r"no column named 'level' — did you mean 'Level'\?"):
        _read(tmp_path, "t,Level\n0,3\n")


def test_times_that_go_backwards_are_refused(tmp_path):
    with pytest.raises(CsvError, match="row 3, column 't': the time goes backwards"):
        _read(tmp_path, "t,level\n5,3\n4,2.9\n")


def test_a_file_that_is_not_utf8_is_refused_with_its_row(tmp_path):
    with pytest.raises(CsvError, match="row 2: not UTF-8"):
        _read(tmp_path, b"t,level\n0,3\xb0\n")


def test_a_missing_file_is_named(tmp_path):
    with pytest.raises(CsvError, match="log2.csv: no such file"):
        read_readings(tmp_path / "log2.csv", shown="log2.csv", time_column="t", time_unit="s",
                      value_column="v", value_kind="length", value_unit="m")


# --- the tables in the project --------------------------------------------------------------

def _problems(extra: str) -> list[str]:
    import tomllib

    data = tomllib.loads(BASE + extra)
    return [f"{p.key}: {p.message}" for p in check_measurements(data, "plant.toml")[1]]


def test_typed_points_load_with_their_units():
    project = load_project_text(BASE + """
[measurements.drain]
element = "T"
quantity = "level"
points = [ { time = "0 min", value = "3.20 m" }, { time = "5 min", level = "2.71 m" } ]
""", "plant.toml")
    m = measurements_of(project)["drain"]
    assert list(m.times) == [0.0, 300.0] and list(m.values) == [3.2, 2.71]


def test_a_measurement_of_an_element_that_does_not_exist_is_refused():
    found = _problems('[measurements.x]\nelement = "TK-9"\nquantity = "level"\n'
                      'points = [ { time = "0 s", value = "1 m" }, { time = "1 s", value = "1 m" } ]\n')
    assert found == ["measurements.x.element: element = 'TK-9' names no element"]


@pytest.mark.parametrize(("element", "quantity", "words"), [
    ("L", "level", "'L' is in lines: a level reading belongs to a tank or reservoir"),
    ("T", "flow", "'T' is in reservoirs: a flow reading belongs to a line"),
    ("O", "pressure", "'O' is in receivers: a pressure reading belongs to a junction"),
])
def test_a_quantity_that_does_not_fit_the_element_kind_is_refused(element, quantity, words):
    found = _problems(f'[measurements.x]\nelement = "{element}"\nquantity = "{quantity}"\n'
                      'points = [ { time = "0 s", value = "1 m" }, { time = "1 s", value = "1 m" } ]\n')
    assert len(found) == 1 and words in found[0]


def test_a_single_level_reading_is_refused_a_level_is_compared_in_time():
    found = _problems('[measurements.x]\nelement = "T"\nquantity = "level"\n'
                      'points = [ { value = "1 m" } ]\n')
    assert found == ["measurements.x: a level is compared in time (a drain or a fill): give "
                     "readings at two times or more"]


def test_conditions_name_the_tank_a_line_draws_from_and_the_valve_on_the_line():
    import tomllib

    data = tomllib.loads(BASE + '[measurements.q]\nelement = "M"\nquantity = "flow"\n'
                         'points = [ { value = "12 L/s" } ]\nvalve_opening = 0.5\n'
                         'initial_level = { T = "2.5 m" }\n')
    found, problems = check_measurements(data, "plant.toml")
    assert problems == []
    q = found["q"]
    assert q.steady and q.openings == {"M": 0.5} and q.levels == {"T": 2.5}
    assert q.values[0] == pytest.approx(0.012)


def test_a_valve_opening_for_a_line_without_a_valve_is_refused():
    found = _problems('[measurements.q]\nelement = "L"\nquantity = "flow"\n'
                      'points = [ { value = "12 L/s" } ]\nvalve_opening = 0.5\n')
    assert len(found) == 1 and found[0].startswith("measurements.q.valve_opening: 'L' is not a line with a valve")


def test_an_unknown_key_in_a_measurement_is_refused_with_a_suggestion():
    found = _problems('[measurements.x]\nelement = "T"\nquantity = "level"\nfiel = "a.csv"\n')
    assert "measurements.x.fiel: unknown key 'fiel' — did you mean 'file'?" in found


def test_validation_leaves_the_csv_file_to_the_commands_that_read_it(tmp_path):
    # a project's text is checked wherever it is (a copy, the app's edits); its CSV file is
    # read where its readings are used, and a missing one is named then
    text = BASE + ('[measurements.x]\nelement = "T"\nquantity = "level"\nfile = "gone.csv"\n'
                   'time_column = "t"\ntime_unit = "s"\nvalue_column = "v"\nvalue_unit = "m"\n')
    path = tmp_path / "plant.toml"
    path.write_text(text, encoding="utf-8")
    project = load_project(path)
    with pytest.raises(ProjectError, match="measurements.x.file: gone.csv: no such file"):
        measurements_of(project)
    (tmp_path / "gone.csv").write_text("t,v\n0,3\n60,2.5\n", encoding="utf-8")
    m = measurements_of(project)["x"]
    assert np.allclose(m.times, [0.0, 60.0]) and math.isclose(m.values[1], 2.5)


# --- physically impossible readings and units at fault ------------------------------------

def test_a_negative_level_reading_is_refused_naming_the_key_path():
    """A level is read above the tank's bottom (the convention of the schema), so it is 0 or
    more (common practice, no source)."""
    found = _problems('[measurements.x]\nelement = "T"\nquantity = "level"\n'
                      'points = [ { time = "0 s", value = "1 m" }, '
                      '{ time = "60 s", value = "-0.05 m" } ]\n')
    assert len(found) == 1
    assert found[0].startswith("measurements.x.points[2].value: '-0.05 m': a level of -0.05 m "
                               "is below the tank's bottom: expected a level above the bottom")


def test_a_negative_level_in_a_csv_file_names_the_file_the_row_and_the_column(tmp_path):
    (tmp_path / "log.csv").write_text("t,lvl\n0,1.20\n1,0.60\n2,-0.02\n", encoding="utf-8")
    text = BASE + ('[measurements.x]\nelement = "T"\nquantity = "level"\nfile = "log.csv"\n'
                   'time_column = "t"\ntime_unit = "min"\nvalue_column = "lvl"\nvalue_unit = "m"\n')
    path = tmp_path / "plant.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProjectError) as caught:
        measurements_of(load_project(path))
    words = str(caught.value)
    assert "measurements.x.file: log.csv: row 4, column 'lvl': a level of -0.02 m is below" in words


def test_a_gauge_pressure_below_a_perfect_vacuum_is_refused():
    """Absolute pressure is never negative, so a gauge reading is above minus the site's
    atmospheric pressure (101.325 kPa here: the standard atmosphere, ISO 2533, at sea
    level)."""
    found = _problems('[measurements.p]\nelement = "J"\nquantity = "pressure"\n'
                      'points = [ { value = "-150 kPa" } ]\n')
    assert len(found) == 1 and found[0].startswith("measurements.p.points[1].value: '-150 kPa': "
                                                   "a gauge pressure of -150 kPa is below a "
                                                   "perfect vacuum")
    assert _problems('[measurements.p]\nelement = "J"\nquantity = "pressure"\n'
                     'points = [ { value = "-60 kPa" } ]\n') == []


@pytest.mark.parametrize(("key", "unit", "words"), [
    ("value_unit", "kg", "value_unit: 'kg': expected a length, got a mass; expected a unit of "
                         "length such as 'm', 'mm' or 'ft'"),
    ("time_unit", "m", "time_unit: 'm': expected a time, got a length; expected a unit of time"),
    ("time_unit", "minz", "time_unit: 'minz' is not a time"),
])
def test_a_csv_unit_that_cannot_be_used_is_reported_under_its_own_key(key, unit, words):
    # checked from the text alone: no file needs to be read (validation reads none)
    table = {"time_unit": "min", "value_unit": "m"}
    table[key] = unit
    text = ('[measurements.x]\nelement = "T"\nquantity = "level"\nfile = "log.csv"\n'
            f'time_column = "t"\ntime_unit = "{table["time_unit"]}"\nvalue_column = "lvl"\n'
            f'value_unit = "{table["value_unit"]}"\n')
    import tomllib

    problems = check_measurements(tomllib.loads(BASE + text), "plant.toml", read_files=False)[1]
    assert [p.key for p in problems] == [f"measurements.x.{key}"]
    assert f"measurements.x.{words}" in f"{problems[0].key}: {problems[0].message}"


def test_a_unit_the_reader_cannot_use_is_blamed_on_its_key_when_read_directly(tmp_path):
    with pytest.raises(CsvError) as caught:
        _read(tmp_path, "t,level\n0,1\n", value_unit="kg")
    assert caught.value.key == "value_unit"
    with pytest.raises(CsvError) as caught:
        _read(tmp_path, "t,level\n0,1\n", time_unit="m")
    assert caught.value.key == "time_unit"


def test_a_reading_beyond_the_longest_simulated_span_is_refused_naming_its_time():
    """Times outside what a run can simulate (1e9 s, workbench.core.transient.options) are
    refused where they are written: 40 years is 40 x 3.15576e7 s (Julian year, IAU)."""
    found = _problems('[measurements.x]\nelement = "T"\nquantity = "level"\n'
                      'points = [ { time = "0 s", value = "1 m" }, '
                      '{ time = "40 year", value = "0.5 m" } ]\n')
    assert found == ["measurements.x.points[2].time: the reading is more than 32 years after "
                     "the start of the test, beyond the longest span a run simulates: check "
                     "the time and its unit"]


def test_a_csv_reading_beyond_the_longest_simulated_span_names_its_row(tmp_path):
    (tmp_path / "log.csv").write_text("t,lvl\n0,1.2\n1e10,0.6\n", encoding="utf-8")
    text = BASE + ('[measurements.x]\nelement = "T"\nquantity = "level"\nfile = "log.csv"\n'
                   'time_column = "t"\ntime_unit = "s"\nvalue_column = "lvl"\nvalue_unit = "m"\n')
    path = tmp_path / "plant.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ProjectError, match=r"measurements.x.file: log.csv: row 3, column 't': "
                                           "the reading is more than 32 years"):
        measurements_of(load_project(path))


def test_an_impossible_reading_is_said_in_the_display_units_asked_for():
    """1 ft = 0.3048 m exactly (NIST SP 811): -0.05 m is -0.164 ft."""
    import tomllib

    data = tomllib.loads(BASE + '[measurements.x]\nelement = "T"\nquantity = "level"\n'
                         'points = [ { time = "0 s", value = "1 m" }, '
                         '{ time = "60 s", value = "-0.05 m" } ]\n')
    (problem,) = check_measurements(data, "plant.toml", unit_system="US")[1]
    assert "a level of -0.164 ft is below the tank's bottom" in problem.message
