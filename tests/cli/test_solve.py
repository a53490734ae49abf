"""``workbench solve``: exit codes, the documented JSON shape, and numbers checked outside."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from workbench.cli import main

G = 9.80665

TRANSFER = """\
schema = 1

[project]
title = "Day-tank transfer (test plant)"
units = "SI"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.HT-1]
kind = "constant_level"
bottom_elevation = "20 m"
level = "3 m"

[reservoirs.DT-2]
kind = "constant_level"
bottom_elevation = "2 m"
level = "1.5 m"

[lines.T-01]
from = "HT-1"
to = "DT-2"
length = "120 m"
nominal_size = "3 in"
schedule = "40"
material = "commercial_steel"
entrance = "sharp"
"""

# A junction reachable from no reservoir: the project validates or not, but cannot be solved.
ORPHAN = TRANSFER + """
[junctions.J-9]
elevation = "5 m"

[junctions.J-10]
elevation = "5 m"

[lines.T-09]
from = "J-9"
to = "J-10"
length = "10 m"
nominal_size = "2 in"
schedule = "40"
material = "commercial_steel"
"""


@pytest.fixture()
def transfer(tmp_path: Path) -> Path:
    path = tmp_path / "transfer.toml"
    path.write_text(TRANSFER)
    return path


def test_json_has_exactly_the_documented_shape(transfer, capsys):
    assert main(["solve", str(transfer), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["schema"] == 1
    assert {"density_kg_m3", "viscosity_pa_s", "vapor_pressure_pa"} <= set(out["fluid"])
    line = out["lines"]["T-01"]
    assert {"flow_m3_s", "velocity_m_s", "reynolds", "regime", "friction_factor",
            "head_loss_m"} <= set(line)
    assert set(out["nodes"]) == {"HT-1", "DT-2"}
    assert {"head_m", "pressure_pa"} <= set(out["nodes"]["HT-1"])
    assert all({"code", "element", "message"} <= set(w) for w in out["warnings"])


def test_json_numbers_agree_with_an_independent_line_solution(transfer, capsys):
    # Independent: pipe bore from fluids.nearest_pipe (ASME B36.10M), water from iapws
    # (IAPWS-95), f from fluids.Clamond (Colebrook), flow from brentq on the energy equation
    # 23 m - 3.5 m = (f L/D + 0.5 entrance + 1 exit) v^2/2g.
    import fluids
    import iapws
    from scipy.optimize import brentq

    assert main(["solve", str(transfer), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    _, d, _, _ = fluids.nearest_pipe(NPS=3, schedule="40")
    water = iapws.IAPWS95(T=293.15, P=0.101325)
    rho, mu = water.rho, water.mu
    assert out["fluid"]["density_kg_m3"] == pytest.approx(rho, rel=1e-6)
    eps = 4.5e-5  # commercial steel, Moody (1944), from memory (HYDRAULICS.md)
    area = math.pi * d**2 / 4

    def residual(q: float) -> float:
        v = q / area
        f = fluids.Clamond(rho * v * d / mu, eps / d)
        return (f * 120.0 / d + 1.5) * v**2 / (2 * G) - 19.5

    q = brentq(residual, 1e-5, 1.0, xtol=1e-14)
    line = out["lines"]["T-01"]
    assert line["flow_m3_s"] == pytest.approx(q, rel=1e-9)
    assert line["head_loss_m"] == pytest.approx(19.5, rel=1e-9)
    assert out["nodes"]["HT-1"]["pressure_pa"] == pytest.approx(rho * G * 3.0, rel=1e-6)


def test_tables_name_every_line_and_node_and_end_with_the_cautions(transfer, capsys):
    assert main(["solve", str(transfer)]) == 0
    text = capsys.readouterr().out
    for word in ("T-01", "HT-1", "DT-2", "L/s", "turbulent", "licensed"):
        assert word in text


def test_an_unsolvable_network_exits_1_with_the_reason_on_stderr(tmp_path, capsys):
    path = tmp_path / "orphan.toml"
    path.write_text(ORPHAN)
    assert main(["solve", str(path)]) == 1
    captured = capsys.readouterr()
    assert captured.out == ""
    assert "J-9" in captured.err


def test_a_missing_file_exits_1_without_a_traceback(tmp_path, capsys):
    assert main(["solve", str(tmp_path / "nope.toml")]) == 1
    err = capsys.readouterr().err
    assert "nope.toml" in err and "Traceback" not in err


SIPHON_US = """\
schema = 1

[project]
title = "Siphon over a pipe bridge (test plant)"
units = "US"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.T1]
kind = "constant_level"
bottom_elevation = "10 m"
level = "2 m"

[receivers.OUT]
kind = "open_discharge"
elevation = "0 m"

[lines.S1]
from = "T1"
to = "OUT"
length = "60 m"
nominal_size = "2 in"
schedule = "40"
material = "commercial_steel"
profile = [
    { distance = "0 m", elevation = "10 m" },
    { distance = "10 m", elevation = "15 m" },
    { distance = "60 m", elevation = "0 m" },
]
"""


def test_a_us_units_project_s_warnings_give_psi_and_ft_and_its_json_stays_si(tmp_path, capsys):
    # Display units follow [project] units = "US" (README); the --json contract stays SI and
    # each warning's numbers are also given as SI values with their quantity kind.
    path = tmp_path / "siphon.toml"
    path.write_text(SIPHON_US)
    assert main(["solve", str(path)]) == 0
    text = capsys.readouterr().out
    warnings = text[text.index("Warnings"):]
    assert "psi gauge" in warnings and " ft " in warnings
    assert "kPa" not in warnings
    assert main(["solve", str(path), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    (sub,) = [w for w in out["warnings"] if w["code"] == "profile.subatmospheric"]
    assert "kPa gauge" in sub["message"]
    assert sub["values"]["p"]["kind"] == "pressure"
    p_min = min(out["lines"]["S1"]["profile"]["pressure_pa"])
    assert sub["values"]["p"]["value"] == pytest.approx(p_min, rel=1e-12)
