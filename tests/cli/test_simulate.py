"""``workbench simulate``: the JSON shape of the transient issue, CSV, plots, and errors.

The drain time printed for a project file is checked against the Torricelli closed form
with a line (HYDRAULICS notes), so the command is checked end to end against an outside
reference, not only for its shape.
"""

from __future__ import annotations

import csv
import json
import math

import pytest

from workbench.cli import main

G = 9.80665  # standard gravity (CGPM 1901)

DRAIN = """\
schema = 1

[project]
title = "Rinse tank drain"
units = "SI"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.RT1]
kind = "tank"
shape = "vertical_cylinder"
diameter = "2 m"
height = "4 m"
bottom_elevation = "10 m"
level = "3 m"
min_level = "0 m"

[receivers.DRAIN]
kind = "open_discharge"
elevation = "9 m"

[lines.L1]
from = "RT1"
to = "DRAIN"
length = "2 m"
inner_diameter = "50 mm"
roughness = "0.045 mm"
friction_factor = 0.02
entrance = 0.5

[simulation]
duration = "2 h"
initial_state = "steady"
stop_when = "drained"
"""

CLOSURE = """\
schema = 1

[project]
title = "Transfer line with a closing valve"
units = "SI"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.HEAD]
kind = "constant_level"
bottom_elevation = "0 m"
level = "30 m"

[receivers.OUT]
kind = "open_discharge"
elevation = "0 m"

[lines.L1]
from = "HEAD"
to = "OUT"
length = "600 m"
nominal_size = "12 in"
schedule = "40"
material = "commercial_steel"
pressure_rating = "10 bar"

[lines.L1.valve]
characteristic = "linear"
k_open = 5
schedule = [{ time = "1 s", opening = 1.0 }, { time = "3 s", opening = 0.0 }]

[simulation]
duration = "10 s"
"""


@pytest.fixture
def drain_file(tmp_path):
    path = tmp_path / "drain.toml"
    path.write_text(DRAIN)
    return path


def _run(capsys, *argv):
    code = main(["simulate", *map(str, argv)])
    out, err = capsys.readouterr()
    return code, out, err


def test_json_has_exactly_the_documented_shape(capsys, drain_file):
    code, out, err = _run(capsys, drain_file, "--json")
    assert code == 0, err
    data = json.loads(out)
    assert data["schema"] == 1
    assert {"schema", "time_s", "lines", "levels", "events", "surge", "warnings"} <= set(data)
    n = len(data["time_s"])
    line = data["lines"]["L1"]
    assert len(line["flow_m3_s"]) == n
    assert isinstance(line["max_pressure_pa"], float) and isinstance(line["min_pressure_pa"], float)
    assert len(data["levels"]["RT1"]["level_m"]) == n
    assert all(set(event) == {"time_s", "code", "element", "message"} for event in data["events"])
    drained = [e for e in data["events"] if e["code"] == "tank.drained"]
    assert len(drained) == 1 and drained[0]["element"] == "RT1"
    assert {"wave_speed_m_s", "joukowsky_pa", "effective_closure_s", "round_trip_s"} <= set(
        data["surge"]["L1"])
    assert all({"code", "element", "message"} <= set(w) for w in data["warnings"])


def test_json_drain_time_matches_torricelli_with_the_line(capsys, drain_file):
    """t = 2 A_T (sqrt(h0 + z) - sqrt(h1 + z)) / (a sqrt(2g/K_t)), K_t = 1 + K_e + fL/D
    (quasi-steady Torricelli, HYDRAULICS notes); the rigid column's inertia shifts it by
    less than 5e-4 here."""
    code, out, _ = _run(capsys, drain_file, "--json")
    data = json.loads(out)
    k_t = 1 + 0.5 + 0.02 * 2.0 / 0.05
    a = math.pi * 0.05**2 / 4
    expected = 2 * math.pi * (math.sqrt(4.0) - math.sqrt(1.0)) / (a * math.sqrt(2 * G / k_t))
    drained = next(e for e in data["events"] if e["code"] == "tank.drained")
    assert drained["time_s"] == pytest.approx(expected, rel=5e-4)
    assert data["time_s"][-1] == drained["time_s"]


def test_csv_holds_the_same_series_as_the_json(capsys, drain_file, tmp_path):
    path = tmp_path / "series.csv"
    code, out, _ = _run(capsys, drain_file, "--json", "--csv", path)
    data = json.loads(out)
    rows = list(csv.reader(path.open()))
    assert rows[0] == ["time_s", "flow_L1_m3_s", "level_RT1_m"]
    assert len(rows) - 1 == len(data["time_s"])
    assert float(rows[5][0]) == data["time_s"][4]
    assert float(rows[5][2]) == pytest.approx(data["levels"]["RT1"]["level_m"][4], rel=1e-15)


