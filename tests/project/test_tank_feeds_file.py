"""A tank's feed and draw-off keys read from a project file: load -> validate -> the core
model in SI, a round trip through the canonical format, and the simulate command's JSON
and tables end to end.

Unit factors: 1 L = 1e-3 m3 (SI, exact); 1 US gallon = 231 in3 = 3.785411784 L (exact by
definition, NIST Handbook 44).
"""

from __future__ import annotations

import json

import pytest

from workbench.core.model import FlowSchedule
from workbench.project.document import ProjectError, format_text, load_project_text

BASE = """\
schema = 1

[project]
title = "Feed keys"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.CW]
kind = "tank"
shape = "vertical_cylinder"
diameter = "4 m"
height = "3 m"
bottom_elevation = "10 m"
level = "1 m"
min_level = "0.2 m"
{tank}

[receivers.OUT]
kind = "open_discharge"
elevation = "8 m"

[lines.L1]
from = "CW"
to = "OUT"
length = "2 m"
inner_diameter = "50 mm"
roughness = "0.045 mm"
friction_factor = 0.02

[lines.L1.valve]
characteristic = "linear"
k_open = 0.5
opening = 0.0  # outlet shut: the tank only fills

[simulation]
duration = "20 min"
output_interval = "30 s"
"""


def tank_of(tank: str):
    return load_project_text(BASE.format(tank=tank)).system.reservoirs["CW"]


def test_constant_feed_and_draw_off_are_read_in_si():
    res = tank_of('inflow = "40 L/s"  # from the filters\ndraw_off = "120 gpm"')
    assert res.inflow == pytest.approx(0.040, rel=1e-12)
    assert res.draw_off == pytest.approx(120 * 3.785411784e-3 / 60, rel=1e-12)
    assert res.inflow_schedule is None and res.draw_off_schedule is None


def test_a_feed_schedule_is_read_as_times_in_seconds_and_flows_in_m3_s():
    res = tank_of('inflow_schedule = [{ time = "0 s", flow = "0 L/s" }, '
                  '{ time = "5 min", flow = "36 m3/h" }, { time = "1 h", flow = "36 m3/h" }]\n'
                  'restart_level = "0.5 m"')
    assert res.inflow_schedule == FlowSchedule((0.0, 300.0, 3600.0), (0.0, 0.01, 0.01))
    assert res.restart_level == pytest.approx(0.5)
    assert res.inflow == 0.0


def test_a_negative_feed_names_the_key_and_points_to_draw_off():
    with pytest.raises(ProjectError) as info:
        tank_of('inflow = "-3 L/s"')
    (problem,) = info.value.problems
    assert problem.key == "reservoirs.CW.inflow"
    assert "must not be negative" in problem.message and "draw_off" in problem.message


def test_an_empty_schedule_is_refused():
    with pytest.raises(ProjectError) as info:
        tank_of("draw_off_schedule = []")
    assert [p.key for p in info.value.problems] == ["reservoirs.CW.draw_off_schedule"]


def test_the_keys_survive_a_round_trip_through_the_canonical_format():
    text = BASE.format(tank='inflow_schedule = [{ time = "0 s", flow = "10 L/s" }, '
                       '{ time = "10 min", flow = "25 L/s" }]\ndraw_off = "4 L/s"  # to process')
    again = format_text(format_text(text))
    assert "# to process" in again
    first = load_project_text(text).system.reservoirs["CW"]
    second = load_project_text(again).system.reservoirs["CW"]
    assert first == second
    assert second.draw_off == pytest.approx(4e-3)


def test_simulate_json_and_tables_carry_the_feed(tmp_path, capsys):
    """Shut outlet, feed ramping 10 -> 25 L/s over 10 min then held, draw-off 4 L/s: the
    volume fed over 20 min is the trapezoid 0.5 (10 + 25) 600 + 25 600 L = 25.5 m3 and the
    volume drawn 4 L/s x 1200 s = 4.8 m3 (mass balance, worked here); the level rises by
    (25.5 - 4.8)/A with A = pi 2^2 m2."""
    from workbench.cli import main

    path = tmp_path / "cw.toml"
    path.write_text(BASE.format(
        tank='inflow_schedule = [{ time = "0 s", flow = "10 L/s" }, '
             '{ time = "10 min", flow = "25 L/s" }]\ndraw_off = "4 L/s"'), encoding="utf-8")
    assert main(["simulate", str(path), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    cw = out["levels"]["CW"]
    assert len(cw["inflow_m3_s"]) == len(out["time_s"]) == len(cw["draw_off_m3_s"])
    assert cw["inflow_m3_s"][0] == pytest.approx(0.010) and cw["inflow_m3_s"][-1] == pytest.approx(0.025)
    assert cw["inflow_volume_m3"] == pytest.approx(25.5, rel=1e-9)
    assert cw["draw_off_volume_m3"] == pytest.approx(4.8, rel=1e-9)
    rise = (25.5 - 4.8) / (3.141592653589793 * 4.0)
    assert cw["final_level_m"] - cw["initial_level_m"] == pytest.approx(rise, rel=1e-9)
    assert cw["end_state"] == "rising"
    assert set(out) >= {"schema", "time_s", "lines", "levels", "events", "warnings"}

    assert main(["simulate", str(path)]) == 0
    text = capsys.readouterr().out
    assert "Feeds and draw-offs" in text and "10–25 L/s" in text and "25.5 m3" in text
