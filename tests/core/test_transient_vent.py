"""Tanks with a vent or sealed in the rigid-column transient, against closed forms.

Sources: Boyle's law with the hydrostatic head balance (closed form in the docstring); the
incompressible orifice equation ``dp = rho (Q/(C_d A))^2/2`` (ISO 5167-1:2003 eq. 1,
epsilon = 1); API 2000 (7th ed.) / ISO 28300:2008: inbreathing for liquid movement equals
the maximum outflow rate (from memory); the open-tank drain of the same system (today's
model) as the reference for a large vent; linear invariants of Runge-Kutta methods
(Hairer, Norsett & Wanner, Solving ODEs I, section II.1, from memory) for the gas mass.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from tests.core.builders import WATER
from workbench.core.model import (
    FlowSchedule,
    FluidProps,
    G,
    Line,
    Receiver,
    Reservoir,
    SimulationSettings,
    System,
    TankShape,
    Vent,
)
from workbench.core.transient import simulate
from workbench.core.vent import bore_effective_area

P_ATM = 101_325.0
R_AIR = 287.0528  # J/(kg K), US Standard Atmosphere 1976


def _drain(vent, level=3.0, shell=4.0, d_line=0.05, length=5.0, out_z=-1.0, duration=4000.0,
           stop="drained", initial="at_rest", **tank):
    t = Reservoir("T", "tank", 0.0, level, shape=TankShape("vertical_cylinder", diameter=2.0),
                  height=shell, vent=vent, **tank)
    return System("t", WATER, {"T": t}, {}, {"OUT": Receiver("OUT", "open_discharge", out_z)},
                  {"L1": Line("L1", "T", "OUT", length, d_line, friction_factor=0.02)},
                  simulation=SimulationSettings(duration, initial, stop, None))


def test_a_sealed_tank_stops_draining_where_its_vacuum_balances_the_head():
    """Sealed vertical cylinder, gas space from h0 = 3 m to the top H = 4 m at p_atm, outlet
    1 m below the bottom. Boyle (isothermal): p = p_atm (H - h0)/(H - h); at rest the line
    carries no flow, so p - p_atm + rho g (h + 1 m) = 0 at the outlet. The column arrives
    with a little momentum; through a 20 mm, 1 m line its overshoot is below 1e-4 of h."""
    system = _drain(Vent(0.0), d_line=0.02, length=1.0, duration=20_000.0, stop=None)
    res = simulate(system)
    assert res.success, res.message
    h_eq = brentq(lambda h: P_ATM * (4.0 - 3.0) / (4.0 - h) - P_ATM
                  + WATER.density * G * (h + 1.0), 0.0, 3.0)
    assert res.levels[0, -1] == pytest.approx(h_eq, rel=1e-4)
    p_end = res.gas_pressures[0, -1]
    assert p_end == pytest.approx(P_ATM * 1.0 / (4.0 - res.levels[0, -1]) - P_ATM, rel=1e-9)
    assert [e.code for e in res.events if e.code == "tank.sealed_stop"] == ["tank.sealed_stop"]
    assert "T" not in res.drain_times


def test_a_vented_drain_at_low_flow_pulls_the_orifice_vacuum_and_needs_its_peak_outflow():
    """50 mm vent with K = 1.5 (C_d A = A/sqrt(K)): the gas-space vacuum follows
    rho_air (Q/(C_d A))^2/2 with the outflow Q at each time (ISO 5167-1, eps = 1), within
    1 % while the vacuum is above 1 Pa; the required inbreathing equals the peak outflow
    (API 2000 / ISO 28300)."""
    area = bore_effective_area(0.05, 1.5)
    res = simulate(_drain(Vent(area, 0.05, 1.5)))
    assert res.success, res.message
    rho_air = P_ATM / (R_AIR * WATER.temperature)
    q = res.flows[0]
    vac = -res.gas_pressures[0]
    expected = rho_air * (q / area) ** 2 / 2.0
    sel = expected > 1.0
    assert sel.sum() > 100
    assert np.max(np.abs(vac[sel] / expected[sel] - 1.0)) < 0.01
    assert res.required_inbreathing["T"] == pytest.approx(float(np.max(q)), rel=1e-12)
    assert res.required_outbreathing["T"] == 0.0


def test_a_large_vent_reproduces_the_open_tank_drain_time():
    """A 1 m vent on a 50 mm drain: the vacuum is below a milli-pascal, the drain time that
    of the open tank (today's model) to 1e-6."""
    open_time = simulate(_drain(None)).drain_times["T"]
    vented = simulate(_drain(Vent(bore_effective_area(1.0, 1.0), 1.0, 1.0)))
    assert vented.drain_times["T"] == pytest.approx(open_time, rel=1e-6)
    assert np.max(np.abs(vented.gas_pressures)) < 1e-2


def test_a_sealed_tank_keeps_its_gas_mass_through_a_drain_and_a_refill():
    """Sealed: no gas crosses the vent, so m = X + rho_atm V_g stays at m0 = rho_atm V_g0
    (ideal gas at p_atm) through a draw-off and a feed: a linear invariant of the
    equations, kept to round-off by the implicit Runge-Kutta method."""
    schedule_out = FlowSchedule((0.0, 100.0, 100.0 + 1e-9, 300.0), (0.01, 0.01, 0.0, 0.0))
    schedule_in = FlowSchedule((0.0, 150.0, 150.0 + 1e-9, 300.0), (0.0, 0.0, 0.01, 0.01))
    system = _drain(Vent(0.0), duration=300.0, stop=None, draw_off_schedule=schedule_out,
                    inflow_schedule=schedule_in)
    res = simulate(system)
    assert res.success, res.message
    m0 = P_ATM / (R_AIR * WATER.temperature) * math.pi * 1.0 * (4.0 - 3.0)
    assert res.gas_masses[0, 0] == pytest.approx(m0, rel=1e-5)  # R from memory
    assert np.max(np.abs(res.gas_masses[0] / res.gas_masses[0, 0] - 1.0)) < 1e-12
    assert res.volumes[0].min() < res.volumes[0, 0] - 0.5  # it did drain, and refill
    assert res.volumes[0, -1] > res.volumes[0].min() + 0.5


def test_a_tank_without_a_vent_reports_no_gas_space():
    res = simulate(_drain(None, duration=50.0, stop=None))
    assert res.gas_tank_ids == () and res.gas_pressures.shape[0] == 0
    assert not [w for w in res.warnings if w.code.startswith("tank.v")]


def test_a_drain_beyond_the_design_vacuum_is_a_danger_and_the_vent_is_undersized():
    """10 mm vent, K 1.5, under a 50 mm drain: vacuum of several kPa, design 0.5 kPa."""
    vent = Vent(bore_effective_area(0.01, 1.5), 0.01, 1.5)
    res = simulate(_drain(vent, design_vacuum=500.0))
    codes = {w.code: w for w in res.warnings}
    assert codes["tank.vacuum"].severity == "danger"
    assert codes["tank.vent_undersized"].severity == "danger"
    assert -res.gas_pressures.min() > 500.0


def test_a_steady_start_begins_at_the_steady_vacuum():
    """initial_state = "steady": the first gas pressure is the orifice drop at the first
    outflow (quasi-steady, ISO 5167-1 with eps = 1) within 0.5 %."""
    area = bore_effective_area(0.03, 1.5)
    res = simulate(_drain(Vent(area, 0.03, 1.5), initial="steady", duration=50.0, stop=None))
    rho_air = P_ATM / (R_AIR * WATER.temperature)
    q0 = res.flows[0, 0]
    assert -res.gas_pressures[0, 0] == pytest.approx(rho_air * (q0 / area) ** 2 / 2.0, rel=5e-3)
    # and the flow starts steady: it changes only as the level falls
    assert abs(res.flows[0, 1] - q0) < 1e-3 * q0


def test_an_adiabatic_sealed_gas_space_follows_the_isentrope():
    """Sealed, gas_process = "adiabatic": p V_g^gamma = const with gamma = 1.4 for air
    (isentropic ideal gas, any thermodynamics text), so p = p_atm (V_g0/V_g)^1.4 at every
    output time."""
    res = simulate(_drain(Vent(0.0), d_line=0.02, length=1.0, duration=3000.0, stop=None,
                          gas_process="adiabatic"))
    assert res.success, res.message
    area = math.pi * 1.0**2
    v_gas = area * 4.0 - res.volumes[0]
    expected = P_ATM * (area * 1.0 / v_gas) ** 1.4 - P_ATM
    assert np.allclose(res.gas_pressures[0], expected, rtol=1e-9, atol=1e-6)
    assert res.gas_pressures[0, -1] < -1000.0


def test_a_fill_through_a_small_vent_pressurises_the_gas_space():
    """A feed of 20 L/s into a tank with a 20 mm vent (K 1.5) whose outlet line rises to a
    discharge above the tank (so nothing leaves): once the gas space follows the feed
    (time constant about 35 s; 300 s run) the vent passes rho_gas Q, so
    dp = rho_gas (Q/(eps C_d A))^2/2 (ISO 5167-1 orifice equation with the ISO 5167-2
    expansibility at beta = 0, eps = 1 - 0.351 (1 - (p_atm/p)^(1/1.4)), written out here)
    within 1 %; above design_pressure it is a danger; the required outbreathing is the
    feed (API 2000 / ISO 28300)."""
    area = bore_effective_area(0.02, 1.5)
    tank = Reservoir("T", "tank", 0.0, 1.0, shape=TankShape("vertical_cylinder", diameter=2.0),
                     height=4.0, vent=Vent(area, 0.02, 1.5), inflow=0.02,
                     design_pressure=200.0)
    system = System("f", WATER, {"T": tank}, {}, {"OUT": Receiver("OUT", "open_discharge", 20.0)},
                    {"L1": Line("L1", "T", "OUT", 5.0, 0.05, friction_factor=0.02)},
                    simulation=SimulationSettings(300.0, "at_rest", None, None))
    res = simulate(system)
    assert res.success, res.message
    p = P_ATM + res.gas_pressures[0, -1]
    rho_gas = p / (R_AIR * WATER.temperature)
    eps = 1.0 - 0.351 * (1.0 - (P_ATM / p) ** (1.0 / 1.4))
    expected = rho_gas * (0.02 / (eps * area)) ** 2 / 2.0
    assert res.gas_pressures[0, -1] == pytest.approx(expected, rel=0.01)
    assert res.required_outbreathing["T"] == pytest.approx(0.02, rel=1e-9)
    codes = {w.code: w.severity for w in res.warnings}
    assert codes.get("tank.overpressure") == "danger"


def test_a_sealed_gas_space_never_falls_below_the_vapour_pressure():
    """A sealed tank with a thin gas space drained 20 m down: Boyle alone would take the
    gas space to a few pascals absolute; the liquid boils at its vapour pressure (2339.2 Pa
    at 20 degC, IAPWS-95) and holds it there, with a danger finding."""
    res = simulate(_drain(Vent(0.0), level=3.999, out_z=-20.0, duration=2000.0))
    assert res.success, res.message
    assert res.gas_pressures.min() == pytest.approx(WATER.vapor_pressure - P_ATM, abs=1e-6)
    assert any(w.code == "tank.vapor" and w.severity == "danger" for w in res.warnings)


@pytest.mark.parametrize(("fluid", "friction", "duration"), [
    # turbulent, fixed f: the column rings down through reversals, its swing shrinking only
    # as 1/t (loss ~ v^2): 93 reversals by 8,000 s, within 2.5e-7 of the balance (1.5 s CPU)
    (WATER, 0.02, 8_000.0),
    (FluidProps("oil", 900.0, 0.5, None, None, 293.15), None, 200_000.0),  # laminar, creeping
])
def test_a_sealed_tank_draining_into_a_lower_reservoir_settles_at_the_boyle_balance(
        fluid, friction, duration):
    """Sealed tank (gas 1 m deep at p_atm, shell 4 m) joined to a constant-level reservoir
    whose surface is 1 m below the tank bottom: at rest the heads balance,
    p_atm (4 - 3)/(4 - h) - p_atm + rho g (h + 1 m) = 0 (Boyle, hydrostatics; closed form
    here), with nothing stopping the line, so the level settles there to 1e-6; the stop
    is listed (tank.sealed_stop) once, as an event and a finding."""
    tank = Reservoir("T", "tank", 0.0, 3.0, shape=TankShape("vertical_cylinder", diameter=2.0),
                     height=4.0, vent=Vent(0.0))
    low = Reservoir("R", "constant_level", -2.0, 1.0)
    system = System("t", fluid, {"T": tank, "R": low}, {}, {},
                    {"L1": Line("L1", "T", "R", 2.0, 0.02, friction_factor=friction)},
                    simulation=SimulationSettings(duration, "at_rest", None, None))
    res = simulate(system)
    assert res.success, res.message
    h_eq = brentq(lambda h: P_ATM / (4.0 - h) - P_ATM + fluid.density * G * (h + 1.0), 0.0, 3.0)
    assert res.levels[0, -1] == pytest.approx(h_eq, rel=1e-6)
    assert [e.code for e in res.events].count("tank.sealed_stop") == 1
    assert [w.code for w in res.warnings].count("tank.sealed_stop") == 1


def test_a_sealed_tank_gets_the_sealed_tank_finding_not_an_undersized_vent():
    """vent = "none" with design figures: there is no vent to size, so no
    ``tank.vent_undersized`` ("passes 0 L/s" before); the drain that stops against the
    vacuum is reported as ``tank.sealed_stop`` (Boyle's law and the head balance, as in
    the test above)."""
    system = _drain(Vent(0.0), d_line=0.02, length=1.0, duration=20_000.0, stop=None,
                    design_vacuum=500.0, design_pressure=500.0)
    res = simulate(system)
    assert res.success, res.message
    codes = [w.code for w in res.warnings]
    assert "tank.vent_undersized" not in codes
    assert "tank.sealed_stop" in codes and "tank.sealed" not in codes
    assert "tank.vacuum" in codes  # far beyond its 0.5 kPa design vacuum


def test_a_sealed_tank_whose_liquid_moves_without_stopping_is_named_sealed():
    """A sealed tank drawn off and fed (the mass-balance case above): no vent finding; one
    ``tank.sealed`` caution with the lowest and highest gas pressure of the run, which
    Boyle's law gives from the gas volumes: p = p_atm V_g0 / V_g (isothermal)."""
    schedule_out = FlowSchedule((0.0, 100.0, 100.0 + 1e-9, 300.0), (0.01, 0.01, 0.0, 0.0))
    schedule_in = FlowSchedule((0.0, 150.0, 150.0 + 1e-9, 300.0), (0.0, 0.0, 0.01, 0.01))
    system = _drain(Vent(0.0), duration=300.0, stop=None, draw_off_schedule=schedule_out,
                    inflow_schedule=schedule_in, design_vacuum=500.0)
    res = simulate(system)
    assert res.success, res.message
    assert not [w for w in res.warnings if w.code == "tank.vent_undersized"]
    (sealed,) = [w for w in res.warnings if w.code == "tank.sealed"]
    area = math.pi * 1.0 ** 2
    vg = area * 4.0 - res.volumes[0]
    boyle = P_ATM * (area * 1.0) / vg - P_ATM
    low = dict((name, v) for name, v, _, _ in sealed.values)["low"]
    assert low == pytest.approx(float(np.min(boyle)), rel=1e-6)
    assert low < -500.0
