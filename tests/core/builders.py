"""Shared builders of the core tests: the water most of them use and a system put together
from lists of its elements (plain SI, no files; systems of our own invention).

The steady tests' own builders are in ``steady_cases.py``, the elastic ones in
``elastic_systems.py`` (which takes its water from here).
"""

from __future__ import annotations

import math

from workbench.core.model import FluidProps, SimulationSettings, System

WATER = FluidProps("water", 998.207, 1.0016e-3, 2339.2, 2.19e9, 293.15)
"""Water at 20 degC: density IAPWS-95, viscosity IAPWS 2008, vapour pressure IAPWS IF97
(HYDRAULICS.md table); bulk modulus 2.19 GPa (common practice, no source)."""


def circle_area(diameter: float) -> float:
    """Area of a circle of ``diameter`` [m]: pi d^2/4 [m^2]."""
    return math.pi * diameter * diameter / 4.0


def transient_system(reservoirs, lines, receivers=(), junctions=(), fluid=WATER,
                     duration=100.0, initial="steady", stop_when=None, interval=None,
                     title="test") -> System:
    """A :class:`System` of the given elements (each keyed by its id) with a simulation of
    ``duration`` [s] from ``initial`` ("steady" or "at_rest"), stopping ``stop_when`` and
    sampled every ``interval`` [s] (``None``: the default)."""
    return System(
        title, fluid,
        {r.id: r for r in reservoirs}, {j.id: j for j in junctions},
        {r.id: r for r in receivers}, {ln.id: ln for ln in lines},
        simulation=SimulationSettings(duration, initial, stop_when, interval),
    )
