"""``workbench simulate --elastic``: the extra JSON keys, the table, bad line names.

The numbers are checked against the Joukowsky rise with a wave speed computed here by hand
from the Korteweg formula, and the flow before closure taken from the rigid-column run's
own steady start (an independent solution) in the same JSON object.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from workbench.cli import main

G = 9.80665

# A 1.2 km DN150 steel line from a constant-level reservoir to a valve discharging into a
# second reservoir; the valve shuts in 0.1 s, much less than 2L/a (about 1.8 s).
PROJECT = """\
schema = 1

[project]
title = "Elastic surge test line"
units = "SI"

[fluid]
kind = "custom"
name = "water"
density = "998.2 kg/m3"
viscosity = "1.002 mPa*s"
vapor_pressure = "2339 Pa"
bulk_modulus = "2.19 GPa"

[reservoirs.HEAD]
kind = "constant_level"
bottom_elevation = "0 m"
level = "60 m"

[reservoirs.TAIL]
kind = "constant_level"
bottom_elevation = "0 m"
level = "10 m"

[lines.L1]
from = "HEAD"
to = "TAIL"
length = "1200 m"
inner_diameter = "154.05 mm"
roughness = "0.045 mm"
wall_thickness = "7.11 mm"
elastic_modulus = "207 GPa"
poisson_ratio = 0.3
support = "anchored"
entrance = "sharp"

[lines.L1.valve]
characteristic = "linear"
k_open = 4.0
schedule = [
    { time = "0 s", opening = 1.0 },
    { time = "1 s", opening = 1.0 },
    { time = "1.1 s", opening = 0.0 },
]

[simulation]
duration = "20 s"
"""


def write(tmp_path: Path, text: str = PROJECT) -> Path:
    path = tmp_path / "line.toml"
    path.write_text(text, encoding="utf-8")
    return path


def korteweg(k, rho, d, e, modulus, nu):
    """Korteweg wave speed, thin wall anchored throughout, c1 = 1 - nu^2.

    a = sqrt((K/rho)/(1 + c1 K D/(E e))) (Wylie & Streeter 1993, ch. 2; c1 from memory).
    D/e = 21.7 here, so the thick-wall form applies: c1 = 2e/D (1 + nu) + D(1 - nu^2)/(D + e)
    (same source, from memory).
    """
    c1 = 2 * e / d * (1 + nu) + d * (1 - nu * nu) / (d + e)
    return math.sqrt((k / rho) / (1 + c1 * k * d / (modulus * e)))


def simulate_json(tmp_path, capsys, *extra):
    code = main(["simulate", str(write(tmp_path)), "--json", *extra])
    out = capsys.readouterr().out
    return code, (json.loads(out) if out.strip() else None)


def test_elastic_option_adds_the_envelope_and_series_under_the_line_surge_key(tmp_path, capsys):
    code, data = simulate_json(tmp_path, capsys, "--elastic", "L1")
    assert code == 0
    # the transient keys are still there, unchanged in shape (issue 4)
    for key in ("schema", "time_s", "lines", "levels", "events", "surge", "warnings"):
        assert key in data
    assert "flow_m3_s" in data["lines"]["L1"]
    el = data["surge"]["L1"]["elastic"]
    n = len(el["distance_m"])
    assert n == el["reaches"] + 1
    for key in ("max_head_m", "min_head_m", "max_pressure_pa", "min_pressure_pa"):
        assert len(el[key]) == n
    assert len(el["time_s"]) == len(el["valve_pressure_pa"]) == len(el["midline_pressure_pa"])
    assert el["distance_m"][0] == 0.0 and el["distance_m"][-1] == pytest.approx(1200.0)
    assert el["dt_s"] > 0 and abs(el["wave_speed_adjustment"]) < 1e-12
    assert el["kernel"] in ("compiled", "numpy")


def test_the_valve_pressure_jumps_by_joukowsky_with_the_korteweg_speed(tmp_path, capsys):
    # Joukowsky (1898): dp = rho a v0 for a closure faster than 2L/a; a by hand (Korteweg).
    code, data = simulate_json(tmp_path, capsys, "--elastic", "L1")
    assert code == 0
    el = data["surge"]["L1"]["elastic"]
    a = korteweg(2.19e9, 998.2, 0.15405, 0.00711, 207e9, 0.3)
    assert el["wave_speed_m_s"] == pytest.approx(a, rel=1e-6)
    v0 = data["lines"]["L1"]["flow_m3_s"][0] / (math.pi * 0.15405**2 / 4)
    t = el["time_s"]
    p = el["valve_pressure_pa"]
    before = p[0]
    # just after the closure ends (1.1 s) and before the reflection returns (1 s + 2L/a)
    i = next(k for k, tk in enumerate(t) if tk >= 1.1 + 0.05)
    rise = p[i] - before
    # friction makes the rise a little larger (line packing) during the short wait
    assert rise == pytest.approx(998.2 * a * v0, rel=0.03)


def test_lines_marked_elastic_in_the_project_run_without_the_option(tmp_path, capsys):
    text = PROJECT.replace("[simulation]", '[lines.L1.surge]\nmodel = "elastic"\n'
                           "reaches = 24\n\n[simulation]")
    code = main(["simulate", str(write(tmp_path, text)), "--json"])
    data = json.loads(capsys.readouterr().out)
    assert code == 0
    assert data["surge"]["L1"]["elastic"]["reaches"] == 24


def test_without_elastic_lines_the_json_has_no_elastic_keys(tmp_path, capsys):
    code, data = simulate_json(tmp_path, capsys)
    assert code == 0
    assert all("elastic" not in entry for entry in data["surge"].values())


def test_an_unknown_elastic_line_is_a_usage_error_naming_it(tmp_path, capsys):
    code = main(["simulate", str(write(tmp_path)), "--json", "--elastic", "L9"])
    err = capsys.readouterr().err
    assert code == 2
    assert "L9" in err and "L1" in err


def test_the_summary_shows_an_elastic_surge_table(tmp_path, capsys):
    code = main(["simulate", str(write(tmp_path)), "--elastic", "L1"])
    out = capsys.readouterr().out
    assert code == 0
    assert "Elastic surge" in out and "L1" in out


def test_a_branch_named_for_the_elastic_model_runs_the_whole_tee(tmp_path, capsys):
    # The elastic model takes the whole part of the system joined through junctions: a tee
    # is run with all three lines, each line's JSON object naming them.
    text = PROJECT.replace('to = "TAIL"', 'to = "J1"').replace("[lines.L1.valve]", """\
