"""Bad files never crash, hang or answer nonsense: fuzzing check, solve and simulate.

Every case must end with exit 0 and a result (JSON with only finite numbers) or exit 1 and
the project's own message, which starts with the file name (``FILE: KEY: MESSAGE``). Never
a traceback, another exit code, an exception escaping ``main`` or a call past its time
limit (see :mod:`tests.hardening.harness`).

Budget: ``WORKBENCH_FUZZ_CASES`` (default 240) mutated demo files run through ``check`` and
``solve``, one in four also through ``simulate`` with a short ``--duration``; hypothesis
draws ``WORKBENCH_FUZZ_CASES // 4`` generated projects (valid and damaged). The files of
several megabytes run ``WORKBENCH_FUZZ_HEAVY`` cases (default 2). For a long hunt:
``WORKBENCH_FUZZ_CASES=5000 WORKBENCH_FUZZ_HEAVY=20 .venv/bin/python -m pytest tests/hardening``
(see the README, "Reference: error messages"). Mutation cases are seeded: a failure names its seed and mutation;
``WORKBENCH_FUZZ_START`` sets the first seed.
"""

from __future__ import annotations

import os
from collections import defaultdict
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings

from tests.hardening.harness import Outcome, judge, run_batch, run_cli, run_subprocess, simulate_argv
from tests.hardening.mutations import Case, mutate
from tests.hardening.strategies import damaged_projects, to_toml, valid_projects

CASES = int(os.environ.get("WORKBENCH_FUZZ_CASES", "240"))
#: First seed of the mutation cases (a long hunt can start where the last one stopped).
START = int(os.environ.get("WORKBENCH_FUZZ_START", "0"))
HEAVY = int(os.environ.get("WORKBENCH_FUZZ_HEAVY", "2"))
#: Time limit per call for the files of several megabytes [s]: Python's own TOML reader
#: takes several seconds for 5 MB on a busy machine; a hang is what never ends.
HEAVY_LIMIT = 120.0
CHUNK = 40
SIMULATE_EVERY = 4


def _write(folder: Path, case: Case) -> str:
    path = folder / "case.toml"
    path.write_text(case.text, encoding="utf-8", newline="")
    return str(path)


def _run_case(folder: Path, case: Case, *, simulate: bool, limit: float | None = None) -> list:
    path = _write(folder, case)
    outcomes = [run_cli(["check", path], project_path=path, limit=limit),
                run_cli(["solve", path, "--json"], project_path=path, limit=limit)]
    if simulate:
        outcomes.append(run_cli(simulate_argv(path, "5 s"), project_path=path))
        outcomes.append(_format_keeps_the_data(path, limit))
    if "'simulation'" in case.name:  # the file's own [simulation] settings were damaged
        outcomes.append(run_cli(["simulate", path, "--json"], project_path=path, limit=limit))
    return outcomes


def _same(data):
    """Data with NaN made comparable (NaN is not equal to itself)."""
    if isinstance(data, dict):
        return {k: _same(v) for k, v in data.items()}
    if isinstance(data, list):
        return [_same(v) for v in data]
    if isinstance(data, float) and data != data:
        return "nan"
    return data


def _format_keeps_the_data(path: str, limit: float | None):
    """``format`` on a damaged file: a message, or the same data in canonical form, twice."""
    import tomllib

    before = Path(path).read_text(encoding="utf-8")
    outcome = run_cli(["format", path], project_path=path, limit=limit)
    if outcome.ok and outcome.code == 0:
        after = Path(path).read_text(encoding="utf-8")
        if _same(tomllib.loads(after)) != _same(tomllib.loads(before.removeprefix("\ufeff"))):
            outcome.problems.append("format changed the data")
        elif run_cli(["format", "--check", path], limit=limit).code != 0:
            outcome.problems.append("format is not idempotent")
    elif outcome.ok and Path(path).read_text(encoding="utf-8") != before:
        outcome.problems.append("format refused the file but rewrote it")
    return outcome


def _assert_all_ended_well(failures: dict) -> None:
    if failures:
        lines = [f"{len(failures)} distinct failure(s):"]
        for signature, items in failures.items():
            name, outcome = items[0]
            lines.append(f"- {signature} ({len(items)} case(s)), e.g. {name}\n{outcome.report()}")
        pytest.fail("\n".join(lines), pytrace=False)


