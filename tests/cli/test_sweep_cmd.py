"""``workbench sweep``: a sizing sweep checked against an independent quasi-steady answer.

The reference drain times are computed in this test from first principles, without the
program's solvers:

* pipe inside diameters of NPS 2, 3 and 4 Schedule 40 from ASME B36.10M (2.067, 3.068 and
  4.026 in);
* water at 20 degC: density 998.207 kg/m^3 (IAPWS-95), viscosity 1.0016 mPa s (IAPWS 2008),
  the values tabulated in HYDRAULICS.md;
* friction from fluids' ``Clamond`` (the Colebrook equation to machine precision); sharp
  entrance K 0.5 and exit K 1 (common practice, no source);
* the quasi-steady flow at each level by ``scipy.optimize.brentq`` on the energy equation,
  and the drain time t = integral of A_T/Q(h) dh from min_level to the initial level by
  ``scipy.integrate.quad``.

The program's simulation is a rigid-column model: it keeps the inertia of the water in the
line (I dQ/dt), which the quasi-steady reference neglects. Here dQ/dt ~ Q/t_drain, so the
inertial head L/(gA) dQ/dt is about 1e-3 of the driving head (worked out in
``test_the_inertia_neglected_by_the_reference_is_small``); the drain times must agree to
0.5 %, a tolerance well above that and well below the 2x spacing between sizes.
"""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path

import fluids
import pytest
from scipy.integrate import quad
from scipy.optimize import brentq

from workbench.cli import main

G = 9.80665  # standard gravity [m/s^2] (CGPM 1901)
RHO, MU = 998.207, 1.0016e-3  # water 20 degC (IAPWS-95, IAPWS 2008; HYDRAULICS.md)
INCH = 0.0254  # [m], exact by definition
# ASME B36.10M Schedule 40 inside diameters [in] (the standard's metric columns round the
# NPS 2 bore to 52.48 mm, 0.04 % below 2.067 in: inside the tolerance below).
SCH40_ID_IN = {"2 in": 2.067, "3 in": 3.068, "4 in": 4.026}

TANK_D, LEVEL, MIN_LEVEL = 2.5, 3.0, 0.05  # [m]
BOTTOM, OUTLET, LENGTH, ROUGHNESS = 6.0, 0.5, 25.0, 0.045e-3  # [m]

PROJECT = f"""\
schema = 1

[project]
title = "Dye tank drain sizing"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.T1]
kind = "tank"
shape = "vertical_cylinder"
diameter = "{TANK_D} m"
bottom_elevation = "{BOTTOM} m"
level = "{LEVEL} m"
height = "3.5 m"
min_level = "{MIN_LEVEL} m"

[receivers.OUT]
kind = "open_discharge"
elevation = "{OUTLET} m"

[lines.L1]
from = "T1"
to = "OUT"
length = "{LENGTH} m"
inner_diameter = "52.5 mm"
roughness = "0.045 mm"

[simulation]
duration = "3 h"
stop_when = "drained"
"""


def _quasi_steady_flow(h: float, d: float) -> float:
    """Flow [m^3/s] through the line at tank level h [m], by brentq on the energy equation."""
    head = BOTTOM + h - OUTLET
    area = math.pi * d * d / 4

    def residual(v: float) -> float:
        re = RHO * v * d / MU
        f = fluids.friction.Clamond(re, ROUGHNESS / d)
        return (f * LENGTH / d + 0.5 + 1.0) * v * v / (2 * G) - head

    return brentq(residual, 0.5, 50.0, xtol=1e-14) * area


def _reference_drain_time(d: float) -> float:
    """t = integral of A_T / Q(h) dh from MIN_LEVEL to LEVEL [s] (scipy quad)."""
    a_tank = math.pi * TANK_D**2 / 4
    t, _ = quad(lambda h: a_tank / _quasi_steady_flow(h, d), MIN_LEVEL, LEVEL, epsabs=1e-9, epsrel=1e-10)
    return t


REFERENCE = {size: _reference_drain_time(d * INCH) for size, d in SCH40_ID_IN.items()}


@pytest.fixture
def project_file(tmp_path: Path) -> Path:
    path = tmp_path / "drain.toml"
    path.write_text(PROJECT, encoding="utf-8")
    return path


def _sweep_json(capsys, *argv: str) -> dict:
    code = main(["sweep", *argv, "--json"])
    out = capsys.readouterr().out
    assert code == 0, out
    return json.loads(out)


def test_the_inertia_neglected_by_the_reference_is_small() -> None:
    # Rigid-column momentum (HYDRAULICS.md): inertial head = L/(g A) dQ/dt; with dQ/dt about
    # Q/t_drain for NPS 2 it is a small fraction of the driving head.
    d = SCH40_ID_IN["2 in"] * INCH
    q = _quasi_steady_flow(LEVEL, d)
    inertial_head = LENGTH / (G * math.pi * d * d / 4) * q / REFERENCE["2 in"]
    assert inertial_head / (BOTTOM + LEVEL - OUTLET) < 2e-3


