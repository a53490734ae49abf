"""A gas pressure over the liquid below its vapour pressure is refused; one above it is not.

Reference: the saturation pressure of water at 80 degC is 47.414 kPa absolute (IAPWS-95,
evaluated here by ``chemicals.iapws.iapws95_Psat``, independently of the workbench's fluid
layer); the standard atmosphere at sea level is 101.325 kPa (ISO 2533). So at sea level the
lowest gauge pressure water at 80 degC can be held under is -53.91 kPa.
"""

from __future__ import annotations

import tomllib

import pytest

from workbench.project.problems import ProjectError
from workbench.project.validate import build_system

HOT = 353.15  # K


def _floor_kpa_gauge() -> float:
    from chemicals.iapws import iapws95_Psat

    return (iapws95_Psat(HOT) - 101_325.0) / 1000.0


def _project(section: str) -> str:
    return f"""
schema = 1
[project]
title = "Hot water under vacuum"
[fluid]
kind = "water"
temperature = "80 degC"
[reservoirs.T1]
kind = "constant_level"
bottom_elevation = "12 m"
level = "4.5 m"
{section}
[lines.L1]
from = "T1"
to = "OUT"
length = "120 m"
inner_diameter = "102.26 mm"
roughness = "0.045 mm"
"""


def _vessel(pressure_kpa: float) -> str:
    return _project(f"""[receivers.OUT]
kind = "vessel"
elevation = "2 m"
pressure = "{pressure_kpa:.2f} kPa"
""")


def _surface(pressure_kpa: float) -> str:
    return _project(f"""surface_pressure = "{pressure_kpa:.2f} kPa"
[receivers.OUT]
kind = "open_discharge"
elevation = "2 m"
""")


@pytest.mark.parametrize("make, key", [(_surface, "reservoirs.T1.surface_pressure"),
                                       (_vessel, "receivers.OUT.pressure")])
def test_a_pressure_just_below_the_vapour_pressure_is_refused_naming_the_floor(make, key):
    with pytest.raises(ProjectError) as info:
        build_system(tomllib.loads(make(_floor_kpa_gauge() - 0.5)), "hot.toml")
    (problem,) = [p for p in info.value.problems if p.key == key]
    assert "would boil" in problem.message
    assert f"{_floor_kpa_gauge():.2f} kPa" in problem.message


@pytest.mark.parametrize("make", [_surface, _vessel])
def test_a_pressure_just_above_the_vapour_pressure_is_accepted(make):
    system = build_system(tomllib.loads(make(_floor_kpa_gauge() + 0.5)), "hot.toml")
    assert system.fluid.vapor_pressure == pytest.approx(47_414.0, rel=1e-3)


@pytest.mark.parametrize("celsius", [25.0, 80.0])
def test_the_pressure_offered_as_the_least_is_one_the_check_accepts(celsius):
    """At 25 degC the floor is -98.155 kPa gauge (IAPWS-95 saturation pressure, 3.170 kPa
    absolute, less the ISO 2533 atmosphere): shown to four figures it rounds down to
    -98.16 kPa, which is below the floor. The figure the message offers must be accepted."""
    import re

    text = _surface(-99.0).replace('"80 degC"', f'"{celsius} degC"')
    with pytest.raises(ProjectError) as info:
        build_system(tomllib.loads(text), "hot.toml")
    (problem,) = [p for p in info.value.problems if p.key == "reservoirs.T1.surface_pressure"]
    offered = re.search(r"give at least (-?[0-9.]+) kPa", problem.message).group(1)
    system = build_system(tomllib.loads(text.replace('"-99.00 kPa"', f'"{offered} kPa"')),
                          "hot.toml")
    assert system.reservoirs["T1"].surface_pressure == pytest.approx(float(offered) * 1e3)
