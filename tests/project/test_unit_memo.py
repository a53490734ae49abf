"""The unit memo: pint's answers kept between runs, equal to pint's own to the last bit, and
never in the way.

The reference is pint itself (the registry of :func:`workbench.project.units.get_registry`);
exact conversions by definition: 1 in = 25.4 mm, 1 US gal = 231 in^3 = 3.785411784 L
(international yard and pound agreement, 1959), 1 psi = 6894.757293168 Pa (the pound-force
from the standard gravity 9.80665 m/s^2, NIST SP 811).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from workbench.project import units
from workbench.project.unit_memo import MAX_ENTRIES, UnitMemo, memo_key, memo_path
from workbench.project.units import QUANTITY_KINDS, get_registry, to_display

ROOT = Path(__file__).resolve().parents[2]
KEY = memo_key(Path(units.__file__))

#: Quantity texts a project holds, of every kind, gauge and absolute pressures included.
TEXTS = [("length", "120 m"), ("length", "393.7 ft"), ("diameter", "4 in"),
         ("diameter", "102.3 mm"), ("flow", "120 gpm"), ("flow", "3.5 m3/h"),
         ("pressure", "1.5 barg"), ("pressure", "14.7 psia"), ("pressure", "50 kPa(g)"),
         ("pressure_abs", "2.34 kPa"), ("temperature", "20 degC"), ("temperature", "68 degF"),
         ("viscosity", "1.2 cP"), ("density", "62.4 lb/ft3"), ("kv", "250 m3/h"),
         ("angle", "60 deg"), ("volume", "1000 gal"), ("salinity", "35 g/kg")]


def test_the_key_names_pint_and_changes_with_the_reading_rules(tmp_path) -> None:
    assert "pint" in KEY and ".dist-info" in KEY
    rules = tmp_path / "units.py"
    rules.write_text("A = 1\n")
    first = memo_key(rules)
    rules.write_text("A = 2\n")
    assert memo_key(rules) != first
    assert memo_path(tmp_path, first) != memo_path(tmp_path, memo_key(rules))


def test_kept_readings_come_back_from_the_file_as_pint_read_them(tmp_path) -> None:
    path = memo_path(tmp_path, KEY)
    memo = UnitMemo(path, KEY)
    fresh = {(kind, text): units._parse_with_pint(text, kind) for kind, text in TEXTS}
    for (kind, text), parsed in fresh.items():
        memo.keep_parsed(kind, text, parsed.value, parsed.reference)
    memo.save()
    again = UnitMemo(path, KEY)
    for (kind, text), parsed in fresh.items():
        assert again.parsed(kind, text) == (parsed.value, parsed.reference), text
    assert again.parsed("flow", "120 gpm")[0] == pytest.approx(120 * 3.785411784e-3 / 60, rel=1e-14)
    assert again.parsed("pressure", "14.7 psia")[1] == "absolute"


@pytest.fixture
def fresh_memo(tmp_path, monkeypatch):
    """An empty memo in a temporary folder as the process's memo, parse caches cleared."""
    memo = UnitMemo(memo_path(tmp_path, KEY), KEY)
    monkeypatch.setattr(units, "unit_memo", lambda: memo)
    units._parse_text.cache_clear()
    yield memo
    units._parse_text.cache_clear()


#: (kind, unit text) pairs whose conversion is a plain factor, gauge and absolute included.
PLAIN_UNITS = [("length", "ft"), ("length", "m"), ("diameter", "in"), ("diameter", "mm"),
               ("flow", "gpm"), ("flow", "m3/h"), ("flow", "L/s"), ("pressure", "barg"),
               ("pressure", "psia"), ("pressure", "kPa(g)"), ("pressure", "kPa abs"),
               ("pressure_abs", "kPa"), ("viscosity", "cP"), ("density", "lb/ft3"),
               ("temperature", "K"), ("temperature", "degR"), ("angle", "deg"), ("volume", "gal"),
               ("time", "min"), ("salinity", "g/kg"), ("kv", "m3/h")]


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(unit=st.sampled_from(PLAIN_UNITS), value=st.floats(0.0, 1e6, allow_nan=False))
def test_a_new_number_with_a_kept_unit_reads_as_pint_reads_it(fresh_memo, unit, value) -> None:
    kind, unit_text = unit
    units._parse_text.cache_clear()  # the memo may hold more units: that is what it is for
    units._parse_text(f"1 {unit_text}", kind)  # pint reads it and the unit is kept
    assert fresh_memo.unit(kind, unit_text) is not None
    text = f"{value!r} {unit_text}"
    assert units._parse_text(text, kind) == units._parse_with_pint(text, kind)