def test_summary_table_names_the_drain_time_and_cautions(capsys, drain_file):
    code, out, err = _run(capsys, drain_file)
    assert code == 0 and err == ""  # no progress bar when stderr is not a terminal
    assert "Tanks" in out and "drained at" in out and "tank.drained" in out
    assert "never proof that a tank is empty" in out


def test_duration_option_overrides_the_file(capsys, drain_file):
    code, out, _ = _run(capsys, drain_file, "--json", "--duration", "90 s")
    data = json.loads(out)
    assert data["time_s"][-1] == pytest.approx(90.0) and data["events"] == []


def test_plot_draws_levels_and_flows(capsys, drain_file):
    code, out, _ = _run(capsys, drain_file, "--plot")
    assert code == 0 and "Tank levels" in out and "Line flows" in out


def test_a_fast_valve_closure_is_flagged_in_the_json(capsys, tmp_path):
    # 2 s closure on 600 m of NPS 12 steel: about two round trips 2L/a (HYDRAULICS notes:
    # rigid column not valid below about five).
    path = tmp_path / "closure.toml"
    path.write_text(CLOSURE)
    code, out, err = _run(capsys, path, "--json")
    assert code == 0, err
    data = json.loads(out)
    codes = {w["code"] for w in data["warnings"]}
    assert "surge.rapid_closure" in codes
    surge = data["surge"]["L1"]
    # Korteweg, steel NPS 12 Sch 40, anchored (HYDRAULICS notes, computed): about 1307 m/s
    # (the liquid's bulk modulus here comes from IAPWS-95, so allow 1 %)
    assert surge["wave_speed_m_s"] == pytest.approx(1307.6, rel=0.01)
    assert surge["round_trip_s"] == pytest.approx(2 * 600 / surge["wave_speed_m_s"], rel=1e-12)
    assert [e["time_s"] for e in data["events"] if e["code"] == "valve.closed"] == [3.0]


def test_a_bad_duration_is_a_usage_error(capsys, drain_file):
    code, _, err = _run(capsys, drain_file, "--duration", "10 kg")
    assert code == 2 and "--duration" in err


def test_a_missing_file_is_named(capsys, tmp_path):
    code, _, err = _run(capsys, tmp_path / "nope.toml")
    assert code == 1 and "nope.toml" in err


def test_a_project_without_a_duration_says_what_to_add(capsys, tmp_path):
    path = tmp_path / "nodur.toml"
    path.write_text(DRAIN.split("[simulation]")[0])
    code, _, err = _run(capsys, path)
    assert code == 1 and "simulation.duration" in err


def test_help_explains_the_lumped_laminar_start_up(capsys):
    assert main(["simulate", "--help"]) == 0
    out = capsys.readouterr().out
    assert "Szymanski" in out and "63-99 % " in out


def test_the_settling_time_is_after_the_last_excursion_not_the_first_crossing():
    # Settling time as control engineering defines it (common practice, no source): the time
    # from which the response stays within a band (1 % of the change) around its final value.
    import numpy as np

    from workbench.output.transient import settle_time

    t = np.linspace(0.0, 100.0, 10001)
    monotone = 1.0 - np.exp(-t / 10.0)
    # 99 % of the change of 1 - exp(-t/10) over 0..100 s: exp(-t/10) = 0.01 + 0.99 exp(-10)
    expected = -10.0 * math.log(0.01 + 0.99 * math.exp(-10.0))
    assert settle_time(t, monotone) == pytest.approx(expected, abs=0.011)
    ringing = 1.0 - np.exp(-t / 10.0) * np.cos(t)  # overshoots the final value many times
    first_crossing = float(t[np.argmax(ringing >= 0.99 * ringing[-1])])
    settled = settle_time(t, ringing)
    assert settled > 30.0 > first_crossing
    after = t >= settled
    assert np.all(np.abs(ringing[after] - ringing[-1]) <= 0.01 * abs(ringing[-1] - ringing[0]))


def test_a_us_project_s_events_and_warnings_give_feet(capsys):
    # Display units follow [project] units = "US" (README); 1 ft = 0.3048 m (NIST SP 811).
    from pathlib import Path

    from workbench.core.transient import simulate
    from workbench.output.common import finding_message
    from workbench.project.document import load_project

    path = Path(__file__).parents[2] / "projects" / "fellgate_cooling_water_network.toml"
    project = load_project(path)
    res = simulate(project.system)
    (drained,) = [e for e in res.events if e.code == "tank.drained"]
    text = finding_message(drained, "US")
    level = project.system.reservoirs[drained.element].min_level
    assert f"drained level {level / 0.3048:.4g} ft" in text and " m;" not in text
    assert main(["simulate", str(path)]) == 0
    out = capsys.readouterr().out
    assert f"{level / 0.3048:.4g} ft" in out
