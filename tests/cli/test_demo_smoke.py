"""Every command a user meets first, on every demo project: the smoke checks.

These are also what CI runs against the lowest versions of the dependencies that
pyproject.toml allows (``.ci/run``, marker ``smoke``), so a version floor that is not true
fails here. The checks of the numbers are closed forms, not stored answers:

* energy: in steady flow the head lost along a line equals the difference of the heads of
  its end nodes, ``h_L = H_from - H_to`` (Bernoulli with losses; any fluid-mechanics text);
* continuity: at a junction the flows in equal the flows out (conservation of mass);
* a simulation's time axis increases and its levels stay finite.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from workbench.cli import main

pytestmark = pytest.mark.smoke

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "projects").glob("*.toml"))
IDS = [p.stem for p in DEMOS]


def _run(argv, capsys) -> tuple[int, str, str]:
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("demo", DEMOS, ids=IDS)
def test_check_accepts_every_demo(demo, capsys):
    code, _, err = _run(["check", demo], capsys)
    assert code == 0, err


@pytest.mark.parametrize("demo", DEMOS, ids=IDS)
def test_solve_on_every_demo_keeps_energy_along_lines_and_mass_at_junctions(demo, capsys):
    code, out, err = _run(["solve", demo, "--json"], capsys)
    assert code == 0, err
    data = json.loads(out)
    assert data["success"] is True
    nodes = data["nodes"]
    balance = {name: 0.0 for name, node in nodes.items() if node["kind"] == "junction"}
    for name, line in data["lines"].items():
        drop = nodes[line["from"]]["head_m"] - nodes[line["to"]]["head_m"]
        assert line["head_loss_m"] == pytest.approx(drop, abs=1e-6), name
        for end, sign in ((line["from"], -1.0), (line["to"], 1.0)):
            if end in balance:
                balance[end] += sign * line["flow_m3_s"]
    for name, net in balance.items():
        assert abs(net) < 1e-9, f"junction {name}: net inflow {net} m3/s"


@pytest.mark.parametrize("demo", DEMOS, ids=IDS)
def test_simulate_on_every_demo_ends_with_a_finite_level_history(demo, capsys):
    code, out, err = _run(["simulate", demo, "--json"], capsys)
    assert code == 0, err
    data = json.loads(out)
    assert data["success"] is True
    times = data["time_s"]
    assert all(b > a for a, b in zip(times, times[1:], strict=False))
    for name, level in data["levels"].items():
        assert len(level["level_m"]) == len(times), name
        assert all(math.isfinite(x) for x in level["level_m"]), name


@pytest.mark.parametrize("demo", DEMOS, ids=IDS)
def test_report_on_every_demo_writes_a_record_naming_every_line(demo, tmp_path, capsys):
    target = tmp_path / "record.md"
    code, _, err = _run(["report", demo, "--output", target], capsys)
    assert code == 0, err
    text = target.read_text(encoding="utf-8")
    assert text.startswith("#")
    solved = json.loads(_run(["solve", demo, "--json"], capsys)[1])
    for name in solved["lines"]:
        assert name in text
