"""Each section checker of the validation package called on its own table: what it
refuses, under which key path, and what it builds.

Unit factors: 1 min = 60 s, 1 h = 3600 s (SI, exact). Standard atmosphere: ISO 2533 (ISA),
84.56 kPa at 1500 m (from memory; the core's atmosphere tests check the formula).
"""

from __future__ import annotations

import pytest

from workbench.project.schema import SCHEMA_VERSION
from workbench.project.validate.checker import Checker
from workbench.project.validate.elements import check_receiver, element_tables
from workbench.project.validate.fittings import check_fittings, check_profile
from workbench.project.validate.fluid import check_fluid
from workbench.project.validate.root import check_project, check_root
from workbench.project.validate.simulation import check_simulation
from workbench.project.validate.valve import check_surge, check_valve


def keys(c: Checker) -> list[str]:
    return [p.key for p in c.problems]


def test_a_file_of_another_schema_version_is_refused_before_anything_else() -> None:
    c = Checker(None)
    assert check_root(c, {"schema": SCHEMA_VERSION + 1}) is False
    assert "schema" in keys(c)
    assert "not supported" in c.problems[keys(c).index("schema")].message


def test_the_site_elevation_sets_the_atmosphere_every_gauge_pressure_is_read_against() -> None:
    c = Checker(None)
    title, units, site = check_project(c, {"project": {"title": "T", "site_elevation": "1500 m"}})
    assert (title, units, site) == ("T", "SI", 1500.0)
    # ISA (ISO 2533): about 84.6 kPa at 1500 m, well below sea level's 101.325 kPa.
    assert c.atmosphere == pytest.approx(84_556.0, rel=2e-3)


def test_an_id_used_in_two_sections_is_refused_at_the_second() -> None:
    c = Checker(None)
    tables = element_tables(c, {"reservoirs": {"A": {}}, "receivers": {"A": {}}})
    assert set(tables["reservoirs"]) == {"A"}
    assert keys(c) == ["receivers.A"] and "unique" in c.problems[0].message


def test_a_vessel_needs_its_pressure_and_an_open_discharge_refuses_one() -> None:
    c = Checker(None)
    assert check_receiver(c, "V", {"kind": "vessel", "elevation": "2 m"}) is None
    assert check_receiver(c, "O", {"kind": "open_discharge", "elevation": "2 m",
                                   "pressure": "1 bar"}) is None
    assert keys(c) == ["receivers.V.pressure", "receivers.O.pressure"]


def test_a_fitting_needs_a_type_or_a_k_but_not_both() -> None:
    c = Checker(None)
    ok = check_fittings(c, {"fittings": [{"type": "elbow_90_standard", "count": 2}]}, "lines.L")
    assert c.problems == [] and ok[0].count == 2
    assert check_fittings(c, {"fittings": [{"type": "elbow_90_standard", "k": 0.3}]},
                          "lines.L") is None
    assert keys(c) == ["lines.L.fittings[1]"]


def test_profile_distances_must_increase_and_stay_within_the_line() -> None:
    c = Checker(None)
    points = [{"distance": "0 m", "elevation": "5 m"}, {"distance": "30 m", "elevation": "1 m"}]
    assert check_profile(c, {"profile": points}, "lines.L", 40.0) == ((0.0, 5.0), (30.0, 1.0))
    back = [{"distance": "10 m", "elevation": "5 m"}, {"distance": "5 m", "elevation": "1 m"}]
    assert check_profile(c, {"profile": back}, "lines.L", 40.0) is None
    assert check_profile(c, {"profile": points}, "lines.L", 20.0) is None
    assert keys(c) == ["lines.L.profile[2].distance", "lines.L.profile[2].distance"]


def test_a_valve_takes_k_or_kv_and_a_schedule_with_increasing_times() -> None:
    c = Checker(None)
    ok, valve = check_valve(c, {"valve": {"characteristic": "linear", "k_open": 0.2, "schedule": [
        {"time": "0 s", "opening": 1.0}, {"time": "2 min", "opening": 0.0}]}}, "lines.L", 0.1, None)
    assert ok and valve.k_open == 0.2 and valve.schedule.times == (0.0, 120.0)
    ok, _ = check_valve(c, {"valve": {"characteristic": "linear", "k_open": 0.2,
                                   "kv_open": "100 m3/h"}}, "lines.L", 0.1, None)
    assert not ok and keys(c) == ["lines.L.valve.kv_open"]


def test_the_surge_table_defaults_to_the_rigid_column() -> None:
    c = Checker(None)
    assert check_surge(c, {}, "lines.L")[1].model == "rigid"
    ok, settings = check_surge(c, {"surge": {"model": "elastic", "reaches": 20}}, "lines.L")
    assert ok and settings.model == "elastic" and settings.reaches == 20


def test_stopping_when_drained_needs_a_tank() -> None:
    c = Checker(None)
    sim = {"simulation": {"duration": "1 h", "stop_when": "drained"}}
    assert check_simulation(c, sim, has_tank=True).duration == 3600.0
    check_simulation(c, sim, has_tank=False)
    assert keys(c) == ["simulation.stop_when"]


def test_salinity_in_ppt_is_refused_with_the_unit_to_use() -> None:
    c = Checker(None)
    fluid = {"fluid": {"kind": "seawater", "temperature": "20 degC", "salinity": "35 ppt"}}
    assert check_fluid(c, fluid) is None
    assert keys(c) == ["fluid.salinity"] and "g/kg" in c.problems[0].message
