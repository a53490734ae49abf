"""``workbench check``: exit 0 valid, 1 invalid (every problem on stderr), 2 usage."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from workbench.cli import main
from workbench.cli.exit_codes import ExitCode

ROOT = Path(__file__).resolve().parents[2]
PROJECTS = sorted((ROOT / "projects").glob("*.toml"))
BROKEN = ROOT / "tests" / "project" / "broken"


def test_valid_projects_exit_zero_with_one_summary_line_each(capsys):
    code = main(["check", *map(str, PROJECTS)])
    out, err = capsys.readouterr()
    assert code == ExitCode.OK
    lines = out.strip().splitlines()
    assert len(lines) == len(PROJECTS)
    for path, line in zip(PROJECTS, lines):
        assert line.startswith(f"{path}: valid")
    assert "Traceback" not in err


def test_an_invalid_project_exits_one_with_every_problem_on_stderr(capsys):
    path = BROKEN / "several_problems.toml"
    code = main(["check", str(path)])
    out, err = capsys.readouterr()
    assert code == ExitCode.INVALID
    assert out == ""
    assert f"{path}: lines.L1.lenght: unknown key 'lenght' — did you mean 'length'?" in err
    assert f"{path}: lines.L1.to: to = 'T9' names no element" in err
    assert len(err.strip().splitlines()) >= 3


def test_a_mix_of_valid_and_invalid_files_exits_one_and_reports_both(capsys):
    code = main(["check", str(PROJECTS[0]), str(BROKEN / "unknown_unit.toml")])
    out, err = capsys.readouterr()
    assert code == ExitCode.INVALID
    assert "valid" in out and "unknown unit 'mmm'" in err


def test_check_without_a_file_is_a_usage_error(capsys):
    assert main(["check"]) == ExitCode.USAGE


def test_a_missing_file_is_reported_not_raised(capsys, tmp_path):
    code = main(["check", str(tmp_path / "none.toml")])
    assert code == ExitCode.INVALID
    assert "no such file" in capsys.readouterr().err


@pytest.mark.parametrize("path", [BROKEN / n for n in ("unknown_unit.toml", "unterminated_string.toml", "several_problems.toml")], ids=lambda p: p.stem)
def test_the_installed_command_never_prints_a_traceback(path):
    result = subprocess.run([sys.executable, "-m", "workbench", "check", str(path)],
                            capture_output=True, text=True, cwd=ROOT)
    assert result.returncode == 1
    assert "Traceback" not in result.stderr and result.stderr.strip()
