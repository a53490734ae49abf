"""Physical sanity of every result: sound results pass, corrupted ones are caught.

The laws checked (workbench.core.sanity) are conservation of mass (continuity at each
junction, volume of each tank) and the energy equation along each line with its losses
(any fluid-mechanics text, e.g. White, *Fluid Mechanics*, ch. 3 and 6; the loop form after
Hardy Cross, 1936) -- common practice, no source needed for the laws themselves. Faults are
injected by replacing the solver with one that returns a corrupted result; the CLI must then
refuse to present it (exit 3, "internal consistency check failed ... please report").
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, Phase, given, settings

from tests.hardening.harness import ROOT, run_cli, simulate_argv
from tests.hardening.strategies import to_toml, valid_projects
from workbench.cli.exit_codes import ExitCode
from workbench.core import network, transient
from workbench.core.network import solve_steady
from workbench.core.sanity import check_steady, check_transient
from workbench.core.transient import simulate
from workbench.project.document import load_project, load_project_text

DEMOS = sorted((ROOT / "projects").glob("*.toml"))
NETWORK = ROOT / "projects" / "fellgate_cooling_water_network.toml"
TRANSFER = ROOT / "projects" / "fellgate_process_water_transfer.toml"
DRAIN = ROOT / "projects" / "fellgate_neutraliser_drain.toml"


# --- sound results pass ------------------------------------------------------------------

@pytest.mark.parametrize("path", DEMOS, ids=[p.stem for p in DEMOS])
def test_every_demo_steady_result_passes_the_physical_checks(path):
    system = load_project(path).system
    result = solve_steady(system)
    assert result.success
    assert check_steady(system, result) == []


@pytest.mark.parametrize("path", DEMOS, ids=[p.stem for p in DEMOS])
def test_every_demo_transient_result_passes_the_physical_checks(path):
    system = load_project(path).system
    result = simulate(system, duration=min(system.simulation.duration, 600.0))
    assert result.success
    assert check_transient(system, result) == []


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow],
          phases=[Phase.explicit, Phase.reuse, Phase.generate])  # shrinking takes minutes here
@given(data=valid_projects())
def test_generated_systems_pass_the_physical_checks(data):
    system = load_project_text(to_toml(data)).system
    result = solve_steady(system)
    if result.success:
        assert check_steady(system, result) == []
    run = simulate(system, duration=2.0)
    if run.success:
        assert check_transient(system, run) == []


# --- corrupted steady results are caught -------------------------------------------------

def _replace_line(result, lid, **changes):
    lines = dict(result.lines)
    lines[lid] = dataclasses.replace(lines[lid], **changes)
    return dataclasses.replace(result, lines=lines)


def _replace_node(result, nid, **changes):
    nodes = dict(result.nodes)
    nodes[nid] = dataclasses.replace(nodes[nid], **changes)
    return dataclasses.replace(result, nodes=nodes)


def _shut_outlet(system):
    line = system.lines["400-CW-03"]
    lines = dict(system.lines)
    lines["400-CW-03"] = dataclasses.replace(line, valve=dataclasses.replace(line.valve, opening=0.0))
    return dataclasses.replace(system, lines=lines)


STEADY_FAULTS = {
    # name: (corruption, check expected to fire)
    "one flow 1 % high breaks continuity": (
        lambda r: _replace_line(r, "400-CW-01", flow=r.lines["400-CW-01"].flow * 1.01), "continuity"),
    "a junction head 5 cm off breaks energy": (
        lambda r: _replace_node(r, "VP-1", head=r.nodes["VP-1"].head + 0.05), "energy"),
    "a line loss 1 % low breaks the path energy": (
        lambda r: _replace_line(r, "400-CW-03", head_loss=r.lines["400-CW-03"].head_loss * 0.99),
        "energy"),
    "a NaN flow is not a result": (
        lambda r: _replace_line(r, "410-CW-02", flow=math.nan), "finite"),
    "a reservoir head that is not its level": (
        lambda r: _replace_node(r, "RWP-1", head=r.nodes["RWP-1"].head + 1.0), "fixed_head"),
    "a negative level": (
        lambda r: dataclasses.replace(r, levels={**r.levels, "TK-410": -0.5}), "level"),
}


@pytest.fixture(scope="module")
def network_solved():
    """The cooling-water network solved once for the checks below (each corrupts a copy)."""
    system = load_project(NETWORK).system
    return system, solve_steady(system)


@pytest.mark.parametrize("name", STEADY_FAULTS)
def test_a_corrupted_steady_result_is_caught_by_the_checks(name, network_solved):
    corrupt, check = STEADY_FAULTS[name]
    system, result = network_solved
    assert check_steady(system, result) == []
    found = check_steady(system, corrupt(result))
    assert check in {v.check for v in found}, found


def test_flow_through_a_shut_valve_is_caught():
    system = _shut_outlet(load_project(NETWORK).system)
    result = solve_steady(system)
    assert result.success and result.lines["400-CW-03"].flow == 0.0
    assert check_steady(system, result) == []
    leaking = _replace_line(result, "400-CW-03", flow=1e-3)
    assert "closed_valve" in {v.check for v in check_steady(system, leaking)}


@pytest.mark.parametrize("name", ["one flow 1 % high breaks continuity",
                                  "a junction head 5 cm off breaks energy"])
def test_the_solve_command_refuses_a_corrupted_result_as_an_internal_error(monkeypatch, name):
    corrupt, check = STEADY_FAULTS[name]
    real = network.solve_steady
    monkeypatch.setattr(network, "solve_steady", lambda system, **kw: corrupt(real(system, **kw)))
    outcome = run_cli(["solve", str(NETWORK), "--json"])
    assert outcome.code == ExitCode.INTERNAL
    assert "internal consistency check failed" in outcome.stderr
    assert check in outcome.stderr and "please report" in outcome.stderr
    assert outcome.stdout == ""  # nothing presented as a result


# --- corrupted transient results are caught ----------------------------------------------

@pytest.fixture(scope="module")
def transfer_run():
    """The transfer demo's first minute, run once for the checks below (each corrupts a
    copy: the corruptions replace arrays, never write into the run's own)."""
    system = load_project(TRANSFER).system
    return system, simulate(system, duration=60.0)


