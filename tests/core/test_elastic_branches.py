"""Branched lines in the elastic model: junctions of several lines, valves on branches,
the whole connected part of a system run together (workbench.core.elastic).

Checked against the classical transmission coefficient of a junction (derived below from
continuity and a common head), the equilibrium of the steady start, and the steady network
solver of workbench.core.network (an independent Newton solution).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.core.elastic_systems import WATER, WATER_WHOLE
from workbench.core.elastic import (
    ElasticSetupError,
    connected_lines,
    run_elastic,
    simulate_elastic,
)
from workbench.core.model import (
    Junction,
    Line,
    Receiver,
    Reservoir,
    SurgeSettings,
    System,
    Valve,
    ValveSchedule,
)

#: Every check runs on both time-stepping kernels (the ``kernel`` fixture, tests/core/conftest.py).
pytestmark = pytest.mark.usefixtures("kernel")




def tee(diameters=(0.3, 0.3, 0.3), fluid=WATER_WHOLE, friction=0.0) -> System:
    """A reservoir feeding a 300 m line whose upstream valve shuts at once, branching at J1
    into a 600 m and a 450 m line discharging to the air."""
    shut = Valve("linear", 1.0, opening=1.0, position="from",
                 schedule=ValveSchedule((0.0, 1e-9), (1.0, 0.0)))
    lines = {
        "L1": Line("L1", "R1", "J1", 300.0, diameters[0], friction_factor=friction,
                   entrance_k=0.0, valve=shut, surge=SurgeSettings("elastic", 20)),
        "L2": Line("L2", "J1", "O2", 600.0, diameters[1], friction_factor=friction),
        "L3": Line("L3", "J1", "O3", 450.0, diameters[2], friction_factor=friction),
    }
    return System("tee", fluid, {"R1": Reservoir("R1", "constant_level", 0.0, 200.0)},
                  {"J1": Junction("J1", 0.0)},
                  {"O2": Receiver("O2", "open_discharge", 0.0),
                   "O3": Receiver("O3", "open_discharge", 0.0)}, lines)


@pytest.mark.parametrize("diameters", [(0.3, 0.3, 0.3), (0.4, 0.3, 0.2), (0.2, 0.3, 0.4)])
def test_a_junction_passes_a_head_wave_by_the_classical_transmission_coefficient(diameters):
    """Continuity ``sum dQ_i = 0`` and a common head change ``dH_t`` at the junction, with
    ``dQ = -(gA/a) dH`` for each wave leaving it and ``dQ_1 = (gA_1/a_1)(dH_i - dH_r)`` for
    the incident and reflected waves in line 1, give ``dH_t = s dH_i`` with
    ``s = 2 (A_1/a_1) / sum(A_i/a_i)`` (Wylie & Streeter 1993, ch. 3, from memory; the
    derivation above is the check). Equal impedances: ``s = 2/3``."""
    a = 1300.0
    system = tee(diameters)
    res = simulate_elastic(system, "L2", wave_speeds={lid: a for lid in system.lines},
                           duration=0.8)
    assert res.success and res.line_ids == ("L1", "L2", "L3")
    areas = [math.pi * d * d / 4.0 for d in diameters]
    s = 2.0 * areas[0] / sum(areas)
    incident = res.traces["valve L1"][1] - res.traces["valve L1"][0]
    # the front reaches mid-L2 after 300 m + 300 m and mid-L3 after 300 m + 225 m
    for lid, travel in (("L2", 600.0), ("L3", 525.0)):
        mid = res.midline_head[lid]
        k = int(round(travel / a / res.dt)) + 2
        assert mid[k] - mid[0] == pytest.approx(s * incident, rel=1e-9)
    junction = res.traces["junction J1"]
    k = int(round(300.0 / a / res.dt)) + 2
    assert junction[k] - junction[0] == pytest.approx(s * incident, rel=1e-9)


def test_a_branched_steady_start_stays_put_when_nothing_moves():
    # The steady start must be an equilibrium of the discrete equations (Wylie & Streeter
    # 1993 ch. 3): a header fed from a reservoir and a tank through two lines, feeding a
    # branch with a part-open valve to a receiver; friction from roughness.
    lines = {
        "A": Line("A", "R1", "J1", 400.0, 0.25, roughness=4.5e-5),
        "B": Line("B", "T1", "J1", 250.0, 0.2, roughness=4.5e-5),
        "C": Line("C", "J1", "O1", 300.0, 0.3, roughness=4.5e-5,
                  valve=Valve("equal_percentage", 2.0, opening=0.7, position="to")),
    }
    system = System("header", WATER, {"R1": Reservoir("R1", "constant_level", 10.0, 15.0),
                                      "T1": Reservoir("T1", "tank", 5.0, 12.0)},
                    {"J1": Junction("J1", 0.0)}, {"O1": Receiver("O1", "open_discharge", 0.0)},
                    lines)
    res = simulate_elastic(system, "C", duration=3.0)
    assert res.success and set(res.line_ids) == {"A", "B", "C"}
    flows = res.initial_flows
    assert flows["A"] > 0 and flows["B"] > 0
    assert flows["C"] == pytest.approx(flows["A"] + flows["B"], rel=1e-12)  # continuity
    for env in res.envelopes.values():
        assert env.max_head == pytest.approx(env.initial_head, abs=1e-9)
        assert env.min_head == pytest.approx(env.initial_head, abs=1e-9)


def test_branched_initial_flows_match_the_steady_network_solver():
    # The elastic run's own steady start against the steady network solver (an independent
    # Newton solution of the same lines): flows within 1 % (the elastic model takes one
    # velocity head at an exit in every regime, the network solver the profile's).
    network = pytest.importorskip("workbench.core.network")
    system = tee((0.3, 0.25, 0.2), fluid=WATER, friction=None)
    lines = {lid: Line(ln.id, ln.from_node, ln.to_node, ln.length, ln.diameter,
                       roughness=4.5e-5, valve=Valve("linear", 3.0, opening=1.0,
                                                     position="from") if lid == "L1" else None)
             for lid, ln in system.lines.items()}
    system = System(system.title, WATER, system.reservoirs, system.junctions, system.receivers,
                    lines)
    steady = network.solve_steady(system)
    assert steady.success, steady.message
    res = simulate_elastic(system, "L3", duration=0.5)
    for lid in lines:
        assert res.initial_flows[lid] == pytest.approx(steady.lines[lid].flow, rel=0.01)


def test_the_whole_connected_part_is_run_once_for_any_of_its_lines():
    system = tee()
    assert connected_lines(system, "L3") == ("L1", "L2", "L3")
    results = run_elastic(system, ("L2", "L3"), duration=0.3)
    assert results["L1"] is results["L2"] is results["L3"]
    assert set(results["L1"].envelopes) == {"L1", "L2", "L3"}


def test_a_valve_shutting_at_a_junction_of_three_lines_reflects_as_a_closed_end():
    # Valve on L2 at its junction end, shut at once: L2 is cut off at J1 and the junction
    # joins L1 and L3 alone. The wave from L1's valve then passes into L3 by the two-line
    # coefficient 2(A1/a1)/(A1/a1 + A3/a3) (as the three-line case above), and L2 keeps
    # its head: no wave enters it (Wylie & Streeter 1993, ch. 3).
    a = 1300.0
    system = tee((0.4, 0.3, 0.2))
    lines = dict(system.lines)
    lines["L2"] = Line("L2", "J1", "O2", 600.0, 0.3, friction_factor=0.0,
                       valve=Valve("linear", 1.0, position="from",
                                   schedule=ValveSchedule((0.0, 1e-9), (1.0, 0.0))))
    system = System(system.title, system.fluid, system.reservoirs, system.junctions,
                    system.receivers, lines)
    res = simulate_elastic(system, "L3", wave_speeds={lid: a for lid in lines}, duration=0.8)
    assert res.success, res.message
    a1, a3 = (math.pi * d * d / 4.0 for d in (0.4, 0.2))
    s = 2.0 * a1 / (a1 + a3)
    incident = res.traces["valve L1"][1] - res.traces["valve L1"][0]
    mid3 = res.midline_head["L3"]
    k = int(round(525.0 / a / res.dt)) + 2
    assert mid3[k] - mid3[0] == pytest.approx(s * incident, rel=1e-9)
    assert "junction J1" in res.traces
    with pytest.raises(ElasticSetupError):
        connected_lines(system, "L9")


def test_a_branch_closure_with_cavities_keeps_every_head_above_vapour():
    # A fast closure of the feed valve drops the header below vapour (Joukowsky): the
    # cavity model holds every section of every line at or above the vapour head (IAPWS
    # IF97 vapour pressure), and the junction trace never goes below it either.
    system = tee(fluid=WATER, friction=0.02)
    res = simulate_elastic(system, "L1", duration=4.0)
    assert res.status == 1 and res.cavity_zones
    for lid, env in res.envelopes.items():
        assert np.all(env.min_head >= res.vapour_head[lid] - 1e-9)
    hv_junction = res.vapour_head["L2"][0]
    assert res.traces["junction J1"].min() >= hv_junction - 1e-9
    assert "surge.cavity_collapse" in [f.code for f in res.findings]
