"""Building the core model: units, site atmosphere, pipe tables, materials, valves, tanks."""

from __future__ import annotations

import math

import pytest

from workbench.project.document import build_system, load_project_text

BASE = """
schema = 1

[project]
title = "Build check"
site_elevation = "{site}"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.T1]
{reservoir}

[receivers.OUT]
{receiver}

[lines.L1]
from = "T1"
to = "OUT"
length = "100 m"
{line}
"""


def build(site="0 m", reservoir=None, receiver=None, line=None):
    text = BASE.format(
        site=site,
        reservoir=reservoir or 'kind = "constant_level"\nbottom_elevation = "10 m"\nlevel = "2 m"',
        receiver=receiver or 'kind = "open_discharge"\nelevation = "0 m"',
        line=line or 'inner_diameter = "100 mm"\nroughness = "0.045 mm"',
    )
    return load_project_text(text, "build.toml").system


def test_an_absolute_vessel_pressure_is_made_gauge_with_the_site_atmosphere():
    # ISO 2533 table: 89 874.6 Pa at 1000 m geopotential (geometric 1000 m differs by about
    # 2 Pa); so 1 bar absolute is about 10.1 kPa gauge there.
    system = build(site="1000 m", receiver='kind = "vessel"\nelevation = "0 m"\npressure = "1 bara"')
    assert system.atmospheric_pressure == pytest.approx(89874.6, abs=10)
    assert system.receivers["OUT"].pressure == pytest.approx(100000 - 89874.6, abs=10)


def test_a_gauge_vessel_pressure_is_kept_as_written():
    system = build(receiver='kind = "vessel"\nelevation = "0 m"\npressure = "0.5 barg"')
    assert system.receivers["OUT"].pressure == 50000.0


def test_a_nominal_size_and_schedule_give_the_tabulated_bore_and_wall():
    # ASME B36.10M: NPS 4 (DN100) schedule 40, OD 114.3 mm, wall 6.02 mm -> ID 102.26 mm.
    system = build(line='nominal_size = "DN100"\nschedule = "40"\nroughness = "0.045 mm"')
    line = system.lines["L1"]
    assert line.diameter == pytest.approx(0.10226, abs=1e-5)
    assert line.wall_thickness == pytest.approx(0.00602, abs=1e-5)


def test_a_material_gives_roughness_and_wall_elasticity():
    # Moody (1944) commercial steel 0.045 mm (from memory); E 207 GPa, nu 0.30 for carbon
    # steel (common handbook values, from memory).
    system = build(line='inner_diameter = "100 mm"\nmaterial = "commercial_steel"')
    line = system.lines["L1"]
    assert line.roughness == pytest.approx(0.045e-3)
    assert line.elastic_modulus == pytest.approx(207e9)
    assert line.poisson_ratio == pytest.approx(0.30)


def test_a_given_roughness_overrides_the_material():
    system = build(line='inner_diameter = "100 mm"\nmaterial = "commercial_steel"\n'
                        'roughness = "0.15 mm"')
    assert system.lines["L1"].roughness == pytest.approx(0.15e-3)


def test_a_valve_kv_becomes_a_loss_coefficient_on_the_line_velocity_head():
    # K = d^4/(625.4 Kv^2), d in mm, Kv in m3/h (from K = 2 dp A^2/(rho Q^2) with the Kv
    # definition of IEC 60534-1: 1 bar drop); DN100, Kv 500 -> K = 0.6396 (computed).
    system = build(line='inner_diameter = "100 mm"\nroughness = "0.045 mm"\n\n'
                        '[lines.L1.valve]\ncharacteristic = "linear"\nkv_open = "500 m3/h"')
    assert system.lines["L1"].valve.k_open == pytest.approx(100**4 / (625.4 * 500**2), rel=1e-3)


def test_a_cone_angle_gives_the_cone_height():
    # Geometry: a cone of included angle 2a under a diameter D is (D/2)/tan(a) deep.
    system = build(reservoir='kind = "tank"\nshape = "cone_bottom"\ndiameter = "3.6 m"\n'
                             'cone_angle = "60 deg"\nbottom_elevation = "10 m"\nlevel = "3 m"')
    shape = system.reservoirs["T1"].shape
    assert shape.cone_height == pytest.approx(1.8 / math.tan(math.radians(30)))


def test_a_horizontal_cylinder_overflows_at_its_diameter_unless_told_otherwise():
    system = build(reservoir='kind = "tank"\nshape = "horizontal_cylinder"\ndiameter = "2.5 m"\n'
                             'length = "8 m"\nbottom_elevation = "1 m"\nlevel = "1 m"')
    assert system.reservoirs["T1"].height == 2.5


def test_water_comes_from_iapws_at_the_file_temperature():
    # IAPWS-95 at 20 degC, 0.101325 MPa: 998.207 kg/m3; IAPWS 2008 viscosity 1.0016 mPa s
    # (values in HYDRAULICS.md, computed with the iapws package).
    fluid = build().fluid
    assert fluid.density == pytest.approx(998.207, abs=0.01)
    assert fluid.viscosity == pytest.approx(1.0016e-3, rel=1e-3)


def test_build_system_raises_project_error_on_plain_data():
    from workbench.project.document import ProjectError

    with pytest.raises(ProjectError) as info:
        build_system({"schema": 1, "project": {"title": "x"}}, "data")
    assert any(p.key == "fluid.kind" for p in info.value.problems)