TRANSIENT_FAULTS = {
    "tank volume drifts 2 % at the end": (
        lambda r: dataclasses.replace(r, volumes=_scaled_tail(r.volumes, 1.02)), "volume"),
    "a negative level": (
        lambda r: dataclasses.replace(r, levels=r.levels - (r.levels.max() + 0.1)), "level"),
    "flow through the shut valve": (
        lambda r: dataclasses.replace(r, flows=_leak_after(r, 42.0)), "closed_valve"),
    "a NaN in the flows": (
        lambda r: dataclasses.replace(r, flows=np.where(np.arange(r.t.size) == 3, np.nan, r.flows)),
        "finite"),
}


def _scaled_tail(volumes, factor):
    out = np.array(volumes, dtype=float)
    out[:, -1] *= factor
    return out


def _leak_after(result, t_close):
    flows = np.array(result.flows, dtype=float)
    flows[0, result.t > t_close + 1.0] = 0.01
    return flows


@pytest.mark.parametrize("name", TRANSIENT_FAULTS)
def test_a_corrupted_transient_result_is_caught_by_the_checks(name, transfer_run):
    corrupt, check = TRANSIENT_FAULTS[name]
    system, result = transfer_run
    assert check_transient(system, result) == []
    found = check_transient(system, corrupt(result))
    assert check in {v.check for v in found}, found


def test_a_drain_that_loses_volume_without_flow_is_caught():
    system = load_project(DRAIN).system
    result = simulate(system, duration=300.0, output_interval=1.0)
    assert check_transient(system, result) == []
    flows = np.array(result.flows) * 0.9  # 10 % of the outflow vanishes from the record
    found = check_transient(system, dataclasses.replace(result, flows=flows))
    assert "volume" in {v.check for v in found}, found


def test_tanks_joined_only_to_each_other_keep_their_total_on_a_coarse_grid(tmp_path):
    # Two tanks swinging as a U-tube (period about 15 s), sampled every 60 s for 180 s
    # (a dozen swings): the grid cannot resolve the flows, yet the sum of the volumes is
    # invariant (mass conservation; common practice, no source). A sound result passes; a
    # drifting total is caught.
    system = load_project_text(U_TUBE).system
    result = simulate(system)
    assert result.success and result.t.size <= 12
    assert check_transient(system, result) == []
    drifted = dataclasses.replace(result, volumes=_scaled_tail(result.volumes, 1.001))
    assert "volume" in {v.check for v in check_transient(system, drifted)}


U_TUBE = """
schema = 1
[project]
title = "two tanks joined by a short wide line"
[fluid]
kind = "water"
temperature = "20 degC"
[reservoirs.A]
kind = "tank"
shape = "vertical_cylinder"
diameter = "1 m"
bottom_elevation = "0 m"
level = "3 m"
[reservoirs.B]
kind = "tank"
shape = "vertical_cylinder"
diameter = "1 m"
bottom_elevation = "0 m"
level = "1 m"
[lines.L]
from = "A"
to = "B"
length = "10 m"
inner_diameter = "300 mm"
roughness = "0.001 mm"
entrance = "rounded"
[simulation]
duration = "180 s"
initial_state = "at_rest"
output_interval = "60 s"
"""


def test_the_simulate_command_refuses_a_corrupted_result_as_an_internal_error(monkeypatch):
    corrupt, _ = TRANSIENT_FAULTS["tank volume drifts 2 % at the end"]
    real = transient.simulate
    monkeypatch.setattr(transient, "simulate", lambda system, **kw: corrupt(real(system, **kw)))
    outcome = run_cli(simulate_argv(str(TRANSFER), "60 s"))
    assert outcome.code == ExitCode.INTERNAL
    assert "internal consistency check failed: volume" in outcome.stderr
    assert "please report" in outcome.stderr
    assert outcome.stdout == ""


# --- regressions the checks found ----------------------------------------------------------

CUT_OFF = """
schema = 1
[project]
title = "junctions behind a shut valve"
[fluid]
kind = "water"
temperature = "20 degC"
[reservoirs.T]
kind = "constant_level"
bottom_elevation = "40 m"
level = "1 m"
[junctions.A]
elevation = "1 m"
[junctions.B]
elevation = "0.3 m"
[lines.IN]
from = "T"
to = "A"
length = "300 m"
inner_diameter = "300 mm"
roughness = "0.3 mm"
[lines.IN.valve]
characteristic = "linear"
k_open = 8.0
opening = 0.0
[lines.AB]
from = "B"
to = "A"
length = "150 m"
inner_diameter = "400 mm"
roughness = "0.5 mm"
"""


def test_junctions_cut_off_by_a_shut_valve_carry_no_flow():
    # Found by the generated-systems check: the pinned heads of the cut-off junctions drove
    # a flow through the line between them (mass from nowhere). With the only inlet shut,
    # nothing can move there (continuity; common practice, no source).
    system = load_project_text(CUT_OFF).system
    result = solve_steady(system)
    assert result.success
    assert result.lines["AB"].flow == 0.0
    assert check_steady(system, result) == []