LIMIT_MIN = 20.0
"""Drain-time limit [min] between the reference times of NPS 2 and NPS 3 (checked below)."""


@pytest.fixture(scope="module")
def sizing_sweep(tmp_path_factory) -> dict:
    """One sizing sweep shared by the checks below (it simulates three cases in workers)."""
    import contextlib
    import io

    path = tmp_path_factory.mktemp("sizing") / "drain.toml"
    path.write_text(PROJECT, encoding="utf-8")
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        code = main(["sweep", str(path), "--vary", "lines.L1.nominal_size=2 in,3 in,4 in",
                     "--require", f"drain_time(T1) < {LIMIT_MIN:g} min", "--workers", "2", "--json"])
    assert code == 0
    return json.loads(out.getvalue())


def test_sizing_sweep_drain_times_match_the_quasi_steady_reference(sizing_sweep) -> None:
    assert [c["values"] for c in sizing_sweep["cases"]] == [{"lines.L1.nominal_size": s} for s in SCH40_ID_IN]
    for case, size in zip(sizing_sweep["cases"], SCH40_ID_IN, strict=True):
        assert case["error"] is None
        drained = [e for e in case["simulation"]["events"] if e["code"] == "tank.drained"]
        assert drained[0]["time_s"] == pytest.approx(REFERENCE[size], rel=5e-3)


def test_the_first_passing_size_is_the_smallest_that_drains_in_time(sizing_sweep) -> None:
    assert REFERENCE["3 in"] < LIMIT_MIN * 60 < REFERENCE["2 in"]
    expected = [REFERENCE[s] < LIMIT_MIN * 60 for s in SCH40_ID_IN]
    assert [c["pass"] for c in sizing_sweep["cases"]] == expected
    assert sizing_sweep["first_passing"] == expected.index(True)


def test_each_case_carries_the_solve_and_simulate_json_objects(project_file, capsys) -> None:
    from workbench.core.network import solve_steady
    from workbench.core.transient import simulate
    from workbench.output.steady import steady_to_json
    from workbench.output.transient import transient_to_json
    from workbench.project.document import load_project, set_value
    from workbench.project.sweep_spec import parse_vary
    from workbench.sweep_runner import prepared_base

    sweep = _sweep_json(capsys, str(project_file), "--vary", "lines.L1.nominal_size=3 in", "--workers", "1")
    case = sweep["cases"][0]
    assert set(case) >= {"values", "steady", "simulation", "pass", "error"}
    assert case["pass"] is None  # no criteria given
    base = load_project(project_file)
    axis = parse_vary("lines.L1.nominal_size=3 in", base.data)
    system = set_value(prepared_base(base, [axis]), "lines.L1.nominal_size", "3 in").system
    expected_steady = json.loads(json.dumps(steady_to_json(solve_steady(system), system)))
    assert case["steady"] == expected_steady
    expected_sim = transient_to_json(simulate(system), system, include_series=False)
    assert set(case["simulation"]) == set(json.loads(json.dumps(expected_sim)))
    assert "time_s" not in case["simulation"]


def test_a_failing_case_is_reported_and_the_sweep_goes_on(project_file, capsys) -> None:
    code = main(["sweep", str(project_file), "--vary", "lines.L1.inner_diameter=50 mm,-5 mm,80 mm",
                 "--steady-only", "--json"])
    captured = capsys.readouterr()
    assert code == 0
    sweep = json.loads(captured.out)
    errors = [c["error"] for c in sweep["cases"]]
    assert errors[0] is None and errors[2] is None
    assert "inner_diameter" in errors[1]
    assert sweep["cases"][1]["steady"] is None
    assert sweep["cases"][2]["steady"]["lines"]["L1"]["flow_m3_s"] > sweep["cases"][0]["steady"]["lines"]["L1"]["flow_m3_s"]
    assert "case 2 (" in captured.err  # the second value, numbered from 1 as in the table


def test_results_come_back_in_the_order_asked_from_parallel_workers(project_file, capsys) -> None:
    # Levels given in a shuffled order; drain times must follow the order asked: a lower
    # starting level drains sooner (monotone), so the sorted order is checked too.
    levels = ["2.5 m", "0.5 m", "3 m", "1 m"]
    sweep = _sweep_json(capsys, str(project_file), "--vary", f"reservoirs.T1.level={','.join(levels)}",
                        "--workers", "2")
    assert [c["values"]["reservoirs.T1.level"] for c in sweep["cases"]] == levels
    times = [next(e["time_s"] for e in c["simulation"]["events"] if e["code"] == "tank.drained")
             for c in sweep["cases"]]
    by_level = [t for _, t in sorted(zip((float(x.split()[0]) for x in levels), times, strict=True))]
    assert by_level == sorted(by_level)


