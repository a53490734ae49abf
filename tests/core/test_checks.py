"""Grade-line checks and findings of a steady solution."""

from __future__ import annotations

import math

import pytest
from steady_cases import WATER_20C, make_system, pipe, tank

from workbench.core.checks import (
    SELF_VENTING_FROUDE,
    SUBATMOSPHERIC_TOLERANCE_M,
    VAPOR_MARGIN_PA,
    VELOCITY_HIGH,
    VELOCITY_LOW,
)
from workbench.core.model import FluidProps, G, Receiver, Reservoir, TankShape
from workbench.core.network import solve_steady

RHO = WATER_20C.density


def _codes(result, element=None):
    return {w.code for w in result.warnings if element is None or w.element == element}


def _siphon(crest: float):
    """A siphon of our own: tank surface at 12 m, a crest at ``crest`` m, lower tank at 1 m."""
    return make_system(
        reservoirs=[tank("source", 10.0, 2.0), tank("receiver", 0.0, 1.0)],
        lines=[pipe("siphon", "source", "receiver", 100.0, 0.08, entrance_k=0.5,
                    profile=((0.0, 10.0), (20.0, crest), (60.0, crest), (100.0, 0.0)))],
    )


def test_a_line_cresting_above_the_source_runs_below_atmospheric_at_the_crest():
    # Source: energy equation with Darcy-Weisbach (friction in proportion to length) and
    # fluids.Colebrook for f: p = rho g [(H_source - z) - (K_entrance + 1 + f s/D) v^2/2g].
    import fluids

    result = solve_steady(_siphon(14.0))
    assert result.success, result.message
    line = result.lines["siphon"]
    nu = WATER_20C.viscosity / RHO
    f = fluids.Colebrook(line.velocity * 0.08 / nu, 4.5e-5 / 0.08)
    assert line.friction_factor == pytest.approx(f, rel=1e-9)
    vh = line.velocity**2 / (2 * G)
    expected = RHO * G * ((12.0 - 14.0) - (0.5 + 1.0 + f * 60.0 / 0.08) * vh)
    prof = result.profiles["siphon"]
    assert prof.pressure_gauge.min() == pytest.approx(expected, rel=1e-9)
    assert prof.distance[prof.pressure_gauge.argmin()] == 60.0
    assert prof.pressure_abs.min() == pytest.approx(expected + 101325.0, rel=1e-9)
    assert "profile.subatmospheric" in _codes(result, "siphon")
    assert "profile.vapor" not in _codes(result)


def test_a_crest_near_barometric_height_is_flagged_as_column_separation():
    # Vapour pressure of water at 20 °C 2339.2 Pa (HYDRAULICS.md, IAPWS) plus the stated margin.
    result = solve_steady(_siphon(21.0))
    prof = result.profiles["siphon"]
    assert prof.pressure_abs.min() <= WATER_20C.vapor_pressure + VAPOR_MARGIN_PA
    vapor = [w for w in result.warnings if w.code == "profile.vapor"]
    assert len(vapor) == 1 and vapor[0].severity == "danger" and vapor[0].source


def test_the_site_atmosphere_sets_the_absolute_pressure():
    system = _siphon(16.0)
    thin_air = type(system)(**{**system.__dict__, "atmospheric_pressure": 80_000.0})
    prof = solve_steady(thin_air).profiles["siphon"]
    assert prof.pressure_abs == pytest.approx(prof.pressure_gauge + 80_000.0)


def test_a_fluid_without_vapour_pressure_gets_an_info_note_instead_of_the_check():
    oil = FluidProps(name="test oil", density=880.0, viscosity=0.25)
    system = make_system(reservoirs=[tank("A", 0.0, 3.0), tank("B", 0.0, 1.0)],
                         lines=[pipe("L", "A", "B", 30.0, 0.05)], fluid=oil)
    result = solve_steady(system)
    notes = [w for w in result.warnings if w.code == "profile.vapor_unchecked"]
    assert len(notes) == 1 and notes[0].severity == "info"
    # Laminar oil: Hagen-Poiseuille regime noted as information.
    laminar = [w for w in result.warnings if w.code == "regime.laminar"]
    assert laminar and laminar[0].severity == "info"


