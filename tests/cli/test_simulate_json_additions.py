"""The simulate JSON's elastic additions (workbench.output.simulate_json), shared by the
``simulate`` command and the sweep runner: the elastic objects go under ``surge.ID.elastic``
beside the transient keys, the findings join the warnings, and a sweep drops the series."""

from __future__ import annotations

from pathlib import Path

import pytest

from workbench.output.simulate_json import ELASTIC_SERIES, add_elastic_json, drop_elastic_series


def test_no_elastic_results_leave_the_object_as_it_was() -> None:
    out = {"surge": {"L1": {"joukowsky_pa": 1.0}}, "warnings": []}
    assert add_elastic_json(out, {}) == {"surge": {"L1": {"joukowsky_pa": 1.0}}, "warnings": []}


def test_dropping_the_series_keeps_the_envelope_and_the_transient_keys() -> None:
    elastic = {key: [0.0, 1.0] for key in ELASTIC_SERIES} | {"max_pressure_pa": 5.0e5}
    out = {"surge": {"L1": {"joukowsky_pa": 1.0, "elastic": elastic}, "L2": {"joukowsky_pa": 2.0}}}
    drop_elastic_series(out)
    assert out["surge"]["L1"] == {"joukowsky_pa": 1.0, "elastic": {"max_pressure_pa": 5.0e5}}
    assert out["surge"]["L2"] == {"joukowsky_pa": 2.0}


@pytest.mark.slow
def test_an_elastic_run_adds_its_object_under_the_lines_surge_key() -> None:
    from workbench.core.elastic import elastic_line_ids, run_elastic
    from workbench.project.document import load_project

    project = load_project(Path(__file__).resolve().parents[2] / "projects"
                           / "fellgate_process_water_transfer.toml")
    system = project.system
    ids = elastic_line_ids(system, [next(iter(system.lines))])
    results = run_elastic(system, ids, max_duration=2.0)
    out = add_elastic_json({"surge": {}, "warnings": []}, results)
    assert set(out["surge"]) == set(results)
    for lid in results:
        assert "elastic" in out["surge"][lid]
        assert set(ELASTIC_SERIES) <= set(out["surge"][lid]["elastic"])
