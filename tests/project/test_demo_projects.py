"""The demo projects load, round-trip, format idempotently and build the same model."""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest

from workbench.project.document import (
    format_text,
    load_project,
    load_project_text,
    save_project,
    starter_text,
)

PROJECTS = sorted((Path(__file__).resolve().parents[2] / "projects").glob("*.toml"))


def test_there_are_at_least_three_demo_projects():
    assert len(PROJECTS) >= 3


@pytest.mark.parametrize("path", PROJECTS, ids=[p.stem for p in PROJECTS])
def test_a_demo_project_saves_back_to_identical_bytes(path, tmp_path):
    project = load_project(path)
    target = tmp_path / path.name
    save_project(project, target)
    assert target.read_bytes() == path.read_bytes()


@pytest.mark.parametrize("path", PROJECTS, ids=[p.stem for p in PROJECTS])
def test_a_demo_project_is_already_in_canonical_form(path):
    text = path.read_text(encoding="utf-8")
    assert format_text(text) == text


@pytest.mark.parametrize("path", PROJECTS, ids=[p.stem for p in PROJECTS])
def test_formatting_a_messy_copy_twice_gives_identical_text_and_the_same_model(path):
    text = path.read_text(encoding="utf-8")
    # Make it messy: odd spacing, single quotes, extra blank lines, trailing spaces.
    messy = (text.replace(" = ", "   =  ").replace("\n\n", "\n\n\n").replace('"m"', "'m'")
             .replace("\n[", "   \n["))
    once = format_text(messy)
    assert format_text(once) == once
    assert load_project_text(once).system == load_project(path).system
    assert load_project_text(messy).system == load_project(path).system


def test_the_demos_cover_the_three_scenarios_of_the_brief():
    systems = [load_project(p).system for p in PROJECTS]
    drain = [s for s in systems if s.simulation and s.simulation.stop_when == "drained"
             and s.receivers]
    assert drain, "a tank draining to an open discharge with stop_when = 'drained'"
    transfer = [s for s in systems if sum(r.kind == "tank" for r in s.reservoirs.values()) == 2
                and any(l.valve and l.valve.schedule and l.pressure_rating and l.wall_thickness
                        and l.elastic_modulus for l in s.lines.values())]
    assert transfer, "a tank-to-tank transfer through a valve with a closing schedule"
    network = [s for s in systems if s.junctions and len(s.reservoirs) >= 2]
    assert network, "a two-source network with a junction"
    # The crest of some profile rises above the source's free surface (sub-atmospheric).
    crest = False
    for s in network:
        for line in s.lines.values():
            if line.from_node in s.reservoirs and line.profile:
                res = s.reservoirs[line.from_node]
                surface = res.bottom_elevation + res.level
                crest |= max(z for _, z in line.profile) > surface
    assert crest


@pytest.mark.parametrize("path", PROJECTS, ids=[p.stem for p in PROJECTS])
def test_demo_sizes_are_realistic_plant_sizes(path):
    # Brief: DN80-DN300 lines, 20-800 m long, heads 5-40 m (common practice, no source).
    system = load_project(path).system
    for line in system.lines.values():
        assert 0.07 <= line.diameter <= 0.32
        assert 20 <= line.length <= 800
    for res in system.reservoirs.values():
        assert math.isfinite(res.bottom_elevation + res.level)


def test_the_starter_project_is_valid_and_canonical():
    project = load_project_text(starter_text(), "starter.toml")
    assert project.system.lines
    assert format_text(starter_text()) == starter_text()


def test_the_us_starter_is_valid_canonical_and_close_to_the_si_one():
    """Every SI figure the starter writes has a US replacement that occurs once, and the US
    starter describes about the same system: each tank and line figure within 10 % of the SI
    one (1 ft = 0.3048 m, NIST SP 811), so neither file is a different plant."""
    from workbench.project.starter import STARTER, US_VALUES

    for si, _ in US_VALUES:
        assert STARTER.count(si) == 1, si
    us_text = starter_text("US")
    assert format_text(us_text) == us_text
    si, us = (load_project_text(t, "starter.toml") for t in (starter_text(), us_text))
    assert us.unit_system == "US" and si.unit_system == "SI"
    pairs = [(si.system.reservoirs["TK1"].level, us.system.reservoirs["TK1"].level),
             (si.system.reservoirs["TK1"].bottom_elevation,
              us.system.reservoirs["TK1"].bottom_elevation),
             (si.system.lines["L1"].length, us.system.lines["L1"].length),
             (si.system.lines["L1"].diameter, us.system.lines["L1"].diameter)]
    for a, b in pairs:
        assert b == pytest.approx(a, rel=0.1)
    quoted = re.findall(r'"([0-9.]+) ([A-Za-z/0-9]+)"', us_text.split("schema = 1", 1)[1])
    assert not {unit for _, unit in quoted} & {"m", "mm", "kPa", "L/s", "degC", "bar"}


def test_the_drain_test_demo_reads_its_level_log_from_beside_it():
    # The site-test demo: a level log exported from a historian (ISO timestamps, one reading
    # lost to a communications gap), beside the project; its line states no roughness of
    # its own, so the model starts from the material's handbook value (Moody 1944, 0.045 mm
    # for commercial steel, from memory, as HYDRAULICS.md lists it).
    from workbench.project.measurements import measurements_of

    path = Path(__file__).resolve().parents[2] / "projects" / "fellgate_wash_tank_drain_test.toml"
    project = load_project(path)
    test = measurements_of(project)["drain_test_nov"]
    assert (test.element, test.quantity, len(test.values), test.skipped_rows) == (
        "TK-420", "level", 38, (19,))
    assert test.times[0] == 0.0 and test.times[-1] == 38 * 60.0
    assert "roughness" not in project.data["lines"]["420-DR-07"]
    assert project.system.lines["420-DR-07"].roughness == pytest.approx(0.045e-3)