def test_what_a_kept_unit_cannot_take_is_refused_in_pints_words(fresh_memo) -> None:
    units._parse_text("1 km", "length")
    units._parse_text("300 K", "temperature")
    with pytest.raises(units.UnitError, match="finite"):
        units._parse_text("1e306 km", "length")
    with pytest.raises(units.UnitError, match="below absolute zero"):
        units._parse_text("-5 K", "temperature")


def test_an_offset_unit_keeps_the_text_not_the_unit(fresh_memo) -> None:
    """20 degC is 293.15 K by definition of the Celsius scale (SI Brochure, 9th ed.)."""
    assert units._parse_text("20 degC", "temperature").value == pytest.approx(293.15, abs=1e-12)
    assert fresh_memo.unit("temperature", "degC") is None
    assert fresh_memo.parsed("temperature", "20 degC")[0] == pytest.approx(293.15, abs=1e-12)


@settings(max_examples=40, deadline=None)
@given(kind=st.sampled_from(sorted(QUANTITY_KINDS)), system=st.sampled_from(["SI", "US"]),
       value=st.floats(-1e6, 1e6, allow_nan=False))
def test_a_display_value_is_pints_conversion_to_the_last_bit(kind, system, value) -> None:
    spec = QUANTITY_KINDS[kind]
    unit = spec.display_us if system == "US" else spec.display_si
    expected = get_registry().Quantity(value, spec.si_unit).to(unit).magnitude
    assert to_display(value, kind, system) == expected
    array = np.array([value, 2.5 * value, 0.0])
    assert np.array_equal(to_display(array, kind, system),
                          get_registry().Quantity(array, spec.si_unit).to(unit).magnitude)
    assert np.array_equal(to_display((value, 1.0), kind, system),
                          get_registry().Quantity((value, 1.0), spec.si_unit).to(unit).magnitude)


def test_exact_factors_by_definition() -> None:
    assert to_display(0.0254, "diameter", "US") == pytest.approx(1.0, rel=1e-15)
    assert to_display(6894.757293168, "pressure", "US") == pytest.approx(1.0, rel=1e-12)
    assert units._display_factor("K", "degC") is None  # an offset: pint converts
    assert to_display(293.15, "temperature", "SI") == pytest.approx(20.0, abs=1e-12)


def test_a_refused_text_is_not_kept_and_is_refused_again(fresh_memo) -> None:
    with pytest.raises(units.UnitError, match="unknown unit"):
        units.parse_value("12 cubits", "length")
    units.parse_value("12 m", "length")
    assert fresh_memo.unit("length", "cubits") is None
    assert fresh_memo.unit("length", "m") == (1.0, None)
    units._parse_text.cache_clear()
    with pytest.raises(units.UnitError, match="unknown unit"):
        units.parse_value("12 cubits", "length")


@pytest.mark.parametrize("content", [
    "half a file {",
    json.dumps({"key": "another pint", "parsed": {"length\t1 m": [5.0, None]}, "units": {},
                "factors": {}}),
    json.dumps(["not", "a", "memo"]),
])
def test_a_damaged_file_or_another_key_is_passed_over(tmp_path, content) -> None:
    path = memo_path(tmp_path, KEY)
    path.write_text(content)
    memo = UnitMemo(path, KEY)
    assert memo.parsed("length", "1 m") is None


def test_entries_of_the_wrong_type_are_passed_over(tmp_path) -> None:
    path = memo_path(tmp_path, KEY)
    path.write_text(json.dumps({"key": KEY, "parsed": {"length\t1 m": ["1", None],
                                                       "length\t2 m": [2.0, "sideways"]},
                                "units": {"length\tft": [0.3048]}, "factors": {"m\tft": "3.28"}}))
    memo = UnitMemo(path, KEY)
    assert memo.parsed("length", "1 m") is None and memo.parsed("length", "2 m") is None
    assert memo.unit("length", "ft") is None and memo.factor("m", "ft") is None