def test_a_laminar_line_s_grade_line_carries_two_velocity_heads_and_meets_the_outlet():
    # Source: energy equation with the kinetic-energy coefficient of a laminar profile,
    # alpha = 2 (HYDRAULICS.md "Minor losses"), f = 64/Re (Hagen-Poiseuille) in proportion
    # to length: p = rho g [(H_source - z) - (K_entrance + 2 + f s/D) v^2/2g]; at a free
    # discharge the jet leaves at atmospheric pressure (common practice, no source).
    oil = FluidProps(name="test oil", density=880.0, viscosity=0.25)
    system = make_system(
        reservoirs=[tank("source", 10.0, 2.0)],
        receivers=[Receiver("out", "open_discharge", 0.0)],
        lines=[pipe("L", "source", "out", 100.0, 0.08, entrance_k=0.5,
                    profile=((0.0, 10.0), (20.0, 12.5), (60.0, 12.5), (100.0, 0.0)))],
        fluid=oil)
    result = solve_steady(system)
    assert result.success, result.message
    line = result.lines["L"]
    assert line.reynolds < 2000.0
    f = 64.0 / line.reynolds
    vh = line.velocity**2 / (2 * G)
    prof = result.profiles["L"]
    expected = oil.density * G * ((12.0 - 12.5) - (0.5 + 2.0 + f * 60.0 / 0.08) * vh)
    assert prof.pressure_gauge[prof.distance == 60.0][0] == pytest.approx(expected, rel=1e-9)
    assert prof.pressure_gauge[-1] == pytest.approx(0.0, abs=1e-6)  # [Pa], round-off of 1e5
    assert prof.egl[-1] - prof.hgl[-1] == pytest.approx(2.0 * vh, rel=1e-12)
    (note,) = [w for w in result.warnings if w.code == "regime.laminar"]
    assert "2 velocity heads" in note.message and "1 used" not in note.message


def test_transitional_flow_shows_both_branches_friction_factors():
    # Branches: 64/Re (Hagen-Poiseuille) and Colebrook (fluids.Colebrook).
    import fluids

    system = make_system(reservoirs=[tank("A", 0.0, 1.06), tank("B", 0.0, 1.0)],
                         lines=[pipe("L", "A", "B", 50.0, 0.025, 1.5e-6)])
    result = solve_steady(system)
    re = result.lines["L"].reynolds
    assert 2000.0 < re < 4000.0
    (w,) = [w for w in result.warnings if w.code == "regime.transitional"]
    assert f"{64.0 / re:.4g}" in w.message
    assert f"{fluids.Colebrook(re, 1.5e-6 / 0.025):.4g}" in w.message


def test_velocity_limits_are_flagged_as_a_rule_of_thumb():
    # Limits 0.3 and 3 m/s: common practice, no source (the user reads "rule of thumb").
    fast = make_system(reservoirs=[tank("A", 0.0, 30.0), tank("B", 0.0, 1.0)],
                       lines=[pipe("L", "A", "B", 10.0, 0.1)])
    slow = make_system(reservoirs=[tank("A", 0.0, 1.01), tank("B", 0.0, 1.0)],
                       lines=[pipe("L", "A", "B", 100.0, 0.1)])
    r_fast, r_slow = solve_steady(fast), solve_steady(slow)
    assert abs(r_fast.lines["L"].velocity) > VELOCITY_HIGH
    assert abs(r_slow.lines["L"].velocity) < VELOCITY_LOW
    (hi,) = [w for w in r_fast.warnings if w.code == "velocity.high"]
    (lo,) = [w for w in r_slow.warnings if w.code == "velocity.low"]
    assert hi.source == "rule of thumb" and lo.source == "rule of thumb"


def _drain(level: float, drop: float, kind: str = "tank"):
    source = tank("vessel_tank", 10.0, level)
    if kind == "tank":
        source = Reservoir(id="vessel_tank", kind="tank", bottom_elevation=10.0, level=level,
                           shape=TankShape("vertical_cylinder", diameter=2.0), height=6.0)
    return make_system(
        reservoirs=[source],
        receivers=[Receiver("floor_drain", "open_discharge", 10.0 - drop)],
        lines=[pipe("drain", "vessel_tank", "floor_drain", 15.0, 0.1)],
    )


def test_a_drain_leaving_a_tank_downward_above_froude_0_3_is_not_self_venting():
    # Froude number v/sqrt(gD) against about 0.3 (Simpson 1968; Hills 1983; from memory).
    result = solve_steady(_drain(2.0, 5.0))
    v = abs(result.lines["drain"].velocity)
    froude = v / math.sqrt(G * 0.1)
    assert froude > SELF_VENTING_FROUDE
    (w,) = [w for w in result.warnings if w.code == "drain.self_venting"]
    assert f"{froude:.3g}" in w.message and "Simpson (1968)" in w.source
    assert "from memory" not in w.source


def test_a_horizontal_outlet_is_not_judged_as_a_drain():
    result = solve_steady(_drain(2.0, 0.0))
    assert "drain.self_venting" not in _codes(result)


@pytest.mark.parametrize(("level", "flagged"), [(0.3, True), (5.0, False)])
def test_outlet_submergence_follows_the_pump_intake_rule(level, flagged):
    # Source: ANSI/HI 9.8, S = D(1 + 2.3 Fr).
    result = solve_steady(_drain(level, 5.0))
    v = abs(result.lines["drain"].velocity)
    required = 0.1 * (1 + 2.3 * v / math.sqrt(G * 0.1))
    assert (level < required) == flagged
    assert ("outlet.submergence" in _codes(result)) == flagged


def test_roughness_outside_the_colebrook_range_is_flagged():
    # Moody (1944) chart range eps/D <= 0.05 (from memory).
    system = make_system(reservoirs=[tank("A", 0.0, 5.0), tank("B", 0.0, 1.0)],
                         lines=[pipe("L", "A", "B", 50.0, 0.05, roughness=0.004)])
    assert "correlation.range" in _codes(solve_steady(system), "L")


