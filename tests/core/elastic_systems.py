"""Small systems of our own invention for the elastic-surge tests (plain SI, no files).

One place for the liquid (the water of ``builders.py``), the closing valve and the
reservoir-line-valve system that the elastic tests of the core and the app's Surge view
build (``from tests.core.elastic_systems import ...``); each test module keeps only the
defaults that are its own.
"""

from __future__ import annotations

from tests.core.builders import WATER
from workbench.core.model import (
    FluidProps,
    Line,
    Receiver,
    Reservoir,
    SurgeSettings,
    System,
    Valve,
    ValveSchedule,
)

WATER_WHOLE = FluidProps("water", 998.207, 1.0016e-3, None, 2.19e9, 293.15)
"""The same water without a vapour pressure, for checks where the liquid must stay whole."""


def closing(t_close: float, k_open: float = 62.0, position: str = "to",
            start: float = 0.0) -> Valve:
    """A linear-characteristic valve closing linearly from fully open, from ``start`` to
    ``start + t_close`` [s]; ``k_open`` its loss coefficient fully open [-].

    With ``c(x) = x`` the valve's effective area falls linearly in time (K = K0/tau^2).
    """
    return Valve("linear", k_open=k_open, opening=1.0, position=position,
                 schedule=ValveSchedule((start, start + t_close), (1.0, 0.0)))


def reservoir_line(*, length: float = 600.0, diameter: float = 0.3, head: float = 20.0,
                   valve: Valve | None = None, reaches: int = 20, fluid: FluidProps = WATER,
                   downstream: str = "air", tail: float = 0.0, name: str = "surge test",
                   **line) -> System:
    """Constant-level reservoir R1 (level ``head`` [m] over a bottom at 0 m) -> line L1
    (``length``, ``diameter`` [m], ``reaches`` elastic reaches, the valve) -> a free
    discharge OUT at 0 m, or (``downstream`` other than ``"air"``) a constant-level
    reservoir OUT at level ``tail`` [m]. ``line`` goes to :class:`Line` as it is
    (``friction_factor``, ``roughness``, ``entrance_k``, ``profile``, ``pressure_rating``).
    """
    pipe = Line("L1", "R1", "OUT", length, diameter, valve=valve,
                surge=SurgeSettings("elastic", reaches), **line)
    reservoirs = {"R1": Reservoir("R1", "constant_level", 0.0, head)}
    receivers = {}
    if downstream == "air":
        receivers["OUT"] = Receiver("OUT", "open_discharge", 0.0)
    else:
        reservoirs["OUT"] = Reservoir("OUT", "constant_level", 0.0, tail)
    return System(name, fluid, reservoirs, {}, receivers, {"L1": pipe})
