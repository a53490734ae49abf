"""Every small broken file in tests/project/broken/ is refused with the words it names.

Each file starts with ``# expect: words | more words``; every part must appear in the
problems reported, and loading must raise ProjectError (never another exception).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from workbench.project.document import ProjectError, load_project

BROKEN = Path(__file__).parent / "broken"
CASES = sorted(BROKEN.glob("*.toml"))


def expected_words(path: Path) -> list[str]:
    first = path.read_text(encoding="utf-8").splitlines()[0]
    assert first.startswith("# expect:"), f"{path.name} must start with '# expect: ...'"
    return [part.strip() for part in first.removeprefix("# expect:").split("|")]


def test_there_are_broken_cases_to_check():
    assert len(CASES) >= 20


@pytest.mark.parametrize("path", CASES, ids=[p.stem for p in CASES])
def test_a_broken_file_is_refused_with_a_message_naming_the_problem(path: Path):
    with pytest.raises(ProjectError) as info:
        load_project(path)
    report = str(info.value)
    for words in expected_words(path):
        assert words in report, f"{path.name}: {words!r} not in:\n{report}"
    assert all(p.file == str(path) for p in info.value.problems)


def test_every_problem_in_a_file_is_reported_at_once():
    with pytest.raises(ProjectError) as info:
        load_project(BROKEN / "several_problems.toml")
    keys = {p.key for p in info.value.problems}
    assert {"lines.L1.lenght", "reservoirs.T1.level", "lines.L1.to"} <= keys


def test_a_problem_knows_the_line_of_its_key():
    with pytest.raises(ProjectError) as info:
        load_project(BROKEN / "unknown_unit.toml")
    (problem,) = info.value.problems
    lines = (BROKEN / "unknown_unit.toml").read_text().splitlines()
    assert lines[problem.line - 1].startswith("length = ")


def test_a_syntax_error_gives_line_and_column():
    with pytest.raises(ProjectError) as info:
        load_project(BROKEN / "unterminated_string.toml")
    (problem,) = info.value.problems
    assert (problem.line, problem.column) == (14, 15)
    assert str(problem).startswith(f"{BROKEN / 'unterminated_string.toml'}:14:15: ")


@pytest.mark.parametrize("content, words", [
    (b"\xff\xfe not utf-8", "not UTF-8"),
    (b"", "missing required key 'schema'"),
    (b"schema = 'one'", "expected the whole number 1"),
    (b"schema = 1\nproject = 3\n", "project: expected a table"),
])
def test_files_that_are_not_projects_at_all_are_refused_in_words(tmp_path, content, words):
    path = tmp_path / "bad.toml"
    path.write_bytes(content)
    with pytest.raises(ProjectError) as info:
        load_project(path)
    assert words in str(info.value)


def test_a_missing_file_is_a_project_error(tmp_path):
    with pytest.raises(ProjectError, match="no such file"):
        load_project(tmp_path / "absent.toml")