def test_every_finding_has_a_stable_code_a_message_a_severity_and_a_source():
    result = solve_steady(_siphon(21.0))
    assert result.warnings
    for w in result.warnings:
        assert w.code.count(".") == 1 and w.message and w.source
        assert w.severity in ("info", "caution", "danger")


def test_a_constant_level_reservoir_is_never_judged_self_venting():
    # A constant-level reservoir's level is held by definition: it cannot draw down to the
    # outlet, so the Froude rule (Simpson 1968; Hills 1983) does not apply to it.
    result = solve_steady(_drain(2.0, 5.0, kind="constant_level"))
    froude = abs(result.lines["drain"].velocity) / math.sqrt(G * 0.1)
    assert froude > SELF_VENTING_FROUDE
    assert "drain.self_venting" not in _codes(result)


def _open_drain(drop: float):
    """A constant-level tank draining to the air ``drop`` m below its bottom."""
    return make_system(
        reservoirs=[tank("src", 10.0, 2.0)],
        receivers=[Receiver("out", "open_discharge", 10.0 - drop)],
        lines=[pipe("L", "src", "out", 40.0, 0.1, entrance_k=0.5)],
    )


def test_round_off_at_an_open_discharge_is_not_reported_as_sub_atmospheric():
    # At a free discharge the jet leaves at atmospheric pressure (energy equation, common
    # practice, no source): the computed gauge pressure there is round-off of a few 1e-10 Pa,
    # far inside the stated tolerance of 1 cm of liquid (SUBATMOSPHERIC_TOLERANCE_M).
    result = solve_steady(_open_drain(5.0))
    prof = result.profiles["L"]
    assert abs(prof.pressure_gauge[-1]) < RHO * G * SUBATMOSPHERIC_TOLERANCE_M
    assert prof.pressure_gauge.min() > -RHO * G * SUBATMOSPHERIC_TOLERANCE_M
    assert "profile.subatmospheric" not in _codes(result)


def test_a_point_one_tolerance_below_atmospheric_is_reported():
    # Closed form: a point whose gauge pressure is just below -rho g * tolerance is reported,
    # one just above is not (definition of the tolerance, SUBATMOSPHERIC_TOLERANCE_M).
    from workbench.core.checks import _LowPoint, pressure_findings

    system = _open_drain(5.0)
    tol = RHO * G * SUBATMOSPHERIC_TOLERANCE_M
    codes = [[f.code for f in pressure_findings(system, "L", _LowPoint(p, 3.0, 9.0,
                                                                        101325.0 + p, 3.0, 9.0))]
             for p in (-1.01 * tol, -0.99 * tol)]
    assert codes == [["profile.subatmospheric"], []]


@pytest.mark.parametrize(("p_abs", "words", "severity"), [
    (2339.2 + 5000.0, "is within 10 kPa of the vapour pressure", "caution"),
    (2339.2 + 20.0, "is at the vapour pressure", "danger"),
    (1000.0, "below the vapour pressure", "danger"),
    (-30000.0, "below absolute zero", "danger"),
])
def test_the_vapour_finding_says_near_at_below_or_below_absolute_zero(p_abs, words, severity):
    # Vapour pressure of water at 20 degC 2339.2 Pa (IAPWS, HYDRAULICS.md); the shortfall is
    # reported as a head (p_v - p)/(rho g), never as an impossible absolute pressure.
    from workbench.core.checks import vapour_finding

    tol = RHO * G * SUBATMOSPHERIC_TOLERANCE_M
    f = vapour_finding("L", p_abs, 12.0, 2339.2, tol, 101325.0, RHO * G)
    assert f.code == "profile.vapor" and f.severity == severity
    assert words in f.message
    if p_abs < 2339.2 - tol:
        shortfall = (2339.2 - p_abs) / (RHO * G)
        assert f"falls {shortfall:.3g} m below" in f.message
        assert "kPa abs at" not in f.message


def test_a_line_running_against_its_file_direction_is_flagged_with_the_cause():
    # A line from a low tank to a vessel pressurised to 50 kPa: the energy equation drives
    # the flow from the vessel back to the tank (H_vessel = z + p/(rho g) = 5.1 m > 3 m).
    system = make_system(
        reservoirs=[tank("low_tank", 0.0, 3.0)],
        receivers=[Receiver("vessel", "vessel", 0.0, pressure=50_000.0)],
        lines=[pipe("L", "low_tank", "vessel", 30.0, 0.05)],
    )
    result = solve_steady(system)
    assert result.lines["L"].flow < 0.0
    (w,) = [w for w in result.warnings if w.code == "flow.reverse"]
    assert "from 'vessel' to 'low_tank'" in w.message
    assert "the pressure in vessel 'vessel'" in w.message
    assert f"{-result.lines['L'].flow * 1000:.3g} L/s" in w.message
