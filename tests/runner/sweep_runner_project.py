"""A small drain project for the sweep runner's tests (invented data), and helpers."""

from __future__ import annotations

PROJECT = """\
schema = 1

[project]
title = "Runner test tank"

[fluid]
kind = "water"
temperature = "20 degC"

[reservoirs.T1]
kind = "tank"
shape = "vertical_cylinder"
diameter = "1.2 m"
height = "2 m"
bottom_elevation = "5 m"
level = "1.5 m"
min_level = "0.05 m"

[receivers.OUT]
kind = "open_discharge"
elevation = "0.5 m"

[lines.L1]
from = "T1"
to = "OUT"
length = "15 m"
nominal_size = "2 in"
schedule = "40"
roughness = "0.045 mm"

[simulation]
duration = "20 min"
initial_state = "at_rest"
stop_when = "drained"
output_interval = "30 s"
"""

SIZES = "lines.L1.nominal_size=1 in,1.5 in,2 in,3 in"


def load_runner_project():
    from workbench.project.document import load_project_text

    return load_project_text(PROJECT, "runner.toml")


def comparable(obj):
    """A sweep JSON object without the run's wall-clock times (which differ run to run)."""
    if isinstance(obj, dict):
        return {k: comparable(v) for k, v in obj.items() if "wall" not in k}
    if isinstance(obj, list):
        return [comparable(v) for v in obj]
    return obj
