"""The validation package's parts, each at its own layer: the checker's value readers, the
tank and line checkers called directly, and the hook for a further table's checker.

Unit factors: 1 mm = 1e-3 m, 1 kPa = 1e3 Pa (SI, exact). Cone height from the included
angle: h = (D/2) / tan(angle/2) (plane geometry, closed form).
"""

from __future__ import annotations

import math
import tomllib

import pytest

from workbench.project.validate import FURTHER_CHECKS, Parts, check_data
from workbench.project.validate.checker import Checker, field_spec
from workbench.project.validate.lines import check_line
from workbench.project.validate.tanks import check_reservoir

SMALL = """\
schema = 1
[project]
title = "Hook"
[fluid]
kind = "water"
temperature = "20 degC"
[reservoirs.T]
kind = "constant_level"
bottom_elevation = "10 m"
level = "2 m"
[receivers.OUT]
kind = "open_discharge"
elevation = "0 m"
[lines.L]
from = "T"
to = "OUT"
length = "50 m"
inner_diameter = "100 mm"
roughness = "0.05 mm"
"""


def test_the_checker_reads_a_quantity_in_si_and_records_a_wrong_unit_with_its_key() -> None:
    c = Checker("f.toml")
    assert c.quantity({"d": "250 mm"}, "d", "length", "lines.L") == pytest.approx(0.25)
    assert c.quantity({"d": "250 kPa"}, "d", "length", "lines.L") is None
    assert [p.key for p in c.problems] == ["lines.L.d"]


def test_the_checker_refuses_a_number_outside_the_schema_range() -> None:
    c = Checker(None)
    spec = field_spec("lines.valve", "opening")
    assert c.number({"opening": 1.5}, spec, "lines.L.valve") is None
    assert "out of range" in c.problems[0].message


def test_a_cone_bottom_tank_takes_its_cone_height_from_the_included_angle() -> None:
    c = Checker(None)
    table = {"kind": "tank", "shape": "cone_bottom", "diameter": "2 m", "cone_angle": "90 deg",
             "height": "4 m", "bottom_elevation": "0 m", "level": "3 m"}
    res = check_reservoir(c, "T", table)
    assert c.problems == []
    # h = (D/2)/tan(45 deg) = 1 m for D = 2 m.
    assert res.shape.cone_height == pytest.approx(1.0 / math.tan(math.pi / 4))


def test_a_constant_level_reservoir_refuses_every_tank_key_by_name() -> None:
    c = Checker(None)
    table = {"kind": "constant_level", "bottom_elevation": "0 m", "level": "1 m",
             "shape": "rectangular", "inflow": "1 L/s"}
    assert check_reservoir(c, "R", table) is None
    assert sorted(p.key for p in c.problems) == ["reservoirs.R.inflow", "reservoirs.R.shape"]


def test_a_line_given_both_a_bore_and_a_nominal_size_is_refused_at_the_nominal_size() -> None:
    c = Checker(None)
    table = {"from": "A", "to": "B", "length": "10 m", "inner_diameter": "100 mm",
             "nominal_size": "4 in", "roughness": "0.05 mm"}
    line = check_line(c, "L", table, {"A": "reservoirs", "B": "receivers"}, None)
    assert line is None
    assert [p.key for p in c.problems] == ["lines.L.nominal_size"]


def test_a_further_check_sees_the_parts_read_and_its_problems_stop_the_build() -> None:
    seen: list[Parts] = []

    def check_extra(c: Checker, parts: Parts) -> None:
        seen.append(parts)
        if "extra" not in parts.data:
            c.add("extra", "missing required table [extra]")

    system, problems = check_data(tomllib.loads(SMALL))
    assert system is not None and problems == []
    FURTHER_CHECKS.append(check_extra)
    try:
        system, problems = check_data(tomllib.loads(SMALL), "hook.toml")
    finally:
        FURTHER_CHECKS.remove(check_extra)
    assert system is None
    assert [(p.file, p.key) for p in problems] == [("hook.toml", "extra")]
    parts = seen[0]
    assert parts.lines["L"].diameter == pytest.approx(0.1)
    assert parts.node_ids == {"T": "reservoirs", "OUT": "receivers", "L": "lines"}
