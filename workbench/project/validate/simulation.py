"""``[simulation]``: the run's duration, initial state, stop condition and output interval."""

from __future__ import annotations

from workbench.core import model as m
from workbench.project.schema import SECTIONS
from workbench.project.validate.checker import Checker, field_spec

__all__ = ["check_simulation"]


def check_simulation(c: Checker, data: dict, has_tank: bool) -> m.SimulationSettings | None:
    if "simulation" not in data:
        return None
    s = c.table(data["simulation"], "simulation")
    if s is None:
        return None
    n0 = len(c.problems)
    c.known_keys(s, SECTIONS["simulation"], "simulation")
    duration = c.quantity(s, "duration", "time", "simulation", positive=True)
    initial = c.choice(s, field_spec("simulation", "initial_state"), "simulation")
    stop = c.choice(s, field_spec("simulation", "stop_when"), "simulation")
    interval = c.quantity(s, "output_interval", "time", "simulation", positive=True)
    if stop == "drained" and not has_tank:
        c.add("simulation.stop_when", "stop_when = \"drained\" needs at least one reservoir "
              "with kind = \"tank\"")
    if interval is not None and duration is not None and interval > duration:
        c.add("simulation.output_interval", "the output interval is longer than the duration")
    if len(c.problems) > n0 or duration is None:
        return None
    return m.SimulationSettings(duration=duration, initial_state=initial or "steady",
                                stop_when=stop, output_interval=interval)

