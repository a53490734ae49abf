"""``simulate`` and ``report`` hold each site test against the model.

End to end against an outside reference: readings typed into a project from the closed form
of a laminar drain (Hagen-Poiseuille, derived in tests/core/test_calibration.py) leave
residuals of a millimetre or less; readings past the end of the run are counted, not
compared; a test under its own conditions is compared on a run at those conditions.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from workbench.cli import main

G = 9.80665  # standard gravity (CGPM 1901)
MU, RHO, L, D = 0.5, 1000.0, 20.0, 0.025  # a viscous custom liquid through a small bore
AREA = math.pi / 4.0  # 1 m tank
DROP, H0 = 5.0, 3.0


def closed_form(t):
    tau = 128.0 * MU * L * AREA / (math.pi * D**4 * RHO * G)  # Hagen-Poiseuille drain
    return (H0 + DROP) * np.exp(-np.asarray(t) / tau) - DROP


def project(points: str, extra: str = "", duration: str = "10 h") -> str:
    return f"""schema = 1
[project]
title = "viscous drain"
[fluid]
kind = "custom"
density = "{RHO} kg/m3"
viscosity = "{MU} Pa*s"
[reservoirs.T]
kind = "tank"
shape = "vertical_cylinder"
diameter = "1 m"
bottom_elevation = "{DROP} m"
level = "{H0} m"
[receivers.O]
kind = "open_discharge"
elevation = "0 m"
[lines.L]
from = "T"
to = "O"
length = "{L} m"
inner_diameter = "{D * 1000} mm"
roughness = "0.045 mm"
entrance = 0
[simulation]
duration = "{duration}"
output_interval = "1 min"
[measurements.drop]
element = "T"
quantity = "level"
points = [ {points} ]
{extra}"""


def _points(hours):
    return ", ".join(f'{{ time = "{h} h", value = "{closed_form(h * 3600.0):.6f} m" }}'
                     for h in hours)


def _run(tmp_path, capsys, text, *args):
    path = tmp_path / "drain.toml"
    path.write_text(text, encoding="utf-8")
    code = main(["simulate", str(path), "--json", *args])
    return code, json.loads(capsys.readouterr().out)


def test_readings_from_the_closed_form_leave_millimetre_residuals(tmp_path, capsys):
    code, out = _run(tmp_path, capsys, project(_points([0, 1, 2, 4, 6, 8])))
    assert code == 0
    m = out["measurements"]["drop"]
    assert m["compared"] == 6 and m["outside_span"] == 0 and m["compared_on"] == "this run"
    assert m["unit_si"] == "m" and m["rms"] < 1e-3 and m["max_abs"] < 2e-3


def test_readings_after_the_end_of_the_run_are_counted_not_compared(tmp_path, capsys):
    code, out = _run(tmp_path, capsys, project(_points([0, 1, 2, 4, 6, 8]), duration="3 h"))
    assert code == 0
    m = out["measurements"]["drop"]
    assert (m["compared"], m["outside_span"]) == (3, 3)
    assert "3 reading(s) after the end of the run at 3 h are not compared" in m["note"]


def test_a_test_at_another_start_level_is_compared_on_a_run_at_that_level(tmp_path, capsys):
    global H0
    saved, H0 = H0, 2.0
    try:
        points = _points([0, 1, 2, 3])
    finally:
        H0 = saved
    code, out = _run(tmp_path, capsys, project(points, 'initial_level = "2 m"\n'))
    m = out["measurements"]["drop"]
    assert code == 0 and m["compared_on"] == "a run at the test's conditions"
    assert m["rms"] < 1e-3


def test_the_table_and_the_record_show_the_residuals(tmp_path, capsys):
    path = tmp_path / "drain.toml"
    path.write_text(project(_points([0, 1, 2])), encoding="utf-8")
    assert main(["simulate", str(path)]) == 0
    assert "Measurements (model minus reading)" in capsys.readouterr().out
    record = tmp_path / "record.md"
    assert main(["report", str(path), "--output", str(record)]) == 0
    text = record.read_text(encoding="utf-8")
    assert "## Site tests" in text and "| drop | level of T | 3 of 3 |" in text
    assert "holds near the conditions tested" in text


@pytest.mark.parametrize("bad", ['"T9"'])
def test_a_test_of_an_element_that_does_not_exist_stops_simulate_with_exit_1(tmp_path, capsys, bad):
    text = project(_points([0, 1])).replace('element = "T"', f"element = {bad}")
    path = tmp_path / "drain.toml"
    path.write_text(text, encoding="utf-8")
    assert main(["simulate", str(path)]) == 1
    assert "measurements.drop.element: element = 'T9' names no element" in capsys.readouterr().err


def test_a_flow_trace_in_time_is_compared_on_the_run(tmp_path, capsys):
    # Flow establishing from a large reservoir to a free outlet, constant f: v = v_inf
    # tanh(t/T), v_inf = sqrt(2gH/K_t), K_t = 1 + K_entrance + fL/D, T = L v_inf/(gH)
    # (classical unsteady Bernoulli result; Streeter, Wylie & Bedford, Fluid Mechanics, from
    # memory, as HYDRAULICS.md gives it).
    head, length, d, f = 10.0, 100.0, 0.1, 0.02
    k_t = 1.0 + 0.5 + f * length / d
    v_inf = math.sqrt(2 * G * head / k_t)
    tau = length * v_inf / (G * head)
    area = math.pi * d**2 / 4
    times = [1.0, 2.0, 4.0, 8.0, 16.0]
    points = ", ".join(f'{{ time = "{t} s", value = "{area * v_inf * math.tanh(t / tau) * 1000:.5f} L/s" }}'
                       for t in times)
    text = f"""schema = 1
[project]
title = "flow start"
[fluid]
kind = "water"
temperature = "20 degC"
[reservoirs.R]
kind = "constant_level"
bottom_elevation = "{head} m"
level = "0 m"
[receivers.O]
kind = "open_discharge"
elevation = "0 m"
[lines.L]
from = "R"
to = "O"
length = "{length} m"
inner_diameter = "{d * 1000} mm"
roughness = "0.045 mm"
friction_factor = {f}
entrance = "sharp"
[simulation]
duration = "20 s"
initial_state = "at_rest"
output_interval = "0.05 s"
[measurements.meter]
element = "L"
quantity = "flow"
points = [ {points} ]
"""
    code, out = _run(tmp_path, capsys, text)
    m = out["measurements"]["meter"]
    assert code == 0 and m["compared"] == 5 and m["unit_si"] == "m^3/s"
    # the run and the closed form agree to 1e-4 of the final flow (readings typed to 5 digits)
    assert m["max_abs"] < 1e-4 * area * v_inf


def test_the_trend_plot_draws_the_readings_as_points(tmp_path, capsys):
    path = tmp_path / "drain.toml"
    path.write_text(project(_points([0, 1, 2, 4])), encoding="utf-8")
    assert main(["simulate", str(path), "--plot"]) == 0
    assert "drop (measured)" in capsys.readouterr().out