@pytest.mark.parametrize("start", range(0, CASES, CHUNK))
def test_mutated_demo_files_end_in_a_result_or_a_message(tmp_path, start):
    failures: dict = defaultdict(list)
    ran = 0
    for seed in range(START + start, START + min(start + CHUNK, CASES)):
        case = mutate(seed)
        for outcome in _run_case(tmp_path, case, simulate=seed % SIMULATE_EVERY == 0):
            ran += 1
            if not outcome.ok:
                failures[outcome.signature()].append((case.name, outcome))
    assert ran >= 2 * min(CHUNK, CASES - start)
    _assert_all_ended_well(failures)


@pytest.mark.slow
@pytest.mark.parametrize("seed", range(HEAVY))
def test_files_of_several_megabytes_end_in_a_result_or_a_message(tmp_path, seed):
    case = mutate(10_000 + seed, heavy=True)
    assert len(case.text) > 1_000_000 or "junctions" in case.name
    failures: dict = defaultdict(list)
    for outcome in _run_case(tmp_path, case, simulate=False, limit=HEAVY_LIMIT):
        if not outcome.ok:
            failures[outcome.signature()].append((case.name, outcome))
    _assert_all_ended_well(failures)


@pytest.mark.slow
def test_a_damaged_file_is_refused_in_a_real_process_without_a_traceback(tmp_path):
    """A few cases through a real process, what a user on a shell actually sees: one
    ``python -m workbench`` and the rest in one process (``run_batch``, the bytes written
    to its pipes and the exit codes; one start-up instead of nine)."""
    picked = [mutate(seed) for seed in (1, 2)] + [mutate(10_000, heavy=True)]
    runs, names = [], []
    for i, case in enumerate(picked):
        path = str(tmp_path / f"case{i}.toml")
        Path(path).write_text(case.text, encoding="utf-8", newline="")
        for argv in (["check", path], ["solve", path, "--json"], simulate_argv(path, "2 s")):
            runs.append(argv)
            names.append((case.name, path))
    first = run_subprocess(runs[0], project_path=names[0][1])
    assert first.ok, f"{names[0][0]}\n{first.report()}"
    env = dict(os.environ, NO_COLOR="1", PYTHONUTF8="1")
    for (name, path), done in zip(names, run_batch(runs, tmp_path / "codes.json", env=env)):
        outcome = judge(Outcome(done.args, done.returncode, done.stdout.decode("utf-8", "replace"),
                                done.stderr.decode("utf-8", "replace"), 0.0), path)
        assert outcome.ok, f"{name}\n{outcome.report()}"


@settings(max_examples=max(CASES // 4, 20), deadline=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture,
                                 HealthCheck.data_too_large])
@given(damaged=damaged_projects())
def test_generated_damaged_projects_end_in_a_result_or_a_message(tmp_path, damaged):
    data, label = damaged
    path = _write(tmp_path, Case(label, to_toml(data)))
    for argv in (["check", path], ["solve", path, "--json"]):
        outcome = run_cli(argv, project_path=path)
        assert outcome.ok, f"{label}\n{outcome.report()}"


@settings(max_examples=max(CASES // 8, 10), deadline=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(data=valid_projects())
def test_generated_valid_projects_solve_and_simulate_with_finite_results(tmp_path, data):
    path = _write(tmp_path, Case("valid", to_toml(data)))
    check = run_cli(["check", path], project_path=path)
    assert check.ok and check.code == 0, check.report()
    for argv in (["solve", path, "--json"], simulate_argv(path, "3 s")):
        outcome = run_cli(argv, project_path=path)
        assert outcome.ok, outcome.report()


def test_odd_ids_and_long_strings_render_in_the_tables_and_plots(tmp_path):
    """The readable output (rich tables, terminal plots), not only JSON, survives unicode,
    control characters and very long strings in ids and texts."""
    cases = [c for c in (mutate(seed) for seed in range(START, START + 400))
             if "rename" in c.name or "long string" in c.name][: max(CASES // 40, 6)]
    assert cases
    failures: dict = defaultdict(list)
    for case in cases:
        path = _write(tmp_path, case)
        for argv in (["solve", path], ["simulate", path, "--duration", "2 s", "--plot"]):
            outcome = run_cli(argv, project_path=path)
            if not outcome.ok:
                failures[outcome.signature()].append((case.name, outcome))
    _assert_all_ended_well(failures)
