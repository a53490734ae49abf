"""Warnings of a rigid-column run that must be true: end states, reversed lines, round-off."""

from __future__ import annotations

import numpy as np
from steady_cases import make_system, pipe

from workbench.core.model import Receiver, Reservoir, SimulationSettings, TankShape
from workbench.core.transient import simulate


def _drain_tank(level=1.0, outlet=0.0, duration=3600.0):
    """A vertical tank of our own draining through 20 m of 50 mm pipe to the air."""
    return make_system(
        reservoirs=[Reservoir("T", "tank", 4.0, level, shape=TankShape("vertical_cylinder",
                                                                     diameter=1.0),
                              height=3.0, min_level=0.05)],
        receivers=[Receiver("OUT", "open_discharge", outlet)],
        lines=[pipe("L", "T", "OUT", 20.0, 0.05, entrance_k=0.5)],
        simulation=SimulationSettings(duration, "steady", "drained"),
    )


def test_a_drained_tank_ends_drained_with_no_falling_rate():
    # Definition (README: end_state and end_level_rate_m_s): a tank whose outlets are held
    # shut at min_level does not go on falling; mass balance dV/dt = sum of the flows in.
    res = simulate(_drain_tank())
    assert res.success and "T" in res.drain_times
    assert res.end_states["T"] == "drained"
    assert res.end_rates["T"] >= 0.0


def test_a_line_that_runs_backwards_in_time_is_flagged_with_the_cause():
    # Energy equation: the vessel's head z + p/(rho g) = 50e3/(998.2 g) = 5.1 m is above the
    # tank's surface (3 m), so the line runs from the vessel into the tank.
    system = make_system(
        reservoirs=[Reservoir("low", "tank", 0.0, 1.0, shape=TankShape("vertical_cylinder",
                                                                      diameter=3.0),
                              height=6.0)],
        receivers=[Receiver("vessel", "vessel", 0.0, pressure=50_000.0)],
        lines=[pipe("L", "low", "vessel", 30.0, 0.05)],
        simulation=SimulationSettings(60.0, "steady"),
    )
    res = simulate(system)
    assert np.all(res.flows[0] < 0.0)
    (w,) = [w for w in res.warnings if w.code == "flow.reverse"]
    assert "from t = 0 s" in w.message and "the pressure in vessel 'vessel'" in w.message


def test_a_run_whose_outlet_is_at_atmospheric_has_no_subatmospheric_caution():
    # At a free outlet the jet leaves at atmospheric pressure (energy equation): whatever
    # the integration leaves there is far inside 1 cm of liquid (SUBATMOSPHERIC_TOLERANCE_M).
    # Outlet 0.5 m below the tank bottom, level 2 m: the inlet stays above atmospheric
    # (depth 2 m against about 0.4 m of entrance loss and velocity head) for the minute run.
    res = simulate(_drain_tank(level=2.0, outlet=3.5, duration=60.0))
    assert res.success and res.min_pressure["L"] < 1.0  # [Pa]: the outlet is at zero gauge
    assert not [w for w in res.warnings if w.code == "profile.subatmospheric"]