def test_quick_sweep_flows_match_the_network_solver(project_file, capsys) -> None:
    # Outside reference for the vectorised path: the program's network solver case by case.
    # Three axes: size, level and temperature (density and viscosity) assembled by broadcasting.
    grid = ["--vary", "lines.L1.nominal_size=2 in,3 in", "--vary", "reservoirs.T1.level=0.5 m..3 m/3",
            "--vary", "fluid.temperature=10 degC,60 degC"]
    full = _sweep_json(capsys, str(project_file), *grid, "--steady-only")
    quick = _sweep_json(capsys, str(project_file), *grid, "--quick")
    assert quick["quick"] is True
    for a, b in zip(full["cases"], quick["cases"], strict=True):
        assert a["values"] == b["values"]
        assert b["steady"]["lines"]["L1"]["flow_m3_s"] == pytest.approx(a["steady"]["lines"]["L1"]["flow_m3_s"], rel=1e-8)


def test_csv_output_has_one_row_per_case_with_si_units(project_file, tmp_path, capsys) -> None:
    out = tmp_path / "sweep.csv"
    code = main(["sweep", str(project_file), "--vary", "reservoirs.T1.level=1 m,2 m,3 m", "--steady-only",
                 "--csv", str(out)])
    assert code == 0
    rows = list(csv.reader(out.open(encoding="utf-8")))
    assert "flow L1 [m^3/s]" in rows[0]
    assert [r[1] for r in rows[1:]] == ["1 m", "2 m", "3 m"]
    # the CSV's case column is the index into the JSON's cases, as it always was (the
    # printed table numbers the same cases from 1 for the reader)
    assert [r[0] for r in rows[1:]] == ["0", "1", "2"]


@pytest.mark.parametrize(
    ("argv", "words"),
    [
        (["--vary", "lines.L1.lenght=1 m"], ["did you mean 'length'"]),
        (["--vary", "lines.L1.length=1 m", "--require", "drain_time(T1) < 3 min", "--steady-only"],
         ["no [simulation] section"]),
        (["--vary", "lines.L1.length=1 m", "--require", "flow(L1) = 3 L/s"], ["expected a comparison"]),
        ([], ["at least one --vary"]),
    ],
)
def test_bad_options_are_usage_errors_with_a_message(project_file, capsys, argv, words) -> None:
    code = main(["sweep", str(project_file), *argv])
    err = capsys.readouterr().err
    assert code == 2
    for word in words:
        assert word in err


def test_table_output_names_the_first_passing_case(project_file, capsys) -> None:
    code = main(["sweep", str(project_file), "--vary", "reservoirs.T1.level=1 m,3 m", "--steady-only",
                 "--require", "flow(L1) > 1 L/s"])
    out = capsys.readouterr().out
    assert code == 0
    assert "First passing case in sweep order: #1" in out


CLEARWELL = Path(__file__).resolve().parents[2] / "projects" / "fellgate_clearwell_filter_feed.toml"


def test_tank_level_criteria_find_the_opening_that_neither_spills_nor_runs_low(capsys,
                                                                                monkeypatch):
    # The clearwell demo: fed 40 L/s (24 L/s during a backwash), 5 L/s drawn off, the rest
    # through FV-503. At a settled level the outflow balances the feed: check the sweep's
    # final_level against the level where the steady line passes 40 - 5 = 35 L/s (brentq on
    # the steady solver, itself checked against outside references in tests/core).
    from scipy.optimize import brentq

    from workbench.core.network import solve_steady
    from workbench.project.document import load_project, set_value

    monkeypatch.setenv("COLUMNS", "80")
    code = main(["sweep", str(CLEARWELL), "--vary",
                 "lines.501-TW-03.valve.opening=0.35,0.4,0.45,0.5,0.55",
                 "--vary", "simulation.duration=24 h",  # long enough to settle
                 "--require", "max_level(CW-501) < 3.4 m",
                 "--require", "min_level(CW-501) > 1.5 m", "--json"])
    data = json.loads(capsys.readouterr().out)
    assert code == 0
    assert data["first_passing"] == 2  # 0.45: the only opening that passes both
    case = data["cases"][2]
    levels = case["simulation"]["levels"]["CW-501"]
    assert case["checks"][0]["value"] == levels["max_level_m"]
    assert case["checks"][1]["value"] == levels["min_level_m"]
    assert levels["min_level_m"] < 2.2 < 3.4  # the backwash dip, below the start
    system = set_value(load_project(CLEARWELL), "lines.501-TW-03.valve.opening", 0.45).system

    def surplus(h):
        return solve_steady(system, levels={"CW-501": h}).lines["501-TW-03"].flow - 0.035

    settled = brentq(surplus, 0.5, 3.5, xtol=1e-9)
    assert levels["final_level_m"] == pytest.approx(settled, abs=1e-4)
    # the overflowing cases spill: max level is the weir crest
    assert data["cases"][0]["simulation"]["levels"]["CW-501"]["max_level_m"] == pytest.approx(3.6)