def test_a_hand_edited_number_that_is_not_finite_is_passed_over(tmp_path) -> None:
    """json reads NaN and Infinity as floats; a reading or factor must be a finite number
    (a factor to SI also above zero)."""
    path = memo_path(tmp_path, KEY)
    path.write_text('{"key": %s, "parsed": {"length\\t1 m": [NaN, null]}, '
                    '"units": {"length\\tft": [Infinity, null]}, '
                    '"factors": {"m\\tft": -Infinity, "m\\tin": 0.0}}' % json.dumps(KEY))
    memo = UnitMemo(path, KEY)
    assert memo.parsed("length", "1 m") is None and memo.unit("length", "ft") is None
    assert memo.factor("m", "ft") is None and memo.factor("m", "in") is None


def test_a_memo_that_cannot_be_written_out_whole_is_not_written(tmp_path) -> None:
    """A value that is not finite (or a table changing under the writer) ends the save
    quietly, leaving no file and no error at exit."""
    memo = UnitMemo(memo_path(tmp_path, KEY), KEY)
    memo.keep_parsed("length", "1 m", float("nan"), None)
    memo.save()
    assert not memo_path(tmp_path, KEY).exists()


def test_the_memo_stops_growing_at_its_limit(tmp_path) -> None:
    memo = UnitMemo(memo_path(tmp_path, KEY), KEY)
    for i in range(MAX_ENTRIES + 10):
        memo.keep_parsed("length", f"{i} m", float(i), None)
    memo.save()
    kept = json.loads(memo_path(tmp_path, KEY).read_text())["parsed"]
    assert len(kept) == MAX_ENTRIES


def test_an_unwritable_folder_means_no_memo_and_no_error(tmp_path) -> None:
    blocker = tmp_path / "a file"
    blocker.write_text("not a folder")
    memo = UnitMemo(blocker / "cache" / "memo.json", KEY)
    memo.keep_parsed("length", "1 m", 1.0, None)
    memo.save()
    assert not (blocker / "cache").exists()


def _solve_twice(cache: str) -> list[str]:
    code = (
        "import contextlib, io, sys\n"
        "from workbench.cli import main\n"
        "out = io.StringIO()\n"
        "with contextlib.redirect_stdout(out):\n"
        "    main(['solve', '--units', 'US', 'projects/fellgate_cooling_water_network.toml'])\n"
        "    main(['solve', '--json', 'projects/fellgate_condensate_tank_vent.toml'])\n"
        "print('pint' in sys.modules)\n"
        "print(out.getvalue())\n"
    )
    env = dict(os.environ, WORKBENCH_CACHE_DIR=cache, NO_COLOR="1")
    return [subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                           cwd=ROOT, env=env, check=True).stdout for _ in range(2)]


def test_a_second_run_reads_its_quantities_without_pint_and_prints_the_same(tmp_path) -> None:
    first, second = _solve_twice(str(tmp_path))
    assert first.startswith("True\n") and second.startswith("False\n")
    assert first[5:] == second[6:] and "gpm" in second
    assert list(tmp_path.glob("unit-memo-*.json"))


def test_with_the_cache_turned_off_every_run_asks_pint(tmp_path) -> None:
    first, second = _solve_twice("")
    assert first.startswith("True\n") and second.startswith("True\n")
    assert first == second


def test_an_edited_number_with_a_known_unit_needs_no_pint(tmp_path) -> None:
    def run(text: str) -> str:
        code = ("import sys\n"
                "from workbench.project.units import parse_quantity\n"
                f"print(parse_quantity({text!r}, 'flow'), 'pint' in sys.modules)\n")
        env = dict(os.environ, WORKBENCH_CACHE_DIR=str(tmp_path))
        return subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                              env=env, check=True).stdout.split()

    assert run("120 gpm")[1] == "True"
    value, pint_loaded = run("90 gpm")
    assert pint_loaded == "False"
    assert float(value) == pytest.approx(90 * 3.785411784e-3 / 60, rel=1e-14)  # 1 US gal
