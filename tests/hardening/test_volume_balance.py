"""Volume is conserved in every state a tank can reach: filling, spilling, after a spill
ends, draining, drained.

The check is the volume balance of each tank, restated independently of the solver: over
the run, ``V(end) - V(0) = integral of (lines in - lines out + feed - draw-off - spill) dt``
(conservation of mass for an incompressible liquid; any fluid-mechanics text, e.g. White,
*Fluid Mechanics*, continuity for a control volume), integrated by the trapezoidal rule on
a dense output grid (every event time is also a grid point), to 1 % of the volume that
moved. Before, a tank that started at its overflow level never drained, and one spilling
when its feed stopped stayed full: volume left that never existed.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from tests.hardening.harness import ROOT
from workbench.core.sanity import check_transient
from workbench.core.transient import simulate
from workbench.project.document import load_project, load_project_text

DATA = Path(__file__).parent / "data"


def _balance_gaps(system, result) -> dict[str, tuple[float, float]]:
    """Per tank: (volume change, net volume moved in by lines, feed, draw-off and spill)."""
    t = np.asarray(result.t)
    flows = np.asarray(result.flows).reshape(len(result.line_ids), t.size)
    row = {lid: i for i, lid in enumerate(result.line_ids)}
    out = {}
    for k, rid in enumerate(result.tank_ids):
        net = result.feeds[k] - result.draw_offs[k] - result.spills[k]
        for lid, line in system.lines.items():
            if line.to_node == rid:
                net = net + flows[row[lid]]
            if line.from_node == rid:
                net = net - flows[row[lid]]
        out[rid] = (float(result.volumes[k][-1] - result.volumes[k][0]),
                    float(np.trapezoid(net, t)))
    return out


def _run(project):
    result = simulate(project.system)
    assert result.success, result.message
    assert check_transient(project.system, result) == []
    return result


def _assert_balanced(project, result) -> None:
    for rid, (change, moved) in _balance_gaps(project.system, result).items():
        throughput = max(abs(moved), abs(change), 1e-6)
        assert abs(change - moved) <= 0.01 * throughput, (rid, change, moved)


def test_a_tank_starting_at_its_overflow_level_drains_when_its_outlet_takes_more():
    text = (ROOT / "projects" / "fellgate_neutraliser_drain.toml").read_text()
    text = text.replace('level = "4.6 m"', 'level = "5.2 m"', 1)  # its height: at overflow
    project = load_project_text(text)
    result = _run(project)
    codes = [(e.code, e.time) for e in result.events if e.element == "TK-210"]
    # it only touches its overflow: one event says so, none says it spills or stops spilling
    assert ("tank.at_overflow", 0.0) in codes
    assert not any(code in ("tank.overflow", "tank.spill_end") for code, _t in codes)
    assert result.end_states["TK-210"] == "drained"
    assert float(np.max(result.spills)) == 0.0
    _assert_balanced(project, result)


def test_a_spill_ends_when_the_upstream_tank_drains_and_the_tank_then_drains():
    project = load_project(DATA / "spilling_tank_fed_by_a_head_tank.toml")
    result = _run(project)
    times = {e.code + ":" + e.element: e.time for e in result.events}
    assert times["tank.spill_end:B"] == pytest.approx(times["tank.drained:A"])
    assert result.end_states["B"] == "drained"
    k = result.tank_ids.index("B")
    assert float(np.max(result.spills[k])) > 0.0  # it did spill while A fed it
    _assert_balanced(project, result)
    # what left through B's outlet is what B held plus what A gave, less what spilled
    t = np.asarray(result.t)
    flows = np.asarray(result.flows).reshape(len(result.line_ids), t.size)
    out_b = np.trapezoid(flows[result.line_ids.index("BO")], t)
    in_b = np.trapezoid(flows[result.line_ids.index("AB")], t)
    spilt = np.trapezoid(result.spills[k], t)
    held = result.volumes[k][0] - result.volumes[k][-1]
    assert out_b == pytest.approx(held + in_b - spilt, rel=0.01)


def test_a_fed_tank_that_overflows_and_spills_keeps_its_balance():
    project = load_project(ROOT / "projects" / "fellgate_clearwell_filter_feed.toml")
    result = _run(project)
    assert any(e.code == "tank.overflow" for e in result.events)
    _assert_balanced(project, result)


def test_the_draw_off_total_is_the_volume_balance_not_a_sum_of_output_samples():
    """The clearwell with a 500 L/s draw-off drains and refills many times between the
    30 s output samples; its draw-off total must be what the volume balance gives,
    ``fed + lines in - spill - (V_end - V_0)`` (the lines' integral on a fine grid), not
    the trapezoid of on/off samples (1,681 m3 was reported before over 8 h).

    The first half hour is run instead of the demo's 8 h (two runs of 8 h took 40 s of
    CPU, of 1 h 3 s): it already holds about fifteen drain-and-refill cycles, each shorter
    than a sample interval, and the sampled trapezoid misses the balance there by over 10 %
    (24 %; checked below), while the balance on the 0.1 s grid agrees with the reported
    total to 1e-4, so the 0.5 % tolerance still tells the two apart as sharply as over 8 h."""
    from workbench.output.transient import transient_to_json

    text = (ROOT / "projects" / "fellgate_clearwell_filter_feed.toml").read_text()
    text = text.replace('draw_off = "5 L/s"', 'draw_off = "500 L/s"', 1)
    text = text.replace('duration = "8 h"', 'duration = "30 min"', 1)
    assert 'duration = "30 min"' in text
    project = load_project_text(text)
    system = project.system
    coarse = simulate(system)
    fine = simulate(system, output_interval=0.1)
    k = fine.tank_ids.index("CW-501")
    t = fine.t
    lines_in = np.zeros_like(t)
    for i, lid in enumerate(fine.line_ids):
        line = system.lines[lid]
        lines_in += fine.flows[i] * ((line.to_node == "CW-501") - (line.from_node == "CW-501"))
    by_balance = (fine.feed_volumes[k] + np.trapezoid(lines_in, t)
                  - np.trapezoid(fine.spills[k], t) - (fine.volumes[k][-1] - fine.volumes[k][0]))
    reported = transient_to_json(coarse, system)["levels"]["CW-501"]["draw_off_volume_m3"]
    assert reported == pytest.approx(by_balance, rel=5e-3)
    sampled = np.trapezoid(coarse.draw_offs[k], coarse.t)  # premise: the old way is far off
    assert abs(sampled - by_balance) > 0.1 * by_balance
    assert reported == pytest.approx(coarse.draw_off_volumes[k])