def test_a_wide_sweep_prints_in_blocks_of_cases_that_fit_80_columns(capsys, monkeypatch):
    monkeypatch.setenv("COLUMNS", "80")
    code = main(["sweep", str(CLEARWELL), "--vary",
                 "lines.501-TW-03.valve.opening=0.35,0.4,0.45,0.5,0.55",
                 "--require", "max_level(CW-501) < 3.4 m"])
    out = capsys.readouterr().out
    assert code == 0
    assert max(len(line) for line in out.splitlines()) <= 80
    assert "…" not in out
    for i in range(1, 6):  # numbered from 1 for the reader (the JSON's first_passing is 2)
        assert f"case #{i}" in out
    blocks = out.count("Sweep of ")
    assert blocks >= 2 and out.count("max_level(CW-501)") == blocks  # one row in each block
    assert "First passing case in sweep order: #3" in out


def test_a_refused_first_value_of_a_swapped_size_fails_its_case_and_the_sweep_goes_on(project_file, capsys) -> None:
    """The line is given by inner_diameter; sweeping nominal_size drops it. '2.2 in' is no NPS
    (ASME B36.10M lists 2 and 2-1/2), so case 0 fails naming the key path and the value; case 1
    runs on NPS 3 Schedule 40, bore 3.068 in (ASME B36.10M), and its flow at the starting
    level is the quasi-steady reference flow of this module (brentq on the energy equation)."""
    code = main(["sweep", str(project_file), "--vary", "lines.L1.nominal_size=2.2 in,3 in",
                 "--steady-only", "--json"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    assert "internal error" not in captured.err
    first, second = json.loads(captured.out)["cases"]
    assert "lines.L1.nominal_size" in first["error"] and "'2.2 in'" in first["error"]
    assert first["steady"] is None
    assert second["error"] is None
    flow = second["steady"]["lines"]["L1"]["flow_m3_s"]
    assert flow == pytest.approx(_quasi_steady_flow(LEVEL, SCH40_ID_IN["3 in"] * INCH), rel=5e-3)
    assert "case 1 (lines.L1.nominal_size = 2.2 in)" in captured.err


@pytest.mark.parametrize("values", ["0.1 mm,-5 mm", "0.1 mm"])
def test_a_swapped_size_whose_every_value_is_refused_is_a_usage_error_naming_key_and_value(
        tmp_path, capsys, values) -> None:
    """A line given by nominal_size swept over bores none of which is plausible (a bore below
    1 mm: the plausibility range of README): refused before any case runs, exit 2, no
    internal error."""
    path = tmp_path / "sized.toml"
    path.write_text(PROJECT.replace('inner_diameter = "52.5 mm"', 'nominal_size = "2 in"'),
                    encoding="utf-8")
    code = main(["sweep", str(path), "--vary", f"lines.L1.inner_diameter={values}", "--steady-only"])
    err = capsys.readouterr().err
    assert code == 2, err
    assert "internal error" not in err
    assert "lines.L1.inner_diameter" in err and "'0.1 mm'" in err


def test_a_refused_first_bore_in_a_grid_of_two_keys_fails_only_its_own_cases(tmp_path, capsys) -> None:
    """Two axes, the first a swapped bore whose first value is refused: the two cases with it
    fail, the two with 52.5 mm (the bore of this module's file) run, and
    a larger level gives a larger flow (more head, Bernoulli)."""
    path = tmp_path / "sized.toml"
    path.write_text(PROJECT.replace('inner_diameter = "52.5 mm"', 'nominal_size = "2 in"'),
                    encoding="utf-8")
    code = main(["sweep", str(path), "--vary", "lines.L1.inner_diameter=0.1 mm,52.5 mm",
                 "--vary", "reservoirs.T1.level=1 m,3 m", "--steady-only", "--json"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    cases = json.loads(captured.out)["cases"]
    assert [c["error"] is None for c in cases] == [False, False, True, True]
    assert all("'0.1 mm'" in c["error"] for c in cases[:2])
    flows = [c["steady"]["lines"]["L1"]["flow_m3_s"] for c in cases[2:]]
    assert flows[1] > flows[0]
    assert flows[1] == pytest.approx(_quasi_steady_flow(3.0, 0.0525), rel=5e-3)
