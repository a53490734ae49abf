"""The workbench starts on every demo as ``workbench open`` builds it, and shows its first result.

A smoke check (marker ``smoke``): CI also runs it against the lowest dependency versions that
pyproject.toml allows. The flows the app shows must be the flows of the CLI's steady solve of
the same file, which is checked against closed forms in tests/cli/test_demo_smoke.py.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.app.conftest import PROJECTS, SIZE, settle

pytestmark = pytest.mark.smoke

DEMOS = sorted(PROJECTS.glob("*.toml"))


@pytest.mark.parametrize("demo", DEMOS, ids=[p.stem for p in DEMOS])
async def test_the_app_built_as_the_cli_builds_it_opens_a_demo_and_solves_it(demo, tmp_path):
    from workbench.app.factory import make_app
    from workbench.core.network import solve_steady
    from workbench.project.document import load_project

    for source in PROJECTS.iterdir():  # a demo may read a file beside it (a level log)
        if source.is_file():
            (tmp_path / source.name).write_bytes(source.read_bytes())
    path = tmp_path / demo.name
    app = make_app(path=path, debounce=0.05, prebuild_forms=False, solve_ahead=True)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, timeout=120.0)
        status = app.steady_status
        flows = {name: line.flow for name, line in app.steady.lines.items()}
    expected = solve_steady(load_project(Path(path)).system)
    assert status == "fresh"
    assert flows and set(flows) == set(expected.lines)
    for name, flow in flows.items():
        assert flow == pytest.approx(expected.lines[name].flow, rel=1e-9), name
