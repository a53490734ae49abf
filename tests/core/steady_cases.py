"""Small systems of our own invention for the steady-hydraulics tests (plain SI, no files)."""

from __future__ import annotations

from workbench.core.model import (
    Fitting,
    FluidProps,
    Junction,
    Line,
    Reservoir,
    System,
    Valve,
)

WATER_20C = FluidProps(
    name="water", density=998.207, viscosity=1.0016e-3, vapor_pressure=2339.2,
    temperature=293.15,
)
"""Water at 20 °C, 0.101325 MPa (IAPWS-95 / IAPWS 2008 values from HYDRAULICS.md)."""


def tank(rid: str, bottom: float, level: float, pressure: float = 0.0) -> Reservoir:
    return Reservoir(id=rid, kind="constant_level", bottom_elevation=bottom, level=level,
                     surface_pressure=pressure)


def pipe(lid: str, a: str, b: str, length: float, diameter: float, roughness: float = 4.5e-5,
         **kw) -> Line:
    return Line(id=lid, from_node=a, to_node=b, length=length, diameter=diameter,
                roughness=roughness, **kw)


def make_system(reservoirs=(), junctions=(), receivers=(), lines=(), fluid=WATER_20C,
                title="test plant", **kw) -> System:
    return System(
        title=title,
        fluid=fluid,
        reservoirs={r.id: r for r in reservoirs},
        junctions={j.id: j for j in junctions},
        receivers={r.id: r for r in receivers},
        lines={ln.id: ln for ln in lines},
        **kw,
    )


def three_reservoirs() -> System:
    """A supply tank feeding two process tanks through a junction (our own scenario)."""
    return make_system(
        reservoirs=[tank("head_tank", 30.0, 5.0), tank("mix_tank", 20.0, 2.0),
                    tank("day_tank", 5.0, 3.0)],
        junctions=[Junction("J1", 10.0)],
        lines=[
            pipe("L1", "head_tank", "J1", 300.0, 0.15,
                 fittings=(Fitting(type="elbow_90_standard", count=3),)),
            pipe("L2", "mix_tank", "J1", 200.0, 0.10),
            pipe("L3", "J1", "day_tank", 400.0, 0.125,
                 valve=Valve(characteristic="equal_percentage", k_open=0.2, opening=0.8)),
        ],
    )
