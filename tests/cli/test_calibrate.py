"""``workbench calibrate``: the JSON contract of the site-test issue, --write, refusals.

The demo drain test is checked against the generator that invented its readings
(``tools/make_drain_test_data.py``): the fit must give back the roughness the generator
used and the project does not state, within the fit's 95 % interval.
"""

from __future__ import annotations

import importlib.util
import json
import shutil
import tomllib
from pathlib import Path

import pytest

from workbench.cli import main

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "projects" / "fellgate_wash_tank_drain_test.toml"
DEMO_CSV = DEMO.with_name("fellgate_wash_tank_drain_test_levels.csv")
DEMO_LINE = "lines.420-DR-07.roughness"

SMALL = """\
schema = 1

[project]
title = "Rinse tank drain test"
units = "SI"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.RT1]
kind = "tank"
shape = "vertical_cylinder"
diameter = "1.2 m"
bottom_elevation = "6 m"
level = "2 m"

[receivers.DR]
kind = "open_discharge"
elevation = "0 m"

[lines.L1]
from = "RT1"
to = "DR"
length = "25 m"
inner_diameter = "52.5 mm"
roughness = "0.045 mm"  # new steel, from the handbook
fittings = [ { k = 0.8, label = "strainer" } ]

[simulation]
duration = "10 min"

# the site test
[measurements.drop]
element = "RT1"
quantity = "level"
points = [
    { time = "0 s", value = "2.00 m" },
    { time = "60 s", value = "1.62 m" },
    { time = "120 s", value = "1.26 m" },
    { time = "180 s", value = "0.93 m" },
    { time = "240 s", value = "0.62 m" },
]
"""


