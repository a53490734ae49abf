"""The Run view offers a vented tank's gas pressure as a trend series (gauge, SI values)."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from workbench.app.trends import trend_series

DEMO = Path(__file__).resolve().parents[2] / "projects" / "fellgate_condensate_tank_vent.toml"


def test_a_vented_tank_gives_a_gas_pressure_series_and_an_open_tank_none():
    from workbench.core.transient import simulate
    from workbench.project.document import load_project

    system = load_project(DEMO).system
    result = simulate(system, duration=120.0)
    series = {key: (label, kind, values) for key, label, kind, values in trend_series(result)}
    label, kind, values = series["gas:TK-118"]
    assert kind == "pressure" and label == "gas pressure TK-118"
    assert np.array_equal(values, result.gas_pressures[0])
    assert min(values) < 0.0  # the drain pulls a vacuum (orifice law: it must)

    from dataclasses import replace

    open_tank = replace(system.reservoirs["TK-118"], vent=None)
    opened = replace(system, reservoirs={"TK-118": open_tank})
    assert not any(k.startswith("gas:") for k, *_ in trend_series(simulate(opened, duration=60.0)))


def test_the_sweep_screen_offers_a_vented_tanks_vent_keys():
    from workbench.app.screens.sweep import keypath_suggestions
    from workbench.project.document import load_project

    found = keypath_suggestions(load_project(DEMO))
    assert "reservoirs.TK-118.vent.nominal_size=" in found
    assert "reservoirs.TK-118.vent.k=" in found
    assert "reservoirs.TK-118.design_vacuum=" in found
