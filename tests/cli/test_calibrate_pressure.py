"""A gauge at a junction read in time: ``simulate`` compares it, ``calibrate`` fits to it.

Readings are typed into the project from the closed form of a laminar drain through two
lines in series (Hagen-Poiseuille, derived in tests/core/test_calibration_pressure.py): the
model leaves residuals of a few pascals on them, and a fit of the second line's bore gives
back the bore that made them within its 95 % interval.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from workbench.cli import main

G = 9.80665  # standard gravity (CGPM 1901)
MU, RHO = 0.5, 1000.0  # a viscous custom liquid
L1, L2, D, Z_J = 8.0, 12.0, 0.025, 1.0
AREA = math.pi / 4.0  # 1 m tank
DROP, H0 = 5.0, 3.0


def gauge(t):
    """``p_J = rho g (H R2/(R1+R2) - z_J)`` with ``H = H0 e^{-t/tau}``,
    ``tau = A (R1 + R2)``, ``R_i = 128 mu L_i/(pi rho g D^4)`` (derived in the core test)."""
    r1, r2 = (128.0 * MU * length / (math.pi * RHO * G * D**4) for length in (L1, L2))
    head = (H0 + DROP) * np.exp(-np.asarray(t, dtype=float) / (AREA * (r1 + r2)))
    return RHO * G * (head * r2 / (r1 + r2) - Z_J)


def project(bore2_mm: float, hours=(0, 1, 2, 3, 4, 5, 6), duration: str = "8 h",
            noise: float = 0.0) -> str:
    """The project; readings with ``noise`` [Pa] of gauge noise (seeded) when asked."""
    hours = np.asarray(hours, dtype=float)
    values = gauge(hours * 3600.0) + np.random.default_rng(7).normal(0.0, noise, hours.size) \
        if noise else gauge(hours * 3600.0)
    points = ", ".join(f'{{ time = "{h:g} h", value = "{v / 1000:.4f} kPa" }}'
                       for h, v in zip(hours, values))
    return f"""schema = 1
[project]
title = "viscous drain through a junction"
[fluid]
kind = "custom"
density = "{RHO} kg/m3"
viscosity = "{MU} Pa*s"
[reservoirs.T]
kind = "tank"
shape = "vertical_cylinder"
diameter = "1 m"
bottom_elevation = "{DROP} m"
level = "{H0} m"
[junctions.J]
elevation = "{Z_J} m"
[receivers.O]
kind = "open_discharge"
elevation = "0 m"
[lines.L1]
from = "T"
to = "J"
length = "{L1} m"
inner_diameter = "{D * 1000} mm"
roughness = "0.045 mm"
entrance = 0
[lines.L2]
from = "J"
to = "O"
length = "{L2} m"
inner_diameter = "{bore2_mm} mm"
roughness = "0.045 mm"
[simulation]
duration = "{duration}"
output_interval = "1 min"
[measurements.gauge]
element = "J"
quantity = "pressure"
points = [ {points} ]
"""


def _write(tmp_path, text):
    path = tmp_path / "gauge.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_simulate_compares_a_junction_pressure_trace_on_a_run_with_pascal_residuals(tmp_path, capsys):
    assert main(["simulate", _write(tmp_path, project(25.0)), "--json"]) == 0
    m = json.loads(capsys.readouterr().out)["measurements"]["gauge"]
    assert m["quantity"] == "pressure" and m["unit_si"] == "Pa" and m["note"] is None
    assert m["compared"] == 7
    # the closed form leaves out velocity heads (2.4 mm of oil, 24 Pa) and the readings are
    # typed to 0.1 Pa: residuals stay within that
    assert m["max_abs"] < 30.0


def test_calibrate_fits_a_bore_to_a_junction_pressure_trace(tmp_path, capsys):
    path = _write(tmp_path, project(31.0, hours=np.arange(0.0, 6.01, 0.5), noise=50.0))
    code = main(["calibrate", path, "--fit", "lines.L2.inner_diameter=15..34 mm", "--json"])
    out = json.loads(capsys.readouterr().out)
    assert code == 0, out["message"]
    p = out["parameters"]["lines.L2.inner_diameter"]
    lo, hi = p["ci95_si"]
    assert lo <= D <= hi and p["value_si"] == pytest.approx(D, rel=2e-3)
    m = out["measurements"]["gauge"]
    assert m["unit_si"] == "Pa" and m["rms_after"] < m["rms_before"] / 100


def test_a_pressure_trace_is_compared_over_its_own_span_when_the_run_ends_earlier(tmp_path, capsys):
    text = project(25.0, duration="3 h").replace('output_interval = "1 min"',
                                                 'output_interval = "1 min"\nstop_when = "drained"')
    assert main(["simulate", _write(tmp_path, text), "--json"]) == 0
    m = json.loads(capsys.readouterr().out)["measurements"]["gauge"]
    # the project's own run keeps no junction pressures: a run over the test's span is used
    assert m["compared"] == 7 and m["compared_on"] == "a run over the test's span"


def _steady_project(bore2_mm: float) -> str:
    """One steady gauge reading at the start level (the closed form at t = 0)."""
    text = project(bore2_mm)
    start = text.index("points = [")
    end = text.index("\n", start)
    return text[:start] + f'points = [ {{ value = "{gauge(0.0) / 1000:.4f} kPa" }} ]' + text[end:]


def test_a_steady_gauge_reading_at_a_junction_is_still_compared_and_fitted(tmp_path, capsys):
    path = _write(tmp_path, _steady_project(25.0))
    assert main(["simulate", path, "--json"]) == 0
    m = json.loads(capsys.readouterr().out)["measurements"]["gauge"]
    assert m["compared_on"] == "the steady solution" and m["compared"] == 1
    assert m["max_abs"] < 30.0  # the velocity heads the closed form leaves out, 24 Pa at most
    path = _write(tmp_path, _steady_project(31.0))
    code = main(["calibrate", path, "--fit", "lines.L2.inner_diameter=15..34 mm", "--json"])
    out = json.loads(capsys.readouterr().out)
    assert code == 0, out["message"]
    assert out["parameters"]["lines.L2.inner_diameter"]["value_si"] == pytest.approx(D, rel=2e-3)
    # one reading, one parameter: no interval, and the fit says so
    assert "calibration.no_interval" in [w["code"] for w in out["warnings"]]