def _generator():
    spec = importlib.util.spec_from_file_location("make_drain_test_data",
                                                  ROOT / "tools" / "make_drain_test_data.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def demo_json():
    import io
    import sys

    out, saved = io.StringIO(), sys.stdout
    sys.stdout = out
    try:
        code = main(["calibrate", str(DEMO), "--fit", f"{DEMO_LINE}=0.01..3 mm", "--json"])
    finally:
        sys.stdout = saved
    return code, json.loads(out.getvalue())


def test_the_json_has_the_contract_shape(demo_json):
    code, out = demo_json
    assert code == 0
    assert {"parameters", "residual_rms_before", "residual_rms_after", "measurements",
            "warnings"} <= set(out)
    p = out["parameters"][DEMO_LINE]
    assert isinstance(p["value"], str) and p["value"].endswith(" mm")
    assert isinstance(p["value_si"], float)
    lo, hi = p["ci95_si"]
    assert lo < p["value_si"] < hi
    m = out["measurements"]["drain_test_nov"]
    assert m["quantity"] == "level" and m["unit_si"] == "m"
    assert m["rms_after"] < m["rms_before"]
    assert isinstance(out["warnings"], list)
    assert out["residual_rms_after"] == pytest.approx(m["rms_after"])


def test_the_demo_gives_back_the_roughness_its_readings_were_invented_with(demo_json):
    _code, out = demo_json
    aged = _generator().AGED_ROUGHNESS
    lo, hi = out["parameters"][DEMO_LINE]["ci95_si"]
    assert lo <= aged <= hi
    # the project's own (handbook) roughness is far from it: the test is worth calibrating
    assert out["parameters"][DEMO_LINE]["start_si"] < aged / 10


def test_the_handbook_roughness_misses_the_demo_drain_by_about_thirty_percent(demo_json):
    _code, out = demo_json
    times = out["measurements"]["drain_test_nov"]["time_to_mark_level_s"]
    assert times["measured"] / times["before"] == pytest.approx(1.3, abs=0.05)
    assert times["after"] == pytest.approx(times["measured"], rel=0.02)


def test_the_result_states_the_range_it_was_tested_over(demo_json):
    _code, out = demo_json
    caution = [w for w in out["warnings"] if w["code"] == "calibration.tested_range"]
    assert caution and "0.29 m to 3.6 m over 38 min" in caution[0]["message"]


def _small(tmp_path: Path) -> Path:
    path = tmp_path / "rinse.toml"
    path.write_text(SMALL, encoding="utf-8")
    return path


def test_write_applies_the_fit_as_one_edit_keeping_comments(tmp_path, capsys):
    path = _small(tmp_path)
    code = main(["calibrate", str(path), "--fit", "lines.L1.roughness=0.001..2 mm", "--json",
                 "--write"])
    assert code == 0
    fitted = json.loads(capsys.readouterr().out)["parameters"]["lines.L1.roughness"]
    text = path.read_text(encoding="utf-8")
    assert "# the site test" in text
    line = next(x for x in text.splitlines() if x.startswith("roughness"))
    assert line.startswith(f'roughness = "{fitted["value"]}"')
    assert "calibrated to drop on" in line and "(was 0.045 mm)" in line
    assert "new steel, from the handbook" in line
    # only that line changed
    before, after = SMALL.splitlines(), text.splitlines()
    assert len(before) == len(after)
    assert [a for a, b in zip(before, after) if a != b] == [
        'roughness = "0.045 mm"  # new steel, from the handbook']
    data = tomllib.loads(text)
    assert data["lines"]["L1"]["roughness"] == fitted["value"]


def test_without_write_the_file_is_untouched(tmp_path, capsys):
    path = _small(tmp_path)
    assert main(["calibrate", str(path), "--fit", "lines.L1.fittings[1].k=0.1..20"]) == 0
    assert path.read_text(encoding="utf-8") == SMALL
    out = capsys.readouterr().out
    assert "lines.L1.fittings[1].k" in out and "95 % interval" in out


@pytest.mark.parametrize(("fit", "words"), [
    ("lines.L9.roughness", "there is no line 'L9'"),
    ("lines.L1.material", "material is not a number"),
    ("lines.L1.length=1..2 m", "length is not a number the fit can change"),
    ("lines.L1.roughness=2..1 mm", "the lower bound must be below the upper bound"),
    ("lines.L1.roughness=0.01..30 mm", "below the pipe radius"),
])
def test_a_fit_that_cannot_work_is_refused_with_exit_1(tmp_path, capsys, fit, words):
    assert main(["calibrate", str(_small(tmp_path)), "--fit", fit]) == 1
    assert words in capsys.readouterr().err


def test_an_unknown_measurement_is_refused(tmp_path, capsys):
    code = main(["calibrate", str(_small(tmp_path)), "--fit", "lines.L1.roughness",
                 "--measurement", "dorp"])
    assert code == 1
    assert "--measurement dorp: no such measurement in the project — did you mean 'drop'?" \
        in capsys.readouterr().err


def test_a_fit_that_runs_to_its_bound_says_which_parameter(tmp_path, capsys):
    code = main(["calibrate", str(_small(tmp_path)), "--fit", "lines.L1.roughness=0.001..0.01 mm"])
    assert code == 1
    out = capsys.readouterr()
    assert "lines.L1.roughness ran to its" in out.err


def test_a_bound_is_named_in_the_files_units_in_the_table_and_the_json(tmp_path, capsys):
    """The fitted value on its bound is said as the user wrote the range (0.01 mm), not as a
    bare SI number, in the headline, on stderr and in the JSON message."""
    path = str(_small(tmp_path))
    assert main(["calibrate", path, "--fit", "lines.L1.roughness=0.001..0.01 mm"]) == 1
    out = capsys.readouterr()
    assert "ran to its upper bound 0.01 mm" in out.out
    assert "ran to its upper bound 0.01 mm" in out.err
    assert "SI)" not in out.out + out.err
    assert main(["calibrate", path, "--fit", "lines.L1.roughness=0.001..0.01 mm", "--json"]) == 1
    message = json.loads(capsys.readouterr().out)["message"]
    assert "ran to its upper bound 0.01 mm" in message


def test_no_fit_is_a_usage_error(tmp_path, capsys):
    assert main(["calibrate", str(_small(tmp_path))]) == 2


def test_the_demo_reads_its_csv_from_beside_the_project(tmp_path, capsys):
    shutil.copy(DEMO, tmp_path / DEMO.name)
    assert main(["check", str(tmp_path / DEMO.name)]) == 1
    assert "fellgate_wash_tank_drain_test_levels.csv: no such file" in capsys.readouterr().err
    shutil.copy(DEMO_CSV, tmp_path / DEMO_CSV.name)
    assert main(["check", str(tmp_path / DEMO.name)]) == 0


# --- steady readings at two valve openings ---------------------------------------------------

K_OPEN_TRUE = 3.0


def meter_flow(opening: float) -> float:
    r"""Steady flow from a constant level through a valved line to a free outlet, derived here.

    Energy from the free surface (14 m above the outlet) to the outlet:
    :math:`H = (1 + K_{ent} + fL/D + K_{open}/x^2)\,v^2/2g` with the exit's one velocity
    head, a sharp entrance 0.5 (common practice), a fixed f = 0.02 and a linear valve whose
    loss is :math:`K_{open}/x^2` (IEC 60534-2-4 linear characteristic, flow coefficient
    proportional to travel).
    """
    import math

    g, head, area = 9.80665, 14.0, math.pi * 0.1**2 / 4
    k = 1.0 + 0.5 + 0.02 * 50.0 / 0.1 + K_OPEN_TRUE / opening**2
    return area * math.sqrt(2 * g * head / k)


VALVED = f"""\
schema = 1

[project]
title = "Meter readings at two openings"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.R]
kind = "constant_level"
bottom_elevation = "10 m"
level = "4 m"

[receivers.OUT]
kind = "open_discharge"
elevation = "0 m"

[lines.L]
from = "R"
to = "OUT"
length = "50 m"
inner_diameter = "100 mm"
roughness = "0.045 mm"  # not used: the friction factor is fixed
friction_factor = 0.02
entrance = "sharp"

[lines.L.valve]
characteristic = "linear"
k_open = 1.0  # from the catalogue

[measurements.full_open]
element = "L"
quantity = "flow"
points = [ {{ value = "{meter_flow(1.0) * 1000:.4f} L/s" }} ]
valve_opening = 1.0

[measurements.half_open]
element = "L"
quantity = "flow"
points = [ {{ value = "{meter_flow(0.5) * 1000:.4f} L/s" }} ]
valve_opening = 0.5
"""


def test_two_steady_meter_readings_give_back_the_valve_loss(tmp_path, capsys):
    path = tmp_path / "valved.toml"
    path.write_text(VALVED, encoding="utf-8")
    code = main(["calibrate", str(path), "--fit", "lines.L.valve.k_open=0.1..20", "--json"])
    assert code == 0
    out = json.loads(capsys.readouterr().out)
    fitted = out["parameters"]["lines.L.valve.k_open"]
    assert fitted["value_si"] == pytest.approx(K_OPEN_TRUE, rel=2e-3)
    assert set(out["measurements"]) == {"full_open", "half_open"}
    assert out["measurements"]["half_open"]["unit_si"] == "m^3/s"
    assert out["residual_rms_after"] < out["residual_rms_before"] / 100


def test_a_fitted_bore_replaces_the_nominal_size_and_keeps_the_wall(tmp_path, capsys):
    # NPS 2 schedule 40: bore 52.50 mm, wall 3.91 mm (ASME B36.10M)
    path = tmp_path / "rinse.toml"
    path.write_text(SMALL.replace('inner_diameter = "52.5 mm"',
                                  'nominal_size = "2 in"\nschedule = "40"'), encoding="utf-8")
    code = main(["calibrate", str(path), "--fit", "lines.L1.inner_diameter=30..60 mm",
                 "--write"])
    assert code == 0
    line = tomllib.loads(path.read_text(encoding="utf-8"))["lines"]["L1"]
    assert "nominal_size" not in line and "schedule" not in line
    assert line["wall_thickness"] == "3.91 mm"
    assert "nominal_size 2 in schedule 40" in path.read_text(encoding="utf-8")


def test_units_shows_the_fit_in_us_units_and_write_keeps_the_files_own(tmp_path, capsys):
    """``--units US`` as for solve and simulate: the table in US units (1 in = 25.4 mm
    exactly, NIST SP 811), the JSON in SI, and ``--write`` in the file's own (SI) units."""
    path = _small(tmp_path)
    assert main(["calibrate", str(path), "--fit", "lines.L1.roughness=0.001..2 mm",
                 "--units", "US", "--json"]) == 0
    fitted = json.loads(capsys.readouterr().out)["parameters"]["lines.L1.roughness"]
    assert fitted["value"].endswith(" in") and fitted["start"] == "0.00177 in"
    assert main(["calibrate", str(path), "--fit", "lines.L1.roughness=0.001..2 mm",
                 "--units", "US", "--write"]) == 0
    out = capsys.readouterr().out
    assert "0.00177 in" in out and " mm" not in out.split("CAUTION")[0].split("Parameters")[1]
    line = next(x for x in path.read_text(encoding="utf-8").splitlines()
                if x.startswith("roughness"))
    assert line.startswith('roughness = "') and ' mm"' in line and "(was 0.045 mm)" in line
