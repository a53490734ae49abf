"""One sweep case as a task: it pickles (so it can travel to a worker process or a cluster
worker), each worker loads a base project once and keeps it keyed by the text's hash, and a
task's answer is the in-process answer."""

from __future__ import annotations

import pickle

import pytest
from sweep_runner_project import PROJECT, load_runner_project

from workbench.sweep_runner import case as case_module
from workbench.sweep_runner.case import SweepTask, cached_project, run_task, solve_case


@pytest.fixture
def runner_project():
    return load_runner_project()


@pytest.fixture
def counted_loads(monkeypatch):
    """Count the project loads behind the worker cache (which starts empty)."""
    from workbench.project import document

    monkeypatch.setattr(case_module, "_PROJECTS", type(case_module._PROJECTS)())
    calls = []
    real = document.load_project_text

    def load(text, name):
        calls.append(name)
        return real(text, name)

    monkeypatch.setattr(document, "load_project_text", load)
    return calls


def test_a_task_survives_pickling_unchanged() -> None:
    task = SweepTask(PROJECT, "runner.toml", (("lines.L1.nominal_size", "3 in"),), True)
    assert pickle.loads(pickle.dumps(task)) == task


def test_a_worker_loads_each_base_project_once_and_keeps_it(counted_loads) -> None:
    first = cached_project(PROJECT, "runner.toml")
    again = cached_project(PROJECT, "runner.toml")
    assert again is first and counted_loads == ["runner.toml"]
    other = cached_project(PROJECT.replace("1.5 m", "1.4 m"), "runner.toml")
    assert other is not first and len(counted_loads) == 2
    assert other.system.reservoirs["T1"].level == pytest.approx(1.4)


def test_the_cache_keeps_only_the_most_recent_projects(counted_loads) -> None:
    texts = [PROJECT.replace('"15 m"', f'"{15 + i} m"') for i in range(case_module.PROJECT_CACHE_SIZE + 1)]
    for text in texts:
        cached_project(text, "runner.toml")
    cached_project(texts[0], "runner.toml")  # dropped as the oldest: loaded again
    assert len(counted_loads) == len(texts) + 1


def test_a_task_gives_the_answer_of_solving_the_case_here(counted_loads, runner_project) -> None:
    settings = (("lines.L1.nominal_size", "3 in"),)
    steady, sim, error = run_task(SweepTask(PROJECT, "runner.toml", settings, False))
    here = solve_case(runner_project, settings, False)
    assert error is None and sim is None
    assert steady == here[0]
    assert steady["lines"]["L1"]["flow_m3_s"] > 0.0


def test_a_bad_value_in_a_task_is_reported_as_the_cases_error() -> None:
    steady, sim, error = run_task(SweepTask(PROJECT, "runner.toml",
                                            (("lines.L1.length", "-3 m"),), False))
    assert steady is None and sim is None
    assert "lines.L1.length" in error