[junctions.J1]
elevation = "0 m"

[lines.L2]
from = "J1"
to = "TAIL"
length = "100 m"
inner_diameter = "154.05 mm"
roughness = "0.045 mm"

[lines.L3]
from = "J1"
to = "TAIL"
length = "150 m"
inner_diameter = "154.05 mm"
roughness = "0.045 mm"

[lines.L1.valve]""")
    code = main(["simulate", str(write(tmp_path, text)), "--json", "--elastic", "L2"])
    captured = capsys.readouterr()
    data = json.loads(captured.out)
    assert code == 0, captured.err
    for lid in ("L1", "L2", "L3"):
        obj = data["surge"][lid]["elastic"]
        assert obj["success"] is True
        assert obj["lines_run"] == ["L1", "L2", "L3"]
    assert "junction J1" in data["surge"]["L2"]["elastic"]["traces_m"]


def test_the_tables_read_whole_at_80_columns(tmp_path, capsys, monkeypatch):
    # The test line reaches vapour pressure (the 0.1 s closure of a 60 m head line drops the
    # valve side below vapour, Joukowsky ~370 m): the note saying so must read in full in an
    # 80-column terminal, and no number may be cut short with an ellipsis.
    monkeypatch.setenv("COLUMNS", "80")
    code = main(["simulate", str(write(tmp_path)), "--elastic", "L1"])
    out = capsys.readouterr().out
    assert code == 0
    assert "…" not in out
    assert max(len(line) for line in out.splitlines()) <= 80
    flat = " ".join(out.split())
    assert "L1: VAPOUR PRESSURE reached on L1 at" in flat
    assert "L1: vapour cavities along" in flat and "depends on the grid" in flat
    assert "results after that time are not trustworthy" in flat
    assert "* capped at static plus Joukowsky" in flat


def test_a_refusal_quoting_a_file_key_prints_the_key(tmp_path, capsys, monkeypatch):
    # The message asks for "[fluid] bulk_modulus": square brackets must reach the terminal
    # as typed, not be taken for console markup.
    monkeypatch.setenv("COLUMNS", "80")
    path = write(tmp_path, PROJECT.replace('bulk_modulus = "2.19 GPa"\n', ""))
    main(["simulate", str(path), "--elastic", "L1"])
    flat = " ".join(capsys.readouterr().out.split())
    note = flat[flat.index("L1: not run:"):]
    note = note[:note.index("bulk_modulus") + len("bulk_modulus")]
    assert note.endswith("give [fluid] bulk_modulus")


def test_the_record_lists_the_envelope_along_the_line_and_its_cavities(tmp_path, capsys):
    # The test line separates (see above): the calculation record names the cavity model
    # and its published sources, tabulates the envelope along the line with the cavity
    # stations in words, and states the grid check (Wylie & Streeter 1993, ch. 8; Bergant,
    # Simpson & Tijsseling 2006).
    text = PROJECT + '\n[lines.L1.surge]\nmodel = "elastic"\n'
    out_path = tmp_path / "record.md"
    code = main(["report", str(write(tmp_path, text)), "--output", str(out_path)])
    record = out_path.read_text()
    assert code in (0, 1)
    assert "| Vapour cavities | discrete vapour cavity model" in record
    assert "Bergant, Simpson and Tijsseling (2006)" in record
    assert "Envelope along L1 (gauge pressure):" in record
    assert "vapour cavity (at vapour pressure)" in record
    assert "DANGER: L1: vapour cavities along" in record
    assert "(the peak depends on the grid)" in record
