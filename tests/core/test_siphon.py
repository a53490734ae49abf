"""Siphon break in the steady solve: the capped flow from the energy equation up to the crest."""

from __future__ import annotations

import math

import pytest
from steady_cases import make_system, pipe, tank

from workbench.core.model import FluidProps, G, Receiver
from workbench.core.network import solve_steady

#: Water at 50 degC (IAPWS-95 density, IAPWS 2008 viscosity, IAPWS-IF97 saturation
#: pressure 12.352 kPa; computed with the iapws package).
WATER_50C = FluidProps(name="water", density=988.03, viscosity=5.465e-4,
                       vapor_pressure=12_352.0, temperature=323.15)
#: Atmosphere at 1500 m (ISO 2533 standard atmosphere): 84.556 kPa.
P_ATM_1500 = 84_556.0
F = 0.02  # a fixed Darcy friction factor, so the closed form is exact
D = 0.08
K_ENT = 0.5


def _siphon(level: float, crest: float = 18.0):
    """Our own siphon: a reservoir with its bottom at 10 m, a crest at ``crest`` m 12 m
    along, a free outlet at 0 m after 60 m of pipe."""
    return make_system(
        reservoirs=[tank("source", 10.0, level)],
        receivers=[Receiver("out", "open_discharge", 0.0)],
        lines=[pipe("S", "source", "out", 60.0, D, entrance_k=K_ENT, friction_factor=F,
                    profile=((0.0, 10.0), (12.0, crest), (60.0, 0.0)))],
        fluid=WATER_50C, atmospheric_pressure=P_ATM_1500,
    )


def _crest_head(crest: float) -> float:
    """Head at the crest when it stands at the vapour pressure, gauge based [m]."""
    return crest + (WATER_50C.vapor_pressure - P_ATM_1500) / (WATER_50C.density * G)


def test_a_siphon_whose_crest_would_boil_passes_what_the_rising_leg_can_lift():
    # Energy equation from the free surface to the crest held at vapour pressure (turbulent,
    # alpha = 1): H - H_c = (K_ent + 1 + f s_c/D) v^2/2g  ->  v = sqrt(2g (H - H_c)/k_c).
    h_source = 10.0 + 2.0
    k_c = K_ENT + 1.0 + F * 12.0 / D
    v = math.sqrt(2 * G * (h_source - _crest_head(18.0)) / k_c)
    q_cap = v * math.pi * D**2 / 4
    # Full bore (closed form, K_t = K_ent + 1 + f L/D) would carry more: the cap applies.
    k_t = K_ENT + 1.0 + F * 60.0 / D
    q_full = math.sqrt(2 * G * h_source / k_t) * math.pi * D**2 / 4
    assert q_cap < q_full
    result = solve_steady(_siphon(2.0))
    line = result.lines["S"]
    assert line.status == "siphon_break"
    assert line.flow == pytest.approx(q_cap, rel=1e-8)
    brk = result.siphon_breaks["S"]
    assert brk.full_bore_flow == pytest.approx(q_full, rel=1e-8)
    assert brk.distance == 12.0 and brk.stop_head == pytest.approx(_crest_head(18.0), rel=1e-12)
    prof = result.profiles["S"]
    assert prof.pressure_abs[1] == pytest.approx(WATER_50C.vapor_pressure, rel=1e-6)
    assert prof.pressure_abs.min() >= WATER_50C.vapor_pressure * (1 - 1e-9)  # never below
    (w,) = [w for w in result.warnings if w.code == "line.siphon_break"]
    assert w.severity == "danger" and f"{q_cap * 1000:.3g} L/s" in w.message


def test_a_source_below_the_water_barometer_under_the_crest_passes_nothing():
    # At zero flow the crest stands at H_source - z_c below atmospheric; when that is more
    # than the water barometer (p_atm - p_v)/(rho g) = 7.45 m the column cannot stand.
    result = solve_steady(_siphon(0.5, crest=18.5))
    assert 10.5 < _crest_head(18.5)
    assert result.lines["S"].status == "siphon_break" and result.lines["S"].flow == 0.0
    (w,) = [w for w in result.warnings if w.code == "line.siphon_break"]
    assert "the flow stops" in w.message


def test_a_siphon_with_margin_runs_full_bore():
    # Crest 2 m above the surface: about 4 m of head to spare below the water barometer.
    result = solve_steady(_siphon(2.0, crest=14.0))
    assert result.lines["S"].status == "flowing" and not result.siphon_breaks


def test_an_air_valve_at_the_crest_parts_the_column_at_atmospheric_pressure():
    # An air valve admits air once the line falls below atmospheric: the rising leg then
    # lifts v = sqrt(2g (H - z_c)/k_c) with the crest at zero gauge (energy equation).
    from dataclasses import replace

    system = _siphon(2.0, crest=11.0)
    line = replace(system.lines["S"], air_valves=(12.0,))
    vented = replace(system, lines={"S": line})
    k_c = K_ENT + 1.0 + F * 12.0 / D
    v = math.sqrt(2 * G * (12.0 - 11.0) / k_c)
    result = solve_steady(vented)
    assert solve_steady(system).lines["S"].status == "flowing"  # no valve: runs full
    assert result.lines["S"].status == "siphon_break"
    assert result.lines["S"].flow == pytest.approx(v * math.pi * D**2 / 4, rel=1e-8)
    assert result.siphon_breaks["S"].vented
    (w,) = [w for w in result.warnings if w.code == "line.siphon_break"]
    assert "air valve" in w.message
