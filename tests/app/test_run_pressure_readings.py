"""A site test's gauge pressure at a junction, held against the run in the Run view (F5).

The project and its readings come from tests/cli/test_calibrate_pressure.py: the readings
are the closed form of a laminar drain through two lines in series (Hagen-Poiseuille, the
junction's gauge pressure ``rho g (H R2/(R1+R2) - z_J)``, derived in
tests/core/test_calibration_pressure.py), so the model's residuals on them are a few
pascals against readings of tens of kilopascals.
"""

from __future__ import annotations

import numpy as np

from tests.app.conftest import SIZE, make, run_to_end, settle
from tests.cli.test_calibrate_pressure import gauge, project


async def test_the_run_keeps_the_gauged_junction_and_f5_shows_its_readings_and_residuals(tmp_path):
    from textual.widgets import SelectionList

    from workbench.output.measurements import compare_measurements
    from workbench.project.document import load_project
    from workbench.project.units import format_quantity

    path = tmp_path / "gauge.toml"
    path.write_text(project(25.0), encoding="utf-8")
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        assert app.run_status == "done"
        assert list(app.transient.junction_ids) == ["J"]  # kept because a test reads J
        box = app.screen.query_one("#run-series", SelectionList)
        keys = [box.get_option_at_index(i).value for i in range(box.option_count)]
        assert "pressure:J" in keys  # a trend the user can choose
        box.focus()
        box.highlighted = keys.index("pressure:J")
        await pilot.press("space")
        await pilot.pause()
        legend = str(app.screen.query_one("#run-legend").render())
        # the same residuals as simulate's table (model minus reading, on this run)
        (found,) = compare_measurements(load_project(path), app.transient)
        assert found.compared_on == "this run"
        rms = format_quantity(found.rms, "pressure", "SI", 3)
        assert f"gauge measured [kPa, right], residual RMS {rms}" in legend
        # against the closed form: the model follows the readings to well under 1 %
        assert found.rms < 0.01 * float(np.max(gauge(found.times)))


async def test_a_project_without_a_pressure_test_keeps_no_junction_pressures(tmp_path):
    text = project(25.0)
    text = text[:text.index("[measurements.gauge]")]  # no site test
    path = tmp_path / "plain.toml"
    path.write_text(text, encoding="utf-8")
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await run_to_end(pilot)
        assert app.run_status == "done"
        assert len(app.transient.junction_ids) == 0
