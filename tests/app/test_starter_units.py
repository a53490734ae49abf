"""A new project started in the workbench with ``--units US`` gets the US starter's figures."""

from __future__ import annotations

import pytest


@pytest.mark.parametrize("units, diameter_text", [("SI", "3 m"), ("US", "10 ft")])
def test_the_new_project_is_written_in_the_chosen_units(units, diameter_text):
    from workbench.app import jobs

    project = jobs.load_starter(units)
    assert project.unit_system == units
    assert f'diameter = "{diameter_text}"' in project.text
