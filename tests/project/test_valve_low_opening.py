"""The project key lines.ID.valve.low_opening: read into the model, refused when unknown."""

from __future__ import annotations

import pytest

from workbench.project.document import load_project

PLANT = """\
schema = 1

[project]
title = "Throttled transfer (test plant)"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.A]
kind = "constant_level"
bottom_elevation = "20 m"
level = "3 m"

[reservoirs.B]
kind = "constant_level"
bottom_elevation = "2 m"
level = "1 m"

[lines.L1]
from = "A"
to = "B"
length = "100 m"
nominal_size = "3 in"
schedule = "40"
material = "commercial_steel"

[lines.L1.valve]
characteristic = "equal_percentage"
k_open = 0.5
opening = 0.1
rangeability = 30
"""


@pytest.mark.parametrize(("line", "expected"), [("", "tangent"),
                                                ('low_opening = "iec"\n', "iec")])
def test_low_opening_is_read_with_tangent_as_the_default(tmp_path, line, expected):
    path = tmp_path / "plant.toml"
    path.write_text(PLANT + line)
    assert load_project(path).system.lines["L1"].valve.low_opening == expected


def test_an_unknown_low_opening_is_refused_by_key_path(tmp_path):
    from workbench.cli import main

    path = tmp_path / "plant.toml"
    path.write_text(PLANT + 'low_opening = "smooth"\n')
    assert main(["check", str(path)]) != 0


def test_the_iec_choice_passes_more_at_one_tenth_travel(tmp_path):
    # IEC 60534-2-4: c = R^(x-1) is above the tangent below x = 1/ln R (0.294 for R = 30).
    from workbench.core.network import solve_steady

    flows = []
    for line in ("", 'low_opening = "iec"\n'):
        path = tmp_path / "plant.toml"
        path.write_text(PLANT + line)
        flows.append(solve_steady(load_project(path).system).lines["L1"].flow)
    assert flows[1] > flows[0] > 0.0


AIR_VALVE = PLANT.split("[lines.L1.valve]")[0] + """profile = [
    { distance = "0 m", elevation = "20 m" },
    { distance = "30 m", elevation = "24 m", air_valve = true },
    { distance = "100 m", elevation = "2 m" },
]
"""


def test_an_air_valve_on_a_profile_point_is_read_as_its_distance(tmp_path):
    path = tmp_path / "plant.toml"
    path.write_text(AIR_VALVE)
    assert load_project(path).system.lines["L1"].air_valves == (30.0,)


def test_an_air_valve_that_is_not_a_boolean_is_refused(tmp_path, capsys):
    from workbench.cli import main

    path = tmp_path / "plant.toml"
    path.write_text(AIR_VALVE.replace("air_valve = true", 'air_valve = "yes"'))
    assert main(["check", str(path)]) != 0
    assert "lines.L1.profile[2].air_valve" in capsys.readouterr().err
