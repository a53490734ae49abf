"""A junction's pressure in time: the rigid-column run keeps it, and a fit reads it.

Reference: a laminar drain through two lines in series, closed form derived in
:func:`junction_pressure`; the run's junction pressure series must follow it, the steady
solution must give its first value, and a fit to readings made by the closed form must give
back the bore that made them.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from workbench.core.calibration import CalibrationError, FitParameter, Observation, fit, predict
from workbench.core.model import (
    FluidProps,
    G,
    Junction,
    Line,
    Receiver,
    Reservoir,
    SimulationSettings,
    System,
    TankShape,
)
from workbench.core.transient import simulate

OIL = FluidProps("viscous oil", 1000.0, 0.5)  # a custom liquid: 0.5 Pa s, 1000 kg/m3
AREA = math.pi / 4.0  # 1 m tank
DROP, H0 = 5.0, 3.0  # tank bottom above the outlet, initial level [m]
L1, L2, Z_J = 8.0, 12.0, 1.0  # line lengths, junction elevation [m]
D1, D2 = 0.025, 0.025  # bores that make the readings [m]


def junction_pressure(times: np.ndarray, d2: float = D2) -> np.ndarray:
    r"""Gauge pressure at the junction of a laminar drain through two lines, derived here.

    Hagen-Poiseuille gives each line's loss :math:`R_i Q` with
    :math:`R_i = 128 \mu L_i/(\pi \rho g D_i^4)`. With velocity heads left out the driving
    head :math:`H = h + \Delta z` (level above the free outlet) decays as
    :math:`H = H_0 e^{-t/\tau}`, :math:`\tau = A (R_1 + R_2)`, and the junction's head is
    the outlet's (zero) plus the second line's loss, :math:`H_J = R_2 Q = H R_2/(R_1+R_2)`,
    so :math:`p_J = \rho g (H R_2/(R_1 + R_2) - z_J)`. The velocity heads left out (the
    laminar exit's two, about 2.4 mm against 8 m) make this 4e-4 high at most.
    """
    r1 = 128.0 * OIL.viscosity * L1 / (math.pi * OIL.density * G * D1**4)
    r2 = 128.0 * OIL.viscosity * L2 / (math.pi * OIL.density * G * d2**4)
    head = (H0 + DROP) * np.exp(-np.asarray(times) / (AREA * (r1 + r2)))
    return OIL.density * G * (head * r2 / (r1 + r2) - Z_J)


def _system(d2: float = D2, duration: float = 36000.0) -> System:
    tank = Reservoir("T", "tank", DROP, H0, shape=TankShape("vertical_cylinder", diameter=1.0))
    lines = {"L1": Line("L1", "T", "J", L1, D1, entrance_k=0.0),
             "L2": Line("L2", "J", "O", L2, d2)}
    return System("two-line drain", OIL, {"T": tank}, {"J": Junction("J", Z_J)},
                  {"O": Receiver("O", "open_discharge", 0.0)}, lines,
                  simulation=SimulationSettings(duration, "steady"))


def test_the_junction_pressure_series_follows_the_laminar_closed_form():
    result = simulate(_system(), duration=36000.0, stop_when=None, output_interval=60.0,
                      rtol=1e-8, junction_pressures=True)
    assert result.success and result.junction_ids == ("J",)
    series = result.junction_pressures[0]
    assert series.shape == result.t.shape
    expected = junction_pressure(result.t)
    np.testing.assert_allclose(series, expected, rtol=5e-4)
    assert series[-1] < 0.6 * series[0]  # it really falls over the test


def test_the_first_junction_pressure_of_a_run_from_steady_is_the_steady_solutions():
    """Common practice, no source: a run that starts from the steady state holds the steady
    pressures at its first instant."""
    from workbench.core.network import solve_steady

    result = simulate(_system(), duration=60.0, stop_when=None, junction_pressures=True)
    steady = solve_steady(_system()).nodes["J"].pressure
    assert result.junction_pressures[0, 0] == pytest.approx(steady, rel=1e-9)


def test_a_run_not_asked_for_junction_pressures_keeps_none():
    result = simulate(_system(), duration=60.0, stop_when=None)
    assert result.junction_ids == () and result.junction_pressures.shape == (0, len(result.t))


def _gauge(noise: float = 0.0) -> Observation:
    times = np.linspace(0.0, 6 * 3600.0, 25)  # the tank drains at 10.9 h
    readings = junction_pressure(times)
    if noise:
        readings = readings + np.random.default_rng(5).normal(0.0, noise, times.size)
    return Observation("gauge", "J", "pressure", times, readings, _system(d2=0.031))


# Above 35 mm the second line drains the tank within the 6 h of readings (tau ln 1.6 < 6 h).
BORE2 = FitParameter("lines.L2.inner_diameter", "diameter", "L2", 0.015, 0.034, 0.031)


def test_a_fit_to_junction_pressures_in_time_gives_back_the_bore_that_made_them():
    result = fit([_gauge(noise=50.0)], [BORE2])  # 50 Pa of gauge noise, about 5 mm of oil
    assert result.success, result.message
    lo, hi = result.ci95[0]
    assert lo <= D2 <= hi
    assert result.values[0] == pytest.approx(D2, rel=3e-3)
    assert result.rms_after["gauge"] < result.rms_before["gauge"] / 20


def test_a_junction_cut_off_from_every_fixed_head_has_no_pressure_to_compare():
    """Both lines at the junction shut: the junction's head is undefined (no line joins it
    to a tank or an outlet), so the run says nan and the comparison refuses."""
    from workbench.core.model import Valve

    system = _system()
    shut = {lid: Line(ln.id, ln.from_node, ln.to_node, ln.length, ln.diameter,
                      entrance_k=ln.entrance_k, valve=Valve("linear", 0.2, opening=0.0))
            for lid, ln in system.lines.items()}
    import dataclasses

    closed = dataclasses.replace(system, lines=shut)
    obs = Observation("gauge", "J", "pressure", np.array([0.0, 60.0]), np.array([1e4, 1e4]),
                      closed)
    with pytest.raises(CalibrationError, match="no flowing line joins junction J"):
        predict(obs)
